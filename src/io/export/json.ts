// The exported waveform as a pulse JSON file (src/io/pulse.ts): dt = 1/sampleRate and the
// quantised I/Q in Hz as exact doubles, padding included, the description in
// metadata.export. A single SSB channel is not a pulse, so it goes to the other formats.
import { ExportError, PulseFormatError } from '../../core/errors.ts';
import type { PulseMetadata } from '../../core/types.ts';
import { readPulse, writePulse } from '../pulse.ts';
import { parseWaveformDescription } from './description.ts';
import { checkSamples, samplesToPulse, type WaveformSamples } from './playback.ts';

/** The pulse JSON (UTF-8) of I/Q waveform samples; `metadata` adds fields (name, ...) beside metadata.export. */
export function writeJsonWaveform(samples: WaveformSamples, metadata: PulseMetadata = {}): Uint8Array {
  const d = samples.description;
  if (d.layout !== 'iq') {
    throw new ExportError('format: the pulse JSON holds I and Q; a single SSB channel is written as csv, npy, raw or wav');
  }
  const pulse = samplesToPulse(samples);
  // The file holds the channels as played: with upconversion "minus" the Q channel is -Q.
  if (d.upconversion === 'minus') pulse.q = pulse.q.map((x) => (x === 0 ? 0 : -x));
  pulse.metadata = { ...metadata, origin: 'export', export: { ...d, units: 'hz' } };
  return new TextEncoder().encode(writePulse(pulse));
}

/** Read waveform samples back from a pulse JSON written by writeJsonWaveform (the marker follows from the padding). */
export function readJsonWaveform(bytes: Uint8Array, source = 'JSON'): WaveformSamples {
  let pulse;
  try {
    pulse = readPulse(new TextDecoder().decode(bytes), { asStored: true });
  } catch (error) {
    if (error instanceof PulseFormatError) error.message = `${source}: ${error.message}`;
    throw error;
  }
  const exported = pulse.metadata.export;
  if (exported === undefined) throw new PulseFormatError(`${source}: a pulse without metadata.export is a design, not an exported waveform`);
  const description = parseWaveformDescription(exported, `${source} metadata.export`);
  if (description.layout !== 'iq') throw new PulseFormatError(`${source}: metadata.export.layout is "${description.layout}"; a pulse JSON holds I/Q`);
  if (Math.abs(pulse.dt * description.sampleRateHz - 1) > 1e-12) {
    throw new PulseFormatError(`${source}: dt ${pulse.dt} s is not 1 / sampleRateHz (${description.sampleRateHz} Hz)`);
  }
  const data = [pulse.i, pulse.q];
  if (description.channels.includes('marker')) {
    data.push(new Float64Array(description.length).fill(1, description.padBefore, description.length - description.padAfter));
  }
  return checkSamples({ description, units: 'hz', data }, source);
}
