// The report of a single-sideband export resampled by 'linear' or 'average' gives the figure
// of the samples actually played. Checked against an independent evaluation of the played
// codes: the resampling written out here from its definitions (docs/physics.md section 5:
// straight lines between design-sample centres read at sample centres, flat beyond the end
// centres; the mean of the design over each sample period), the least-squares demodulation
// solved densely by mathjs `lusolve` on the normal equations, and the figure computed by the
// reference propagator (tests/reference/oracle.ts). A second check needs no demodulation at
// all: the same settings with two channels I and Q play the same I/Q, so both reports agree
// to quantisation.
import { describe, expect, it } from 'vitest';
import { lusolve, matrix, type Matrix } from 'mathjs';
import type { Pulse } from '../../../src/core/types.ts';
import { exportReport } from '../../../src/io/export/report.ts';
import { resamplePulse, resampledLength } from '../../../src/io/export/resample.ts';
import type { ResampleMethod } from '../../../src/io/export/settings.ts';
import { demodulateSsb, modulateSsb } from '../../../src/io/export/ssb.ts';
import { resampleMap } from '../../../src/io/export/resample.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { codesToHz } from '../../../src/io/export/quantise.ts';
import { ensembleFigure } from '../../reference/oracle.ts';
import { expectClose, normwiseRelativeError } from '../../reference/tolerance.ts';
import { gate, member, oracleEvaluator, shapedPulse } from './helpers.ts';

/** Weight of design sample k in instrument sample s, from the definition of each method. */
function weight(method: 'linear' | 'average', s: number, k: number, ratio: number, segments: number): number {
  if (method === 'average') {
    // Overlap of [s, s+1)/ratio with [k, k+1), divided by the period's length 1/ratio.
    const overlap = Math.min((s + 1) / ratio, k + 1) - Math.max(s / ratio, k);
    return overlap > 0 ? overlap * ratio : 0;
  }
  // The centre of instrument sample s, in design samples from the centre of the first one.
  const u = Math.min(segments - 1, Math.max(0, (s + 0.5) / ratio - 0.5));
  return Math.max(0, 1 - Math.abs(u - k)); // the hat function of a straight-line interpolation
}

/** The played I/Q per sample from one SSB channel, by dense least squares over the design values. */
function independentDemodulation(
  s: Float64Array,
  method: 'linear' | 'average',
  segments: number,
  ratio: number,
  fIF: number,
  fs: number,
  first: number,
  pulseSamples: number,
): { i: Float64Array; q: Float64Array } {
  // s_n = sum_k w_nk (I_k cos(2 pi f n / fs) + Q_k sin(2 pi f n / fs)) for the upper sideband
  // (docs/physics.md section 5); unknowns (I_0..I_{N-1}, Q_0..Q_{N-1}).
  const rows: number[][] = [];
  for (let t = 0; t < pulseSamples; t++) {
    const n = first + t;
    const phase = (2 * Math.PI * fIF * n) / fs;
    const w = Array.from({ length: segments }, (_, k) => weight(method, t, k, ratio, segments));
    rows.push([...w.map((x) => x * Math.cos(phase)), ...w.map((x) => x * Math.sin(phase))]);
  }
  const m = 2 * segments;
  const normal = Array.from({ length: m }, (_, a) => Array.from({ length: m }, (_, b) => rows.reduce((sum, r) => sum + r[a] * r[b], 0)));
  const rhs = Array.from({ length: m }, (_, a) => [rows.reduce((sum, r, t) => sum + r[a] * s[first + t], 0)]);
  const x = (lusolve(matrix(normal), matrix(rhs)) as Matrix).toArray() as unknown as number[][];
  const i = new Float64Array(s.length);
  const q = new Float64Array(s.length);
  for (let t = 0; t < pulseSamples; t++) {
    for (let k = 0; k < segments; k++) {
      const w = weight(method, t, k, ratio, segments);
      i[first + t] += w * x[k][0];
      q[first + t] += w * x[segments + k][0];
    }
  }
  return { i, q };
}

describe('SSB with linear or average resampling: the report evaluates the samples played', () => {
  const segments = 20;
  const dt = 2.4e-9; // 2.4 instrument samples per design sample at 1 GS/s: not whole
  const fs = 1e9;
  const fIF = 125e6;
  const design: Pulse = shapedPulse(9e6, segments, dt);
  const target = gate(Math.PI / 2);
  const members = [member(0, 0), member(-1e6, 0.05), member(2e6, -0.08)];
  const evaluate = oracleEvaluator(target, members);

  for (const method of ['linear', 'average'] as const) {
    it(`${method}: demodulating the unquantised channel gives back the resampled I/Q to rounding`, () => {
      const resampled = resamplePulse(design, fs, method);
      const settings = { sampleRate: fs, intermediateFrequency: fIF, sideband: 'upper' as const, mixerSign: 1 as const };
      const s = modulateSsb(resampled.i, resampled.q, settings);
      const back = demodulateSsb(s, resampleMap(segments, dt, fs, method), segments, settings);
      expect(normwiseRelativeError(back.i, resampled.i)).toBeLessThan(1e-12);
      expect(normwiseRelativeError(back.q, resampled.q)).toBeLessThan(1e-12);
    });

    it(`${method}: the reported figure is that of the played codes, demodulated and evaluated independently`, async () => {
      const settings = { sampleRate: fs, bits: 14 as const, fullScale: 1e7, resample: method as ResampleMethod, granularity: 16, pad: 'split' as const };
      const ssb = exportWaveform(design, { ...settings, channels: 'ssb', intermediateFrequency: fIF });
      const report = await exportReport(evaluate, design, ssb);
      const d = ssb.description;
      const pulseSamples = resampledLength(segments, dt, fs);
      expect(d.length - d.padBefore - d.padAfter).toBe(pulseSamples);
      const played = codesToHz(ssb.codes[0], 14, 1e7);
      const { i, q } = independentDemodulation(played, method, segments, dt * fs, fIF, fs, d.padBefore, pulseSamples);
      const independent = ensembleFigure(target, { dt: 1 / fs, i, q, metadata: {} }, members);
      expectClose(report.gate!.exported.meanInfidelity, independent.mean, { rel: 1e-9 }, 'mean infidelity as played');
      expectClose(report.gate!.exported.worstInfidelity, independent.worst, { rel: 1e-9 }, 'worst infidelity as played');

      // The same I/Q played on two channels: the figures differ only by quantisation (a few
      // code steps of 1e7 / 8191 Hz on a 9 MHz pulse), far less than the 15-300 % that a
      // constant fit per design sample put on them.
      const iq = exportWaveform(design, settings);
      const iqReport = await exportReport(evaluate, design, iq);
      const gap = Math.abs(report.gate!.exported.meanInfidelity / iqReport.gate!.exported.meanInfidelity - 1);
      expect(gap).toBeLessThan(0.01);
    });
  }
});
