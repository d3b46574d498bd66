#!/usr/bin/env node
// Builds what the package ships:
//   wasm  assembly/ -> build/gatesmith.wasm and build/gatesmith-fused.wasm (bin/unroll.js
//         expands the kernel templates, then AssemblyScript, release target, twice)
//   lib   src/core, src/io, src/cli and the entries src/index.ts, src/node.ts -> dist/, ES
//         modules with .d.ts files (tsc). tsc rewrites the sources' `.ts` import specifiers
//         to `.js` in the JavaScript but not in the declarations, so they are rewritten here.
// `node scripts/build.js wasm lib` builds both; `--if-stale` skips a part whose output is
// newer than every source (npm runs `prepare` right after `prepack` when packing). dist/ is
// built in a fresh folder and swapped in, so that a reader never sees half of it.
import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
// The core's two builds from the same sources (src/core/wasm.ts CORE_FILES): portable (the
// same bits on every engine) and fused (relaxed SIMD: a * b + c in one rounding where the
// CPU can; assembly/su2.ts vmad).
const WASM_BUILDS = [
  { file: 'build/gatesmith.wasm', text: 'build/gatesmith.wat' },
  { file: 'build/gatesmith-fused.wasm', text: 'build/gatesmith-fused.wat', enable: 'relaxed-simd' },
];
const require = createRequire(import.meta.url);
const args = process.argv.slice(2);
const ifStale = args.includes('--if-stale');
const parts = args.filter((a) => !a.startsWith('--'));

for (const part of parts.length > 0 ? parts : ['wasm', 'lib']) {
  if (part === 'wasm') {
    const sources = ['assembly', 'asconfig.json', 'bin/unroll.js'];
    if (ifStale && WASM_BUILDS.every(({ file }) => newerThanSources(join(root, file), sources))) continue;
    // The kernel templates expand into assembly/generated/ first (bin/unroll.js).
    execFileSync(process.execPath, ['bin/unroll.js'], { stdio: 'inherit', cwd: root });
    const asc = join(require.resolve('assemblyscript/package.json'), '..', 'bin/asc.js');
    for (const { file, text, enable } of WASM_BUILDS) {
      const args = [asc, 'assembly/index.ts', '--config', 'asconfig.json', '--target', 'release', '--outFile', file, '--textFile', text];
      execFileSync(process.execPath, enable ? [...args, '--enable', enable] : args, { stdio: 'inherit', cwd: root });
    }
  } else if (part === 'lib') {
    if (ifStale && newerThanSources(join(root, 'dist/index.js'), ['src/core', 'src/io', 'src/cli', 'src/index.ts', 'src/node.ts', 'tsconfig.build.json', 'tsconfig.json'])) continue;
    buildLib();
  } else {
    throw new Error(`unknown part "${part}": wasm or lib`);
  }
}

function buildLib() {
  const out = join(root, `dist.build-${process.pid}`);
  const tsc = require.resolve('typescript/bin/tsc');
  rmSync(out, { recursive: true, force: true });
  execFileSync(process.execPath, [tsc, '-p', join(root, 'tsconfig.build.json'), '--outDir', out], { stdio: 'inherit', cwd: root });
  // `from './x.ts'` and `import('./x.ts')` in declarations -> `.js` (relative paths only).
  const relativeTs = /((?:from\s+|import\()\s*['"])(\.{1,2}\/[^'"]+)\.ts(['"])/g;
  for (const file of walk(out)) {
    if (!file.endsWith('.d.ts')) continue;
    const text = readFileSync(file, 'utf8');
    const fixed = text.replace(relativeTs, '$1$2.js$3');
    if (fixed !== text) writeFileSync(file, fixed);
  }
  const dist = join(root, 'dist');
  const old = join(root, `dist.old-${process.pid}`);
  if (existsSync(dist)) renameSync(dist, old);
  renameSync(out, dist);
  rmSync(old, { recursive: true, force: true });
}

/** True when `output` exists and is newer than every file under `sources` (paths from the root). */
function newerThanSources(output, sources) {
  if (!existsSync(output)) return false;
  const built = statSync(output).mtimeMs;
  for (const source of sources) {
    const path = join(root, source);
    if (!existsSync(path)) continue;
    const files = statSync(path).isDirectory() ? [...walk(path)] : [path];
    if (files.some((f) => statSync(f).mtimeMs > built)) return false;
  }
  return true;
}

function* walk(dir) {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) yield* walk(path);
    else yield path;
  }
}
