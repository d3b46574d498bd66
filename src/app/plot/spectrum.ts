// What the spectrum view draws: curves in dB over detuning and vertical markers.
import { decibels } from '../../core/spectrum.ts';

/** A curve in dB over detuning (Hz): the pulse's spectrum, or an overlay such as a line's response. */
export interface SpectrumCurve {
  label: string;
  detuning: ArrayLike<number>;
  db: ArrayLike<number>;
  colour: string;
}

/** Vertical lines at given detunings (Hz), one legend entry. */
export interface SpectrumMarker {
  label: string;
  at: number[];
  colour: string;
  dash: number[];
}

/** Levels in dB of magnitudes against a reference (floored, so that exact nulls stay drawable). */
export function toDecibels(magnitude: ArrayLike<number>, reference: number, floorDb = -160): Float64Array {
  const out = new Float64Array(magnitude.length);
  for (let k = 0; k < magnitude.length; k++) out[k] = decibels(magnitude[k], reference, floorDb);
  return out;
}
