// The line's discrete kernel (docs/physics.md section 5, "The line"): on the fine grid
// delta = dt / oversample, h_j = integral of h(t) over [(j - 1/2) delta, (j + 1/2) delta],
// normalised to sum 1. Convolving the held samples with it gives the continuous filtered
// held waveform exactly at the centre of every fine step. Tails are cut where what is left
// out is below TAIL_FRACTION of the response's area.
import { ArgumentError } from './errors.ts';
import type { LineResponse } from './types.ts';
import * as pm from './portable-math.ts';

/** The area of the response left out by cutting its tails (each side), at most. */
export const TAIL_FRACTION = 1e-12;
/** Most taps a kernel may have (a lowpass far below the sample rate has a long tail). */
export const MAX_KERNEL_TAPS = 1 << 20;

/** A discrete kernel: taps on the fine grid, `lead` of them before lag 0. */
export interface DiscreteKernel {
  h: Float64Array;
  lead: number;
}

/** The discrete kernel of a response on a fine grid of `fine` seconds (null: the held samples alone). */
export function discreteKernel(response: LineResponse | null, fine: number, tail = TAIL_FRACTION): DiscreteKernel {
  if (response === null) return { h: Float64Array.of(1), lead: 0 };
  let k: DiscreteKernel;
  if (response.kind === 'gaussian') k = gaussianKernel(response.bandwidth, fine, tail);
  else if (response.kind === 'lowpass') k = lowpassKernel(response.bandwidths, fine, tail);
  else k = { h: Float64Array.from(response.values), lead: 0 };
  let sum = 0;
  for (const v of k.h) sum += v;
  for (let j = 0; j < k.h.length; j++) k.h[j] /= sum;
  return k;
}

/** sigma (s) of the Gaussian whose |H(f)| = exp(-ln2 f^2 / (2 fc^2)): sqrt(ln 2) / (2 pi fc). */
export function gaussianSigma(bandwidth: number): number {
  return Math.sqrt(Math.LN2) / (2 * Math.PI * bandwidth);
}

/** Half-width of the kept Gaussian in sigmas, x with erfc(x / sqrt 2) / 2 = tail (7.0345 for 1e-12), by bisection. */
export function gaussianHalfWidth(tail: number): number {
  let lo = 0, hi = 40;
  for (let k = 0; k < 100; k++) {
    const mid = (lo + hi) / 2;
    if (erfc(mid / Math.SQRT2) / 2 > tail) lo = mid;
    else hi = mid;
  }
  return hi;
}

function gaussianKernel(bandwidth: number, fine: number, tail: number): DiscreteKernel {
  const sigma = gaussianSigma(bandwidth);
  // Bins beyond K start farther out than the cut: K delta - delta/2 >= half width.
  const half = Math.max(0, Math.ceil((gaussianHalfWidth(tail) * sigma) / fine - 0.5));
  if (2 * half + 1 > MAX_KERNEL_TAPS) throw tooLong('gaussian', bandwidth, fine);
  const h = new Float64Array(2 * half + 1);
  const scale = fine / (sigma * Math.SQRT2);
  // P(a < X < b) for X ~ N(0, sigma^2), from erfc where it is small so the tails keep their digits.
  h[half] = erf(0.5 * scale);
  for (let j = 1; j <= half; j++) {
    const v = (erfc((j - 0.5) * scale) - erfc((j + 0.5) * scale)) / 2;
    h[half + j] = v;
    h[half - j] = v;
  }
  return { h, lead: half };
}

function tooLong(kind: string, bandwidth: number, fine: number): ArgumentError {
  return new ArgumentError(`line.response.${kind}.bandwidth: ${bandwidth} Hz is not allowed with a fine step of ${fine} s; ` +
    `its kernel would pass ${MAX_KERNEL_TAPS} taps: raise the bandwidth or lower the oversampling`);
}

/**
 * First-order RC stages in series, each |H(f)| = 1/sqrt(1 + (f/fc)^2) (-3 dB at fc,
 * RC = 1/(2 pi fc)). The survival y = 1 - step response of the cascade obeys
 * y1' = -l1 y1, yk' = lk (y_{k-1} - yk), y(0) = 1, so y over one fine step is one matrix
 * exponential, exact for any mix of equal and different bandwidths; the taps are
 * differences of y, which keeps the tail's digits.
 */
function lowpassKernel(bandwidths: readonly number[], fine: number, tail: number): DiscreteKernel {
  const rates = bandwidths.map((f) => 2 * Math.PI * f);
  const d = rates.length;
  const a = (scale: number): number[][] => rates.map((l, i) => rates.map((_, k) => (k === i ? -l * scale : k === i - 1 ? l * scale : 0)));
  const half = expm(a(fine / 2));
  const step = expm(a(fine));
  let y = apply(half, new Array<number>(d).fill(1));
  const taps = [1 - y[d - 1]];
  while (y[d - 1] > tail) {
    if (taps.length >= MAX_KERNEL_TAPS) throw tooLong('lowpass', Math.min(...bandwidths), fine);
    const next = apply(step, y);
    taps.push(y[d - 1] - next[d - 1]);
    y = next;
  }
  return { h: Float64Array.from(taps), lead: 0 };
}

function apply(m: number[][], v: number[]): number[] {
  return m.map((row) => row.reduce((s, x, k) => s + x * v[k], 0));
}

function multiply(a: number[][], b: number[][]): number[][] {
  return a.map((row) => b[0].map((_, k) => row.reduce((s, x, j) => s + x * b[j][k], 0)));
}

/** exp(A) of a small matrix by scaling and squaring with a Taylor series (terms to 1e-17 at norm 1/2). */
function expm(a: number[][]): number[][] {
  const d = a.length;
  let norm = 0;
  for (const row of a) norm = Math.max(norm, row.reduce((s, x) => s + Math.abs(x), 0));
  // Halved until the norm is at most 1/2 (exact steps: the same count on every engine).
  let squarings = 0, factor = 1;
  for (let n = norm; n > 0.5; n /= 2) {
    squarings++;
    factor /= 2;
  }
  const scaled = a.map((row) => row.map((x) => x * factor));
  const identity = (): number[][] => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, k) => (i === k ? 1 : 0)));
  let result = identity();
  let term = identity();
  for (let n = 1; n <= 20; n++) {
    term = multiply(term, scaled).map((row) => row.map((x) => x / n));
    result = result.map((row, i) => row.map((x, k) => x + term[i][k]));
  }
  for (let s = 0; s < squarings; s++) result = multiply(result, result);
  return result;
}

/** The complementary error function, to about 1e-15 relative (1 - erf below 2, a continued fraction above). */
export function erfc(x: number): number {
  if (x < 0) return 2 - erfc(-x);
  if (x < 2) return 1 - erf(x);
  // Lentz's method on erfc(x) = exp(-x^2)/sqrt(pi) * 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + ...)))).
  const tiny = 1e-300;
  let f = x, c = x, dd = 0;
  for (let k = 1; k < 500; k++) {
    const an = k / 2;
    dd = x + an * dd;
    dd = dd === 0 ? 1 / tiny : 1 / dd;
    c = x + an / c;
    if (c === 0) c = tiny;
    const delta = c * dd;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-17) break;
  }
  return pm.exp(-x * x) / (Math.sqrt(Math.PI) * f);
}

/** The error function: erf(x) = 2x/sqrt(pi) exp(-x^2) sum (2x^2)^n / (1 3 5 ... (2n+1)) (positive terms), 1 - erfc above 3. */
export function erf(x: number): number {
  if (x < 0) return -erf(-x);
  if (x >= 3) return 1 - erfc(x);
  let term = 1, sum = 1;
  for (let n = 1; n < 200; n++) {
    term *= (2 * x * x) / (2 * n + 1);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return ((2 * x) / Math.sqrt(Math.PI)) * pm.exp(-x * x) * sum;
}
