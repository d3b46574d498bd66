// `gatesmith batch run MANIFEST --out DIR [--shard I/N]`: designs the variations of one shard,
// each on a worker thread of its own (as many at once as there are cores), skipping those
// whose result is already in DIR, and writes each pulse and result whole as it finishes,
// so that a killed batch, run again, resumes where it stopped.
import { availableParallelism } from 'node:os';
import { SHARDS_VARIABLE, shardFromEnvironment, shardIndices } from '../core/batch.ts';
import type { BatchVariation, Shard } from '../core/batch.ts';
import { ArgumentError } from '../core/errors.ts';
import { writePulse } from '../io/pulse.ts';
import { flagValue, optionsHelp, requiredFlag, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { loadManifest, prepareBatchFolder, pulseFile, readResult, removeStaleTemporaries, writeResult } from './batch-files.ts';
import type { BatchResult } from './batch-files.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { checkPeak, withDesignMetadata } from './design.ts';
import { printWarnings } from './files.ts';
import { formatInfidelity } from './format.ts';
import { progressReporter } from './progress.ts';
import { specUnitWarnings } from './unit-warnings.ts';

const ARGS: ArgSpec = {
  command: 'batch run',
  positionals: ['MANIFEST'],
  flags: [
    { name: 'out', value: 'DIR', help: 'the batch folder: results, pulses and a copy of the manifest (required)' },
    { name: 'shard', value: 'I/N', help: 'run shard I of N (I from 1 to N): the variations whose position k (from 0) has k mod N = I - 1' },
    { name: 'shards', value: 'N', help: `the shard count of a Kubernetes indexed job (JOB_COMPLETION_INDEX); or set ${SHARDS_VARIABLE}` },
    { name: 'threads', value: 'N', help: 'variations designed at once, one per thread (default: the number of cores)' },
    { name: 'json', help: 'print the outcome as one JSON object' },
  ],
};

const HELP = `Run the variations of a batch manifest (or of one shard of it) into a folder.

Usage: ${usageLine(ARGS)}

MANIFEST is {"base": SPEC, "variations": [{"name": "q07", "set": {"ensemble.detuning.min": -2e6}}]}
or {"base": SPEC, "variationsCsv": "chip.csv"} (first column "name", the other header cells
dotted paths; an empty cell keeps the base value). Every variation's spec is validated
before anything runs.

Into DIR go pulses/NAME.json, results/NAME.json and, on the first run, a copy of the
manifest (and CSV) that "gatesmith batch collect DIR" reads. A variation whose result is
already there is skipped, so a killed batch resumes when run again; a failed one is tried
again. Each file is written whole (to a temporary name, then renamed).

The shard: --shard I/N; else a Slurm job array (SLURM_ARRAY_TASK_ID, _COUNT, _MIN, _STEP);
else a Kubernetes indexed job (JOB_COMPLETION_INDEX with --shards N or ${SHARDS_VARIABLE});
else the whole batch. Shards take variations by position, so they never overlap.

Options:
${optionsHelp(ARGS)}

Exit codes: 0 every variation of the shard done, 1 bad input or a variation failed,
130 interrupted (finished variations are kept).
`;

/** The `batch run` subcommand. */
export const batchRunCommand: Command = defineCommand({
  name: 'batch run',
  summary: 'run the variations of a batch manifest (or one shard of it) into a folder',
  args: ARGS,
  help: HELP,
  async body([manifestPath], flags, io: CliIO): Promise<number> {
    const dir = requiredFlag(flags, 'out', ARGS);
    const shardsText = flagValue(flags, 'shards');
    const shards = shardsText === undefined ? undefined : wholeFlag(shardsText, '--shards', 1, 100000);
    const threadsText = flagValue(flags, 'threads');
    const threadLimit = threadsText === undefined ? availableParallelism() : wholeFlag(threadsText, '--threads', 1, 64);
    const shardText = flagValue(flags, 'shard');
    if (shardText !== undefined && shards !== undefined) throw new ArgumentError('--shards: not allowed with --shard I/N, which gives the count itself');
    const shard: Shard = shardText !== undefined
      ? shardFlag(shardText)
      : shardFromEnvironment(process.env, shards) ?? { index: 0, count: 1, source: 'the whole batch' };
    if (shards !== undefined && shard.source === 'the whole batch') {
      throw new ArgumentError(`--shards: ${shards} is given but JOB_COMPLETION_INDEX is not set (not a Kubernetes indexed job); give --shard I/N to choose a shard by hand`);
    }
    const loaded = loadManifest(manifestPath);
    const { variations, specs } = loaded.manifest;
    prepareBatchFolder(dir, loaded);

    const mine = shardIndices(variations.length, shard.index, shard.count);
    for (const k of mine) printWarnings(io, specUnitWarnings(specs[k].problem).map((w) => `${variations[k].source} (variation "${variations[k].name}"): ${w}`));
    removeStaleTemporaries(dir, mine.map((k) => variations[k].name));
    const done = new Set(mine.filter((k) => readResult(dir, variations[k].name)?.status === 'done'));
    const todo = mine.filter((k) => !done.has(k));
    const threads = Math.max(1, Math.min(threadLimit, todo.length));
    io.stderr(`batch: shard ${shard.index + 1}/${shard.count} (${shard.source}): ${mine.length} of ${variations.length} variations, ${done.size} already done, ${todo.length} to run${todo.length > 0 ? ` on ${threads} thread${threads === 1 ? '' : 's'}` : ''}\n`);

    const controller = new AbortController();
    const unsubscribe = io.onInterrupt?.(() => {
      if (controller.signal.aborted) return;
      controller.abort();
      io.stderr('\ninterrupted: stopping the running designs; finished variations are kept, run the same command again to resume\n');
    });
    const { designInThreads } = await import('../core/threads.ts');
    const outcome = new Map<number, 'done' | 'failed'>();
    let finished = 0;
    const runOne = async (k: number): Promise<void> => {
      const v = variations[k];
      const problem = specs[k].problem;
      const reporter = progressReporter(prefixed(io, `${v.name}: `), problem.optimizer);
      let result: BatchResult;
      let pulseText: string | null = null;
      try {
        const design = await designInThreads(problem, { threads: 1, signal: controller.signal, onProgress: (p) => reporter.update(p) });
        if (controller.signal.aborted) return; // cut short: not a result
        const pulse = withDesignMetadata(design, specs[k].json);
        pulse.metadata.name = v.name;
        pulse.metadata.batch = { variation: v.name, set: v.set };
        checkPeak(pulse, problem);
        pulseText = writePulse(pulse);
        result = {
          ...resultHead(v, 'done'),
          meanInfidelity: design.evaluation.meanInfidelity,
          worstInfidelity: design.evaluation.worstInfidelity,
          pulse: pulseFile(v.name),
          iterations: design.best.iterations,
          stopReason: design.best.stopReason,
          elapsedS: design.elapsedS,
        };
      } catch (error) {
        if (controller.signal.aborted) return;
        result = { ...resultHead(v, 'failed'), meanInfidelity: null, worstInfidelity: null, pulse: null, error: (error as Error).message ?? String(error) };
      } finally {
        reporter.finish();
      }
      writeResult(dir, result, pulseText);
      outcome.set(k, result.status);
      finished++;
      io.stderr(result.status === 'done'
        ? `batch: ${v.name} done (${finished}/${todo.length}): mean ${formatInfidelity(result.meanInfidelity!)}, worst ${formatInfidelity(result.worstInfidelity!)}, ${result.elapsedS!.toFixed(2)} s\n`
        : `batch: ${v.name} failed (${finished}/${todo.length}): ${result.error}\n`);
    };
    try {
      await pool(todo, threads, runOne, controller.signal);
    } finally {
      unsubscribe?.();
    }

    const failed = todo.filter((k) => outcome.get(k) === 'failed').map((k) => variations[k].name);
    const left = todo.filter((k) => !outcome.has(k)).map((k) => variations[k].name);
    if (flags.json) {
      const status = (k: number): string => (done.has(k) ? 'skipped' : outcome.get(k) ?? 'interrupted');
      io.stdout(JSON.stringify({ shard: { index: shard.index + 1, count: shard.count }, variations: mine.map((k) => ({ name: variations[k].name, status: status(k) })) }, null, 2) + '\n');
    }
    if (controller.signal.aborted) {
      io.stderr(`batch: interrupted with ${left.length} variation${left.length === 1 ? '' : 's'} of this shard left; run the same command again to resume\n`);
      return 130;
    }
    io.stderr(`batch: shard ${shard.index + 1}/${shard.count} finished: ${todo.length - failed.length} designed, ${done.size} skipped, ${failed.length} failed${failed.length > 0 ? ` (${failed.join(', ')})` : ''}; "gatesmith batch collect ${dir}" gathers every shard\n`);
    return failed.length > 0 ? 1 : 0;
  },
});

function resultHead(v: BatchVariation, status: 'done' | 'failed') {
  return { format: 'gatesmith.batch-result' as const, version: 1 as const, name: v.name, status, set: v.set };
}

/** Runs `task` on each item with at most `width` at once, in order of the list; stops taking new ones on abort. */
async function pool<T>(items: T[], width: number, task: (item: T) => Promise<void>, signal: AbortSignal): Promise<void> {
  let next = 0;
  const lane = async (): Promise<void> => {
    while (next < items.length && !signal.aborted) await task(items[next++]);
  };
  await Promise.all(Array.from({ length: width }, lane));
}

/** The command's io with each stderr line led by `prefix` and drawn as lines (designs run side by side). */
function prefixed(io: CliIO, prefix: string): CliIO {
  return { ...io, isTTY: false, stderr: (text) => io.stderr(text.replace(/^(?=.)/gm, prefix)) };
}

function wholeFlag(text: string, flag: string, min: number, max: number): number {
  const n = Number(text);
  if (!/^\d+$/.test(text.trim()) || n < min || n > max) throw new ArgumentError(`${flag}: "${text}" is not allowed; a whole number from ${min} to ${max}`);
  return n;
}

function shardFlag(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const [i, n] = m ? [Number(m[1]), Number(m[2])] : [NaN, NaN];
  if (!m || n < 1 || i < 1 || i > n) {
    throw new ArgumentError(`--shard: "${text}" is not allowed; I/N with N >= 1 and I from 1 to N, e.g. 2/4 for the second of four shards`);
  }
  return { index: i - 1, count: n, source: '--shard' };
}
