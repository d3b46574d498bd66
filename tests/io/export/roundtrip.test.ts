// Round trips of every format (formats.ts, csv.ts, npy.ts, raw.ts, wav.ts, json.ts,
// read.ts): codes come back exactly, values in Hz within half a code step of the
// unquantised waveform (issue 5); the SHA-256 in a raw description agrees with Node's
// OpenSSL-backed node:crypto (an implementation independent of crypto.subtle's use here);
// readers reject malformed input with a PulseFormatError.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { PulseFormatError } from '../../../src/core/errors.ts';
import { readCsv, writeCsv } from '../../../src/io/export/csv.ts';
import { decodeWaveform, encodeWaveform, WAVEFORM_FORMATS, type WaveformFormat } from '../../../src/io/export/formats.ts';
import { readJsonWaveform } from '../../../src/io/export/json.ts';
import { samplesToPulse, waveformSamples } from '../../../src/io/export/playback.ts';
import { quantise } from '../../../src/io/export/quantise.ts';
import { readRaw, writeRaw } from '../../../src/io/export/raw.ts';
import { readWaveform } from '../../../src/io/export/read.ts';
import { sha256Hex } from '../../../src/io/export/sha256.ts';
import { exportWaveform, type ExportedWaveform } from '../../../src/io/export/waveform.ts';
import { shapedPulse } from './helpers.ts';

const waveforms: [string, ExportedWaveform][] = [
  ['I/Q, 16 bits, padded before', exportWaveform(shapedPulse(9e6, 20, 4e-9), { sampleRate: 1e9, bits: 16, fullScale: 1e7, granularity: 32, pad: 'before' })],
  [
    'I/Q + marker, 12 bits, linear resampling, split padding',
    exportWaveform(shapedPulse(9e6, 13, 3.3e-9), { sampleRate: 1e9, bits: 12, fullScale: 1e7, resample: 'linear', granularity: 16, pad: 'split', marker: true }),
  ],
  [
    'SSB lower sideband, mixer -1, 14 bits',
    exportWaveform(shapedPulse(9e6, 10, 8e-9), { sampleRate: 1e9, bits: 14, fullScale: 1e7, channels: 'ssb', intermediateFrequency: 1.1e8, sideband: 'lower', mixerSign: -1, minLength: 100 }),
  ],
];

const fileName: Record<WaveformFormat, string> = { csv: 'w.csv', npy: 'w.npy', raw: 'w.bin', wav: 'w.wav', json: 'w.json' };

describe('every format round trip', () => {
  for (const [label, waveform] of waveforms) {
    for (const format of WAVEFORM_FORMATS) {
      for (const units of ['codes', 'hz'] as const) {
        const holds = format === 'json' ? units === 'hz' && waveform.description.layout === 'iq' : format === 'raw' || format === 'wav' ? units === 'codes' : true;
        const wavFits = format !== 'wav' || waveform.codes.length <= 2;
        if (!holds || !wavFits) continue;
        it(`${format} (${units}): ${label}`, async () => {
          const encoded = await encodeWaveform(waveform, format, format === 'json' ? {} : { units });
          const samples = await decodeWaveform(encoded.bytes, fileName[format], { sidecar: encoded.sidecar ?? undefined });
          const d = waveform.description;
          expect(samples.description).toEqual(d);
          expect(samples.units).toBe(units);
          samples.data.forEach((x, c) => {
            const name = d.channels[c];
            // Codes exactly: read directly, or re-quantised from the values in Hz.
            const codes = units === 'codes' || name === 'marker' ? Int16Array.from(x) : quantise(Float64Array.from(x), d.bits, d.fullScaleHz);
            expect(Array.from(codes), `${name} codes`).toEqual(Array.from(waveform.codes[c]));
            if (units === 'hz' && name !== 'marker') {
              const half = d.fullScaleHz / d.codeMax / 2;
              for (let n = 0; n < x.length; n++) expect(Math.abs(x[n] - waveform.ideal[c][n])).toBeLessThanOrEqual(half * (1 + 1e-12));
            }
          });
          // And as a Pulse: the same I/Q as the waveform played from its codes.
          const pulse = await readWaveform(encoded.bytes, fileName[format], { sidecar: encoded.sidecar ?? undefined });
          const direct = samplesToPulse(waveformSamples(waveform, 'codes'));
          expect(pulse.dt).toBe(1 / d.sampleRateHz);
          expect(Array.from(pulse.i)).toEqual(Array.from(direct.i));
          expect(Array.from(pulse.q)).toEqual(Array.from(direct.q));
        });
      }
    }
  }
  it('a pulse JSON without export metadata (a design) reads back as it is', async () => {
    const design = shapedPulse(9e6, 5, 4e-9);
    const text = JSON.stringify({ dt: design.dt, i: Array.from(design.i), q: Array.from(design.q) });
    const pulse = await readWaveform(new TextEncoder().encode(text), 'design.json');
    expect(Array.from(pulse.i)).toEqual(Array.from(design.i));
  });
});

describe('raw: SHA-256 and malformed input', () => {
  const waveform = waveforms[1][1];
  it('the description carries the SHA-256 of the data, equal to node:crypto createHash', async () => {
    const { data, description } = await writeRaw(waveformSamples(waveform, 'codes'));
    const json = JSON.parse(new TextDecoder().decode(description)) as { sha256: string; interleaved: boolean; dataBytes: number };
    expect(json.sha256).toBe(createHash('sha256').update(data).digest('hex'));
    expect(await sha256Hex(new TextEncoder().encode('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'); // FIPS 180-2 example "abc"
    expect(json.interleaved).toBe(true);
    expect(json.dataBytes).toBe(waveform.description.length * 3 * 2);
  });
  it('interleaves channels sample by sample, little-endian int16', async () => {
    const { data } = await writeRaw(waveformSamples(waveform, 'codes'));
    const view = new DataView(data.buffer);
    const n = waveform.description.padBefore + 3;
    expect([view.getInt16(6 * n, true), view.getInt16(6 * n + 2, true), view.getInt16(6 * n + 4, true)]).toEqual([
      waveform.codes[0][n],
      waveform.codes[1][n],
      1,
    ]);
  });
  it('rejects changed data, truncated data and a description of another length', async () => {
    const { data, description } = await writeRaw(waveformSamples(waveform, 'codes'));
    const changed = Uint8Array.from(data);
    changed[10] ^= 1;
    await expect(readRaw(changed, description, 'w.bin')).rejects.toThrow(/SHA-256 .* does not match/);
    await expect(readRaw(data.subarray(0, data.length - 2), description, 'w.bin')).rejects.toThrow(/truncated or mismatched/);
    const other = JSON.parse(new TextDecoder().decode(description)) as Record<string, unknown>;
    other.length = (other.length as number) + 1;
    await expect(readRaw(data, other, 'w.bin')).rejects.toThrow(PulseFormatError);
    await expect(decodeWaveform(data, 'w.bin')).rejects.toThrow(/needs its JSON description/);
  });
});

describe('CSV: header and malformed input', () => {
  const waveform = waveforms[1][1];
  const text = new TextDecoder().decode(writeCsv(waveformSamples(waveform, 'codes')));
  const lines = text.split('\n');
  const headerRow = lines.findIndex((l) => l.startsWith('time_s'));
  it('states units, sample rate, calibration, bits and padding in the commented header', () => {
    expect(text).toMatch(/^# sampleRateHz: 1000000000$/m);
    expect(text).toMatch(/^# fullScaleHz: 10000000$/m);
    expect(text).toMatch(/^# bits: 12$/m);
    expect(text).toMatch(/^# calibration - full-scale code 2047 = 10000000 Hz Rabi frequency/m);
    expect(text).toMatch(/^# padBefore: \d+$/m);
    expect(text).toMatch(/^# units: "codes"$/m);
    expect(lines[headerRow]).toBe('time_s,i_code,q_code,marker');
  });
  const edit = (change: (rows: string[]) => void) => {
    const copy = [...lines];
    change(copy);
    return new TextEncoder().encode(copy.join('\n'));
  };
  const cases: [string, Uint8Array, RegExp][] = [
    ['a missing row (truncated)', edit((r) => r.splice(headerRow + 5, 1)), /sample rows; the header says length/],
    ['NaN in a cell', edit((r) => (r[headerRow + 2] = r[headerRow + 2].replace(/,[^,]*,/, ',NaN,'))), /"NaN" is not a finite number/],
    ['an empty cell', edit((r) => (r[headerRow + 2] = r[headerRow + 2].replace(/,[^,]*,/, ',,'))), /"" is not a finite number/],
    ['a code that is not whole', edit((r) => (r[headerRow + 9] = r[headerRow + 9].replace(/,([^,]*),/, ',$1.5,'))), /is not a DAC code/],
    ['a wrong column header', edit((r) => (r[headerRow] = 'time_s,i,q,marker')), /the column header is/],
    ['a wrong time', edit((r) => (r[headerRow + 3] = r[headerRow + 3].replace(/^[^,]*/, '1'))), /is not sample 2's time/],
    ['a marker that does not follow the padding', edit((r) => (r[headerRow + 1] = r[headerRow + 1].replace(/,0$/, ',1'))), /marker\[0\] is 1/],
    ['a header value that is not JSON', edit((r) => (r[1] = '# bits: twelve')), /the value of "bits" is not JSON/],
  ];
  for (const [what, bytes, message] of cases) {
    it(`rejects ${what}`, () => {
      expect(() => readCsv(bytes, 'w.csv')).toThrow(PulseFormatError);
      expect(() => readCsv(bytes, 'w.csv')).toThrow(message);
    });
  }
});

describe('pulse JSON: malformed input', () => {
  it('rejects a dt that is not the sample period, and a pulse without export metadata', async () => {
    const waveform = waveforms[0][1];
    const { bytes } = await encodeWaveform(waveform, 'json');
    const doc = JSON.parse(new TextDecoder().decode(bytes)) as Record<string, unknown>;
    doc.dt = 2e-9;
    expect(() => readJsonWaveform(new TextEncoder().encode(JSON.stringify(doc)), 'w.json')).toThrow(/dt 2e-9 s is not 1 \/ sampleRateHz/);
    delete doc.metadata;
    expect(() => readJsonWaveform(new TextEncoder().encode(JSON.stringify(doc)), 'w.json')).toThrow(/without metadata\.export/);
  });
});
