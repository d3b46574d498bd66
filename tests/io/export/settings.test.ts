// Tests of src/io/export/settings.ts: the fields and limits of issue 5 and docs/physics.md
// section 5 (signed 12/14/16-bit codes, code = round(x / fullScale * (2^(b-1) - 1)), SSB
// below Nyquist, fs/2), and error messages that name the field, the value and what is allowed.
import { describe, expect, it } from 'vitest';
import { SpecError } from '../../../src/core/errors.ts';
import { codeMax, EXPORT_DEFAULTS, parseExportSettings, ssbQSign } from '../../../src/io/export/settings.ts';
import { thrown } from './helpers.ts';

const base = { sampleRate: 1e9, bits: 16, fullScale: 2e7 };

const refusal = (input: unknown) => thrown(SpecError, () => parseExportSettings(input));

describe('parseExportSettings', () => {
  it('fills the defaults: hold, amplitude limit, no padding rule, after, two channels, no marker', () => {
    expect(parseExportSettings(base)).toEqual({ ...base, ...EXPORT_DEFAULTS });
    expect(EXPORT_DEFAULTS.resample).toBe('hold');
    expect(EXPORT_DEFAULTS.peakLimit).toBe('amplitude');
  });
  it('keeps an SSB setting with its intermediate frequency, sideband and mixer sign', () => {
    const s = parseExportSettings({ ...base, channels: 'ssb', intermediateFrequency: 1e8, sideband: 'lower', mixerSign: -1 });
    expect([s.channels, s.intermediateFrequency, s.sideband, s.mixerSign]).toEqual(['ssb', 1e8, 'lower', -1]);
  });
  it('the full-scale code is 2^(b-1) - 1: 2047, 8191, 32767 (signed DAC codes, common practice)', () => {
    expect([codeMax(12), codeMax(14), codeMax(16)]).toEqual([2047, 8191, 32767]);
  });
  it('sign of the Q term: +Q sin for upper/+1 (docs/physics.md section 5), flipped by the lower sideband or mixer sign -1', () => {
    expect(ssbQSign({ sideband: 'upper', mixerSign: 1 })).toBe(1);
    expect(ssbQSign({ sideband: 'lower', mixerSign: 1 })).toBe(-1);
    expect(ssbQSign({ sideband: 'upper', mixerSign: -1 })).toBe(-1);
    expect(ssbQSign({ sideband: 'lower', mixerSign: -1 })).toBe(1);
  });
});

describe('parseExportSettings refusals name the field, the value and what is allowed', () => {
  const cases: [string, unknown, string, RegExp][] = [
    ['a bad bit depth', { ...base, bits: 10 }, 'bits', /^bits: 10 is not allowed; one of 12, 14, 16/],
    ['bits as text', { ...base, bits: '16' }, 'bits', /"16" is not allowed/],
    ['a zero sample rate', { ...base, sampleRate: 0 }, 'sampleRate', /sampleRate: 0 is not allowed; a finite number > 0/],
    ['a negative full scale', { ...base, fullScale: -1 }, 'fullScale', /fullScale: -1 is not allowed/],
    ['a missing full scale', { sampleRate: 1e9, bits: 16 }, 'fullScale', /fullScale: missing value/],
    ['a fractional granularity', { ...base, granularity: 1.5 }, 'granularity', /granularity: 1.5 is not allowed; a whole number of samples >= 1/],
    ['a negative minimum length', { ...base, minLength: -4 }, 'minLength', /minLength: -4/],
    ['a maximum below the minimum', { ...base, minLength: 100, maxLength: 50 }, 'maxLength', /maxLength: 50 is not allowed; at least minLength \(100\)/],
    ['an unknown padding place', { ...base, pad: 'middle' }, 'pad', /pad: "middle" is not allowed; one of "before", "after", "split"/],
    ['an unknown method', { ...base, resample: 'cubic' }, 'resample', /"hold", "hold-nearest", "linear", "average"/],
    ['an unknown field', { ...base, sampleRateHz: 1e9 }, 'sampleRateHz', /unknown field/],
    ['SSB without a frequency', { ...base, channels: 'ssb' }, 'intermediateFrequency', /missing value is not allowed; a frequency with 0 < f < sampleRate\/2 = 500000000 Hz/],
    ['SSB at Nyquist', { ...base, channels: 'ssb', intermediateFrequency: 5e8 }, 'intermediateFrequency', /500000000 is not allowed.*Nyquist/],
    ['SSB above Nyquist', { ...base, channels: 'ssb', intermediateFrequency: 7e8 }, 'intermediateFrequency', /Nyquist/],
    ['a frequency with two channels', { ...base, intermediateFrequency: 5e7 }, 'intermediateFrequency', /only used with channels "ssb"/],
    ['a mixer sign of 2', { ...base, mixerSign: 2 }, 'mixerSign', /mixerSign: 2 is not allowed; 1 or -1/],
    ['a marker given as text', { ...base, marker: 'yes' }, 'marker', /true or false/],
    ['not an object', 42, 'exportSettings', /an object with sampleRate, bits and fullScale/],
  ];
  for (const [what, input, field, message] of cases) {
    it(what, () => {
      const error = refusal(input);
      expect(error.field).toBe(field);
      expect(error.message).toMatch(message);
    });
  }
});
