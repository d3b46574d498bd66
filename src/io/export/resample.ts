// From the design's samples (length dt) to the instrument's sample period 1/sampleRate,
// by the method the settings name (see ResampleMethod).
import { ExportError } from '../../core/errors.ts';
import type { Pulse } from '../../core/types.ts';
import type { ResampleMethod } from './settings.ts';

/** The I/Q at the instrument sample period, before padding and quantisation. */
export interface Resampled {
  i: Float64Array;
  q: Float64Array;
  method: ResampleMethod;
  /** Instrument samples per design sample, dt * sampleRate (not always whole). */
  ratio: number;
  /** The whole number of instrument samples per design sample, or null when dt is not a multiple of the period. */
  holdSamples: number | null;
}

/** Relative slack allowed when deciding that dt * sampleRate is a whole number (floating-point rounding). */
const WHOLE_TOLERANCE = 1e-9;

/** dt * sampleRate, and that number rounded when it is whole (within rounding), else null. */
export function samplesPerSegment(dt: number, sampleRate: number): { ratio: number; whole: number | null } {
  const ratio = dt * sampleRate;
  const nearest = Math.round(ratio);
  const whole = nearest >= 1 && Math.abs(ratio - nearest) <= WHOLE_TOLERANCE * ratio ? nearest : null;
  return { ratio, whole };
}

/** How many instrument samples the pulse part takes: it never ends before the design does. */
export function resampledLength(segments: number, dt: number, sampleRate: number): number {
  const { ratio, whole } = samplesPerSegment(dt, sampleRate);
  if (whole !== null) return segments * whole;
  const exact = segments * ratio;
  return Math.max(1, Math.ceil(exact - WHOLE_TOLERANCE * Math.max(1, exact)));
}

/**
 * The design sample under the centre of instrument sample n (0-based within the pulse part);
 * samples past the end belong to the last design sample.
 */
export function segmentUnderCentre(n: number, ratio: number, segments: number): number {
  return Math.min(segments - 1, Math.floor((n + 0.5) / ratio));
}

/**
 * The linear map from design samples to instrument samples: instrument sample s is
 * sum over j < width of weights[s * width + j] * design[first[s] + j]. Resampling applies it;
 * single-sideband demodulation inverts it, so both read the one definition of each method.
 */
export interface ResampleMap {
  length: number;
  width: number;
  first: Int32Array;
  weights: Float64Array;
}

/** The map of a method from `segments` design samples of `dt` to the instrument's period; 'hold' only when whole. */
export function resampleMap(segments: number, dt: number, sampleRate: number, method: ResampleMethod): ResampleMap {
  const { ratio, whole } = samplesPerSegment(dt, sampleRate);
  if (method === 'hold' && whole === null) {
    throw new ExportError(
      `resample: "hold" needs the design's dt to be a whole number of instrument sample periods, but dt = ${Number(dt.toPrecision(12))} s ` +
        `is ${Number(ratio.toPrecision(6))} periods at sampleRate ${sampleRate} Hz; choose resample "hold-nearest", "linear" or "average" ` +
        `(the exported waveform is then evaluated as resampled)`,
    );
  }
  const n = resampledLength(segments, dt, sampleRate);
  if (method === 'hold' || (whole !== null && method !== 'linear')) {
    // A whole number of periods per design sample: holding, nearest-centre and averaging agree.
    const first = Int32Array.from({ length: n }, (_, s) => Math.floor(s / (whole as number)));
    return { length: n, width: 1, first, weights: new Float64Array(n).fill(1) };
  }
  if (method === 'hold-nearest') {
    const first = Int32Array.from({ length: n }, (_, s) => segmentUnderCentre(s, ratio, segments));
    return { length: n, width: 1, first, weights: new Float64Array(n).fill(1) };
  }
  if (method === 'linear') {
    const first = new Int32Array(n);
    const weights = new Float64Array(2 * n);
    for (let s = 0; s < n; s++) {
      // Position in design samples, measured from the centre of the first one.
      const u = (s + 0.5) / ratio - 0.5;
      if (u <= 0 || segments === 1) {
        weights[2 * s] = 1;
      } else if (u >= segments - 1) {
        first[s] = segments - 1;
        weights[2 * s] = 1;
      } else {
        const k = Math.floor(u);
        first[s] = k;
        weights[2 * s] = 1 - (u - k);
        weights[2 * s + 1] = u - k;
      }
    }
    return { length: n, width: 2, first, weights };
  }
  return averageMap(segments, ratio, n);
}

/** The mean of the piecewise-constant design over each instrument period; time past the end counts as zero drive. */
function averageMap(segments: number, ratio: number, n: number): ResampleMap {
  // A period of 1/ratio design samples overlaps at most ceil(1/ratio) + 1 of them.
  const width = Math.ceil(1 / ratio) + 1;
  const first = new Int32Array(n);
  const weights = new Float64Array(n * width);
  for (let s = 0; s < n; s++) {
    // The period [s, s+1) in instrument samples is [s/ratio, (s+1)/ratio) in design samples.
    const a = s / ratio;
    const b = (s + 1) / ratio;
    const k = Math.min(segments - 1, Math.floor(a));
    first[s] = k;
    for (let j = k; j < segments && j < b && j - k < width; j++) {
      // Divide by the period's length in design samples, 1/ratio.
      const overlap = Math.min(b, j + 1) - Math.max(a, j);
      if (overlap > 0) weights[s * width + (j - k)] = overlap * ratio;
    }
  }
  return { length: n, width, first, weights };
}

/** Apply a resampling map to one channel of design samples. */
export function applyResampleMap(map: ResampleMap, design: ArrayLike<number>): Float64Array {
  const out = new Float64Array(map.length);
  for (let s = 0; s < map.length; s++) {
    let sum = 0;
    for (let j = 0; j < map.width; j++) {
      const w = map.weights[s * map.width + j];
      if (w !== 0) sum += w * design[map.first[s] + j];
    }
    out[s] = sum;
  }
  return out;
}

/** Resample a design pulse to the instrument's sample period; 'hold' is refused unless dt is a whole number of periods. */
export function resamplePulse(pulse: Pulse, sampleRate: number, method: ResampleMethod): Resampled {
  const { ratio, whole } = samplesPerSegment(pulse.dt, sampleRate);
  const map = resampleMap(pulse.i.length, pulse.dt, sampleRate, method);
  return { i: applyResampleMap(map, pulse.i), q: applyResampleMap(map, pulse.q), method, ratio, holdSamples: whole };
}
