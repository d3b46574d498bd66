// The worker's export calls over a MessageChannel in one realm (no Worker): the waveform as
// played and its report come back with their arrays transferred, the gate figures agree with
// closed forms, the file bytes are the library's (read back by npyjs, an independent reader),
// refusals keep their class name, and the evaluation waits its turn on the core.
import { afterAll, describe, expect, it } from 'vitest';
import { parse } from 'npyjs';
import { proxy, wrap, type Remote } from 'comlink';
import { demoSpec } from '../../src/app/demo.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Member, Pulse, Target } from '../../src/core/types.ts';
import { encodeWaveform, exportWaveform } from '../../src/io/export/index.ts';
import type { CoreService, ExportJudge } from '../../src/worker/protocol.ts';
import { expectClose } from '../reference/tolerance.ts';
import { closePorts, serviceEndpoint } from './in-realm.ts';

afterAll(closePorts);
const core: Remote<CoreService> = wrap<CoreService>(serviceEndpoint());

const X90: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
const member = (detuning: number, amplitudeError: number): Member => ({ detuning, amplitudeError, weight: 1 });

/** X(90) as 2.5 MHz for 100 ns: 10 design samples of 10 ns. */
function rectangularX90(): Pulse {
  return { dt: 1e-8, i: new Float64Array(10).fill(2.5e6), q: new Float64Array(10), metadata: { name: 'rect' } };
}

describe('exportPreview and exportFile over a MessageChannel', () => {
  it('reports the quantisation effect of a rectangular X(90) as the closed form sin^2(theta e / 2)', async () => {
    // Issue 5: one code step is an amplitude error of 1/(2^(b-1)-1) of full scale; a
    // rectangular X(theta) with relative amplitude error e has 1 - F = sin^2(theta e / 2)
    // (docs/physics.md sections 1-2). Full scale is set so that 2.5 MHz is 1000.4 codes at 12 bits.
    const fullScale = (2.5e6 * 2047) / 1000.4;
    const judge: ExportJudge = { target: X90, members: [member(0, 0), member(0, 0.02)] };
    const preview = await core.exportPreview(rectangularX90(), { sampleRate: 1e9, bits: 12, fullScale, granularity: 64 }, judge);
    const r = preview.report;
    expect(r.peak.code).toBe(1000);
    expect(r.samples).toEqual({ pulse: 100, padBefore: 0, padAfter: 28, total: 128 });
    const e = 1000 / 1000.4 - 1;
    const theta = Math.PI / 2;
    // The pulse part alone: the mean of the two members (weights 1/2 each).
    const expected = (Math.sin((theta * e) / 2) ** 2 + Math.sin((theta * ((1 + 0.02) * (1 + e) - 1)) / 2) ** 2) / 2;
    expectClose(r.gate!.exportedPulseOnly.meanInfidelity, expected, { rel: 1e-7 }, 'exported pulse part, mean');
    // With no detuning the idle padding does nothing: as played equals the pulse part.
    expectClose(r.gate!.exported.meanInfidelity, expected, { rel: 1e-7 }, 'exported as played, mean');
    expectClose(r.gate!.design.worstInfidelity, Math.sin((theta * 0.02) / 2) ** 2, { rel: 1e-9 }, 'design worst');
    expectClose(r.quantisation.maxErrorCodes, 0.4, { rel: 1e-9 }, 'largest error in codes');
    // The waveform as played, transferred as typed arrays: 128 samples of 1 ns, 1000 codes in Hz.
    expect(preview.played.i).toBeInstanceOf(Float64Array);
    expect(preview.played.i).toHaveLength(128);
    expect(preview.played.dt).toBe(1e-9);
    expectClose(preview.played.i[0], (1000 * fullScale) / 2047, { rel: 1e-15 }, 'played I');
    expect(preview.played.i[100]).toBe(0);
  });

  it('plays the idle padding: a full turn about z under detuning changes nothing, a half turn does', async () => {
    // After the pulse, 1000 idle samples of 1 ns at detuning Delta are R_z(2 pi Delta 1 us);
    // at Delta = 1 MHz that is R_z(2 pi) = -1, a global phase (docs/physics.md section 1), so the
    // waveform as played has the figures of its pulse part; at 0.5 MHz, R_z(pi), it does not.
    const settings = { sampleRate: 1e9, bits: 16, fullScale: 1e7, minLength: 1100 };
    const full = (await core.exportPreview(rectangularX90(), settings, { target: X90, members: [member(1e6, 0)] })).report;
    expect(full.samples.padAfter).toBe(1000);
    expectClose(full.gate!.exported.meanInfidelity, full.gate!.exportedPulseOnly.meanInfidelity, { rel: 1e-9 }, 'a full turn of idling');
    const half = (await core.exportPreview(rectangularX90(), settings, { target: X90, members: [member(5e5, 0)] })).report;
    expect(Math.abs(half.gate!.exported.meanInfidelity - half.gate!.exportedPulseOnly.meanInfidelity)).toBeGreaterThan(0.1);
  });

  it('writes the library\'s bytes; npyjs reads back the I/Q codes', async () => {
    const pulse = rectangularX90();
    const settings = { sampleRate: 1e9, bits: 14, fullScale: 1e7, marker: true };
    const file = await core.exportFile(pulse, settings, { format: 'npy' });
    const direct = await encodeWaveform(exportWaveform(pulse, settings), 'npy');
    expect(file.bytes).toBeInstanceOf(Uint8Array);
    expect(Array.from(file.bytes)).toEqual(Array.from(direct.bytes));
    expect(new TextDecoder().decode(file.sidecar!)).toBe(new TextDecoder().decode(direct.sidecar!));
    // npyjs (an independent reader of NumPy's format): shape (100, 3) int16, I = round(2.5/10 * 8191) = 2048.
    const parsed = parse(new Uint8Array(file.bytes).buffer);
    expect(parsed.dtype).toBe('i2');
    expect(parsed.shape).toEqual([100, 3]);
    const flat = parsed.data as Int16Array;
    expect([flat[0], flat[1], flat[2]]).toEqual([2048, 0, 1]);
  });

  it('refuses a peak above full scale with the library\'s ExportError, and a JSON file of one SSB channel', async () => {
    await expect(core.exportPreview(rectangularX90(), { sampleRate: 1e9, bits: 14, fullScale: 2e6 }, null)).rejects.toMatchObject({
      name: 'ExportError',
      message: expect.stringMatching(/^fullScale: .*2500000 Hz.*above the full scale of 2000000 Hz.*never clipped/),
    });
    await expect(core.exportFile(rectangularX90(), { sampleRate: 1e9, bits: 14, fullScale: 2e6 }, { format: 'csv' })).rejects.toMatchObject({ name: 'ExportError' });
    const ssb = { sampleRate: 1e9, bits: 14, fullScale: 1e7, channels: 'ssb', intermediateFrequency: 2e8 };
    await expect(core.exportFile(rectangularX90(), ssb, { format: 'json' })).rejects.toMatchObject({ name: 'ExportError', message: expect.stringMatching(/^format:/) });
    await expect(core.exportPreview(rectangularX90(), { sampleRate: 1e9, bits: 13, fullScale: 1e7 }, null)).rejects.toMatchObject({ name: 'SpecError' });
  });

  it('gives the same report with a design running on the same core as alone (jobs nest in the core arena)', async () => {
    const problem = parseSpec(demoSpec());
    const judge: ExportJudge = { target: problem.target, members: problem.members };
    const pulse: Pulse = { dt: problem.dt, i: new Float64Array(problem.segments).fill(1.25e6), q: new Float64Array(problem.segments).fill(5e5), metadata: {} };
    const settings = { sampleRate: 1e9, bits: 14, fullScale: 1e7, granularity: 16 };
    const alone = await core.exportPreview(pulse, settings, judge);
    const spec = { ...demoSpec(), optimizer: { starts: 1, seed: 3, maxIterations: 30 } };
    const previews: Promise<Awaited<ReturnType<typeof core.exportPreview>>>[] = [];
    await core.design(spec, [0], proxy(() => void previews.push(core.exportPreview(pulse, settings, judge))), 0);
    const crowded = await Promise.all(previews);
    expect(crowded.length).toBeGreaterThan(0);
    for (const c of crowded) expect(c.report.gate).toEqual(alone.report.gate);
  });
});
