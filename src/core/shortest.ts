// The shortest pulse that meets a goal: designs at whole numbers of samples of the spec's
// sample period, bracketed and bisected over the duration, each design seeded by the pulse
// found at the nearest duration tried (stretched to the new length), so that the search
// follows one family of pulses rather than restarting from noise at every length.
import { design as designOnCore, toProblem } from './api.ts';
import type { DesignOptions } from './api.ts';
import { ArgumentError, describeValue } from './errors.ts';
import { MAX_SEGMENTS } from './spec.ts';
import type { DesignResult, Problem, Progress, Pulse, Target } from './types.ts';

/** What a shortest-duration search must reach, and where it may look. */
export interface ShortestOptions {
  /** The weighted mean infidelity must be at most this. */
  goalMean: number;
  /** The worst member's infidelity must be at most this (default: no condition). */
  goalWorst?: number;
  /** Fewest samples to try (default 1). */
  minSegments?: number;
  /** Most samples to try (default 8 times the spec's segments, at most MAX_SEGMENTS). */
  maxSegments?: number;
  /** Called when a duration has been designed and judged, with the pulse designed for it. */
  onTrial?: (trial: DurationTrial, pulse: Pulse) => void;
  /** Progress of the design running at the moment (as design()'s onProgress). */
  onProgress?: (progress: Progress, segments: number) => void;
  /** Aborting it ends the design running now and the search after it; what was found is returned. */
  signal?: AbortSignal;
  /** The design function (default the library's design(); the command line passes a threaded one). */
  design?: (problem: Problem, options: DesignOptions) => Promise<DesignResult>;
}

/** One duration tried: its best figures and whether they meet the goal. */
export interface DurationTrial {
  durationS: number;
  segments: number;
  meanInfidelity: number;
  worstInfidelity: number;
  met: boolean;
}

/** The outcome of a search: the shortest duration that met the goal (null if none did). */
export interface ShortestResult {
  durationS: number | null;
  segments: number | null;
  meanInfidelity: number | null;
  worstInfidelity: number | null;
  /** The best pulse at that duration, null if no duration met the goal. */
  pulse: Pulse | null;
  /** Its design result. */
  design: DesignResult | null;
  /** Every duration tried, shortest first. */
  tried: DurationTrial[];
  /** A rectangular pulse of the target's angle at the peak Rabi rate: theta / (2 pi peak), s. */
  lowerBoundS: number;
  /** The sample period the durations are whole numbers of (s). */
  dt: number;
  /** True when the search was stopped before its bracket closed. */
  stopped: boolean;
}

/**
 * The rotation angle (rad, 0..pi) a target needs: a gate's angle folded to its shortest
 * equivalent (R_n(theta) = -R_-n(2 pi - theta)), a state transfer's angle between the vectors.
 */
export function targetAngle(target: Target): number {
  if (target.kind === 'state') {
    const [a, b] = [target.from, target.to];
    return Math.acos(Math.max(-1, Math.min(1, a[0] * b[0] + a[1] * b[1] + a[2] * b[2])));
  }
  const turn = 2 * Math.PI;
  const theta = ((target.angleRad % turn) + turn) % turn;
  return Math.min(theta, turn - theta);
}

/**
 * The time a rectangular resonant pulse at the peak drive needs for the target's angle,
 * theta / (2 pi peak) (docs/physics.md section 1): no pulse of the same peak is shorter
 * on the error-free member. The box bound's peak is sqrt(2) rabiMax.
 */
export function rectangularTime(problem: Problem): number {
  const peak = problem.constraints.bound === 'box' ? Math.SQRT2 * problem.rabiMax : problem.rabiMax;
  return targetAngle(problem.target) / (2 * Math.PI * peak);
}

function checkGoal(value: number | undefined, name: string, required: boolean): void {
  if (value === undefined && !required) return;
  if (typeof value !== 'number' || !(value > 0 && value <= 1)) {
    throw new ArgumentError(`${name}: ${describeValue(value)} is not allowed; an infidelity > 0 and <= 1, e.g. 1e-4`);
  }
}

function checkSegments(value: number, name: string): void {
  if (!Number.isInteger(value) || value < 1 || value > MAX_SEGMENTS) {
    throw new ArgumentError(`${name}: ${describeValue(value)} is not allowed; a whole number of samples from 1 to ${MAX_SEGMENTS}`);
  }
}

/**
 * `pulse` stretched to `segments` samples: read at the same fraction of its duration (linear
 * between sample centres) and scaled by old/new length, which keeps the pulse area and so the
 * rotation angle of a one-axis pulse. The design pulls samples back inside the bound.
 */
export function stretchPulse(pulse: { i: ArrayLike<number>; q: ArrayLike<number> }, segments: number): { i: Float64Array; q: Float64Array } {
  const m = pulse.i.length;
  const scale = m / segments;
  const i = new Float64Array(segments), q = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    const x = Math.max(0, Math.min(m - 1, ((k + 0.5) * m) / segments - 0.5));
    const j = Math.min(m - 2, Math.floor(x));
    if (m === 1) {
      i[k] = pulse.i[0] * scale;
      q[k] = pulse.q[0] * scale;
      continue;
    }
    const f = x - j;
    i[k] = (pulse.i[j] * (1 - f) + pulse.i[j + 1] * f) * scale;
    q[k] = (pulse.q[j] * (1 - f) + pulse.q[j + 1] * f) * scale;
  }
  return { i, q };
}

/**
 * The shortest duration, in whole samples of the spec's sample period, at which a design meets
 * the goal: from the spec's own length, halve (or double) until the goal is bracketed, then
 * bisect until a duration that meets it sits one sample above one that does not.
 */
export async function shortestDuration(spec: unknown, options: ShortestOptions): Promise<ShortestResult> {
  const problem = toProblem(spec);
  checkGoal(options.goalMean, 'goalMean', true);
  checkGoal(options.goalWorst, 'goalWorst', false);
  const minN = options.minSegments ?? 1;
  const maxN = options.maxSegments ?? Math.min(MAX_SEGMENTS, 8 * problem.segments);
  checkSegments(minN, 'minSegments');
  checkSegments(maxN, 'maxSegments');
  if (minN > maxN) throw new ArgumentError(`minSegments: ${minN} is not allowed; it must not exceed maxSegments (${maxN})`);
  if (problem.constraints.zeroEdges && maxN < 3) {
    throw new ArgumentError(`maxSegments: ${maxN} is not allowed with zero edges; at least 3 samples`);
  }
  const low = problem.constraints.zeroEdges ? Math.max(3, minN) : minN;
  const runDesign = options.design ?? designOnCore;
  const dt = problem.dt;
  // N dt as the spec's own duration scaled, so that the spec's length prints as it was typed.
  const durationOf = (n: number): number => (n * problem.duration) / problem.segments;
  const lowerBoundS = rectangularTime(problem);
  // Below the rectangular time the error-free member cannot reach the angle: a good first guess downwards.
  const rectangularN = Math.floor(lowerBoundS / dt + 1e-9);

  const results = new Map<number, DesignResult>();
  const trials: DurationTrial[] = [];
  let lo = low - 1; // the longest duration known to fail (none below the minimum)
  let hi = maxN + 1; // the shortest duration known to meet the goal (none yet)
  let next = Math.max(low, Math.min(maxN, problem.segments));
  let stopped = false;
  for (;;) {
    const seed = seedFor(next, trials, results);
    const trialProblem: Problem = { ...problem, segments: next, duration: durationOf(next), dt };
    const result = await runDesign(trialProblem, {
      signal: options.signal,
      onProgress: options.onProgress ? (p) => options.onProgress!(p, next) : undefined,
      initialPulse: seed ? stretchPulse(seed, next) : undefined,
    });
    const ev = result.evaluation;
    const met = ev.meanInfidelity <= options.goalMean && (options.goalWorst === undefined || ev.worstInfidelity <= options.goalWorst);
    const trial: DurationTrial = { durationS: durationOf(next), segments: next, meanInfidelity: ev.meanInfidelity, worstInfidelity: ev.worstInfidelity, met };
    trials.push(trial);
    results.set(next, result);
    options.onTrial?.(trial, result.pulse);
    if (met) hi = next;
    else lo = next;
    if (hi <= lo + 1) break;
    if (options.signal?.aborted) {
      stopped = true;
      break;
    }
    if (hi > maxN) {
      // Nothing met yet: double upwards.
      if (lo >= maxN) break;
      next = Math.min(maxN, Math.max(lo + 1, 2 * lo));
    } else if (lo < low) {
      // Nothing failed yet: halve downwards, or jump to the rectangular time when that is shorter still.
      next = Math.max(low, Math.floor(hi / 2));
      if (rectangularN > next && rectangularN < hi) next = rectangularN;
    } else {
      next = Math.floor((lo + hi) / 2);
    }
  }
  trials.sort((a, b) => a.segments - b.segments);
  const best = hi <= maxN ? results.get(hi)! : null;
  return {
    durationS: best ? durationOf(hi) : null,
    segments: best ? hi : null,
    meanInfidelity: best ? best.evaluation.meanInfidelity : null,
    worstInfidelity: best ? best.evaluation.worstInfidelity : null,
    pulse: best ? best.pulse : null,
    design: best,
    tried: trials,
    lowerBoundS,
    dt,
    stopped,
  };
}

// The seed of a new duration: the pulse met at the nearest longer duration (shortening a
// pulse that works is the search's usual step), else the pulse of the nearest duration tried.
function seedFor(segments: number, trials: DurationTrial[], results: Map<number, DesignResult>): Pulse | undefined {
  let best: DurationTrial | undefined;
  for (const t of trials) {
    if (t.met && t.segments > segments && (!best || t.segments < best.segments)) best = t;
  }
  if (!best) {
    for (const t of trials) if (!best || Math.abs(t.segments - segments) < Math.abs(best.segments - segments)) best = t;
  }
  return best ? results.get(best.segments)!.pulse : undefined;
}
