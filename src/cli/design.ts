// `gatesmith design SPEC [--out PULSE] [--json]`: runs ensemble GRAPE on a spec, shows
// progress on stderr, prints the figures on stdout and writes the best pulse.
import { availableParallelism } from 'node:os';
import { ArgumentError } from '../core/errors.ts';
import { memberShares } from '../core/member-split.ts';
import { fusedAvailable } from '../core/wasm.ts';
import { describeLine } from '../core/line-spec.ts';
import type { DesignResult, MemberFigure, Problem, Progress, Pulse, StartResult } from '../core/types.ts';
import { writePulse } from '../io/pulse.ts';
import { flagValue, optionsHelp, usageLine } from './args.ts';
import type { ArgSpec } from './args.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { estimateDesign, longDesignNotice, measureSecondsPerMemberSample, type DesignEstimate } from './estimate.ts';
import { checkOutputName, checkWritable, loadSpec, printWarnings, writeFilesTogether } from './files.ts';
import { formatFrequency, formatInfidelity, formatMemberAt, formatStopReason, formatTarget, formatTime } from './format.ts';
import { progressReporter } from './progress.ts';

/** Designs estimated to run longer than this (s) are announced and wait for --yes or a time limit. */
export const LONG_DESIGN_S = 60;
/** A design whose single iteration may outlast this (s) runs in a worker thread, so that Ctrl-C stops it at once. */
const LONGEST_IN_PROCESS_ITERATION_S = 0.03;
/** The best pulse so far is kept from progress reports at least this often (ms). */
const KEEP_PULSE_EVERY_MS = 100;

const ARGS: ArgSpec = {
  command: 'design',
  positionals: ['SPEC'],
  flags: [
    { name: 'out', value: 'PULSE', help: 'write the best pulse to this file (gatesmith pulse JSON)' },
    { name: 'json', help: 'print the figures as one JSON object instead of a table' },
    { name: 'threads', value: 'N', help: "run the starts on N threads, and a start alone on a large ensemble over its member shares (default: all cores for designs expected to take over 2 s; the pulse is the same for every N)" },
    { name: 'time-limit', value: 'S', help: "stop after S seconds of wall time, keeping the best pulse (overrides the spec's optimizer.timeLimit)" },
    { name: 'yes', help: `run a design estimated to take over ${LONG_DESIGN_S} s without asking` },
    { name: 'fused', help: "design on the core's fused build (relaxed SIMD: faster, other last bits, so possibly another pulse; the spec's optimizer.arithmetic \"fused\")" },
  ],
};

const HELP = `Design a robust pulse for the spec by ensemble GRAPE (exact gradients, L-BFGS).

Usage: ${usageLine(ARGS)}

SPEC is a design spec (JSON; see docs/spec.md). Progress goes to stderr, the figures
to stdout. Ctrl-C stops the run at once; the best pulse so far is written, then
evaluated and reported (Ctrl-C again exits without waiting for the report).

A design estimated to take over ${LONG_DESIGN_S} s (every start to its iteration limit, at the
speed measured on this machine) is announced before it starts: on a terminal you are
asked; without one (scripts, CI) it is not started and exits 1, unless --yes or a time
limit (--time-limit S or the spec's optimizer.timeLimit) is given.

Options:
${optionsHelp(ARGS)}

Infidelity is 1 - F with F = |Tr(V^dag U)|^2 / 4 for a gate target (phase-insensitive)
and F = |<to|U|from>|^2 for a state target, per ensemble member; "mean" is weighted.
Starts are numbered from 1.
`;

/** The `design` subcommand. */
export const designCommand: Command = defineCommand({
  name: 'design',
  summary: 'design a robust pulse for a spec',
  args: ARGS,
  help: HELP,
  async body([specPath], flags, io: CliIO): Promise<number> {
    const out = flagValue(flags, 'out');
    if (out !== undefined) checkOutputName(out, '--out', ['.json'], 'a pulse file (JSON)');
    const spec = loadSpec(specPath);
    if (out !== undefined) checkWritable(out, '--out', [specPath]);
    const timeLimit = timeLimitFlag(flagValue(flags, 'time-limit'));
    const optimizer = { ...spec.problem.optimizer, ...(timeLimit === undefined ? {} : { timeLimit }), ...(flags.fused === true ? { arithmetic: 'fused' as const } : {}) };
    const problem: Problem = { ...spec.problem, optimizer };
    printWarnings(io, spec.warnings);

    // Loaded here, not at the top, so that --help and bad input never wait for the wasm core.
    const api = await import('../core/api.ts');
    if (optimizer.arithmetic === 'fused' && !fusedAvailable()) {
      io.stderr(`warning: ${flags.fused === true ? '--fused' : 'optimizer.arithmetic "fused"'}: this engine does not run relaxed SIMD (Node 20 needs --experimental-wasm-relaxed-simd); designing on the portable build\n`);
    }
    const { threads, estimate } = plan(flagValue(flags, 'threads'), problem, api.evaluateMembers);
    // A time limit, from the flag or the spec, is the user's own bound: no question then.
    const bounded = Number.isFinite(problem.optimizer.timeLimit);
    if (estimate.seconds > LONG_DESIGN_S && flags.yes !== true && !bounded) {
      const notice = longDesignNotice(problem, estimate);
      if (!io.confirm) {
        throw new ArgumentError(`design: ${notice}; not started without a terminal to ask: give --yes to run it anyway, or --time-limit S to bound it`);
      }
      if (!(await io.confirm(`${notice}.\nRun it? (--yes skips this question, --time-limit S bounds it) [y/N] `))) {
        io.stderr('design: not started\n');
        return 1;
      }
    }

    const controller = new AbortController();
    let interrupted = false;
    // The latest samples each start reported: a stop keeps the best of them at once.
    const latest = new Map<number, Progress>();
    const unsubscribe = io.onInterrupt?.(() => {
      if (interrupted) return;
      interrupted = true;
      controller.abort();
      io.stderr('\ninterrupted: stopping now, keeping the best pulse so far\n');
      const kept = bestReported(latest);
      const interim = kept ? interimPulse(kept, problem, spec.json) : null;
      if (out !== undefined && kept && interim && withinLimit(interim, problem)) {
        try {
          writeFilesTogether([{ path: out, data: writePulse(interim) }], '--out');
          io.stderr(`best pulse so far (start ${kept.start + 1}, iteration ${kept.iteration}, mean infidelity ${formatInfidelity(kept.meanInfidelity)}) written to ${out}; evaluating it\n`);
        } catch (error) {
          // The final write after the evaluation tries again and reports its own failure.
          io.stderr(`warning: ${(error as Error).message}\n`);
        }
      }
    });
    const reporter = progressReporter(io, problem.optimizer);
    let result: DesignResult;
    try {
      const options = {
        onProgress: (p: Progress) => {
          if (p.pulse) latest.set(p.start, p);
          reporter.update(p);
        },
        onStartEnd: (r: StartResult) => reporter.ended(r),
        signal: controller.signal,
        progressPulseEveryMs: KEEP_PULSE_EVERY_MS,
      };
      const inThread = threads > 1 || estimate.iterationSeconds > LONGEST_IN_PROCESS_ITERATION_S;
      result = inThread
        ? await (await import('../core/threads.ts')).designInThreads(problem, { ...options, threads })
        : await api.design(problem, options);
    } catch (error) {
      if ((error as Error).name !== 'StoppedBeforeFirstIterationError') throw error;
      io.stderr('design: stopped before the first iteration; there is no pulse to write\n');
      return 130;
    } finally {
      reporter.finish();
      unsubscribe?.();
    }

    const pulse = withDesignMetadata(result, spec.json);
    const peak = checkPeak(pulse, problem);
    if (out !== undefined) writeFilesTogether([{ path: out, data: writePulse(pulse) }], '--out');
    else if (!flags.json) io.stderr('note: the pulse is not saved; give --out PULSE to write it\n');

    const warning = truncationWarning(result, problem);
    if (warning) io.stderr(`warning: ${warning}\n`);
    if (flags.json) io.stdout(JSON.stringify(designJson(result, peak, out, interrupted, spec.warnings), null, 2) + '\n');
    else io.stdout(designTable(result, problem, peak, out, interrupted));
    return 0;
  },
});

function timeLimitFlag(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const s = Number(text);
  if (text.trim() === '' || !(s > 0) || !Number.isFinite(s)) throw new ArgumentError(`--time-limit: "${text}" is not allowed; a time in seconds > 0, e.g. 60`);
  return s;
}

// Threads pay off once a design runs for seconds (starting one costs tens of ms). The
// speed is assumed generously first and measured only when the design may be long.
function plan(
  flag: string | undefined,
  problem: Problem,
  evaluateMembers: Parameters<typeof measureSecondsPerMemberSample>[0],
): { threads: number; estimate: DesignEstimate } {
  let requested: number | undefined;
  if (flag !== undefined) {
    const n = Number(flag);
    if (!Number.isInteger(n) || n < 1 || n > 64) throw new ArgumentError(`--threads: "${flag}" is not allowed; a whole number from 1 to 64`);
    requested = n;
  }
  let single = estimateDesign(problem, 1);
  if (single.seconds > 2 || single.iterationSeconds > LONGEST_IN_PROCESS_ITERATION_S) {
    single = estimateDesign(problem, 1, measureSecondsPerMemberSample(evaluateMembers));
  }
  // Starts over threads, and a start alone with a large ensemble over its member shares (threads.ts memberThreads).
  const useful = Math.max(problem.optimizer.starts, memberShares(problem).length);
  const threads = requested ?? (single.seconds > 2 ? Math.max(1, Math.min(availableParallelism(), useful)) : 1);
  return { threads, estimate: estimateDesign(problem, threads, single.qubitSecondsPerMemberSample) };
}

/** The lowest-objective report among each start's latest with samples. */
function bestReported(latest: Map<number, Progress>): Progress | null {
  let best: Progress | null = null;
  for (const p of latest.values()) if (!best || p.objective < best.objective) best = p;
  return best;
}

/** The pulse written at the moment of a stop, before its evaluation replaces it. */
function interimPulse(p: Progress, problem: Problem, specJson: unknown): Pulse {
  const specName = (specJson as { name?: unknown }).name;
  return {
    dt: problem.dt,
    i: p.pulse!.i,
    q: p.pulse!.q,
    metadata: {
      name: typeof specName === 'string' ? specName : `design start ${p.start + 1}`,
      origin: 'design',
      spec: specJson,
      figures: { meanInfidelity: p.meanInfidelity, iterations: p.iteration, stopReason: 'stopped', start: p.start + 1 },
      arithmetic: arithmeticOf(problem),
    },
  };
}

/** The core's build a design of `problem` runs on (as wasm.ts buildFor decides in Node). */
function arithmeticOf(problem: Problem): 'portable' | 'fused' {
  return problem.optimizer.arithmetic === 'fused' && fusedAvailable() ? 'fused' : 'portable';
}

/** The design's pulse with its making recorded in the metadata: the spec as given and the figures reached. */
export function withDesignMetadata(result: DesignResult, specJson: unknown): Pulse {
  const meta = result.pulse.metadata ?? {};
  // The spec's own name says more to a reader of the file than which start won.
  const specName = (specJson as { name?: unknown }).name;
  const name = typeof specName === 'string' ? specName : `design start ${result.best.start + 1}`;
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
        start: result.best.start + 1,
      },
    },
  };
}

/** The pulse's peak amplitude (Hz); throws above rabiMax: such a waveform is never written (it drives an amplifier). */
export function checkPeak(pulse: Pulse, problem: Problem): number {
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

function withinLimit(pulse: Pulse, problem: Problem): boolean {
  try {
    checkPeak(pulse, problem);
    return true;
  } catch {
    return false;
  }
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

function designJson(result: DesignResult, peak: number, out: string | undefined, interrupted: boolean, warnings: string[]) {
  const ev = result.evaluation;
  const startJson = (s: DesignResult['best']) => ({
    start: s.start + 1,
    meanInfidelity: s.meanInfidelity,
    objective: s.objective,
    iterations: s.iterations,
    evaluations: Number.isNaN(s.evaluations) ? null : s.evaluations,
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
    peakRabiHz: peak,
    interrupted,
    out: out ?? null,
    warnings,
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
    ['worst infidelity', `${formatInfidelity(ev.worstInfidelity)} at ${formatMemberAt(worst)}`],
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
