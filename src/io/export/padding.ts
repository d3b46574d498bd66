// Zero padding to the instrument's block size and minimum length (docs/physics.md section 5).
import { ExportError } from '../../core/errors.ts';
import type { ExportSettings } from './settings.ts';

/** Where the pulse part sits in the padded waveform. */
export interface Padding {
  /** Zero samples before the pulse. */
  before: number;
  /** Zero samples after the pulse. */
  after: number;
  /** Total length in samples, before + pulse + after. */
  length: number;
}

/** The padded length and the split of the padding for a pulse part of `samples` samples. */
export function padding(samples: number, settings: Pick<ExportSettings, 'granularity' | 'minLength' | 'maxLength' | 'pad'>): Padding {
  const { granularity, minLength, maxLength, pad } = settings;
  const length = Math.ceil(Math.max(samples, minLength) / granularity) * granularity;
  if (length > maxLength) {
    throw new ExportError(
      `length: the waveform needs ${length} samples (pulse ${samples}, padded to a multiple of granularity ${granularity}` +
        `${minLength > samples ? ` and at least minLength ${minLength}` : ''}), more than maxLength ${maxLength}; ` +
        `shorten the pulse, lower the sample rate or raise maxLength to the instrument's memory`,
    );
  }
  const total = length - samples;
  const before = pad === 'before' ? total : pad === 'after' ? 0 : Math.floor(total / 2);
  return { before, after: total - before, length };
}

/** The samples of `x` placed after `before` zeros in an array of `length` samples. */
export function padArray(x: Float64Array, pad: Padding): Float64Array {
  const out = new Float64Array(pad.length);
  out.set(x, pad.before);
  return out;
}

/** The pulse part of a padded array (the inverse of padArray). */
export function unpadArray<T extends Float64Array | Int16Array>(x: T, pad: Pick<Padding, 'before' | 'after'>): T {
  return x.slice(pad.before, x.length - pad.after) as T;
}
