// Uniform grid axes of robustness maps: where their points sit, what a valid axis is, and
// the default region of a spec (the range of its ensemble). Plain arithmetic, no core: the
// command line, the worker and the page all place and check grid points here.
import { ArgumentError, describeValue } from './errors.ts';
import type { GridAxis, Problem } from './types.ts';

/** Most points one axis of a map may have. */
export const MAX_AXIS_POINTS = 2001;

/** Points per axis of the default region. */
export const DEFAULT_REGION_POINTS = 101;

/** A region of errors: a detuning axis (Hz) by an amplitude-error axis (relative). */
export interface Region {
  detuning: GridAxis;
  amplitudeError: GridAxis;
}

/** The value of point k of a uniform axis (a single point sits at the midpoint). */
export function axisValue(axis: GridAxis, k: number): number {
  return axis.points === 1 ? (axis.min + axis.max) / 2 : axis.min + ((axis.max - axis.min) * k) / (axis.points - 1);
}

/** Every value of a uniform axis, in order. */
export function axisValues(axis: GridAxis): Float64Array {
  const v = new Float64Array(axis.points);
  for (let k = 0; k < axis.points; k++) v[k] = axisValue(axis, k);
  return v;
}

/** Check an axis: 1 to MAX_AXIS_POINTS whole points, finite min <= max, min above `lowest`; errors name `name`. */
export function checkAxis(axis: GridAxis, name: string, lowest = -Infinity): void {
  if (typeof axis !== 'object' || axis === null) {
    throw new ArgumentError(`${name}: ${describeValue(axis)} is not allowed; {"min", "max", "points"}`);
  }
  if (!Number.isInteger(axis.points) || axis.points < 1 || axis.points > MAX_AXIS_POINTS) {
    throw new ArgumentError(`${name}.points: ${describeValue(axis.points)} is not allowed; it must be a whole number from 1 to ${MAX_AXIS_POINTS}`);
  }
  if (!Number.isFinite(axis.min) || !Number.isFinite(axis.max) || axis.min > axis.max) {
    throw new ArgumentError(`${name}: ${describeValue([axis.min, axis.max])} is not allowed; min and max must be finite with min <= max`);
  }
  if (axis.min <= lowest) throw new ArgumentError(`${name}.min: ${axis.min} is not allowed; it must be above ${lowest}`);
}

/** Check a region: detuning any finite range, amplitude error above -1 (the drive would vanish). */
export function checkRegion(region: Region): void {
  checkAxis(region.detuning, 'detuning');
  checkAxis(region.amplitudeError, 'amplitudeError', -1);
}

/** The range of a problem's ensemble on each axis, `points` per axis (one where the ensemble does not vary). */
export function ensembleRegion(problem: Pick<Problem, 'members'>, points = DEFAULT_REGION_POINTS): Region {
  const range = (pick: (m: Problem['members'][number]) => number): GridAxis => {
    const v = problem.members.map(pick);
    const min = Math.min(...v);
    const max = Math.max(...v);
    return { min, max, points: min === max ? 1 : points };
  };
  return { detuning: range((m) => m.detuning), amplitudeError: range((m) => m.amplitudeError) };
}
