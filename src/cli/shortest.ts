// `gatesmith shortest SPEC --goal-mean X [--goal-worst Y] [--min S] [--max S] [--out PULSE] [--json]`:
// the shortest duration, in whole samples of the spec's sample period, at which a design
// meets the goal; the figure against duration of every length tried, the rectangular-pulse
// lower bound beside the answer, and the best pulse written.
import { ArgumentError } from '../core/errors.ts';
import type { ShortestResult } from '../core/shortest.ts';
import type { Problem, Progress } from '../core/types.ts';
import { writePulse } from '../io/pulse.ts';
import { flagValue, optionsHelp, requiredFlag, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { checkPeak, truncationWarning, withDesignMetadata } from './design.ts';
import { checkOutputName, checkWritable, loadSpec, printWarnings, writeFilesTogether } from './files.ts';
import { formatInfidelity, formatTime } from './format.ts';
import { progressReporter } from './progress.ts';

const ARGS: ArgSpec = {
  command: 'shortest',
  positionals: ['SPEC'],
  flags: [
    { name: 'goal-mean', value: 'X', help: 'the mean infidelity over the ensemble must be at most X (required)' },
    { name: 'goal-worst', value: 'Y', help: "the worst member's infidelity must be at most Y" },
    { name: 'min', value: 'S', help: 'shortest duration to try (s; default one sample)' },
    { name: 'max', value: 'S', help: "longest duration to try (s; default 8 times the spec's duration)" },
    { name: 'out', value: 'PULSE', help: 'write the best pulse at the shortest duration found (gatesmith pulse JSON)' },
    { name: 'json', help: 'print the result as one JSON object instead of a table' },
  ],
};

const HELP = `Find the shortest pulse that meets a goal: designs at durations that are whole numbers
of the spec's sample period (duration / segments), bracketed from the spec's own duration
by halving or doubling, then bisected until a duration that meets the goal sits one
sample above one that does not. The pulse found at one duration, stretched to the next,
seeds that design's first start (warm start); the other starts are the spec's.

Usage: ${usageLine(ARGS)}

Every duration tried is reported with its best mean and worst infidelity and whether it
met the goal. Beside the answer stands the lower bound theta / (2 pi rabiMax): the time
a rectangular pulse of the target's angle needs at the peak Rabi rate, so that you see
what robustness costs. Exit code 1 when no duration tried meets the goal. Ctrl-C stops
the design running and ends the search with what it found.

Options:
${optionsHelp(ARGS)}

--json prints { durationS, segments, meanInfidelity, worstInfidelity,
tried: [ { durationS, segments, meanInfidelity, worstInfidelity, met } ] } (null figures
when nothing met the goal).
`;

/** The `shortest` subcommand. */
export const shortestCommand: Command = defineCommand({
  name: 'shortest',
  summary: 'the shortest duration at which a design meets a goal, with the figure against duration',
  args: ARGS,
  help: HELP,
  async body([specPath], flags, io: CliIO): Promise<number> {
    const goalMean = goalFlag(requiredFlag(flags, 'goal-mean', ARGS), '--goal-mean');
    const worstText = flagValue(flags, 'goal-worst');
    const goalWorst = worstText === undefined ? undefined : goalFlag(worstText, '--goal-worst');
    const out = flagValue(flags, 'out');
    if (out !== undefined) checkOutputName(out, '--out', ['.json'], 'a pulse file (JSON)');
    const spec = loadSpec(specPath);
    if (out !== undefined) checkWritable(out, '--out', [specPath]);
    const problem = spec.problem;
    const minSegments = durationFlag(flagValue(flags, 'min'), '--min', problem, 'up');
    const maxSegments = durationFlag(flagValue(flags, 'max'), '--max', problem, 'down');
    if (minSegments !== undefined && maxSegments !== undefined && minSegments > maxSegments) {
      throw new ArgumentError(`--min: ${flagValue(flags, 'min')} s is longer than --max ${flagValue(flags, 'max')} s; give --min <= --max`);
    }
    printWarnings(io, spec.warnings);

    const { shortestDuration } = await import('../core/shortest.ts');
    const controller = new AbortController();
    const unsubscribe = io.onInterrupt?.(() => {
      if (controller.signal.aborted) return;
      controller.abort();
      io.stderr('\ninterrupted: stopping the design running now and ending the search with what it found\n');
    });
    // A bar for the design running on a terminal; off a terminal one line per duration is enough.
    let reporter: ReturnType<typeof progressReporter> | null = null;
    let result: ShortestResult;
    try {
      result = await shortestDuration(problem, {
        goalMean, goalWorst, minSegments, maxSegments, signal: controller.signal,
        onProgress: io.isTTY
          ? (p: Progress) => {
            reporter ??= progressReporter(io, problem.optimizer);
            reporter.update(p);
          }
          : undefined,
        onTrial: (t) => {
          reporter?.finish();
          reporter = null;
          io.stderr(`shortest: ${t.segments} samples (${formatTime(t.durationS)}): mean ${formatInfidelity(t.meanInfidelity)}, worst ${formatInfidelity(t.worstInfidelity)}: ${t.met ? 'meets the goal' : 'does not meet the goal'}\n`);
        },
      });
    } finally {
      (reporter as ReturnType<typeof progressReporter> | null)?.finish();
      unsubscribe?.();
    }

    if (result.design && result.segments !== null) {
      const specJson = { ...(spec.json as object), duration: result.durationS, segments: result.segments };
      const pulse = withDesignMetadata(result.design, specJson);
      pulse.metadata.shortest = { goalMean, goalWorst: goalWorst ?? null, lowerBoundS: result.lowerBoundS };
      checkPeak(pulse, problem);
      if (out !== undefined) writeFilesTogether([{ path: out, data: writePulse(pulse) }], '--out');
      else if (!flags.json) io.stderr('note: the pulse is not saved; give --out PULSE to write it\n');
      // On a ladder: the answer's design re-checked on two more levels, as design does.
      const warning = truncationWarning(result.design, problem);
      if (warning) io.stderr(`warning: the shortest pulse found: ${warning}\n`);
    }
    if (flags.json) {
      io.stdout(JSON.stringify(shortestJson(result), null, 2) + '\n');
      io.stderr(`lower bound (rectangular pulse at rabiMax): ${formatTime(result.lowerBoundS)}\n`);
    } else {
      io.stdout(shortestTable(result, out));
    }
    if (result.segments === null) {
      io.stderr(`shortest: no duration tried met the goal (mean <= ${goalMean}${goalWorst === undefined ? '' : `, worst <= ${goalWorst}`}); try a longer --max, a looser goal or more starts\n`);
      return 1;
    }
    return 0;
  },
});

function goalFlag(text: string, flag: string): number {
  const x = Number(text);
  if (text.trim() === '' || !(x > 0 && x <= 1)) throw new ArgumentError(`${flag}: "${text}" is not allowed; an infidelity > 0 and <= 1, e.g. 1e-4`);
  return x;
}

/** A duration flag (s) as whole samples of the spec's sample period, rounded inwards. */
function durationFlag(text: string | undefined, flag: string, problem: Problem, round: 'up' | 'down'): number | undefined {
  if (text === undefined) return undefined;
  const s = Number(text);
  if (text.trim() === '' || !(s > 0) || !Number.isFinite(s)) throw new ArgumentError(`${flag}: "${text}" is not allowed; a duration in seconds > 0, e.g. 1e-7`);
  // A hair of tolerance so that a duration typed as a whole number of samples stays that number.
  const samples = s / problem.dt;
  const n = round === 'up' ? Math.ceil(samples - 1e-9) : Math.floor(samples + 1e-9);
  if (n < 1) throw new ArgumentError(`${flag}: "${text}" s is shorter than one sample of the spec (${formatTime(problem.dt)}); give at least ${problem.dt}`);
  return n;
}

function shortestJson(r: ShortestResult) {
  return {
    durationS: r.durationS,
    segments: r.segments,
    meanInfidelity: r.meanInfidelity,
    worstInfidelity: r.worstInfidelity,
    tried: r.tried.map((t) => ({ durationS: t.durationS, segments: t.segments, meanInfidelity: t.meanInfidelity, worstInfidelity: t.worstInfidelity, met: t.met })),
  };
}

function shortestTable(r: ShortestResult, out: string | undefined): string {
  const lines: string[] = [];
  if (r.segments !== null) {
    lines.push(`shortest duration  ${formatTime(r.durationS!)} (${r.segments} samples of ${formatTime(r.dt)})${r.stopped ? ', search stopped early' : ''}`);
    lines.push(`mean infidelity    ${formatInfidelity(r.meanInfidelity!)}`);
    lines.push(`worst infidelity   ${formatInfidelity(r.worstInfidelity!)}`);
  } else {
    lines.push('shortest duration  none of the durations tried met the goal');
  }
  const ratio = r.durationS !== null && r.lowerBoundS > 0 ? ` (the answer is ${(r.durationS / r.lowerBoundS).toFixed(2)} times it)` : '';
  lines.push(`lower bound        ${formatTime(r.lowerBoundS)}: a rectangular pulse of the same angle at rabiMax${ratio}`);
  if (r.segments !== null) lines.push(`pulse              ${out !== undefined ? `written to ${out}` : 'not saved'}`);
  lines.push('', 'duration     samples  mean infidelity  worst infidelity  goal');
  for (const t of r.tried) {
    lines.push(`${formatTime(t.durationS).padEnd(12)} ${String(t.segments).padStart(7)}  ${formatInfidelity(t.meanInfidelity).padStart(15)}  ${formatInfidelity(t.worstInfidelity).padStart(16)}  ${t.met ? 'met' : 'not met'}`);
  }
  return lines.join('\n') + '\n';
}
