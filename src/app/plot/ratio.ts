// Where one pulse beats another: the ratio of two infidelity maps on the same grid, drawn
// in a diverging colour map centred on "equal" (blue where the first pulse is better, red
// where the second is), with the equality line as its contour.
import { logInfidelity, type Grid } from './heatmap.ts';

/**
 * ColorBrewer's RdBu, 11 classes (Brewer and Harrower, colorbrewer2.org, 2003; values recalled
 * from memory and checked by eye against the published swatches), blue end first: a
 * diverging map that stays readable with the common colour-vision deficiencies.
 */
const RDBU = ['053061', '2166ac', '4393c3', '92c5de', 'd1e5f0', 'f7f7f7', 'fddbc7', 'f4a582', 'd6604d', 'b2182b', '67001f'].map((h) => [
  parseInt(h.slice(0, 2), 16),
  parseInt(h.slice(2, 4), 16),
  parseInt(h.slice(4, 6), 16),
]);

/** The diverging colour at t in [0, 1] (0: deep blue, 0.5: near white, 1: deep red), interpolated between the classes. */
export function divergingColour(t: number): [number, number, number] {
  const x = Math.max(0, Math.min(1, t)) * (RDBU.length - 1);
  const k = Math.min(RDBU.length - 2, Math.floor(x));
  const f = x - k;
  const a = RDBU[k];
  const b = RDBU[k + 1];
  return [Math.round(a[0] + f * (b[0] - a[0])), Math.round(a[1] + f * (b[1] - a[1])), Math.round(a[2] + f * (b[2] - a[2]))];
}

/** The ratio grid a / b (each infidelity held at 1e-16 and above, as the maps draw them); NaN where either is not known yet. */
export function ratioGrid(a: Grid, b: Grid): Grid {
  if (a.nx !== b.nx || a.ny !== b.ny) throw new Error(`ratioGrid: grids of ${a.nx} x ${a.ny} and ${b.nx} x ${b.ny} points differ`);
  const values = new Float64Array(a.values.length);
  for (let k = 0; k < values.length; k++) {
    const x = logInfidelity(a.values[k]);
    const y = logInfidelity(b.values[k]);
    values[k] = Number.isNaN(x) || Number.isNaN(y) ? NaN : 10 ** (x - y);
  }
  return { nx: a.nx, ny: a.ny, values };
}

/**
 * Whole decades m such that the colour bar spans 1e-m .. 1e+m (1 to 12): enough for 98 % of
 * the cells, so that a few extreme cells (an exact zero of one pulse) do not wash out the rest.
 */
export function ratioSpan(values: ArrayLike<number>): number {
  const logs: number[] = [];
  for (let k = 0; k < values.length; k++) {
    const v = Math.abs(Math.log10(values[k]));
    if (Number.isFinite(v)) logs.push(v);
  }
  if (logs.length === 0) return 1;
  logs.sort((a, b) => a - b);
  const typical = logs[Math.ceil(0.98 * (logs.length - 1))];
  return Math.max(1, Math.min(12, Math.ceil(typical - 1e-9)));
}

/** RGBA pixels of a ratio grid, top row the largest second-axis value, log10 ratio from -span (blue) to +span (red). */
export function renderRatioPixels(grid: Grid, span: number): Uint8ClampedArray {
  const { nx, ny, values } = grid;
  const out = new Uint8ClampedArray(nx * ny * 4);
  for (let row = 0; row < ny; row++) {
    const y = ny - 1 - row;
    for (let x = 0; x < nx; x++) {
      const v = values[y * nx + x];
      const p = 4 * (row * nx + x);
      if (Number.isNaN(v)) continue;
      const [r, g, b] = divergingColour((Math.log10(v) + span) / (2 * span));
      out[p] = r;
      out[p + 1] = g;
      out[p + 2] = b;
      out[p + 3] = 255;
    }
  }
  return out;
}
