// The package as a lab installs it: `npm pack` in a clean copy of the sources (the prepack
// script builds the wasm and dist/ there), then `npm install ./gatesmith-*.tgz` in an empty
// project, which must then import the library in .mjs and in strict TypeScript (its own
// types, no DOM library) and run `npx gatesmith` with no TypeScript loader installed.
// Figures are checked against the plain-TypeScript oracle of tests/reference
// (docs/physics.md sections 1 and 2).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { cpSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { memberInfidelity, normalisedWeights } from '../reference/oracle.ts';
import type { Member, Pulse, Target } from '../../src/core/types.ts';
import { expectClose } from '../reference/tolerance.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const PKG = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
let tmp: string;
let project: string;
let tarball: string;

const sh = (command: string, args: string[], cwd: string): string =>
  execFileSync(command, args, { cwd, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, npm_config_update_notifier: 'false' } });

beforeAll(() => {
  tmp = mkdtempSync(join(tmpdir(), 'gatesmith-pack-'));
  // A clean copy of what git would check out (tracked and new files, not ignored ones).
  const copy = join(tmp, 'checkout');
  const files = sourceFiles();
  for (const f of files) {
    try {
      mkdirSync(dirname(join(copy, f)), { recursive: true });
      cpSync(join(ROOT, f), join(copy, f));
    } catch (error) {
      if ((error as { code?: string }).code !== 'ENOENT') throw error; // deleted but not yet committed
    }
  }
  symlinkSync(join(ROOT, 'node_modules'), join(copy, 'node_modules'));
  sh('npm', ['pack', '--pack-destination', tmp], copy);
  tarball = join(tmp, readdirSync(tmp).find((f) => f.endsWith('.tgz'))!);
  project = join(tmp, 'lab');
  mkdirSync(project);
  writeFileSync(join(project, 'package.json'), JSON.stringify({ name: 'lab', private: true, type: 'module' }));
  // No network is needed: the package has no runtime dependencies.
  sh('npm', ['install', '--offline', '--no-audit', '--no-fund', tarball], project);
}, 300_000);
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** The checkout's files as git sees them; outside a git checkout, all but build output and installs. */
function sourceFiles(): string[] {
  try {
    return sh('git', ['ls-files', '-z', '--cached', '--others', '--exclude-standard'], ROOT).split('\0').filter((f) => f !== '');
  } catch {
    const skip = new Set(['node_modules', 'dist', 'build', 'test-results', '.git']);
    const walk = (rel: string): string[] =>
      readdirSync(join(ROOT, rel), { withFileTypes: true }).flatMap((e) => {
        const path = rel === '' ? e.name : `${rel}/${e.name}`;
        if (skip.has(path)) return [];
        return e.isDirectory() ? walk(path) : [path];
      });
    return walk('');
  }
}

describe('npm pack', () => {
  it('ships the compiled library, the command and the wasm core, and no sources or tests', () => {
    const list = sh('tar', ['-tzf', tarball], tmp).split('\n').filter((l) => l !== '');
    for (const f of ['package/dist/index.js', 'package/dist/index.d.ts', 'package/dist/cli/main.js', 'package/dist/core/design-thread.js', 'package/build/gatesmith.wasm', 'package/build/gatesmith-fused.wasm', 'package/bin/gatesmith.js', 'package/README.md']) {
      expect(list, f).toContain(f);
    }
    expect(list.filter((f) => /^package\/(src|tests|assembly|bench)\//.test(f))).toEqual([]);
    expect(list.filter((f) => f.endsWith('.ts') && !f.endsWith('.d.ts'))).toEqual([]);
  });

  it('installs with no runtime dependencies; comlink and tsx are not among them', () => {
    const installed = JSON.parse(readFileSync(join(project, 'node_modules/gatesmith/package.json'), 'utf8'));
    expect(installed.dependencies ?? {}).toEqual({});
    expect(installed.engines.node).toBe('>=20.16'); // process.getBuiltinModule arrived in Node 20.16
    expect(readdirSync(join(project, 'node_modules')).sort()).toEqual(['.bin', '.package-lock.json', 'gatesmith']);
  });
});

describe('the installed package', () => {
  it('import { design, evaluate, robustnessMap } from "gatesmith" works in .mjs; figures agree with the oracle', () => {
    writeFileSync(join(project, 'use.mjs'), `
import { design, evaluate, robustnessMap } from 'gatesmith';
import { readFileSync } from 'node:fs';
const spec = JSON.parse(readFileSync('node_modules/gatesmith/examples/transmon-x90.json', 'utf8'));
const small = { ...spec, optimizer: { ...spec.optimizer, starts: 1, maxIterations: 40 } };
const result = await design(small);
const ev = evaluate(small, result.pulse);
const map = robustnessMap({ kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 }, result.pulse, { min: -1e6, max: 1e6, points: 3 }, { min: 0, max: 0, points: 1 });
console.log(JSON.stringify({ dt: result.pulse.dt, i: [...result.pulse.i], q: [...result.pulse.q], ev, map: [...map.infidelity] }));
`);
    const out = JSON.parse(sh(process.execPath, ['use.mjs'], project));
    const pulse: Pulse = { dt: out.dt, i: Float64Array.from(out.i), q: Float64Array.from(out.q), metadata: {} };
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    // The spec's 5 x 5 grid (docs/spec.md): detuning -1..1 MHz, amplitude error -0.1..0.1.
    const members: Member[] = [];
    for (let a = 0; a < 5; a++) for (let d = 0; d < 5; d++) members.push({ detuning: -1e6 + 5e5 * d, amplitudeError: -0.1 + 0.05 * a, weight: 1 });
    const w = normalisedWeights(members);
    const oracleMean = members.reduce((sum, m, k) => sum + w[k] * memberInfidelity(target, pulse, m), 0);
    expectClose(out.ev.meanInfidelity, oracleMean, { rel: 1e-9 }, 'mean infidelity against the oracle');
    for (const [k, det] of [-1e6, 0, 1e6].entries()) {
      expectClose(out.map[k], memberInfidelity(target, pulse, { detuning: det, amplitudeError: 0, weight: 1 }), { rel: 1e-9, abs: 1e-15 }, `map point ${k}`);
    }
  });

  it('strict TypeScript with only Node types checks against the shipped .d.ts, and a misuse is a type error', () => {
    writeFileSync(join(project, 'tsconfig.json'), JSON.stringify({
      compilerOptions: {
        strict: true, module: 'nodenext', moduleResolution: 'nodenext', target: 'es2022', lib: ['es2022'], noEmit: true,
        types: ['node'], typeRoots: [join(ROOT, 'node_modules/@types')], skipLibCheck: false,
      },
      include: ['*.ts'],
    }));
    writeFileSync(join(project, 'use.ts'), `
import { design, evaluate, robustnessMap, type DesignResult, type Evaluation, type Pulse } from 'gatesmith';
import { exportWaveform, encodeWaveform } from 'gatesmith/export';
import { designInThreads, readWaveformFile } from 'gatesmith/node';
const spec = { target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: 2e-7, segments: 100, rabiMax: 1e7 };
const result: DesignResult = await design(spec, { onProgress: (p) => void p.meanInfidelity });
const pulse: Pulse = result.pulse;
const ev: Evaluation = evaluate(spec, pulse);
// @ts-expect-error evaluate needs the pulse: the types are real, not any
evaluate(spec);
const waveform = exportWaveform(pulse, { sampleRate: 2e9, bits: 14, fullScale: 1e7 });
console.log(ev.worstIndex, robustnessMap, designInThreads, readWaveformFile, waveform.description.length, encodeWaveform);
`);
    const tsc = spawnSync(process.execPath, [join(ROOT, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.json'], { cwd: project, encoding: 'utf8' });
    expect(tsc.stdout + tsc.stderr).toBe('');
    expect(tsc.status).toBe(0);
  });

  it("the README's library snippets run as written in the user's project (design, then export)", () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    const jsBlock = (after: string): string => {
      const from = readme.indexOf(after);
      expect(from, after).toBeGreaterThanOrEqual(0);
      const m = /```js\n([\s\S]*?)```/.exec(readme.slice(from));
      return m![1];
    };
    const library = jsBlock('The same functions are a library, and');
    expect(library).toContain("from 'gatesmith'");
    writeFileSync(join(project, 'readme-library.mjs'), library);
    const [mean, worstOnMap] = sh(process.execPath, ['readme-library.mjs'], project).trim().split('\n').pop()!.split(' ').map(Number);
    // The demo's figure (README, Performance: mean infidelity 3.0e-4 on its 5 x 5 ensemble).
    expect(mean).toBeLessThan(4e-4);
    expect(worstOnMap).toBeGreaterThan(mean); // the map reaches twice the ensemble's range
    const exporting = jsBlock('### From the library');
    expect(exporting).toContain("from 'gatesmith/export'");
    writeFileSync(join(project, 'readme-export.mjs'), exporting);
    const [peakCode, exportedMean, samples] = sh(process.execPath, ['readme-export.mjs'], project).trim().split(' ').map(Number);
    expect(peakCode).toBeLessThanOrEqual(8191); // 14 bits: the full-scale code 2^13 - 1
    expect(Math.abs(exportedMean - mean)).toBeLessThan(1e-4);
    expect(samples).toBe(480); // 200 ns x 2.4 GS/s, already a multiple of the granularity 32
  });

  it('npx gatesmith runs compiled JavaScript: --version, and a design on two threads without tsx', () => {
    expect(sh('npx', ['--no-install', 'gatesmith', '--version'], project)).toBe(`gatesmith ${PKG.version}\n`);
    const run = spawnSync('npx', ['--no-install', 'gatesmith', 'design', 'node_modules/gatesmith/examples/transmon-x90.json', '--threads', '2', '--json'], { cwd: project, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const json = JSON.parse(run.stdout);
    // The demo's benchmark figure (README, Performance): mean infidelity 3.0e-4 on this 5 x 5 ensemble.
    expect(json.meanInfidelity).toBeLessThan(4e-4);
    expect(json.starts.map((s: { start: number }) => s.start)).toEqual([1, 2, 3, 4, 5]);
    expect(run.stderr).not.toMatch(/tsx/);
  });
});
