// Tests of src/io/export/report.ts (and quantise.ts) against closed forms, with figures
// computed by the reference propagator tests/reference/oracle.ts:
// - a rectangular X(theta) delivered with relative amplitude error e is X(theta (1 + e)) =
//   X(theta) X(theta e), so 1 - F = 1 - cos^2(theta e / 2) = sin^2(theta e / 2)
//   (docs/physics.md sections 1-2; F = |Tr(V^dag U)|^2 / 4);
// - one code step is fullScale / (2^(b-1) - 1), i.e. an amplitude error of 1/(2^(b-1) - 1)
//   of full scale (issue 5, docs/physics.md section 5);
// - no drive for a time t under detuning Delta is R_z(2 pi Delta t), whose infidelity to the
//   identity is sin^2(pi Delta t).
import { describe, expect, it } from 'vitest';
import { exportReport } from '../../../src/io/export/report.ts';
import { codeMax, type DacBits } from '../../../src/io/export/settings.ts';
import { exportWaveform } from '../../../src/io/export/waveform.ts';
import { expectClose } from '../../reference/tolerance.ts';
import { gate, member, oracleEvaluator, rectangular } from './helpers.ts';

describe('quantisation effect on a rectangular X(theta): sin^2(theta e / 2)', () => {
  const theta = Math.PI / 2;
  const duration = 100e-9;
  const amplitude = theta / (2 * Math.PI * duration); // 2.5 MHz
  const design = rectangular(amplitude, 10, duration / 10);
  const members = [member(0, 0), member(0, 0.05), member(0, -0.05)];
  const evaluate = oracleEvaluator(gate(theta), members);

  for (const bits of [12, 14, 16] as DacBits[]) {
    for (const delta of [0.37, -0.41]) {
      it(`${bits} bits, the amplitude ${delta} code from code c: e = -delta / (c + delta)`, async () => {
        const top = codeMax(bits);
        const c = Math.round(0.7 * top);
        // Calibrate so that the design amplitude is exactly c + delta codes.
        const fullScale = (amplitude * top) / (c + delta);
        const waveform = exportWaveform(design, { sampleRate: 1e9, bits, fullScale });
        const report = await exportReport(evaluate, design, waveform);
        expect(report.peak.code).toBe(c);
        expectClose(report.quantisation.maxErrorCodes, Math.abs(delta), { rel: 1e-9 }, 'largest error in codes');
        expectClose(report.quantisation.maxErrorHz, (Math.abs(delta) * fullScale) / top, { rel: 1e-9 }, 'largest error in Hz');
        expectClose(report.quantisation.stepHz * top, fullScale, { rel: 1e-15 }, 'one code is fullScale / (2^(b-1) - 1)');
        const e = c / (c + delta) - 1;
        const gateFigures = report.gate!;
        // The ideal member: only the quantisation error.
        const exact = Math.sin((theta * e) / 2) ** 2;
        const perMember = (await evaluate(exportedPulse(report, waveform))).members;
        expectClose(perMember[0].infidelity, exact, { rel: 1e-6 }, 'ideal member');
        // Members with amplitude error eps: the errors compose, (1 + eps)(1 + e) - 1.
        members.forEach((m, j) => {
          const total = (1 + m.amplitudeError) * (1 + e) - 1;
          expectClose(perMember[j].infidelity, Math.sin((theta * total) / 2) ** 2, { rel: 1e-6 }, `member ${j}`);
        });
        const designWorst = Math.sin((theta * 0.05) / 2) ** 2;
        expectClose(gateFigures.design.worstInfidelity, designWorst, { rel: 1e-9 }, 'design worst');
        const worstTotal = Math.max(...members.map((m) => Math.abs((1 + m.amplitudeError) * (1 + e) - 1)));
        expectClose(gateFigures.exported.worstInfidelity, Math.sin((theta * worstTotal) / 2) ** 2, { rel: 1e-6 }, 'exported worst');
      });
    }
  }
});

// The exported pulse the report evaluated (as played), rebuilt from its codes.
function exportedPulse(report: Awaited<ReturnType<typeof exportReport>>, waveform: ReturnType<typeof exportWaveform>) {
  const step = report.quantisation.stepHz;
  return {
    dt: 1 / report.description.sampleRateHz,
    i: Float64Array.from(waveform.codes[0], (c) => c * step),
    q: Float64Array.from(waveform.codes[1], (c) => c * step),
    metadata: {},
  };
}

describe('padding is idle time: under detuning it turns the qubit about z', () => {
  it('identity target, no drive for T plus P padding samples: sin^2(pi Delta T) without, sin^2(pi Delta (T + P/fs)) with', async () => {
    const fs = 1e9;
    const design = rectangular(0, 25, 4e-9); // 100 ns of no drive
    const detuning = 1.3e6;
    const evaluate = oracleEvaluator(gate(0), [member(detuning, 0)]);
    const waveform = exportWaveform(design, { sampleRate: fs, bits: 16, fullScale: 1e7, granularity: 128, pad: 'before' });
    expect(waveform.description.padBefore).toBe(28);
    const report = await exportReport(evaluate, design, waveform);
    const T = 100e-9;
    expectClose(report.gate!.design.meanInfidelity, Math.sin(Math.PI * detuning * T) ** 2, { rel: 1e-12 }, 'design');
    expectClose(report.gate!.exportedPulseOnly.meanInfidelity, Math.sin(Math.PI * detuning * T) ** 2, { rel: 1e-12 }, 'pulse only');
    expectClose(report.gate!.exported.meanInfidelity, Math.sin(Math.PI * detuning * (T + 28 / fs)) ** 2, { rel: 1e-12 }, 'as played');
  });
});

describe('report figures of the samples', () => {
  it('durations, lengths, padding and peak of a 37-sample pulse padded to 48 (split), without a target', async () => {
    const design = rectangular(5e6, 37, 2e-9);
    const waveform = exportWaveform(design, { sampleRate: 500e6, bits: 12, fullScale: 1e7, granularity: 16, pad: 'split' });
    const report = await exportReport(null, design, waveform);
    expect(report.gate).toBeNull();
    expect(report.samples).toEqual({ pulse: 37, padBefore: 5, padAfter: 6, total: 48 });
    expectClose(report.durationS.design, 74e-9, { rel: 1e-12 }, 'design duration');
    expectClose(report.durationS.total, 96e-9, { rel: 1e-12 }, 'padded duration');
    // 5 MHz of 10 MHz full scale at 12 bits: 0.5 * 2047 = 1023.5 rounds away from zero to 1024.
    expect(report.peak.code).toBe(1024);
    expectClose(report.peak.hz, (1024 * 1e7) / 2047, { rel: 1e-15 }, 'peak amplitude');
    expect(report.holdSamples).toBe(1);
  });
});
