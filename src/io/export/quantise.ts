// DAC codes: code = round(x / fullScale * (2^(bits-1) - 1)), and back to Hz.
import { ExportError } from '../../core/errors.ts';
import { codeMax, type DacBits } from './settings.ts';

/** Hz per code step, fullScale / (2^(bits-1) - 1). */
export function codeStepHz(bits: DacBits, fullScale: number): number {
  return fullScale / codeMax(bits);
}

/**
 * Quantise values (Hz) to signed codes, rounding half away from zero so that -x gives the
 * negated code of x. A value whose code would pass full scale is refused, never clipped.
 */
export function quantise(x: Float64Array, bits: DacBits, fullScale: number, channel = 'channel'): Int16Array {
  const top = codeMax(bits);
  const out = new Int16Array(x.length);
  for (let n = 0; n < x.length; n++) {
    // In the formula's order, so that exact halves (x = fullScale / 2) stay exact.
    const v = (x[n] / fullScale) * top;
    const code = Math.sign(v) * Math.round(Math.abs(v));
    if (!(Math.abs(code) <= top)) {
      throw new ExportError(
        `${channel}[${n}]: ${x[n]} Hz is code ${code}, beyond the full-scale code ${top} (fullScale ${fullScale} Hz, ${bits} bits); ` +
          `the waveform is not written (it is never clipped)`,
      );
    }
    out[n] = code;
  }
  return out;
}

/** Codes back to values in Hz. */
export function codesToHz(codes: ArrayLike<number>, bits: DacBits, fullScale: number): Float64Array {
  const top = codeMax(bits);
  const out = new Float64Array(codes.length);
  for (let n = 0; n < codes.length; n++) out[n] = (codes[n] * fullScale) / top;
  return out;
}
