// Before any test: the wasm core and the compiled package (dist/) are built when their
// sources are newer, so that tests spawning `bin/gatesmith.js` run the code as it stands.
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/** Vitest's global setup: runs once per test run, before every test file. */
export default function setup(): void {
  const root = fileURLToPath(new URL('..', import.meta.url));
  execFileSync(process.execPath, ['scripts/build.js', 'wasm', 'lib', '--if-stale'], { cwd: root, stdio: 'inherit' });
}
