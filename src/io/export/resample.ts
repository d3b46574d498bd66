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

/** Resample a design pulse to the instrument's sample period; 'hold' is refused unless dt is a whole number of periods. */
export function resamplePulse(pulse: Pulse, sampleRate: number, method: ResampleMethod): Resampled {
  const segments = pulse.i.length;
  const { ratio, whole } = samplesPerSegment(pulse.dt, sampleRate);
  if (method === 'hold' && whole === null) {
    throw new ExportError(
      `resample: "hold" needs the design's dt to be a whole number of instrument sample periods, but dt = ${pulse.dt} s ` +
        `is ${ratio} periods at sampleRate ${sampleRate} Hz; choose resample "hold-nearest", "linear" or "average" ` +
        `(the exported waveform is then evaluated as resampled)`,
    );
  }
  const n = resampledLength(segments, pulse.dt, sampleRate);
  const i = new Float64Array(n);
  const q = new Float64Array(n);
  if (method === 'hold' || (whole !== null && method !== 'linear')) {
    // A whole number of periods per design sample: holding, nearest-centre and averaging agree.
    const m = whole as number;
    for (let k = 0; k < segments; k++) {
      i.fill(pulse.i[k], k * m, (k + 1) * m);
      q.fill(pulse.q[k], k * m, (k + 1) * m);
    }
  } else if (method === 'hold-nearest') {
    for (let s = 0; s < n; s++) {
      const k = segmentUnderCentre(s, ratio, segments);
      i[s] = pulse.i[k];
      q[s] = pulse.q[k];
    }
  } else if (method === 'linear') {
    for (let s = 0; s < n; s++) {
      // Position in design samples, measured from the centre of the first one.
      const u = (s + 0.5) / ratio - 0.5;
      if (u <= 0 || segments === 1) {
        i[s] = pulse.i[0];
        q[s] = pulse.q[0];
      } else if (u >= segments - 1) {
        i[s] = pulse.i[segments - 1];
        q[s] = pulse.q[segments - 1];
      } else {
        const k = Math.floor(u);
        const f = u - k;
        i[s] = pulse.i[k] * (1 - f) + pulse.i[k + 1] * f;
        q[s] = pulse.q[k] * (1 - f) + pulse.q[k + 1] * f;
      }
    }
  } else {
    averageInto(pulse, ratio, i, q);
  }
  return { i, q, method, ratio, holdSamples: whole };
}

/** The mean of the piecewise-constant design over each instrument period; time past the end counts as zero drive. */
function averageInto(pulse: Pulse, ratio: number, i: Float64Array, q: Float64Array): void {
  const segments = pulse.i.length;
  let k = 0;
  for (let s = 0; s < i.length; s++) {
    // The period [s, s+1) in instrument samples is [s/ratio, (s+1)/ratio) in design samples.
    const a = s / ratio;
    const b = (s + 1) / ratio;
    while (k < segments && k + 1 <= a) k++;
    let sumI = 0;
    let sumQ = 0;
    for (let j = k; j < segments && j < b; j++) {
      const overlap = Math.min(b, j + 1) - Math.max(a, j);
      if (overlap > 0) {
        sumI += pulse.i[j] * overlap;
        sumQ += pulse.q[j] * overlap;
      }
    }
    // Divide by the period's length in design samples, 1/ratio.
    i[s] = sumI * ratio;
    q[s] = sumQ * ratio;
  }
}
