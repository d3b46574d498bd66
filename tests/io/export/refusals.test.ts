// Refusals of src/io/export/waveform.ts and formats.ts (issue 5, docs/physics.md section 6:
// a waveform above the configured limit is never written and never clipped): peak above
// full scale, a sample period that does not divide dt without a named method, lengths that
// do not fit, bad bit depths, and combinations a format cannot hold.
import { describe, expect, it } from 'vitest';
import { ArgumentError, ExportError, SpecError } from '../../../src/core/errors.ts';
import { encodeWaveform } from '../../../src/io/export/formats.ts';
import { codeMax } from '../../../src/io/export/settings.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { rectangular, shapedPulse, thrown } from './helpers.ts';

const settings = { sampleRate: 1e9, bits: 16, fullScale: 1e7 };

const exportError = (run: () => unknown) => thrown(ExportError, run);

describe('peak above full scale', () => {
  it('is refused with the peak and the full scale in the message', () => {
    const error = exportError(() => exportWaveform(rectangular(1.2e7, 10, 4e-9), settings));
    expect(error.message).toMatch(/reaches 12000000 Hz .* above the full scale of 10000000 Hz; the waveform is not written \(it is never clipped\)/);
  });
  it('is judged on the amplitude sqrt(I^2+Q^2) by default: I = Q = 0.8 full scale (amplitude 1.13) is refused', () => {
    const pulse = rectangular(0.8e7 * Math.SQRT2, 10, 4e-9, Math.PI / 4);
    expect(() => exportWaveform(pulse, settings)).toThrow(/drive amplitude sqrt\(I\^2\+Q\^2\) reaches/);
    // The per-channel limit, asked for by name, lets it through with each channel at 0.8 of full scale.
    const w = exportWaveform(pulse, { ...settings, peakLimit: 'per-channel' });
    expect(w.codes[0][0]).toBe(Math.round(0.8 * codeMax(16)));
  });
  it('a design exactly at full scale is accepted, its code is the full-scale code', () => {
    const w = exportWaveform(rectangular(1e7, 10, 4e-9), settings);
    expect(w.description.peakCode).toBe(32767);
  });
  it('also after resampling, and for the SSB channel', () => {
    expect(() => exportWaveform(rectangular(1.01e7, 10, 2.5e-9), { ...settings, resample: 'linear' })).toThrow(ExportError);
    expect(() =>
      exportWaveform(rectangular(1.01e7, 10, 4e-9), { ...settings, channels: 'ssb', intermediateFrequency: 1e8 }),
    ).toThrow(/above the full scale/);
  });
});

describe('sample period that does not divide dt', () => {
  it("is refused for 'hold', naming dt, the ratio and the methods to choose from", () => {
    const error = exportError(() => exportWaveform(rectangular(5e6, 10, 2.5e-9), settings));
    expect(error.message).toMatch(/dt = 2\.5e-9 s is 2\.5 periods at sampleRate 1000000000 Hz; choose resample "hold-nearest", "linear" or "average"/);
  });
  it('is accepted with a named method, which the description records', () => {
    const w = exportWaveform(rectangular(5e6, 10, 2.5e-9), { ...settings, resample: 'average' });
    expect(w.description.resample).toBe('average');
    expect(w.description.length).toBe(25);
  });
});

describe('lengths that do not fit', () => {
  it('a padded length above maxLength is refused with the lengths in the message', () => {
    const error = exportError(() => exportWaveform(rectangular(5e6, 100, 4e-9), { ...settings, granularity: 64, maxLength: 400 }));
    expect(error.message).toMatch(/needs 448 samples \(pulse 400, padded to a multiple of granularity 64\), more than maxLength 400/);
  });
  it('SSB with fewer than 2 instrument samples per design sample is refused (I and Q cannot be separated)', () => {
    const error = exportError(() => exportWaveform(rectangular(5e6, 10, 1e-9), { ...settings, channels: 'ssb', intermediateFrequency: 1e8 }));
    expect(error.message).toMatch(/at least 2 instrument samples per design sample \(dt \* sampleRate = 1\)/);
  });
});

describe('bad settings and bad pulses', () => {
  it('a bit depth of 8 is a SpecError naming bits', () => {
    expect(() => exportWaveform(rectangular(5e6, 10, 4e-9), { ...settings, bits: 8 })).toThrow(SpecError);
    expect(() => exportWaveform(rectangular(5e6, 10, 4e-9), { ...settings, bits: 8 })).toThrow(/bits: 8 is not allowed; one of 12, 14, 16/);
  });
  it('a NaN sample is an ArgumentError naming it', () => {
    const pulse = rectangular(5e6, 10, 4e-9);
    pulse.q[3] = NaN;
    expect(() => exportWaveform(pulse, settings)).toThrow(ArgumentError);
    expect(() => exportWaveform(pulse, settings)).toThrow(/pulse\.q\[3\]: NaN is not allowed/);
  });
});

describe('what a format cannot hold', () => {
  const ssb = exportWaveform(shapedPulse(8e6, 8, 8e-9), { ...settings, channels: 'ssb', intermediateFrequency: 1e8 });
  const iq = exportWaveform(shapedPulse(8e6, 8, 8e-9), settings);
  it('the pulse JSON refuses a single SSB channel', async () => {
    await expect(encodeWaveform(ssb, 'json')).rejects.toThrow(/the pulse JSON holds I and Q/);
  });
  it('raw and WAV refuse values in Hz; an unknown format is refused', async () => {
    await expect(encodeWaveform(iq, 'raw', { units: 'hz' })).rejects.toThrow(/"hz" is not allowed for raw; "codes"/);
    await expect(encodeWaveform(iq, 'wav', { units: 'hz' })).rejects.toThrow(ExportError);
    await expect(encodeWaveform(iq, 'mat' as 'csv')).rejects.toThrow(/format: "mat" is not allowed/);
  });
});
