// Any file this program writes -> a Pulse that can be evaluated: an exported waveform in
// any format (I/Q in Hz at the instrument sample period, SSB demodulated) or a pulse JSON.
import { PulseFormatError } from '../../core/errors.ts';
import type { Pulse } from '../../core/types.ts';
import { readPulse } from '../pulse.ts';
import { decodeWaveform, detectFormat, type DecodeOptions } from './formats.ts';
import { samplesToPulse, type PlaybackOptions } from './playback.ts';

/** Options of readWaveform: what decoding needs (the description beside npy/raw) and whether to drop padding. */
export type ReadWaveformOptions = DecodeOptions & PlaybackOptions;

/** Read the bytes of a waveform or pulse file named `name` into a Pulse; a pulse JSON without export metadata is returned as it is. */
export async function readWaveform(bytes: Uint8Array, name: string, options: ReadWaveformOptions = {}): Promise<Pulse> {
  if (detectFormat(bytes, name) === 'json') {
    let pulse: Pulse;
    try {
      pulse = readPulse(new TextDecoder().decode(bytes), { asStored: true });
    } catch (error) {
      if (error instanceof PulseFormatError) error.message = `${name}: ${error.message}`;
      throw error;
    }
    // A design pulse: nothing to convert.
    if (pulse.metadata.export === undefined) return pulse;
  }
  return samplesToPulse(await decodeWaveform(bytes, name, options), options);
}
