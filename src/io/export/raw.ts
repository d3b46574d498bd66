// Raw little-endian int16 codes, interleaved sample by sample when there are two channels
// or more, with a JSON description beside it (sample rate, bits, full scale, channels in
// order, length, padding and the SHA-256 of the data bytes).
import { ExportError, PulseFormatError } from '../../core/errors.ts';
import { parseJsonText } from '../../core/json-text.ts';
import { parseWaveformDescription, type WaveformDescription } from './description.ts';
import { checkSamples, type WaveformSamples } from './playback.ts';
import { sha256Hex, type Sha256 } from './sha256.ts';

/** The JSON written beside a raw file. */
export interface RawDescription extends WaveformDescription {
  sampleFormat: 'int16le';
  /** Channel values of one sample follow each other (ch0[0], ch1[0], ch0[1], ...). */
  interleaved: boolean;
  units: 'codes';
  dataBytes: number;
  /** SHA-256 of the data file's bytes, lowercase hex. */
  sha256: string;
}

/** The raw data bytes and the JSON description (UTF-8) of waveform codes. */
export async function writeRaw(samples: WaveformSamples, sha256: Sha256 = sha256Hex): Promise<{ data: Uint8Array; description: Uint8Array }> {
  if (samples.units !== 'codes') throw new ExportError('units: raw files hold int16 DAC codes; write "codes" (or use csv/npy for values in Hz)');
  const d = samples.description;
  const c = samples.data.length;
  const data = new Uint8Array(d.length * c * 2);
  const view = new DataView(data.buffer);
  for (let n = 0; n < d.length; n++) for (let k = 0; k < c; k++) view.setInt16(2 * (n * c + k), samples.data[k][n], true);
  const description: RawDescription = {
    ...d,
    sampleFormat: 'int16le',
    interleaved: c > 1,
    units: 'codes',
    dataBytes: data.length,
    sha256: await sha256(data),
  };
  return { data, description: new TextEncoder().encode(JSON.stringify(description, null, 2) + '\n') };
}

/** Parse a raw file's JSON description (bytes, text or parsed object). */
export function readRawDescription(input: Uint8Array | string | object, source = 'raw description'): RawDescription {
  let obj: unknown = input;
  if (typeof input === 'string' || input instanceof Uint8Array) {
    const text = typeof input === 'string' ? input : new TextDecoder().decode(input);
    try {
      obj = parseJsonText(text);
    } catch (error) {
      throw new PulseFormatError(`${source}: ${(error as Error).message}`);
    }
  }
  const base = parseWaveformDescription(obj, source);
  const o = obj as Record<string, unknown>;
  const c = base.channels.length;
  if (o.sampleFormat !== 'int16le') throw new PulseFormatError(`${source}: sampleFormat ${JSON.stringify(o.sampleFormat)} is not "int16le"`);
  if (o.interleaved !== c > 1) throw new PulseFormatError(`${source}: interleaved is ${JSON.stringify(o.interleaved)}; it is ${c > 1} for ${c} channel(s)`);
  if (o.units !== 'codes') throw new PulseFormatError(`${source}: units ${JSON.stringify(o.units)} is not "codes"`);
  if (o.dataBytes !== base.length * c * 2) {
    throw new PulseFormatError(`${source}: dataBytes ${JSON.stringify(o.dataBytes)} is not length ${base.length} x ${c} channel(s) x 2 bytes`);
  }
  if (typeof o.sha256 !== 'string' || !/^[0-9a-f]{64}$/.test(o.sha256)) {
    throw new PulseFormatError(`${source}: sha256 ${JSON.stringify(o.sha256)} is not 64 lowercase hex digits`);
  }
  return { ...base, sampleFormat: 'int16le', interleaved: c > 1, units: 'codes', dataBytes: o.dataBytes as number, sha256: o.sha256 };
}

/** Read raw codes with their description; the data's length and SHA-256 must match it. */
export async function readRaw(
  data: Uint8Array,
  descriptionInput: Uint8Array | string | object,
  source = 'raw',
  sha256: Sha256 = sha256Hex,
): Promise<WaveformSamples> {
  const d = readRawDescription(descriptionInput, `${source} description`);
  if (data.length !== d.dataBytes) {
    throw new PulseFormatError(`${source}: ${data.length} bytes; the description says ${d.dataBytes} (truncated or mismatched file)`);
  }
  const digest = await sha256(data);
  if (digest !== d.sha256) throw new PulseFormatError(`${source}: SHA-256 ${digest} does not match the description's ${d.sha256}`);
  const c = d.channels.length;
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  const channels = d.channels.map(() => new Int16Array(d.length));
  for (let n = 0; n < d.length; n++) for (let k = 0; k < c; k++) channels[k][n] = view.getInt16(2 * (n * c + k), true);
  const { sampleFormat: _f, interleaved: _i, units: _u, dataBytes: _b, sha256: _s, ...description } = d;
  return checkSamples({ description, units: 'codes', data: channels }, source);
}
