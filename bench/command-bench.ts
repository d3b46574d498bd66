// Figures of the compiled command as a user runs it (`node bin/gatesmith.js`, what npx runs):
// start-up of --version and of a demo design against bare Node, and how fast Ctrl-C takes
// effect on designs whose iterations are long (SIGINT to the acknowledgement, to the best
// pulse written, to the exit).
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { medianOf } from './timing.ts';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const BIN = join(ROOT, 'bin/gatesmith.js');

/** Start-up medians (ms) and Ctrl-C latencies (ms) per problem size. */
export interface CommandFigures {
  startupMs: { bareNode: number; version: number; help: number; demoDesign: number; versionOverNode: number };
  interrupt: { segments: number; members: number; iterationMs: number; acknowledgedMs: number; pulseWrittenMs: number; exitedMs: number }[];
}


function timeRun(args: string[]): number {
  const t = performance.now();
  const r = spawnSync(process.execPath, args, { cwd: ROOT, stdio: 'ignore' });
  if (r.status !== 0) throw new Error(`node ${args.join(' ')} exited ${r.status}`);
  return performance.now() - t;
}

/** One interrupted design: SIGINT once the third progress line is out, then the times of what follows. */
async function interruptOnce(specPath: string, out: string): Promise<{ acknowledgedMs: number; pulseWrittenMs: number; exitedMs: number; iterationMs: number }> {
  const child = spawn(process.execPath, [BIN, 'design', specPath, '--yes', '--threads', '1', '--out', out, '--json'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
  let stderr = '';
  let stdout = '';
  let sentAt = 0;
  const marks: Record<string, number> = {};
  child.stdout.on('data', (b) => (stdout += b));
  const exited = new Promise<void>((resolve) => child.on('exit', () => {
    marks.exited = performance.now();
    resolve();
  }));
  await new Promise<void>((resolve) => {
    child.stderr.on('data', (b) => {
      stderr += b;
      const now = performance.now();
      if (sentAt > 0 && marks.acknowledged === undefined && stderr.includes('interrupted:')) marks.acknowledged = now;
      if (sentAt > 0 && marks.written === undefined && /written to .*; evaluating it/.test(stderr)) marks.written = now;
      if (sentAt === 0 && stderr.split('\n').filter((l) => l.startsWith('design ')).length >= 3) {
        sentAt = performance.now();
        child.kill('SIGINT');
        resolve();
      }
    });
  });
  await exited;
  const json = JSON.parse(stdout) as { best: { iterations: number }; elapsedS: number };
  return {
    acknowledgedMs: marks.acknowledged - sentAt,
    pulseWrittenMs: marks.written - sentAt,
    exitedMs: marks.exited - sentAt,
    iterationMs: (json.elapsedS * 1000) / Math.max(1, json.best.iterations),
  };
}

/** Runs the command figures, logging a table as it goes. */
export async function commandBenchmark(log: (text: string) => void): Promise<CommandFigures> {
  execFileSync(process.execPath, ['scripts/build.js', 'wasm', 'lib', '--if-stale'], { cwd: ROOT, stdio: 'inherit' });
  const demo = join(ROOT, 'examples/transmon-x90.json');
  const runs = { bareNode: [] as number[], version: [] as number[], help: [] as number[], demoDesign: [] as number[] };
  timeRun([BIN, '--version']); // warm the file cache
  for (let k = 0; k < 11; k++) {
    runs.bareNode.push(timeRun(['-e', '0']));
    runs.version.push(timeRun([BIN, '--version']));
    runs.help.push(timeRun([BIN, '--help']));
    if (k < 5) runs.demoDesign.push(timeRun([BIN, 'design', demo]));
  }
  const startupMs = {
    bareNode: medianOf(runs.bareNode),
    version: medianOf(runs.version),
    help: medianOf(runs.help),
    demoDesign: medianOf(runs.demoDesign),
    versionOverNode: medianOf(runs.version.map((v, k) => v - runs.bareNode[k])),
  };
  log('command start-up (compiled, node bin/gatesmith.js), medians of process wall time');
  log(`  node -e 0 ${startupMs.bareNode.toFixed(0)} ms; gatesmith --version ${startupMs.version.toFixed(0)} ms ` +
    `(+${startupMs.versionOverNode.toFixed(0)} ms over bare Node); --help ${startupMs.help.toFixed(0)} ms; design of the demo ${startupMs.demoDesign.toFixed(0)} ms`);

  const dir = mkdtempSync(join(tmpdir(), 'gatesmith-bench-'));
  const interrupt: CommandFigures['interrupt'] = [];
  log('Ctrl-C on a design in progress (SIGINT after the third progress line), medians of 3, ms');
  log('segments  members  ms/iteration  acknowledged  best pulse written  exited');
  try {
    const spec = JSON.parse(readFileSync(demo, 'utf8'));
    for (const [segments, side] of [[20000, 11], [100000, 21]] as const) {
      const path = join(dir, `big-${segments}.json`);
      writeFileSync(path, JSON.stringify({
        ...spec, segments, duration: segments * 1e-9, rabiMax: 1e6,
        ensemble: { detuning: { min: -1e5, max: 1e5, points: side }, amplitudeError: { min: -0.1, max: 0.1, points: side } },
        optimizer: { ...spec.optimizer, starts: 1, maxIterations: 100000 },
      }));
      const rows = [];
      for (let k = 0; k < 3; k++) rows.push(await interruptOnce(path, join(dir, `p-${segments}-${k}.json`)));
      const row = {
        segments, members: side * side,
        iterationMs: medianOf(rows.map((r) => r.iterationMs)),
        acknowledgedMs: medianOf(rows.map((r) => r.acknowledgedMs)),
        pulseWrittenMs: medianOf(rows.map((r) => r.pulseWrittenMs)),
        exitedMs: medianOf(rows.map((r) => r.exitedMs)),
      };
      interrupt.push(row);
      log(`${String(segments).padStart(8)}  ${String(row.members).padStart(7)}  ${row.iterationMs.toFixed(0).padStart(12)}  ` +
        `${row.acknowledgedMs.toFixed(1).padStart(12)}  ${row.pulseWrittenMs.toFixed(1).padStart(18)}  ${row.exitedMs.toFixed(0).padStart(6)}`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return { startupMs, interrupt };
}
