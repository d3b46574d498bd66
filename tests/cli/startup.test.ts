// Start-up of the compiled command: `--version` and `--help` load the dispatcher alone, not
// the command modules or the core, so that they start about as fast as Node itself (the
// time is a benchmark figure, bench/command-bench.ts; this checks the structure behind it
// by recording every module Node resolves, through a module-resolution hook).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const ROOT = new URL('../../', import.meta.url).pathname;
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-startup-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The package modules (paths under dist/) that `gatesmith argv...` loads. */
function loadedModules(argv: string[]): string[] {
  const log = join(dir, `loaded-${argv.join('-')}.txt`);
  const hook = join(dir, 'hook.mjs');
  writeFileSync(hook, `import { appendFileSync } from 'node:fs';
export async function resolve(specifier, context, next) {
  const r = await next(specifier, context);
  if (r.url.includes('/dist/')) appendFileSync(${JSON.stringify(log)}, r.url.split('/dist/')[1] + '\\n');
  return r;
}
`);
  const register = join(dir, 'register.mjs');
  writeFileSync(register, `import { register } from 'node:module';\nregister(${JSON.stringify(pathToFileURL(hook).href)});\n`);
  const r = spawnSync(process.execPath, ['--import', pathToFileURL(register).href, join(ROOT, 'bin/gatesmith.js'), ...argv], { encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  return existsSync(log) ? [...new Set(readFileSync(log, 'utf8').trim().split('\n'))].sort() : [];
}

describe('what the command loads', () => {
  it('--version and --help load the dispatcher and the error classes only', () => {
    for (const argv of [['--version'], ['--help']]) expect(loadedModules(argv), argv[0]).toEqual(['cli/main.js', 'core/errors.js']);
  });

  it('a command loads its own module; the wasm core (core/api.js) waits until the work starts', () => {
    const help = loadedModules(['evaluate', '--help']);
    expect(help).toContain('cli/evaluate.js');
    expect(help).not.toContain('cli/design.js');
    expect(help).not.toContain('core/api.js');
  });
});
