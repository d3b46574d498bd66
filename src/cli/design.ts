// `gatesmith design SPEC [--out PULSE] [--json]`: runs ensemble GRAPE on a spec, shows
// progress on stderr, prints the figures on stdout and writes the best pulse.
import { availableParallelism } from 'node:os';
import { ArgumentError } from '../core/errors.ts';
import { describeLine } from '../core/line-spec.ts';
import type { DesignResult, MemberFigure, Problem, Pulse } from '../core/types.ts';
import { writePulse } from '../io/pulse.ts';
import { flagValue, optionsHelp, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { checkWritable, loadSpec, writeText } from './files.ts';
import { formatFrequency, formatInfidelity, formatRelative, formatStopReason, formatTarget, formatTime } from './format.ts';
import { progressReporter } from './progress.ts';

const ARGS: ArgSpec = {
  command: 'design',
  positionals: ['SPEC'],
  flags: [
    { name: 'out', value: 'PULSE', help: 'write the best pulse to this file (gatesmith pulse JSON)' },
    { name: 'json', help: 'print the figures as one JSON object instead of a table' },
    { name: 'threads', value: 'N', help: 'run the starts on N threads (default: all cores for designs expected to take over 2 s)' },
  ],
};

const HELP = `Design a robust pulse for the spec by ensemble GRAPE (exact gradients, L-BFGS).

Usage: ${usageLine(ARGS)}

SPEC is a design spec (JSON; see docs/spec.md). Progress goes to stderr, the figures
to stdout. Ctrl-C stops the run after the current iteration; the best pulse so far is
still reported and written.

Options:
${optionsHelp(ARGS)}

Infidelity is 1 - F with F = |Tr(V^dag U)|^2 / 4 for a gate target (phase-insensitive)
and F = |<to|U|from>|^2 for a state target, per ensemble member; "mean" is weighted.
`;

/** The `design` subcommand. */
export const designCommand: Command = defineCommand({
  name: 'design',
  summary: 'design a robust pulse for a spec',
  args: ARGS,
  help: HELP,
  async body([specPath], flags, io: CliIO): Promise<number> {
    const out = flagValue(flags, 'out');
    const spec = loadSpec(specPath);
    if (out !== undefined) checkWritable(out, '--out');

    // Loaded here, not at the top, so that --help and bad input never wait for the wasm core.
    const api = await import('../core/api.ts');
    const controller = new AbortController();
    let interrupted = false;
    const unsubscribe = io.onInterrupt?.(() => {
      if (interrupted) return;
      interrupted = true;
      controller.abort();
      io.stderr('\ninterrupted: stopping after this iteration, keeping the best pulse so far\n');
    });
    const { starts, maxIterations } = spec.problem.optimizer;
    const reporter = progressReporter(io, starts, maxIterations);
    let result: DesignResult;
    try {
      const threads = threadCount(flagValue(flags, 'threads'), spec.problem);
      const options = { onProgress: reporter.update, signal: controller.signal };
      result = threads > 1
        ? await (await import('../core/threads.ts')).designInThreads(spec.problem, { ...options, threads })
        : await api.design(spec.json, options);
    } finally {
      reporter.finish();
      unsubscribe?.();
    }

    const pulse = withDesignMetadata(result, spec.json);
    const peak = checkPeak(pulse, spec.problem);
    if (out !== undefined) writeText(out, writePulse(pulse), '--out');
    else if (!flags.json) io.stderr('note: the pulse is not saved; give --out PULSE to write it\n');

    const warning = truncationWarning(result, spec.problem);
    if (warning) io.stderr(`warning: ${warning}\n`);
    if (flags.json) io.stdout(JSON.stringify(designJson(result, peak, out, interrupted), null, 2) + '\n');
    else io.stdout(designTable(result, spec.problem, peak, out, interrupted));
    return 0;
  },
});

// Threads pay off once a design runs for seconds (starting one costs about 0.4 s here):
// estimate the single-thread time from the work, about 20 ns per member-segment-iteration.
function threadCount(flag: string | undefined, problem: Problem): number {
  if (flag !== undefined) {
    const n = Number(flag);
    if (!Number.isInteger(n) || n < 1 || n > 64) throw new ArgumentError(`--threads ${flag}: not allowed; a whole number from 1 to 64`);
    return n;
  }
  const { segments, members, optimizer } = problem;
  const seconds = 2e-8 * segments * members.length * optimizer.maxIterations * optimizer.starts;
  return seconds > 2 ? Math.min(availableParallelism(), optimizer.starts) : 1;
}

// The pulse file records how it was made: the spec as given and the figures reached.
function withDesignMetadata(result: DesignResult, specJson: unknown): Pulse {
  const meta = result.pulse.metadata ?? {};
  // The spec's own name says more to a reader of the file than which start won.
  const specName = (specJson as { name?: unknown }).name;
  const name = typeof specName === 'string' ? specName : meta.name;
  return {
    ...result.pulse,
    metadata: {
      ...meta,
      ...(typeof name === 'string' ? { name } : {}),
      origin: meta.origin ?? 'design',
      spec: meta.spec ?? specJson,
      figures: {
        ...meta.figures,
        meanInfidelity: result.evaluation.meanInfidelity,
        worstInfidelity: result.evaluation.worstInfidelity,
        iterations: result.best.iterations,
        stopReason: result.best.stopReason,
      },
    },
  };
}

// A waveform above the configured limit is never written (safety: it drives an amplifier).
function checkPeak(pulse: Pulse, problem: Problem): number {
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) {
    const a = problem.constraints.bound === 'box' ? Math.max(Math.abs(pulse.i[k]), Math.abs(pulse.q[k])) : Math.hypot(pulse.i[k], pulse.q[k]);
    if (!(a <= problem.rabiMax * (1 + 1e-12))) {
      throw new Error(`designed sample ${k} has amplitude ${a} Hz above rabiMax ${problem.rabiMax} Hz; refusing to write it`);
    }
    peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  }
  return peak;
}

function memberJson(m: MemberFigure) {
  return {
    detuning: m.detuning, amplitudeError: m.amplitudeError, weight: m.weight, infidelity: m.infidelity,
    ...(m.leakage !== undefined ? { anharmonicityError: m.anharmonicityError ?? 0, leakage: m.leakage } : {}),
    ...(m.phaseAfter !== undefined ? { phaseAfter: m.phaseAfter } : {}),
  };
}

/** The truncation-check warning of a ladder design, or null. */
export function truncationWarning(result: DesignResult, problem: Problem): string | null {
  const check = result.truncationCheck;
  if (!check || !check.differs) return null;
  return `on ${check.levels} levels the mean infidelity is ${formatInfidelity(check.meanInfidelity)} and the mean leakage ` +
    `${formatInfidelity(check.meanLeakage)}, more than a factor two from ${formatInfidelity(result.evaluation.meanInfidelity)} and ` +
    `${formatInfidelity(result.evaluation.meanLeakage ?? 0)} on ${problem.system?.levels} levels: the truncation matters; design with more levels`;
}

function designJson(result: DesignResult, peak: number, out: string | undefined, interrupted: boolean) {
  const ev = result.evaluation;
  const startJson = (s: DesignResult['best']) => ({
    start: s.start,
    meanInfidelity: s.meanInfidelity,
    objective: s.objective,
    iterations: s.iterations,
    evaluations: s.evaluations,
    stopReason: s.stopReason,
    elapsedS: s.elapsedS,
  });
  return {
    members: ev.members.map(memberJson),
    meanInfidelity: ev.meanInfidelity,
    worstInfidelity: ev.worstInfidelity,
    worstMember: memberJson(ev.members[ev.worstIndex]),
    ...(ev.meanLeakage !== undefined ? { levels: ev.levels, meanLeakage: ev.meanLeakage, worstLeakage: ev.worstLeakage } : {}),
    ...(result.truncationCheck ? {
      truncationCheck: {
        levels: result.truncationCheck.levels, meanInfidelity: result.truncationCheck.meanInfidelity, meanLeakage: result.truncationCheck.meanLeakage,
      },
    } : {}),
    best: startJson(result.best),
    starts: result.starts.map(startJson),
    elapsedS: result.elapsedS,
    peakRabi: peak,
    interrupted,
    out: out ?? null,
  };
}

function designTable(result: DesignResult, problem: Problem, peak: number, out: string | undefined, interrupted: boolean): string {
  const ev = result.evaluation;
  const worst = ev.members[ev.worstIndex];
  const rows: [string, string][] = [
    ['target', formatTarget(problem.target)],
    ['ensemble', `${ev.members.length} member${ev.members.length === 1 ? '' : 's'}`],
    ...(problem.line ? [['line', `${describeLine(problem.line)}: the figures are of the drive the qubit sees`] as [string, string]] : []),
    ['mean infidelity', formatInfidelity(ev.meanInfidelity)],
    ['worst infidelity', `${formatInfidelity(ev.worstInfidelity)} at detuning ${formatFrequency(worst.detuning)}, amplitude error ${formatRelative(worst.amplitudeError)}`],
    ...ladderRows(result, problem),
    ['best start', `${result.best.start + 1} of ${result.starts.length}: ${result.best.iterations} iterations, ended on ${formatStopReason(result.best.stopReason)}`],
    ['all starts', result.starts.map((s) => `${s.start + 1}: ${formatInfidelity(s.meanInfidelity)}`).join('  ')],
    ['wall time', `${result.elapsedS.toFixed(3)} s${interrupted ? ' (interrupted)' : ''}`],
    ['peak drive', `${formatFrequency(peak)} of rabiMax ${formatFrequency(problem.rabiMax)} (${problem.constraints.bound} bound)`],
    ['pulse', `${result.pulse.i.length} samples of ${formatTime(result.pulse.dt)}${out !== undefined ? ` written to ${out}` : ', not saved'}`],
  ];
  const width = Math.max(...rows.map(([k]) => k.length));
  return rows.map(([k, v]) => `${k.padEnd(width)}  ${v}`).join('\n') + '\n';
}

function ladderRows(result: DesignResult, problem: Problem): [string, string][] {
  const ev = result.evaluation;
  if (ev.meanLeakage === undefined) return [];
  const rows: [string, string][] = [
    ['system', `${ev.levels} levels, anharmonicity ${formatFrequency(problem.system?.anharmonicity ?? 0)}`],
    ['mean leakage', formatInfidelity(ev.meanLeakage)],
    ['worst leakage', formatInfidelity(ev.worstLeakage ?? 0)],
  ];
  const phases = ev.members.filter((m) => m.phaseAfter !== undefined).map((m) => m.phaseAfter!);
  if (phases.length > 0) rows.push(['phase after', `${((phases[0] * 180) / Math.PI).toFixed(3)} deg (z rotation after the pulse, member 1; every member's in --json)`]);
  const check = result.truncationCheck;
  if (check) {
    rows.push([`on ${check.levels} levels`, `mean infidelity ${formatInfidelity(check.meanInfidelity)}, mean leakage ${formatInfidelity(check.meanLeakage)}${check.differs ? ' (differs by more than x2)' : ''}`]);
  }
  return rows;
}
