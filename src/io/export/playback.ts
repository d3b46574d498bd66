// The way back: samples as a file holds them (codes or Hz) -> I/Q in Hz at the instrument
// sample period (SSB demodulated, padding kept or removed) -> a Pulse that can be evaluated.
import { PulseFormatError } from '../../core/errors.ts';
import type { Pulse } from '../../core/types.ts';
import { descriptionSettings, type WaveformDescription } from './description.ts';
import { unpadArray } from './padding.ts';
import { codesToHz } from './quantise.ts';
import { resampledLength, resampleMap, samplesPerSegment, segmentUnderCentre } from './resample.ts';
import { demodulateSsb, type Block } from './ssb.ts';
import type { ExportedWaveform } from './waveform.ts';

/** What a sample file stores: DAC codes or values in Hz (the quantised values, code * fullScale / codeMax). */
export type SampleUnits = 'codes' | 'hz';

/** The samples of a waveform file, one array per channel in description.channels order. */
export interface WaveformSamples {
  description: WaveformDescription;
  units: SampleUnits;
  data: (Int16Array | Float64Array)[];
}

/** An exported waveform's samples in the units a file will hold. */
export function waveformSamples(waveform: ExportedWaveform, units: SampleUnits): WaveformSamples {
  const d = waveform.description;
  if (units === 'codes') return { description: d, units, data: waveform.codes };
  const data = waveform.codes.map((c, k) => (d.channels[k] === 'marker' ? Float64Array.from(c) : codesToHz(c, d.bits, d.fullScaleHz)));
  return { description: d, units, data };
}

/** Check that samples agree with their description (lengths, ranges, marker, no NaN); `source` names the file. */
export function checkSamples(samples: WaveformSamples, source: string): WaveformSamples {
  const d = samples.description;
  if (samples.data.length !== d.channels.length) {
    throw new PulseFormatError(`${source}: ${samples.data.length} channels found; the description lists ${d.channels.length} (${d.channels.join(', ')})`);
  }
  const pulseSamples = d.length - d.padBefore - d.padAfter;
  const expected = resampledLength(d.designSegments, d.designDtS, d.sampleRateHz);
  if (pulseSamples !== expected) {
    throw new PulseFormatError(
      `${source}: the pulse part has ${pulseSamples} samples (length ${d.length} - padding ${d.padBefore} + ${d.padAfter}); ` +
        `${d.designSegments} design samples of ${d.designDtS} s at ${d.sampleRateHz} Hz make ${expected}`,
    );
  }
  const limit = samples.units === 'codes' ? d.codeMax : d.fullScaleHz * (1 + 1e-9);
  samples.data.forEach((x, c) => {
    const name = d.channels[c];
    if (x.length !== d.length) {
      throw new PulseFormatError(`${source}: channel ${name} has ${x.length} samples; the description says length ${d.length}`);
    }
    for (let n = 0; n < x.length; n++) {
      const v = x[n];
      if (name === 'marker') {
        const want = n >= d.padBefore && n < d.length - d.padAfter ? 1 : 0;
        if (v !== want) throw new PulseFormatError(`${source}: marker[${n}] is ${v}; it is ${want} there (1 while the pulse plays, 0 in the padding)`);
      } else if (!Number.isFinite(v)) {
        throw new PulseFormatError(`${source}: ${name}[${n}] is ${v}; samples must be finite numbers`);
      } else if (Math.abs(v) > limit) {
        throw new PulseFormatError(`${source}: ${name}[${n}] = ${v} is beyond full scale (${limit} ${samples.units === 'codes' ? 'codes' : 'Hz'})`);
      }
    }
  });
  return samples;
}

/** The blocks of file samples that share one design sample (the design sample under each sample's centre). */
export function ssbBlocks(d: WaveformDescription): Block[] {
  const pulseSamples = d.length - d.padBefore - d.padAfter;
  const { ratio, whole } = samplesPerSegment(d.designDtS, d.sampleRateHz);
  const blocks: Block[] = [];
  let start = 0;
  let current = 0;
  for (let s = 0; s <= pulseSamples; s++) {
    const k = s === pulseSamples ? -1 : whole !== null ? Math.floor(s / whole) : segmentUnderCentre(s, ratio, d.designSegments);
    if (k !== current) {
      if (s > start) blocks.push({ start: d.padBefore + start, end: d.padBefore + s });
      start = s;
      current = k;
    }
  }
  return blocks;
}

/** Options of samplesToPulse. */
export interface PlaybackOptions {
  /** Drop the zero padding (default false: the waveform as played, padding included). */
  unpad?: boolean;
}

/** The waveform as a Pulse at the instrument sample period: I/Q in Hz, SSB demodulated, padding kept unless asked. */
export function samplesToPulse(samples: WaveformSamples, options: PlaybackOptions = {}): Pulse {
  const d = samples.description;
  const hz = samples.data.map((x, c) =>
    d.channels[c] === 'marker' ? Float64Array.from(x) : samples.units === 'codes' ? codesToHz(x, d.bits, d.fullScaleHz) : Float64Array.from(x),
  );
  let i: Float64Array;
  let q: Float64Array;
  if (d.layout === 'iq') {
    // Back to the drive the qubit sees: the Q channel of an upconversion "minus" holds -Q.
    [i, q] = hz;
    if (d.upconversion === 'minus') q = q.map((x) => (x === 0 ? 0 : -x));
  } else {
    const s = hz[0];
    for (let n = 0; n < s.length; n++) {
      if ((n < d.padBefore || n >= d.length - d.padAfter) && s[n] !== 0) {
        throw new PulseFormatError(`ssb[${n}] is ${s[n]} in the padding; padding samples are 0`);
      }
    }
    const map = resampleMap(d.designSegments, d.designDtS, d.sampleRateHz, d.resample);
    ({ i, q } = demodulateSsb(s, map, d.designSegments, descriptionSettings(d), d.padBefore));
  }
  if (options.unpad) {
    i = unpadArray(i, { before: d.padBefore, after: d.padAfter });
    q = unpadArray(q, { before: d.padBefore, after: d.padAfter });
  }
  return {
    dt: 1 / d.sampleRateHz,
    i,
    q,
    metadata: { origin: 'export', export: { ...d, units: samples.units, padding: options.unpad ? 'removed' : 'kept' } },
  };
}
