// Drawing a robustness map: log10 infidelity through the viridis colour map into RGBA
// pixels (a coarse map fills what the fine one has not reached yet), and the threshold
// contour by marching squares with linear interpolation along cell edges.
import { VIRIDIS } from './viridis.ts';

/** Smallest infidelity drawn (values below, including exact zeros, take the darkest colour). */
export const LOG_FLOOR = -16;

/** log10 of an infidelity, held at LOG_FLOOR below 1e-16 (NaN stays NaN). */
export function logInfidelity(x: number): number {
  if (Number.isNaN(x)) return NaN;
  return x > 0 ? Math.max(LOG_FLOOR, Math.log10(x)) : LOG_FLOOR;
}

/** The colour-bar range: whole decades around the finite values, at most [LOG_FLOOR, 0]. */
export function decadeRange(values: ArrayLike<number>): { lo: number; hi: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (let k = 0; k < values.length; k++) {
    const v = logInfidelity(values[k]);
    if (Number.isNaN(v)) continue;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  if (!Number.isFinite(lo)) return { lo: -6, hi: 0 };
  lo = Math.max(LOG_FLOOR, Math.floor(lo));
  // "+ 0" turns the -0 of ceil(-0.3) into 0.
  hi = Math.min(0, Math.ceil(hi)) + 0;
  if (hi <= lo) hi = lo + 1;
  return { lo, hi };
}

/** Index into the colour table (0..255) of a log10 value within [lo, hi]. */
export function colourIndex(logValue: number, lo: number, hi: number): number {
  const t = (logValue - lo) / (hi - lo);
  return Math.max(0, Math.min(255, Math.round(t * 255)));
}

/** The CSS colour of a table index. */
export function colourCss(index: number): string {
  const k = 3 * Math.max(0, Math.min(255, Math.round(index)));
  return `rgb(${VIRIDIS[k]}, ${VIRIDIS[k + 1]}, ${VIRIDIS[k + 2]})`;
}

/** A grid of values, row-major with rows along the second axis (amplitude error). */
export interface Grid {
  nx: number;
  ny: number;
  values: ArrayLike<number>;
}

/**
 * RGBA pixels of `fine` (nx x ny), the top row being the largest second-axis value; a NaN
 * (not computed yet) takes the nearest value of `coarse`, which spans the same ranges.
 */
export function renderPixels(fine: Grid, lo: number, hi: number, coarse?: Grid): Uint8ClampedArray {
  const { nx, ny, values } = fine;
  const out = new Uint8ClampedArray(nx * ny * 4);
  for (let row = 0; row < ny; row++) {
    const y = ny - 1 - row;
    for (let x = 0; x < nx; x++) {
      let v = values[y * nx + x];
      if (Number.isNaN(v) && coarse) {
        const cx = nx === 1 ? 0 : Math.round((x * (coarse.nx - 1)) / (nx - 1));
        const cy = ny === 1 ? 0 : Math.round((y * (coarse.ny - 1)) / (ny - 1));
        v = coarse.values[cy * coarse.nx + cx];
      }
      const p = 4 * (row * nx + x);
      if (Number.isNaN(v)) {
        out[p + 3] = 0;
        continue;
      }
      const c = 3 * colourIndex(logInfidelity(v), lo, hi);
      out[p] = VIRIDIS[c];
      out[p + 1] = VIRIDIS[c + 1];
      out[p + 2] = VIRIDIS[c + 2];
      out[p + 3] = 255;
    }
  }
  return out;
}

/** A contour segment in grid coordinates (x along the first axis, y along the second, both in index units). */
export type Segment = [number, number, number, number];

/**
 * Segments of the level set `log10(infidelity) = log10(threshold)` (marching squares;
 * Lorensen and Cline, SIGGRAPH 1987, in two dimensions). Interpolating log values makes
 * the line sit where the decades say, not skewed towards the larger corner.
 */
export function contourSegments(grid: Grid, threshold: number): Segment[] {
  const { nx, ny, values } = grid;
  const level = Math.log10(threshold);
  const at = (x: number, y: number) => logInfidelity(values[y * nx + x]);
  const segments: Segment[] = [];
  for (let y = 0; y + 1 < ny; y++) {
    for (let x = 0; x + 1 < nx; x++) {
      const a = at(x, y);
      const b = at(x + 1, y);
      const c = at(x + 1, y + 1);
      const d = at(x, y + 1);
      if ([a, b, c, d].some(Number.isNaN)) continue;
      const code = (a >= level ? 1 : 0) | (b >= level ? 2 : 0) | (c >= level ? 4 : 0) | (d >= level ? 8 : 0);
      if (code === 0 || code === 15) continue;
      const t = (p: number, q: number) => (p === q ? 0.5 : (level - p) / (q - p));
      // Crossing points on the four edges: bottom (a-b), right (b-c), top (d-c), left (a-d).
      const bottom: [number, number] = [x + t(a, b), y];
      const right: [number, number] = [x + 1, y + t(b, c)];
      const top: [number, number] = [x + t(d, c), y + 1];
      const left: [number, number] = [x, y + t(a, d)];
      const add = (p: [number, number], q: [number, number]) => segments.push([p[0], p[1], q[0], q[1]]);
      switch (code) {
        case 1: case 14: add(left, bottom); break;
        case 2: case 13: add(bottom, right); break;
        case 3: case 12: add(left, right); break;
        case 4: case 11: add(right, top); break;
        case 6: case 9: add(bottom, top); break;
        case 7: case 8: add(left, top); break;
        case 5: case 10: {
          // Saddle: the mean of the corners decides which pairs of edges connect.
          const centreAbove = (a + b + c + d) / 4 >= level;
          if ((code === 5) === centreAbove) {
            add(left, top);
            add(bottom, right);
          } else {
            add(left, bottom);
            add(right, top);
          }
          break;
        }
      }
    }
  }
  return segments;
}

/** Nice tick values across [min, max]: about `count` of them at 1, 2 or 5 times a power of ten. */
export function ticks(min: number, max: number, count = 5): number[] {
  if (!(max > min)) return [min];
  const raw = (max - min) / Math.max(1, count);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const out: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}
