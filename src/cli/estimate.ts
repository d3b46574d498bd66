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
/** The two pulse lengths (samples) whose evaluation times give the cost per member-sample. */
const SLOPE_SMALL_SAMPLES = 256;
const SLOPE_LARGE_SAMPLES = 4096;

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
 * The qubit's gradient cost per member-sample on this machine: figure-only evaluations of a
 * small and a large qubit job timed for about 20 ms, the slope between them scaled by the
 * gradient's known cost ratio (another
 * system's cost follows from it by systemCostFactor, without timing a slow job).
 */
export function measureSecondsPerMemberSample(evaluateMembers: (target: Problem['target'], pulse: Pulse, members: Member[]) => unknown): number {
  const members: Member[] = Array.from({ length: 16 }, (_, k) => ({ detuning: 1e5 * (k - 8), amplitudeError: 0.01 * (k % 4), weight: 1 }));
  const target: Problem['target'] = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
  const job = (n: number): Pulse => ({ dt: 1e-9, i: new Float64Array(n).fill(1e6), q: new Float64Array(n).fill(5e5), metadata: {} });
  // One call carries a fixed cost (checks, copies, the worst member) of about a tenth of a
  // millisecond, as large as the small job itself: the cost per member-sample is the slope
  // between a small and a large job, each timed for about 10 ms in alternating turns.
  const [small, large] = [job(SLOPE_SMALL_SAMPLES), job(SLOPE_LARGE_SAMPLES)];
  evaluateMembers(target, small, members); // loads and warms the core
  evaluateMembers(target, large, members);
  const spent = [0, 0];
  const runs = [0, 0];
  const t0 = performance.now();
  while (performance.now() - t0 < 20) {
    for (const [k, pulse] of [small, large].entries()) {
      const t = performance.now();
      evaluateMembers(target, pulse, members);
      spent[k] += performance.now() - t;
      runs[k]++;
    }
  }
  const [perSmall, perLarge] = [spent[0] / runs[0], spent[1] / runs[1]];
  // A busy machine can make the slope come out small or negative: never below a quarter of the whole large job's share.
  const slope = Math.max((perLarge - perSmall) / (SLOPE_LARGE_SAMPLES - SLOPE_SMALL_SAMPLES), perLarge / SLOPE_LARGE_SAMPLES / 4);
  return (GRADIENT_OVER_FIGURE * slope) / 1000 / members.length;
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
