// Held (piecewise-constant) samples as chart points: sample k holds its value over
// [start + k dt, start + (k + 1) dt).

/**
 * How chart.js must step a line through held points. Its 'before' mode (the same as
 * `stepped: true`) keeps a point's value until the next point's x and then jumps
 * (`_steppedLineTo` in chart.js 4 draws lineTo(next.x, previous.y), then lineTo(next.x,
 * next.y)); its 'after' mode would draw each value over the interval before its point, one
 * sample early.
 */
export const HELD_STEP = 'before' as const;

/** A chart point; y is NaN where nothing is drawn (a gap). */
export interface ChartPoint {
  x: number;
  y: number;
}

const same = (a: number, b: number) => a === b || (Number.isNaN(a) && Number.isNaN(b));

/**
 * Held samples as the points of a line stepped by HELD_STEP: one point where each run of
 * equal values starts, one at the end of the last sample, and, where a run is followed by a
 * gap (NaN), a point closing the run at the gap's start. A held export repeats each value
 * hundreds of times; the runs draw the same steps with far fewer points.
 */
export function heldRuns(values: ArrayLike<number>, dt: number, start: number, tScale = 1, yScale = 1): ChartPoint[] {
  const out: ChartPoint[] = [];
  const n = values.length;
  for (let k = 0; k < n; k++) {
    if (k > 0 && same(values[k], values[k - 1])) continue;
    const x = (start + k * dt) / tScale;
    if (k > 0 && Number.isNaN(values[k]) && !Number.isNaN(values[k - 1])) out.push({ x, y: values[k - 1] / yScale });
    out.push({ x, y: values[k] / yScale });
  }
  if (n) out.push({ x: (start + n * dt) / tScale, y: values[n - 1] / yScale });
  return out;
}

/** Most points a held series is drawn with: beyond it the samples are summarised per bucket. */
export const MAX_HELD_POINTS = 1200;

/**
 * Held samples for a chart of at most about `maxPoints` points: the runs when they are few
 * enough, else, per bucket of consecutive samples, its lowest and highest value at the
 * bucket's start (a min-max envelope: each bucket spans less than a pixel column, and no
 * extreme is lost, which is what a limit check needs).
 */
export function heldPoints(values: ArrayLike<number>, dt: number, start: number, tScale = 1, yScale = 1, maxPoints = MAX_HELD_POINTS): ChartPoint[] {
  const n = values.length;
  if (n <= maxPoints) {
    const runs = heldRuns(values, dt, start, tScale, yScale);
    if (runs.length <= maxPoints) return runs;
  }
  const size = Math.ceil((2 * n) / maxPoints);
  const out: ChartPoint[] = [];
  for (let first = 0; first < n; first += size) {
    let lo = Infinity;
    let hi = -Infinity;
    const last = Math.min(n, first + size);
    for (let k = first; k < last; k++) {
      const v = values[k];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    const x = (start + first * dt) / tScale;
    if (lo > hi) out.push({ x, y: NaN });
    else out.push({ x, y: lo / yScale }, { x, y: hi / yScale });
  }
  if (n) {
    const tail = out.at(-1)!.y;
    out.push({ x: (start + n * dt) / tScale, y: tail });
  }
  return out;
}
