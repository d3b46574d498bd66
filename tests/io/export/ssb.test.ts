// Tests of src/io/export/ssb.ts and the SSB path of waveform.ts / playback.ts.
// Sources: the modulation formula of docs/physics.md section 5, s = I cos(wt) + Q sin(wt)
// = A cos(wt - phi) with I = A cos phi, Q = A sin phi (a trigonometric identity), the form
// under which a qubit in the frame of the drive sees the drive about the axis at +phi
// (docs/physics.md section 1, and the lab-frame simulation in tests/core/lab-frame.test.ts);
// the product-to-sum identity cos(a) cos(b) = [cos(a+b) + cos(a-b)] / 2 for an ideal mixer;
// and a plain discrete Fourier transform written here, X[k] = sum_n x_n e^{-2 pi i k n / N},
// whose bin k0 of A cos(2 pi k0 n / N + p) is (N A / 2) e^{i p}.
import { describe, expect, it } from 'vitest';
import { samplesToPulse, ssbBlocks, waveformSamples } from '../../../src/io/export/playback.ts';
import { resampleMap, resamplePulse } from '../../../src/io/export/resample.ts';
import { codeStepHz } from '../../../src/io/export/quantise.ts';
import type { Sideband } from '../../../src/io/export/settings.ts';
import { demodulateSsb, modulateSsb } from '../../../src/io/export/ssb.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { normwiseRelativeError } from '../../reference/tolerance.ts';
import { rectangular, shapedPulse } from './helpers.ts';

/** X[k] of a real sequence, by the definition. */
function dftBin(x: ArrayLike<number>, k: number): [number, number] {
  let re = 0;
  let im = 0;
  for (let n = 0; n < x.length; n++) {
    const a = (-2 * Math.PI * k * n) / x.length;
    re += x[n] * Math.cos(a);
    im += x[n] * Math.sin(a);
  }
  return [re, im];
}

/** The bin of largest |X[k]| over 0..N/2. */
function peakBin(x: ArrayLike<number>): number {
  let best = 0;
  let bestPower = -1;
  for (let k = 0; k <= x.length / 2; k++) {
    const [re, im] = dftBin(x, k);
    if (re * re + im * im > bestPower) {
      bestPower = re * re + im * im;
      best = k;
    }
  }
  return best;
}

const wrap = (a: number) => Math.atan2(Math.sin(a), Math.cos(a));

describe('SSB modulation then demodulation (least squares through the resampling map)', () => {
  const fs = 1e9;
  const design = shapedPulse(8e6, 16, 8e-9); // 8 instrument samples per design sample
  const held = resamplePulse(design, fs, 'hold');
  for (const sideband of ['upper', 'lower'] as Sideband[]) {
    for (const mixerSign of [1, -1] as const) {
      it(`gives back the I/Q to rounding (${sideband} sideband, mixer sign ${mixerSign})`, () => {
        const settings = { sampleRate: fs, intermediateFrequency: 83.3e6, sideband, mixerSign };
        const s = modulateSsb(held.i, held.q, settings);
        const back = demodulateSsb(s, resampleMap(16, 8e-9, fs, 'hold'), 16, settings);
        expect(normwiseRelativeError(back.i, held.i)).toBeLessThan(1e-13);
        expect(normwiseRelativeError(back.q, held.q)).toBeLessThan(1e-13);
      });
    }
  }
  it('through 14-bit quantisation and padding, the exported waveform demodulates to within a code step of the design', () => {
    const w = exportWaveform(design, {
      sampleRate: fs,
      bits: 14,
      fullScale: 1e7,
      channels: 'ssb',
      intermediateFrequency: 125e6,
      granularity: 48,
      pad: 'split',
    });
    expect([w.description.padBefore, w.description.padAfter]).toEqual([8, 8]);
    const pulse = samplesToPulse(waveformSamples(w, 'codes'), { unpad: true });
    const step = codeStepHz(14, 1e7);
    for (let n = 0; n < held.i.length; n++) {
      expect(Math.abs(pulse.i[n] - held.i[n])).toBeLessThan(step);
      expect(Math.abs(pulse.q[n] - held.q[n])).toBeLessThan(step);
    }
  });
  it('the blocks of a resampled (not held) design follow the design sample under each sample centre', () => {
    const w = exportWaveform(shapedPulse(8e6, 4, 12e-9), { sampleRate: 200e6, bits: 16, fullScale: 1e7, channels: 'ssb', intermediateFrequency: 50e6, resample: 'linear' });
    // dt * fs = 2.4, ceil(4 * 2.4) = 10 samples; centres (n + 0.5) / 2.4 = 0.21, 0.63, 1.04, 1.46, 1.88,
    // 2.29, 2.71, 3.13, 3.54, 3.96 fall in design samples 0,0,1,1,1,2,2,3,3,3.
    expect(ssbBlocks(w.description)).toEqual([
      { start: 0, end: 2 },
      { start: 2, end: 5 },
      { start: 5, end: 7 },
      { start: 7, end: 10 },
    ]);
  });
});

describe('SSB spectrum (a plain DFT)', () => {
  const fs = 1e9;
  const N = 400;
  const k0 = 52; // f_IF on a DFT bin: 52 * fs / N = 130 MHz
  const fIF = (k0 * fs) / N;
  const amplitude = 6e6;
  const phi = 0.7;
  const pulse = rectangular(amplitude, 1, N / fs, phi); // one design sample held over N instrument samples
  const held = resamplePulse(pulse, fs, 'hold');

  it('s = I cos + Q sin peaks at f_IF with phase -phi, i.e. A cos(wt - phi) (upper sideband, mixer sign +1)', () => {
    const s = modulateSsb(held.i, held.q, { sampleRate: fs, intermediateFrequency: fIF, sideband: 'upper', mixerSign: 1 });
    expect(peakBin(s)).toBe(k0);
    const [re, im] = dftBin(s, k0);
    expect(Math.hypot(re, im) / ((N * amplitude) / 2)).toBeCloseTo(1, 12);
    expect(wrap(Math.atan2(im, re) + phi)).toBeCloseTo(0, 12);
  });
  it('the lower sideband (or mixer sign -1) conjugates the phase: +phi at f_IF', () => {
    for (const [sideband, mixerSign] of [['lower', 1], ['upper', -1]] as const) {
      const s = modulateSsb(held.i, held.q, { sampleRate: fs, intermediateFrequency: fIF, sideband, mixerSign });
      const [re, im] = dftBin(s, k0);
      expect(wrap(Math.atan2(im, re) - phi)).toBeCloseTo(0, 12);
    }
  });
  it('after an ideal mixer (multiply by cos of the LO), the chosen sideband is A cos(w_d t - phi), the drive at phase phi, and the image A cos(w t + phi)', () => {
    const kLO = 120; // LO at 300 MHz; sidebands at bins 172 (upper) and 68 (lower), all below N/2
    for (const sideband of ['upper', 'lower'] as const) {
      const s = modulateSsb(held.i, held.q, { sampleRate: fs, intermediateFrequency: fIF, sideband, mixerSign: 1 });
      const rf = s.map((x, n) => x * Math.cos((2 * Math.PI * kLO * n) / N));
      const [chosen, image] = sideband === 'upper' ? [kLO + k0, kLO - k0] : [kLO - k0, kLO + k0];
      const [cr, ci] = dftBin(rf, chosen);
      const [ir, ii] = dftBin(rf, image);
      // cos(a) cos(b) halves each line: |X| = N A / 4 at both sidebands.
      expect(Math.hypot(cr, ci) / ((N * amplitude) / 4)).toBeCloseTo(1, 12);
      expect(wrap(Math.atan2(ci, cr) + phi)).toBeCloseTo(0, 12);
      expect(wrap(Math.atan2(ii, ir) - phi)).toBeCloseTo(0, 12);
    }
  });

  it('accepts 2 samples per design sample when dt carries a rounding error (2e-7/100 at 1 GS/s)', () => {
    // 2e-7 / 100 * 1e9 = 1.9999999999999998 in IEEE 754 arithmetic; holding counts it as 2,
    // and so must the single-sideband check.
    const w = exportWaveform(shapedPulse(5e6, 100, 2e-7 / 100), { sampleRate: 1e9, bits: 14, fullScale: 1e7, channels: 'ssb', intermediateFrequency: 1e8 });
    expect(w.description.length).toBe(200);
  });
});
