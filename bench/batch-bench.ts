// The batch figures of the benchmark: 16 variations of the transmon demo (one per invented
// qubit of a chip: its detuning spread and its Rabi calibration) run by the installed
// command on one core, on all cores (worker threads), and as 4 shards run by GNU parallel.
// The demo's iteration budget is cut to 300 per start to keep the benchmark short.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';

/** Wall times (s) of one batch run three ways; null where GNU parallel is missing. */
export interface BatchFigures {
  variations: number;
  maxIterations: number;
  cores: number;
  oneCoreS: number;
  allCoresS: number;
  parallelShardsS: number | null;
  shards: number;
}

const ROOT = new URL('../', import.meta.url).pathname;
const BIN = join(ROOT, 'bin/gatesmith.js');
const PARALLEL = '/usr/bin/parallel';

function timed(command: string, args: string[]): number {
  const t = performance.now();
  const r = spawnSync(command, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${command} ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  return (performance.now() - t) / 1000;
}

/** Runs the batch three ways and logs a table; the command is built first if it is stale. */
export function batchBenchmark(log: (text: string) => void): BatchFigures {
  spawnSync(process.execPath, [join(ROOT, 'scripts/build.js'), 'wasm', 'lib', '--if-stale'], { stdio: 'inherit' });
  const demo = JSON.parse(readFileSync(join(ROOT, 'examples/transmon-x90.json'), 'utf8'));
  const maxIterations = 300;
  const base = { ...demo, optimizer: { ...demo.optimizer, maxIterations } };
  const variations = Array.from({ length: 16 }, (_, k) => ({
    name: `k${String(k + 1).padStart(2, '0')}`,
    set: { 'ensemble.detuning.min': -(0.6 + 0.1 * k) * 1e6, 'ensemble.detuning.max': (0.6 + 0.1 * k) * 1e6, rabiMax: (k % 2 === 0 ? 9.5 : 10.5) * 1e6 },
  }));
  const dir = mkdtempSync(join(tmpdir(), 'gatesmith-bench-batch-'));
  try {
    const manifest = join(dir, 'chip.json');
    writeFileSync(manifest, JSON.stringify({ base, variations }));
    const cores = availableParallelism();
    const runArgs = (out: string, threads: number): string[] => [BIN, 'batch', 'run', manifest, '--out', join(dir, out), '--threads', String(threads)];
    const oneCoreS = timed(process.execPath, runArgs('one', 1));
    const allCoresS = timed(process.execPath, runArgs('all', cores));
    const shards = 4;
    const parallelShardsS = existsSync(PARALLEL)
      ? timed(PARALLEL, ['--will-cite', '--jobs', String(shards), process.execPath, ...runArgs('sharded', 1), '--shard', `{}/${shards}`, ':::', '1', '2', '3', '4'])
      : null;
    log(`\nbatch of ${variations.length} variations of the transmon demo (${maxIterations} iterations per start), wall time of gatesmith batch run`);
    const rows: [string, string][] = [
      ['one core (--threads 1)', `${oneCoreS.toFixed(2)} s`],
      [`all ${cores} cores (--threads ${cores})`, `${allCoresS.toFixed(2)} s, speed-up ${(oneCoreS / allCoresS).toFixed(2)}`],
      [`${shards} shards by GNU parallel (--jobs ${shards}, --threads 1 each)`, parallelShardsS === null
        ? `skipped: ${PARALLEL} is missing (apt-get install parallel)`
        : `${parallelShardsS.toFixed(2)} s, speed-up ${(oneCoreS / parallelShardsS).toFixed(2)}`],
    ];
    const width = Math.max(...rows.map(([k]) => k.length));
    for (const [k, v] of rows) log(`${k.padEnd(width)}  ${v}`);
    return { variations: variations.length, maxIterations, cores, oneCoreS, allCoresS, parallelShardsS, shards };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
