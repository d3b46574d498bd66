// The largest interval around zero error, along one error axis, where a pulse's
// infidelity stays below a threshold. Found without a grid: sqrt(infidelity) is the sine of
// the Fubini-Study angle between the target's and the pulse's (qubit subspace) states, and
// it cannot change faster than the propagator does (docs/transmon.md, "Half-widths on a
// ladder"), so with T the duration and A = sum |Omega| dt the pulse area (turns):
//   |d sqrt(1 - F) / d Delta|     <= pi (d - 1) T            (dH/dDelta = 2 pi n; pi T on the qubit)
//   |d sqrt(1 - F) / d eps|       <= pi A x_d                (x_d: largest root of the Hermite He_d; 1 on the qubit)
//   |d sqrt(1 - F) / d alphaErr|  <= pi (d - 1)(d - 2) T / 2 (dH/dalpha = pi n (n - 1))
// With that bound an interval [a, b] whose ends lie below the threshold is proven free of
// any crossing when (g(a) + g(b) + L (b - a)) / 2 < sqrt(threshold); intervals that are
// not proven are halved, leftmost first, until the first crossing is bracketed tightly.
import { evaluateMembers } from './api.ts';
import { ArgumentError } from './errors.ts';
import type { Member, Pulse, Target, LadderSystem } from './types.ts';

/** Which error axis a cut or a width runs along (the other error is held at zero). */
export type ErrorAxis = 'detuning' | 'amplitudeError';

/** An axis a half-width can be found along: a cut's axes, and on a ladder the anharmonicity error (Hz). */
export type WidthAxis = ErrorAxis | 'anharmonicityError';

/** The interval [lower, upper] around zero error on one axis where infidelity < threshold. */
export interface ThresholdInterval {
  /** <= 0: the first crossing below zero (Hz for detuning, relative for amplitude error). */
  lower: number;
  /** >= 0: the first crossing above zero. */
  upper: number;
  /** min(-lower, upper): the symmetric half-width around zero. */
  halfWidth: number;
  /** True when a side reached the search limit without crossing: the width is then at least this. */
  reachedLimit: boolean;
}

/** How closely a crossing is bracketed, relative to its distance from zero (the issue asks 1e-3). */
export const WIDTH_RELATIVE_TOLERANCE = 1e-7;

// Points of the first outward chunk; chunks double up to the largest.
const FIRST_CHUNK = 256;
const LARGEST_CHUNK = 65536;
// Outward points in all, per side: beyond them (a target the pulse meets at any error, such
// as the identity) the width is reported as "at least" the distance reached.
const MAX_SCAN_POINTS = 1 << 20;
// Halvings per side: far more than a bracket of 1e-7 needs; a bound for near-tangent curves.
const MAX_REFINEMENTS = 20000;
// The drive vanishes at amplitude error -1; the search stops just short of it.
const AMPLITUDE_FLOOR = -1 + 1e-9;

/**
 * The largest root of the probabilists' Hermite polynomial He_d: the norm of the truncated
 * a + a^dag on d levels, whose characteristic polynomial He_d is (He_{k+1} = x He_k - k He_{k-1}).
 * Newton's method from above every root (2 sqrt(d)) falls monotonically onto the largest.
 */
export function ladderDriveNorm(levels: number): number {
  if (levels <= 2) return 1; // sigma_x: the qubit's bound exactly
  const he = (x: number): [number, number] => {
    let previous = 1, current = x;
    for (let k = 1; k < levels; k++) [previous, current] = [current, x * current - k * previous];
    return [current, previous]; // He_d(x), He_{d-1}(x); He_d' = d He_{d-1}
  };
  let x = 2 * Math.sqrt(levels);
  for (let step = 0; step < 200; step++) {
    const [value, below] = he(x);
    const next = x - value / (levels * below);
    if (!(next < x)) break;
    x = next;
  }
  return x;
}

/**
 * Bounds of sqrt(infidelity)'s slope along each axis (per Hz of detuning or anharmonicity
 * error, per unit of relative amplitude error), on the qubit or the ladder `system`.
 */
export function slopeBounds(pulse: Pulse, system?: LadderSystem): Record<WidthAxis, number> {
  let area = 0;
  for (let k = 0; k < pulse.i.length; k++) area += Math.hypot(pulse.i[k], pulse.q[k]) * pulse.dt;
  const duration = pulse.i.length * pulse.dt;
  const d = system?.levels ?? 2;
  return {
    detuning: Math.PI * (d - 1) * duration,
    amplitudeError: Math.PI * area * ladderDriveNorm(d),
    anharmonicityError: (Math.PI * (d - 1) * (d - 2) * duration) / 2,
  };
}

/** The search limits of each side of an axis: where the width stops being a useful figure. */
function searchLimits(pulse: Pulse, axis: WidthAxis): { below: number; above: number } {
  if (axis === 'amplitudeError') return { below: -AMPLITUDE_FLOOR, above: 10 };
  // Far beyond the drive's reach: a detuning (or anharmonicity error) 1000 times the larger
  // of the peak Rabi frequency and the inverse duration leaves a pulse doing next to nothing.
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  const limit = 1000 * Math.max(peak, 1 / (pulse.i.length * pulse.dt));
  return { below: limit, above: limit };
}

/** The interval around zero error on `axis` where infidelity against `target` stays below `threshold`. */
export function thresholdInterval(target: Target, pulse: Pulse, axis: WidthAxis, threshold: number, system?: LadderSystem): ThresholdInterval {
  if (axis === 'anharmonicityError' && !(system && system.levels > 2)) {
    throw new ArgumentError(`axis: "anharmonicityError" is not allowed without a ladder; give a system of 3 or more levels`);
  }
  const bound = slopeBounds(pulse, system)[axis];
  const limits = searchLimits(pulse, axis);
  const rootThreshold = Math.sqrt(threshold);
  const sideOf = (sign: 1 | -1, limit: number) => {
    // g(x): sqrt(infidelity) at signed distance sign * x from zero error.
    const g = (xs: number[]): Float64Array => {
      const members: Member[] = xs.map((x) => ({ detuning: 0, amplitudeError: 0, weight: 1, [axis]: sign * x }));
      const figures = evaluateMembers(target, pulse, members, undefined, system).members;
      return Float64Array.from(figures, (m) => Math.sqrt(m.infidelity));
    };
    return firstCrossing(g, bound, rootThreshold, limit);
  };
  const up = sideOf(1, limits.above);
  const down = sideOf(-1, limits.below);
  return {
    lower: -down.at,
    upper: up.at,
    halfWidth: Math.min(up.at, down.at),
    reachedLimit: up.reachedLimit || down.reachedLimit,
  };
}

/**
 * The first x >= 0 where g(x) reaches `level`, for g with |g'| <= `slope`, searched up to
 * `limit`. Returns the largest x proven below the level (within the tolerance).
 */
export function firstCrossing(
  g: (xs: number[]) => Float64Array,
  slope: number,
  level: number,
  limit: number,
): { at: number; reachedLimit: boolean } {
  const g0 = g([0])[0];
  if (!(g0 < level)) return { at: 0, reachedLimit: false };
  if (!(slope > 0)) return { at: limit, reachedLimit: true };
  // With this step, neighbours whose values add up to less than the level are proven free.
  const step = level / slope;
  const tolerance = (b: number) => WIDTH_RELATIVE_TOLERANCE * Math.max(b, 1e-6 * step);
  let refinements = 0;

  // Leftmost-first halving of [a, b]; returns the crossing or null when [a, b] is below the level.
  const resolve = (a: number, ga: number, b: number, gb: number): number | null => {
    const crossesAtEnd = !(gb < level);
    if (!crossesAtEnd && (ga + gb + slope * (b - a)) / 2 < level) return null;
    if (b - a <= tolerance(b) || refinements >= MAX_REFINEMENTS) {
      // A bracket this tight is the answer; an unproven one this narrow only grazes the level.
      return crossesAtEnd ? a : null;
    }
    refinements++;
    const m = a + (b - a) / 2;
    const gm = g([m])[0];
    const left = resolve(a, ga, m, gm);
    if (left !== null) return left;
    return resolve(m, gm, b, gb);
  };

  let a = 0;
  let ga = g0;
  let chunk = FIRST_CHUNK;
  let scanned = 0;
  while (a < limit && scanned < MAX_SCAN_POINTS) {
    const xs: number[] = [];
    for (let k = 1; k <= chunk && xs[xs.length - 1] !== limit; k++) xs.push(Math.min(limit, a + k * step));
    const gs = g(xs);
    for (let k = 0; k < xs.length; k++) {
      const crossing = resolve(a, ga, xs[k], gs[k]);
      if (crossing !== null) return { at: crossing, reachedLimit: false };
      a = xs[k];
      ga = gs[k];
    }
    scanned += xs.length;
    chunk = Math.min(2 * chunk, LARGEST_CHUNK);
  }
  return { at: a, reachedLimit: true };
}
