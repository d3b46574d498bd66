// Single-sideband modulation of I/Q onto one real channel at an intermediate frequency,
// and its inversion for evaluation (docs/physics.md section 5).
//
// s(t_n) = I_n cos(2 pi f t_n) - sigma Q_n sin(2 pi f t_n),  t_n = n / sampleRate,
// with sigma = +1 for the upper sideband and mixer sign +1 (ssbQSign). Time n = 0 is the
// first sample of the file, padding included: the carrier runs on the instrument's clock.
//
// Demodulation: one real sample cannot give two unknowns, but the design holds I and Q
// over each of its samples, so over each block of instrument samples that share a design
// sample we solve the 2x2 least-squares problem for (I, Q). Where the I/Q really are held
// (resample 'hold') this is an exact inversion (up to rounding, and it is the least-squares
// estimate under quantisation); for the other methods it is the best constant fit over the
// block, i.e. an average. The mixer's image sideband and carrier leakage are not modelled.
import { ExportError } from '../../core/errors.ts';
import { ssbQSign, type ExportSettings } from './settings.ts';

/** The SSB part of the settings. */
export type SsbSettings = Pick<ExportSettings, 'sampleRate' | 'intermediateFrequency' | 'sideband' | 'mixerSign'>;

/** cos and sigma-signed -sin of the carrier at file sample n. */
function carrier(n: number, settings: SsbSettings): [number, number] {
  // Reduce the phase to one cycle first so that long files keep full precision.
  const cycles = (n * settings.intermediateFrequency) / settings.sampleRate;
  const phase = 2 * Math.PI * (cycles - Math.floor(cycles));
  return [Math.cos(phase), -ssbQSign(settings) * Math.sin(phase)];
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

/** The demodulated I/Q, held over each block, and the worst conditioning met. */
export interface Demodulated {
  i: Float64Array;
  q: Float64Array;
  /** Largest condition number of a block's 2x2 normal matrix (noise gain is its square root). */
  worstCondition: number;
}

/** Condition numbers above this make a block's I and Q inseparable. */
const SINGULAR_CONDITION = 1e10;

/** Invert SSB modulation by least squares over each block (indices are file sample indices). */
export function demodulateSsb(s: ArrayLike<number>, blocks: Block[], settings: SsbSettings): Demodulated {
  const i = new Float64Array(s.length);
  const q = new Float64Array(s.length);
  let worstCondition = 1;
  for (const { start, end } of blocks) {
    // s_n = I a_n + Q b_n with (a_n, b_n) = carrier(n): normal equations of the 2x2 fit.
    let aa = 0;
    let ab = 0;
    let bb = 0;
    let as = 0;
    let bs = 0;
    for (let n = start; n < end; n++) {
      const [a, b] = carrier(n, settings);
      aa += a * a;
      ab += a * b;
      bb += b * b;
      as += a * s[n];
      bs += b * s[n];
    }
    const det = aa * bb - ab * ab;
    const trace = aa + bb;
    const root = Math.sqrt(Math.max(0, trace * trace - 4 * det));
    const condition = det > 0 ? (trace + root) / (trace - root) : Infinity;
    if (!(condition < SINGULAR_CONDITION)) {
      throw new ExportError(
        `intermediateFrequency: ${settings.intermediateFrequency} Hz leaves samples ${start}..${end - 1} (one design sample) ` +
          `without the carrier phase spread needed to separate I from Q; give each design sample at least 2 instrument ` +
          `samples and an intermediate frequency away from 0 and sampleRate/2`,
      );
    }
    worstCondition = Math.max(worstCondition, condition);
    const iValue = (bb * as - ab * bs) / det;
    const qValue = (aa * bs - ab * as) / det;
    i.fill(iValue, start, end);
    q.fill(qValue, start, end);
  }
  return { i, q, worstCondition };
}
