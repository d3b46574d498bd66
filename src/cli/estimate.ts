// How long a design may take, before it starts: the problem's size times the speed of this
// machine, measured on a small job of the same core. The figure is an upper bound (every
// start running to its iteration limit); most designs stop earlier, at their target.
import { systemCostFactor } from '../core/cost.ts';
import { needsLadder } from '../core/system.ts';
import type { Member, Problem, Pulse } from '../core/types.ts';
import { formatTime } from './format.ts';

export { systemCostFactor } from '../core/cost.ts';

/** Optimiser iterations cost about this many figure-and-gradient evaluations (L-BFGS line searches). */
const EVALUATIONS_PER_ITERATION = 1.2;
/** A figure-and-gradient evaluation costs about this many figure-only evaluations (npm run bench). */
const GRADIENT_OVER_FIGURE = 2.6;
/** Cost per member-sample of a qubit gradient evaluation assumed before measuring (s); a generous guess. */
export const ASSUMED_SECONDS_PER_MEMBER_SAMPLE = 2e-8;

/** The time a design may take and what the figure rests on. */
export interface DesignEstimate {
  /** Upper bound of the wall time (s), every start to its iteration limit. */
  seconds: number;
  /** One optimiser iteration (s): the longest a stop inside the same thread can wait. */
  iterationSeconds: number;
  /** Gradient cost per member-sample of this problem's system (s): the qubit's times systemCostFactor. */
  secondsPerMemberSample: number;
  /** The qubit's gradient cost per member-sample it rests on (s), measured or assumed. */
  qubitSecondsPerMemberSample: number;
  threads: number;
}

/** Members the core processes: padded to a multiple of 4 on the qubit kernels; the ladder kernels take one at a time. */
function paddedMembers(problem: Problem): number {
  const multiple = needsLadder(problem.target, problem.system) ? 1 : 4;
  return Math.ceil(problem.members.length / multiple) * multiple;
}

/** The estimate from the qubit's cost per member-sample, scaled to the problem's system (the time limit, when set, caps it). */
export function estimateDesign(problem: Problem, threads: number, qubitSecondsPerMemberSample = ASSUMED_SECONDS_PER_MEMBER_SAMPLE): DesignEstimate {
  const { segments, optimizer } = problem;
  const secondsPerMemberSample = qubitSecondsPerMemberSample * systemCostFactor(problem);
  const iterationSeconds = EVALUATIONS_PER_ITERATION * secondsPerMemberSample * segments * paddedMembers(problem);
  const startsPerThread = Math.ceil(optimizer.starts / Math.max(1, threads));
  const seconds = Math.min(iterationSeconds * optimizer.maxIterations * startsPerThread, optimizer.timeLimit);
  return { seconds, iterationSeconds, secondsPerMemberSample, qubitSecondsPerMemberSample, threads };
}

/**
 * The qubit's gradient cost per member-sample on this machine: a figure-only evaluation of a
 * small qubit job timed for about 20 ms, scaled by the gradient's known cost ratio (another
 * system's cost follows from it by systemCostFactor, without timing a slow job).
 */
export function measureSecondsPerMemberSample(evaluateMembers: (target: Problem['target'], pulse: Pulse, members: Member[]) => unknown): number {
  const n = 256;
  const members: Member[] = Array.from({ length: 16 }, (_, k) => ({ detuning: 1e5 * (k - 8), amplitudeError: 0.01 * (k % 4), weight: 1 }));
  const i = new Float64Array(n).fill(1e6);
  const q = new Float64Array(n).fill(5e5);
  const pulse: Pulse = { dt: 1e-9, i, q, metadata: {} };
  const target: Problem['target'] = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
  evaluateMembers(target, pulse, members); // loads and warms the core
  let runs = 0;
  const t0 = performance.now();
  while (performance.now() - t0 < 20) {
    evaluateMembers(target, pulse, members);
    runs++;
  }
  const perRun = (performance.now() - t0) / 1000 / runs;
  return (GRADIENT_OVER_FIGURE * perRun) / (n * members.length);
}

/** A duration for people: "45 s", "12 min", "3.2 h". */
export function formatDuration(seconds: number): string {
  if (seconds < 60) return formatTime(Number(seconds.toPrecision(2)));
  if (seconds < 3600) return `${Number((seconds / 60).toPrecision(2))} min`;
  return `${Number((seconds / 3600).toPrecision(2))} h`;
}

/** The announcement of a long design, naming what makes it long and how to run it anyway. */
export function longDesignNotice(problem: Problem, e: DesignEstimate): string {
  const { optimizer } = problem;
  return (
    `this design may take up to about ${formatDuration(e.seconds)} here: ${optimizer.starts} start${optimizer.starts === 1 ? '' : 's'} x up to ` +
    `${optimizer.maxIterations} iterations of ${problem.segments} segments x ${problem.members.length} members, ` +
    `about ${formatDuration(e.iterationSeconds)} per iteration on ${e.threads} thread${e.threads === 1 ? '' : 's'} ` +
    `(most designs stop earlier, at their target)`
  );
}
