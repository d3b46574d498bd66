// Held (piecewise-constant) samples as chart points.

/**
 * Held samples as the points of a line drawn with `stepped: 'after'`: one point where each run
 * of equal values starts (t = start + k dt, scaled), and one at the end of the last sample. A
 * held export repeats each value hundreds of times; the runs draw the same steps with far
 * fewer points.
 */
export function heldRuns(values: ArrayLike<number>, dt: number, start: number, tScale = 1, yScale = 1): { x: number; y: number }[] {
  const out: { x: number; y: number }[] = [];
  for (let k = 0; k < values.length; k++) {
    if (k === 0 || values[k] !== values[k - 1]) out.push({ x: (start + k * dt) / tScale, y: values[k] / yScale });
  }
  if (values.length) out.push({ x: (start + values.length * dt) / tScale, y: values[values.length - 1] / yScale });
  return out;
}
