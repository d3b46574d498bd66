// Single-sideband modulation of I/Q onto one real channel at an intermediate frequency,
// and its inversion for evaluation (docs/physics.md section 5).
//
// s(t_n) = I_n cos(2 pi f t_n) + sigma Q_n sin(2 pi f t_n),  t_n = n / sampleRate,
// with sigma = +1 for the upper sideband and mixer sign +1 (ssbQSign). Mixed with the LO,
// the chosen sideband reaches the qubit as I cos(2 pi f_d t) + Q sin(2 pi f_d t), the
// convention under which the qubit sees the designed drive (docs/physics.md sections 1
// and 5). Time n = 0 is the first sample of the file, padding included: the carrier runs
// on the instrument's clock.
//
// Demodulation: one real sample cannot give two unknowns, but the played I/Q are a known
// linear map of the design's samples (the resampling method, resample.ts), so the design's
// I and Q are fitted to the whole channel by linear least squares through that map, and
// the map then gives the I/Q of every played sample. Where the I/Q really are held
// (resample 'hold') this is the exact inversion of each design sample's block; for the
// interpolating methods it follows the interpolation, which a constant fit per design sample
// would average away. Under quantisation it is the least-squares estimate. The mixer's
// image sideband and carrier leakage are not modelled.
import { ExportError } from '../../core/errors.ts';
import { applyResampleMap, type ResampleMap } from './resample.ts';
import { ssbQSign, type ExportSettings } from './settings.ts';

/** The SSB part of the settings. */
export type SsbSettings = Pick<ExportSettings, 'sampleRate' | 'intermediateFrequency' | 'sideband' | 'mixerSign'>;

/** cos and sigma-signed sin of the carrier at file sample n. */
function carrier(n: number, settings: SsbSettings): [number, number] {
  // Reduce the phase to one cycle first so that long files keep full precision.
  const cycles = (n * settings.intermediateFrequency) / settings.sampleRate;
  const phase = 2 * Math.PI * (cycles - Math.floor(cycles));
  return [Math.cos(phase), ssbQSign(settings) * Math.sin(phase)];
}

/** The real SSB channel of the I/Q samples (Hz); `first` is the file index of i[0]. */
export function modulateSsb(i: Float64Array, q: Float64Array, settings: SsbSettings, first = 0): Float64Array {
  const s = new Float64Array(i.length);
  for (let n = 0; n < i.length; n++) {
    const [a, b] = carrier(first + n, settings);
    s[n] = i[n] * a + q[n] * b;
  }
  return s;
}

/** A run of samples [start, end) over which the modulating I/Q are taken as constant. */
export interface Block {
  start: number;
  end: number;
}

/** The demodulated I/Q at every file sample (zero in the padding). */
export interface Demodulated {
  i: Float64Array;
  q: Float64Array;
}

/** Condition numbers above this make a block's I and Q inseparable. */
const SINGULAR_CONDITION = 1e10;

/** The carrier's phase spread must separate I from Q; the message of a refusal. */
function inseparable(settings: SsbSettings, start: number, end: number): ExportError {
  return new ExportError(
    `intermediateFrequency: ${settings.intermediateFrequency} Hz leaves samples ${start}..${end - 1} (one design sample) ` +
      `without the carrier phase spread needed to separate I from Q; give each design sample at least 2 instrument ` +
      `samples and an intermediate frequency away from 0 and sampleRate/2`,
  );
}

/**
 * The largest condition number of a block's 2x2 fit of a constant (I, Q) to its carrier
 * samples (noise gain is its square root); refuses a block where I and Q cannot be separated.
 */
export function blockConditioning(blocks: Block[], settings: SsbSettings): number {
  let worstCondition = 1;
  for (const { start, end } of blocks) {
    let aa = 0;
    let ab = 0;
    let bb = 0;
    for (let n = start; n < end; n++) {
      const [a, b] = carrier(n, settings);
      aa += a * a;
      ab += a * b;
      bb += b * b;
    }
    const det = aa * bb - ab * ab;
    const trace = aa + bb;
    const root = Math.sqrt(Math.max(0, trace * trace - 4 * det));
    const condition = det > 0 ? (trace + root) / (trace - root) : Infinity;
    if (!(condition < SINGULAR_CONDITION)) throw inseparable(settings, start, end);
    worstCondition = Math.max(worstCondition, condition);
  }
  return worstCondition;
}

/**
 * Invert SSB modulation: fit the design's I/Q through the resampling map to the channel
 * `s` (whose pulse part starts at file sample `first`) by least squares, then map them to
 * the played samples.
 */
export function demodulateSsb(s: ArrayLike<number>, map: ResampleMap, segments: number, settings: SsbSettings, first = 0): Demodulated {
  // Unknowns interleaved (I_0, Q_0, I_1, Q_1, ...); sample n involves design samples
  // first[n] .. first[n] + width - 1, so the normal matrix is banded with half-width p.
  const m = 2 * segments;
  const p = 2 * map.width - 1;
  const band = new Float64Array(m * (p + 1)); // band[r * (p + 1) + d] = M[r][r + d]
  const rhs = new Float64Array(m);
  const cols = new Int32Array(2 * map.width);
  const vals = new Float64Array(2 * map.width);
  for (let t = 0; t < map.length; t++) {
    const [a, b] = carrier(first + t, settings);
    let used = 0;
    for (let j = 0; j < map.width; j++) {
      const w = map.weights[t * map.width + j];
      if (w === 0) continue;
      const k = map.first[t] + j;
      cols[used] = 2 * k;
      vals[used++] = w * a;
      cols[used] = 2 * k + 1;
      vals[used++] = w * b;
    }
    const value = s[first + t];
    for (let x = 0; x < used; x++) {
      rhs[cols[x]] += vals[x] * value;
      for (let y = 0; y < used; y++) {
        if (cols[y] >= cols[x]) band[cols[x] * (p + 1) + (cols[y] - cols[x])] += vals[x] * vals[y];
      }
    }
  }
  const design = solveBanded(band, rhs, m, p, (r) => {
    // Name the played samples that carry the unknown design sample.
    const k = r >> 1;
    let start = -1;
    let end = -1;
    for (let t = 0; t < map.length; t++) {
      if (map.first[t] <= k && k < map.first[t] + map.width && map.weights[t * map.width + k - map.first[t]] !== 0) {
        if (start < 0) start = t;
        end = t + 1;
      }
    }
    return inseparable(settings, first + Math.max(0, start), first + Math.max(1, end));
  });
  const iDesign = new Float64Array(segments);
  const qDesign = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    iDesign[k] = design[2 * k];
    qDesign[k] = design[2 * k + 1];
  }
  const i = new Float64Array(s.length);
  const q = new Float64Array(s.length);
  i.set(applyResampleMap(map, iDesign), first);
  q.set(applyResampleMap(map, qDesign), first);
  return { i, q };
}

/** Solve the symmetric positive definite banded system M x = rhs by Cholesky; `singular(row)` makes the error. */
function solveBanded(band: Float64Array, rhs: Float64Array, m: number, p: number, singular: (row: number) => Error): Float64Array {
  const w = p + 1;
  // M = L L^T with L stored by rows: l[r * w + (r - c)] = L[r][c] for 0 <= r - c <= p.
  const l = new Float64Array(m * w);
  const at = (r: number, c: number) => (r - c > p || c > r ? 0 : l[r * w + (r - c)]);
  for (let c = 0; c < m; c++) {
    let diag = band[c * w];
    for (let k = Math.max(0, c - p); k < c; k++) diag -= at(c, k) ** 2;
    if (!(diag > band[c * w] / SINGULAR_CONDITION)) throw singular(c);
    const root = Math.sqrt(diag);
    l[c * w] = root;
    for (let r = c + 1; r <= Math.min(m - 1, c + p); r++) {
      let v = band[c * w + (r - c)];
      for (let k = Math.max(0, r - p); k < c; k++) v -= at(r, k) * at(c, k);
      l[r * w + (r - c)] = v / root;
    }
  }
  const y = new Float64Array(m);
  for (let r = 0; r < m; r++) {
    let v = rhs[r];
    for (let k = Math.max(0, r - p); k < r; k++) v -= at(r, k) * y[k];
    y[r] = v / l[r * w];
  }
  const x = new Float64Array(m);
  for (let r = m - 1; r >= 0; r--) {
    let v = y[r];
    for (let k = r + 1; k <= Math.min(m - 1, r + p); k++) v -= at(k, r) * x[k];
    x[r] = v / l[r * w];
  }
  return x;
}
