// 16-bit PCM WAV files, RIFF header written by hand (Microsoft/IBM RIFF WAVE: "RIFF"
// size "WAVE", a "fmt " chunk of 16 bytes, a "data" chunk). The description rides in a
// standard LIST/INFO "ICMT" (comment) chunk that audio tools skip. Codes are stored as
// they are (a 12-bit waveform is not shifted up to 16 bits), so they read back exactly.
import { ExportError, PulseFormatError } from '../../core/errors.ts';
import { parseWaveformDescription, type WaveformDescription } from './description.ts';
import { checkSamples, type WaveformSamples } from './playback.ts';

const UINT32_MAX = 0xffffffff;

/** The WAV bytes of waveform codes (one or two channels). */
export function writeWav(samples: WaveformSamples): Uint8Array {
  const d = samples.description;
  if (samples.units !== 'codes') throw new ExportError('units: WAV files hold 16-bit PCM codes; write "codes"');
  const channels = samples.data.length;
  if (channels > 2) {
    throw new ExportError(
      `channels: WAV here holds one or two channels, this waveform has ${channels} (${d.channels.join(', ')}); ` +
        `leave out the marker, or use csv, npy or raw`,
    );
  }
  const byteRate = d.sampleRateHz * channels * 2;
  if (!Number.isInteger(d.sampleRateHz) || byteRate > UINT32_MAX) {
    throw new ExportError(
      `sampleRate: WAV stores a whole number of Hz with a byte rate below 2^32 (at most ${Math.floor(UINT32_MAX / (channels * 2))} Hz ` +
        `for ${channels} channel(s)); ${d.sampleRateHz} Hz does not fit: use csv, npy or raw`,
    );
  }
  const comment = new TextEncoder().encode(JSON.stringify({ ...d, units: 'codes' }) + '\0');
  const commentPadded = comment.length + (comment.length % 2);
  const listSize = 4 + 8 + commentPadded;
  const dataSize = d.length * channels * 2;
  const total = 12 + (8 + 16) + (8 + listSize) + (8 + dataSize);
  if (total - 8 > UINT32_MAX) throw new ExportError(`length: ${d.length} samples make a WAV file above 4 GiB; use npy or raw`);
  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);
  let at = 0;
  const tag = (text: string) => {
    for (let k = 0; k < 4; k++) out[at + k] = text.charCodeAt(k);
    at += 4;
  };
  const u32 = (v: number) => {
    view.setUint32(at, v, true);
    at += 4;
  };
  const u16 = (v: number) => {
    view.setUint16(at, v, true);
    at += 2;
  };
  tag('RIFF');
  u32(total - 8);
  tag('WAVE');
  tag('fmt ');
  u32(16);
  u16(1); // PCM
  u16(channels);
  u32(d.sampleRateHz);
  u32(byteRate);
  u16(channels * 2); // block align
  u16(16); // bits per sample
  tag('LIST');
  u32(listSize);
  tag('INFO');
  tag('ICMT');
  u32(comment.length);
  out.set(comment, at);
  at += commentPadded;
  tag('data');
  u32(dataSize);
  for (let n = 0; n < d.length; n++) {
    for (let k = 0; k < channels; k++) {
      view.setInt16(at, samples.data[k][n], true);
      at += 2;
    }
  }
  return out;
}

/** Read a 16-bit PCM WAV; its description comes from its ICMT chunk, or from `description` when it has none. */
export function readWav(bytes: Uint8Array, source = 'WAV', description?: WaveformDescription): WaveformSamples {
  const fail = (why: string): never => {
    throw new PulseFormatError(`${source}: ${why}`);
  };
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const tagAt = (at: number) => String.fromCharCode(bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]);
  if (bytes.length < 12 || tagAt(0) !== 'RIFF' || tagAt(8) !== 'WAVE') fail('not a RIFF WAVE file');
  const riffEnd = 8 + view.getUint32(4, true);
  if (riffEnd > bytes.length) fail(`truncated: the RIFF header says ${riffEnd} bytes, the file has ${bytes.length}`);
  let format: { channels: number; sampleRate: number } | undefined;
  let data: Uint8Array | undefined;
  let comment: string | undefined;
  for (let at = 12; at < riffEnd; ) {
    if (at + 8 > riffEnd) fail(`truncated chunk header at byte ${at}`);
    const id = tagAt(at);
    const size = view.getUint32(at + 4, true);
    const body = at + 8;
    if (body + size > riffEnd) fail(`truncated: chunk "${id}" needs ${size} bytes, ${riffEnd - body} remain`);
    if (id === 'fmt ') {
      if (size < 16) fail(`the fmt chunk is ${size} bytes; PCM needs 16`);
      const audioFormat = view.getUint16(body, true);
      const channels = view.getUint16(body + 2, true);
      const sampleRate = view.getUint32(body + 4, true);
      const byteRate = view.getUint32(body + 8, true);
      const blockAlign = view.getUint16(body + 12, true);
      const bits = view.getUint16(body + 14, true);
      if (audioFormat !== 1) fail(`audio format ${audioFormat} is not 1 (integer PCM)`);
      if (bits !== 16) fail(`${bits} bits per sample; this reader takes 16-bit PCM`);
      if (channels !== 1 && channels !== 2) fail(`${channels} channels; one or two are read`);
      if (blockAlign !== channels * 2 || byteRate !== sampleRate * blockAlign) {
        fail(`inconsistent fmt chunk (block align ${blockAlign}, byte rate ${byteRate} for ${channels} channels at ${sampleRate} Hz)`);
      }
      format = { channels, sampleRate };
    } else if (id === 'data') {
      data = bytes.subarray(body, body + size);
    } else if (id === 'LIST' && size >= 4 && tagAt(body) === 'INFO') {
      for (let sub = body + 4; sub + 8 <= body + size; ) {
        const subSize = view.getUint32(sub + 4, true);
        if (sub + 8 + subSize > body + size) fail('truncated LIST/INFO chunk');
        if (tagAt(sub) === 'ICMT') comment = new TextDecoder().decode(bytes.subarray(sub + 8, sub + 8 + subSize)).replace(/\0+$/, '');
        sub += 8 + subSize + (subSize % 2);
      }
    }
    at = body + size + (size % 2);
  }
  if (!format) return fail('no fmt chunk');
  if (!data) return fail('no data chunk');
  let d = description;
  if (comment !== undefined && comment.trimStart().startsWith('{')) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(comment);
    } catch {
      fail('the ICMT comment is not the JSON description');
    }
    d = parseWaveformDescription(parsed, source);
  }
  if (!d) return fail('no description (LIST/INFO/ICMT chunk); give the description of the waveform');
  if (format.sampleRate !== d.sampleRateHz) fail(`sample rate ${format.sampleRate} Hz; the description says ${d.sampleRateHz} Hz`);
  if (format.channels !== d.channels.length) fail(`${format.channels} channel(s); the description lists ${d.channels.join(', ')}`);
  const c = format.channels;
  if (data.length !== d.length * c * 2) fail(`${data.length} data bytes; length ${d.length} x ${c} channel(s) x 2 bytes expected (truncated or mismatched)`);
  const dataView = new DataView(data.buffer, data.byteOffset, data.byteLength);
  const channels = d.channels.map(() => new Int16Array(d.length));
  for (let n = 0; n < d.length; n++) for (let k = 0; k < c; k++) channels[k][n] = dataView.getInt16(2 * (n * c + k), true);
  return checkSamples({ description: d, units: 'codes', data: channels }, source);
}
