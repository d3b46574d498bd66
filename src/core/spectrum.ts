// The spectrum of a held pulse: the Fourier transform of the complex drive I + iQ held for
// dt per sample (zero-order hold), so the sinc envelope of the hold is part of it. It is
// plotted against the detuning of the qubit each component would drive, which lines it up
// with the robustness map's detuning axis (docs/analysis.md, "Spectrum").
//
// Convention. X(D) = integral of (I(t) + i Q(t)) exp(+2 pi i D t) dt. To first order in the
// drive, a qubit at detuning D (qubit minus drive, docs/physics.md section 1) leaves |0>
// with amplitude -i pi X(D), so |X(D)| is the pulse's weak-drive excitation profile.
// Held samples give X(D) = dt sinc(D dt) exp(i pi D dt) sum_k c_k exp(2 pi i D dt k), with
// c_k = I_k + i Q_k and sinc(x) = sin(pi x)/(pi x): one FFT of the zero-padded samples
// gives the sum on a grid, and the sum is periodic in D with period 1/dt.
import { ArgumentError } from './errors.ts';
import type { Pulse } from './types.ts';

/** Which detunings to report, and how many points at most. */
export interface SpectrumRequest {
  /** Lowest detuning (Hz). */
  min: number;
  /** Highest detuning (Hz). */
  max: number;
  /** Most points returned; finer grids keep the largest value of each bin (the envelope). */
  points: number;
  /** Levels (dB re the reference) whose extent is reported, e.g. [-3, -20]. */
  levels?: number[];
}

/** |X| of a held pulse over a span of detunings. */
export interface Spectrum {
  /** Detuning of each point (Hz), ascending. */
  detuning: Float64Array;
  /** |X(D)| (Hz s, i.e. turns per Hz of bandwidth; X(0) is the pulse area in turns for a real pulse). */
  magnitude: Float64Array;
  /** Largest |X| over the span and the first Nyquist zone, the 0 dB reference. */
  reference: number;
  /** Spacing of the underlying grid (Hz). */
  resolution: number;
  /** For each level asked for: the lowest and highest detuning of the span where |X| reaches it, on the full grid (null if nowhere). */
  levels: { db: number; from: number; to: number }[];
}

/** Longest FFT used (2^22 points, 64 MiB of doubles). */
const MAX_FFT = 1 << 22;
/** Most points a request may ask for. */
export const MAX_SPECTRUM_POINTS = 20001;

/** sin(pi x)/(pi x), 1 at 0. */
export function sinc(x: number): number {
  if (x === 0) return 1;
  const px = Math.PI * x;
  return Math.sin(px) / px;
}

function checkPulse(pulse: Pulse): void {
  const n = pulse.i.length;
  if (!(pulse.dt > 0) || !Number.isFinite(pulse.dt)) throw new ArgumentError(`dt: ${pulse.dt} is not allowed; a sample period > 0 s`);
  if (n === 0 || pulse.q.length !== n) throw new ArgumentError(`i, q: ${n} and ${pulse.q.length} samples; give as many Q as I samples, at least one`);
}

/** X(D) of a held pulse at one detuning by the direct sum (exact; O(N) per point). */
export function heldSpectrumAt(pulse: Pulse, detuning: number): { re: number; im: number } {
  checkPulse(pulse);
  const { dt, i, q } = pulse;
  let re = 0;
  let im = 0;
  for (let k = 0; k < i.length; k++) {
    // Phase of sample k's centre, exp(2 pi i D dt (k + 1/2)), taken afresh for each k (no recurrence drift).
    const phase = 2 * Math.PI * detuning * dt * (k + 0.5);
    const c = Math.cos(phase);
    const s = Math.sin(phase);
    re += i[k] * c - q[k] * s;
    im += i[k] * s + q[k] * c;
  }
  const envelope = dt * sinc(detuning * dt);
  return { re: re * envelope, im: im * envelope };
}

/** In-place radix-2 FFT with the +i sign: out_m = sum_k x_k exp(+2 pi i k m / L). */
export function fftPlus(re: Float64Array, im: Float64Array): void {
  const n = re.length;
  if (n & (n - 1)) throw new ArgumentError(`fft: length ${n} is not a power of two`);
  for (let k = 1, j = 0; k < n; k++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (k < j) {
      let t = re[k];
      re[k] = re[j];
      re[j] = t;
      t = im[k];
      im[k] = im[j];
      im[j] = t;
    }
  }
  const cos = new Float64Array(n >> 1);
  const sin = new Float64Array(n >> 1);
  for (let k = 0; k < n >> 1; k++) {
    cos[k] = Math.cos((2 * Math.PI * k) / n);
    sin[k] = Math.sin((2 * Math.PI * k) / n);
  }
  for (let size = 2; size <= n; size <<= 1) {
    const half = size >> 1;
    const stride = n / size;
    for (let start = 0; start < n; start += size) {
      for (let k = 0; k < half; k++) {
        const wr = cos[k * stride];
        const wi = sin[k * stride];
        const a = start + k;
        const b = a + half;
        const tr = re[b] * wr - im[b] * wi;
        const ti = re[b] * wi + im[b] * wr;
        re[b] = re[a] - tr;
        im[b] = im[a] - ti;
        re[a] += tr;
        im[a] += ti;
      }
    }
  }
}

function nextPow2(x: number): number {
  let p = 1;
  while (p < x) p <<= 1;
  return p;
}

/** |X(D)| of a held pulse over [min, max], on an FFT grid fine enough for `points` points and for the pulse's own features. */
export function heldSpectrum(pulse: Pulse, request: SpectrumRequest): Spectrum {
  checkPulse(pulse);
  const { min, max } = request;
  if (!Number.isFinite(min) || !Number.isFinite(max) || !(max > min)) {
    throw new ArgumentError(`span: from ${min} Hz to ${max} Hz is not allowed; give finite detunings with "from" below "to"`);
  }
  const points = request.points;
  if (!Number.isInteger(points) || points < 2 || points > MAX_SPECTRUM_POINTS) {
    throw new ArgumentError(`points: ${points} is not allowed; a whole number from 2 to ${MAX_SPECTRUM_POINTS}`);
  }
  const { dt, i, q } = pulse;
  const n = i.length;
  // At least 16 grid points per 1/T (the width of the pulse's features) and `points` across the span.
  const spanCycles = (max - min) * dt;
  const length = Math.min(MAX_FFT, Math.max(nextPow2(n), nextPow2(Math.max(8192, 16 * n, Math.ceil(points / spanCycles)))));
  const re = new Float64Array(length);
  const im = new Float64Array(length);
  re.set(i);
  im.set(q);
  fftPlus(re, im);
  const resolution = 1 / (length * dt);
  const magnitudeAt = (j: number): number => {
    const m = ((j % length) + length) % length;
    const d = j * resolution;
    return dt * Math.abs(sinc(d * dt)) * Math.hypot(re[m], im[m]);
  };
  // 0 dB: the largest value in the first Nyquist zone (where the pulse's energy sits) or the span.
  let reference = 0;
  for (let m = 0; m < length; m++) reference = Math.max(reference, magnitudeAt(m < length / 2 ? m : m - length));
  const first = Math.ceil(min / resolution);
  const last = Math.floor(max / resolution);
  const count = Math.max(0, last - first + 1);
  const bins = Math.min(points, count);
  const detuning = new Float64Array(bins);
  const magnitude = new Float64Array(bins);
  for (let b = 0; b < bins; b++) {
    // The bin's grid points; the largest value stands for the bin, at its own detuning.
    const from = first + Math.floor((b * count) / bins);
    const to = first + Math.floor(((b + 1) * count) / bins);
    let best = -1;
    let at = from;
    for (let j = from; j < to; j++) {
      const v = magnitudeAt(j);
      if (v > best) {
        best = v;
        at = j;
      }
    }
    detuning[b] = at * resolution;
    magnitude[b] = best;
    reference = Math.max(reference, best);
  }
  // Extents of the levels on the full grid, not on the bins (a bin may be far wider than the grid).
  const levels = (request.levels ?? []).map((db) => {
    const floor = reference * 10 ** (db / 20);
    let lo = Infinity;
    let hi = -Infinity;
    for (let j = first; j <= last; j++) {
      if (magnitudeAt(j) >= floor) {
        lo = Math.min(lo, j);
        hi = Math.max(hi, j);
      }
    }
    return Number.isFinite(lo) ? { db, from: lo * resolution, to: hi * resolution } : null;
  });
  return { detuning, magnitude, reference, resolution, levels: levels.filter((l) => l !== null) };
}

/** Decibels of a magnitude against a reference, floored at `floorDb`. */
export function decibels(magnitude: number, reference: number, floorDb = -160): number {
  if (!(magnitude > 0) || !(reference > 0)) return floorDb;
  return Math.max(floorDb, 20 * Math.log10(magnitude / reference));
}
