// Tests of src/io/export/wav.ts against the independent npm WAV library wavefile (reads
// ours; writes files that ours reads) and the RIFF WAVE layout (Microsoft/IBM Multimedia
// Programming Interface and Data Specifications 1.0, 1991: "fmt " chunk of 16 bytes for
// PCM, LIST/INFO with ICMT for a comment).
import wavefile from 'wavefile';
import { describe, expect, it } from 'vitest';
import { ExportError, PulseFormatError } from '../../../src/core/errors.ts';
import { waveformSamples } from '../../../src/io/export/playback.ts';
import { readWav, writeWav } from '../../../src/io/export/wav.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { shapedPulse } from './helpers.ts';

const { WaveFile } = wavefile;

const iqWaveform = exportWaveform(shapedPulse(9e6, 10, 5e-9), { sampleRate: 200e6, bits: 16, fullScale: 1e7, granularity: 32, pad: 'split' });
const ssbWaveform = exportWaveform(shapedPulse(9e6, 10, 20e-9), {
  sampleRate: 400e6,
  bits: 12,
  fullScale: 1e7,
  channels: 'ssb',
  intermediateFrequency: 60e6,
  marker: true,
});

describe('wavefile (independent reader) reads our WAV', () => {
  it('two channels I, Q: same sample rate, bit depth and samples', () => {
    const wav = new WaveFile(writeWav(waveformSamples(iqWaveform, 'codes')));
    const fmt = wav.fmt as { numChannels: number; sampleRate: number; bitsPerSample: number; audioFormat: number };
    expect([fmt.audioFormat, fmt.numChannels, fmt.sampleRate, fmt.bitsPerSample]).toEqual([1, 2, 200e6, 16]);
    const [i, q] = wav.getSamples(false, Int16Array) as unknown as Int16Array[];
    expect(Array.from(i)).toEqual(Array.from(iqWaveform.codes[0]));
    expect(Array.from(q)).toEqual(Array.from(iqWaveform.codes[1]));
  });
  it('one SSB channel plus marker (12-bit codes stored unshifted): same samples, and the ICMT comment holds the description', () => {
    const wav = new WaveFile(writeWav(waveformSamples(ssbWaveform, 'codes')));
    const [s, marker] = wav.getSamples(false, Int16Array) as unknown as Int16Array[];
    expect(Array.from(s)).toEqual(Array.from(ssbWaveform.codes[0]));
    expect(Array.from(marker)).toEqual(Array.from(ssbWaveform.codes[1]));
    const comment = JSON.parse(wav.getTag('ICMT') ?? 'null') as { fullScaleHz: number; intermediateFrequencyHz: number };
    expect(comment.fullScaleHz).toBe(1e7);
    expect(comment.intermediateFrequencyHz).toBe(60e6);
  });
});

describe('readWav reads what wavefile writes', () => {
  it('a two-channel 16-bit file given the description separately', () => {
    const codes = iqWaveform.codes;
    const wav = new WaveFile();
    wav.fromScratch(2, 200e6, '16', [Array.from(codes[0]), Array.from(codes[1])]);
    const read = readWav(wav.toBuffer(), 'wavefile.wav', iqWaveform.description);
    expect(Array.from(read.data[0])).toEqual(Array.from(codes[0]));
    expect(Array.from(read.data[1])).toEqual(Array.from(codes[1]));
  });
});

describe('writeWav header, written by hand', () => {
  const bytes = writeWav(waveformSamples(iqWaveform, 'codes'));
  const view = new DataView(bytes.buffer);
  const tag = (at: number) => String.fromCharCode(...bytes.subarray(at, at + 4));
  it('RIFF size is the file length minus 8; fmt is PCM with block align 4 and byte rate 4 x sample rate', () => {
    expect(tag(0)).toBe('RIFF');
    expect(view.getUint32(4, true)).toBe(bytes.length - 8);
    expect(tag(8) + tag(12)).toBe('WAVEfmt ');
    expect(view.getUint32(16, true)).toBe(16);
    expect(view.getUint16(32, true)).toBe(4);
    expect(view.getUint32(28, true)).toBe(4 * 200e6);
  });
});

describe('WAV refusals', () => {
  it('three channels (I, Q, marker) are refused at writing', () => {
    const w = exportWaveform(shapedPulse(9e6, 10, 5e-9), { sampleRate: 200e6, bits: 16, fullScale: 1e7, marker: true });
    expect(() => writeWav(waveformSamples(w, 'codes'))).toThrow(ExportError);
    expect(() => writeWav(waveformSamples(w, 'codes'))).toThrow(/one or two channels, this waveform has 3/);
  });
  it('a sample rate that is not a whole number of Hz is refused at writing', () => {
    const w = exportWaveform(shapedPulse(9e6, 10, 1 / 3e6), { sampleRate: 1.5e6 + 0.5, bits: 16, fullScale: 1e7, resample: 'linear' });
    expect(() => writeWav(waveformSamples(w, 'codes'))).toThrow(/whole number of Hz/);
  });
  const good = writeWav(waveformSamples(iqWaveform, 'codes'));
  const cases: [string, Uint8Array, RegExp][] = [
    ['truncated data', good.subarray(0, good.length - 10), /truncated/],
    ['not RIFF', Uint8Array.from([0x52, 0x49, 0x46, 0x58, ...good.subarray(4)]), /not a RIFF WAVE/],
    ['a header only', good.subarray(0, 30), /truncated/],
  ];
  for (const [what, bytes, message] of cases) {
    it(`malformed input: ${what}`, () => {
      expect(() => readWav(bytes, 'bad.wav')).toThrow(PulseFormatError);
      expect(() => readWav(bytes, 'bad.wav')).toThrow(message);
    });
  }
  it('malformed input: 8-bit PCM', () => {
    const wav = new WaveFile();
    wav.fromScratch(1, 8000, '8', [1, 2, 3]);
    expect(() => readWav(wav.toBuffer(), 'eight.wav', iqWaveform.description)).toThrow(/8 bits per sample/);
  });
  it('a sample rate other than the description says', () => {
    const wav = new WaveFile();
    wav.fromScratch(2, 48000, '16', [Array.from(iqWaveform.codes[0]), Array.from(iqWaveform.codes[1])]);
    expect(() => readWav(wav.toBuffer(), 'rate.wav', iqWaveform.description)).toThrow(/sample rate 48000 Hz; the description says 200000000 Hz/);
  });
  it('no description at all', () => {
    const wav = new WaveFile();
    wav.fromScratch(1, 48000, '16', [1, 2, 3]);
    expect(() => readWav(wav.toBuffer(), 'plain.wav')).toThrow(/no description/);
  });
});
