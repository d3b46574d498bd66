// Every figure through the line (docs/physics.md section 5, "The line"): with the
// bandwidth going to infinity each figure is the figure without a line; a design through
// a 300 MHz line beats one made without it when both are played through it; the drive
// bound; the delay; and the spec section's refusals.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { blochTrajectory, design, evaluate, evaluateMembers, robustnessMap } from '../../src/core/api.ts';
import { SpecError } from '../../src/core/errors.ts';
import { qubitDrive } from '../../src/core/line.ts';
import { lineJson } from '../../src/core/line-spec.ts';
import { compare } from '../../src/core/compare.ts';
import { cut, summarise } from '../../src/core/robustness.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Line, Member, Pulse, Target } from '../../src/core/types.ts';
import { exportReport, exportWaveform } from '../../src/io/export/index.ts';
import { expectClose } from '../reference/tolerance.ts';

const dt = 1 / 2.4e9;
const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
const members: Member[] = [
  { detuning: 1e6, amplitudeError: 0.03, weight: 1 },
  { detuning: -2e6, amplitudeError: -0.02, weight: 1 },
  { detuning: 0, amplitudeError: 0, weight: 2 },
];

function smoothPulse(n: number): Pulse {
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    i[k] = 3e7 * Math.sin((Math.PI * (k + 0.5)) / n) ** 2 + 4e6 * Math.cos(k);
    q[k] = 5e6 * Math.sin(2.3 * k);
  }
  return { dt, i, q, metadata: { name: 'test pulse' } };
}

describe('with the bandwidth going to infinity every figure is the figure without a line', () => {
  // Source: an invariant. A Gaussian or RC response of unbounded bandwidth is the identity;
  // its kernel is the single tap 1, so the qubit sees each sample held for oversample
  // fine steps, the same rotation as the sample held for dt (exact up to rounding).
  const wide: Line[] = [
    { oversample: 8, response: { kind: 'gaussian', bandwidth: 1e30 }, delay: 0, boundOn: 'programmed' },
    { oversample: 5, response: { kind: 'lowpass', bandwidths: [1e30, 1e30] }, delay: 0, boundOn: 'programmed' },
  ];
  const pulse = smoothPulse(30);
  for (const line of wide) {
    const name = line.response!.kind;
    it(`${name}: evaluate, map, cuts, summary, Bloch path (1e-13)`, () => {
      const a = evaluateMembers(target, pulse, members, line), b = evaluateMembers(target, pulse, members);
      a.members.forEach((m, j) => expectClose(m.infidelity, b.members[j].infidelity, { abs: 1e-13 }, `member ${j}`));
      const det = { min: -3e6, max: 3e6, points: 7 }, amp = { min: -0.05, max: 0.05, points: 5 };
      const ma = robustnessMap(target, pulse, det, amp, line), mb = robustnessMap(target, pulse, det, amp);
      ma.infidelity.forEach((v, j) => expectClose(v, mb.infidelity[j], { abs: 1e-13 }, `map point ${j}`));
      const ca = cut(target, pulse, 'amplitudeError', amp, line), cb = cut(target, pulse, 'amplitudeError', amp);
      ca.infidelity.forEach((v, j) => expectClose(v, cb.infidelity[j], { abs: 1e-13 }, `cut point ${j}`));
      const sa = summarise(target, pulse, det, amp, { line }).summary, sb = summarise(target, pulse, det, amp).summary;
      expectClose(sa.regionMeanInfidelity, sb.regionMeanInfidelity, { abs: 1e-13 }, 'summary region mean');
      expectClose(sa.detuningHalfWidth, sb.detuningHalfWidth, { rel: 1e-6 }, 'detuning half-width');
      expectClose(sa.amplitudeHalfWidth, sb.amplitudeHalfWidth, { rel: 1e-6 }, 'amplitude half-width');
      expectClose(sa.pulseAreaTurns, sb.pulseAreaTurns, { rel: 1e-12 }, 'pulse area');
      expectClose(sa.durationS, sb.durationS, { rel: 1e-12 }, 'duration');
      const member = members[0];
      const pa = blochTrajectory(pulse, member, [0, 0, 1], line), pb = blochTrajectory(pulse, member, [0, 0, 1]);
      // The path through the line has oversample points per sample: every oversample-th is the sample's.
      for (let k = 0; k <= pulse.i.length; k++) {
        for (let c = 0; c < 3; c++) expectClose(pa[3 * k * line.oversample + c], pb[3 * k + c], { abs: 1e-13 }, `Bloch ${k}.${c}`);
      }
    });
  }

  it('compare: every row (the pulse and composites) equals the row without the line (1e-13)', () => {
    const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x90-line.json', import.meta.url), 'utf8'));
    const { line: _omit, ...bare } = spec;
    const wideSpec = { ...bare, line: { oversample: 4, response: { gaussian: { bandwidth: 1e30 } } } };
    const p = { ...pulse, dt: spec.duration / spec.segments };
    const options = { composites: ['bb1', 'corpse'], region: { detuning: { min: -1e6, max: 1e6, points: 5 }, amplitudeError: { min: -0.02, max: 0.02, points: 5 } } };
    const a = compare(wideSpec, [{ name: 'p', pulse: p }], options), b = compare(bare, [{ name: 'p', pulse: p }], options);
    expect(a.rows.map((r) => r.name)).toEqual(b.rows.map((r) => r.name));
    a.rows.forEach((r, j) => {
      expectClose(r.figures!.meanInfidelity, b.rows[j].figures!.meanInfidelity, { abs: 1e-13 }, `${r.name} mean`);
      expectClose(r.figures!.regionWorstInfidelity, b.rows[j].figures!.regionWorstInfidelity, { abs: 1e-13 }, `${r.name} region worst`);
    });
  });

  it('export report: the gate figures through the line equal those without it (1e-13), both given', async () => {
    const line = wide[0];
    const problem = { ...parseSpec(JSON.parse(readFileSync(new URL('../../examples/transmon-x90-line.json', import.meta.url), 'utf8'))), line };
    const p = { ...pulse, i: pulse.i.map((v) => v / 2), q: pulse.q.map((v) => v / 2) };
    const waveform = exportWaveform(p, { sampleRate: 4.8e9, bits: 16, fullScale: 5e7, granularity: 16, resample: 'hold' });
    const report = await exportReport(problem, p, waveform);
    const g = report.gate!;
    expect(g.withoutLine).toBeDefined();
    expectClose(g.design.meanInfidelity, g.withoutLine!.design.meanInfidelity, { abs: 1e-13 }, 'design');
    expectClose(g.exported.meanInfidelity, g.withoutLine!.exported.meanInfidelity, { abs: 1e-13 }, 'exported');
  });
});

describe('designing through the line', () => {
  const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x90-line.json', import.meta.url), 'utf8'));
  const { line: _line, ...naive } = spec;

  it('a pulse designed without the line is worse through a 300 MHz Gaussian line than one designed through it (2.4 GS/s, two-level model)', async () => {
    // Source: the claim of designing through the line (Motzoi, Gambetta, Merkel, Wilhelm,
    // Phys. Rev. A 84, 022307, 2011): the optimiser pre-distorts for the response it sees.
    // The example is a fast transmon-like X(90) (50 MHz peak, 30 ns at 2.4 GS/s) on the
    // two-level model of docs/physics.md section 1.
    const without = await design(naive);
    const through = await design(spec);
    const seenWithout = evaluate(spec, without.pulse).meanInfidelity;
    const seenThrough = evaluate(spec, through.pulse).meanInfidelity;
    expect(seenThrough).toBe(through.evaluation.meanInfidelity);
    expect(seenWithout).toBeGreaterThan(3 * seenThrough);
    // The naive design's own (held-sample) figure hides what the line does to it.
    expect(without.evaluation.meanInfidelity).toBeLessThan(seenWithout / 2);
    // The pulse file records the line it was designed for.
    expect(through.pulse.metadata.line).toEqual(lineJson(parseSpec(spec).line!));
    expect(without.pulse.metadata.line).toBeUndefined();
  });

  it('"boundOn": "both" holds the drive the qubit sees within rabiMax; "programmed" lets a line with overshoot exceed it', async () => {
    // Source: an invariant (the bound) on a line whose impulse response overshoots: the
    // taps -0.15, 1.3, -0.15 (sum 1) raise a step between samples of opposite sign.
    const base = {
      target: { gate: { axis: [0, 1, 0], angleDeg: 180 } }, duration: 5e-9, segments: 12, rabiMax: 1.2e8,
      ensemble: { detuning: { min: 0, max: 0, points: 1 }, amplitudeError: { min: -0.05, max: 0.05, points: 3 } },
      optimizer: { starts: 1, seed: 2, maxIterations: 300 },
    };
    const lineOf = (boundOn: string) => ({ oversample: 2, response: { impulse: { values: [-0.15, 1.3, -0.15] } }, boundOn });
    const peakSeen = (spec: unknown, p: Pulse): number => {
      const d = qubitDrive(p, parseSpec(spec).line);
      return Math.max(...Array.from(d.i, (v, j) => Math.hypot(v, d.q[j])));
    };
    const programmed = { ...base, line: lineOf('programmed') };
    const both = { ...base, line: lineOf('both') };
    const a = await design(programmed), b = await design(both);
    expect(peakSeen(programmed, a.pulse)).toBeGreaterThan(1.2e8 * 1.01);
    expect(peakSeen(both, b.pulse)).toBeLessThanOrEqual(1.2e8);
    // The programmed bound holds in both.
    for (const p of [a.pulse, b.pulse]) for (let k = 0; k < p.i.length; k++) expect(Math.hypot(p.i[k], p.q[k])).toBeLessThanOrEqual(1.2e8);
  });
});

describe('the delay and the spec section', () => {
  const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x90-line.json', import.meta.url), 'utf8'));
  const fine = spec.duration / spec.segments / 8;

  it('a delay of whole fine steps moves the drive in time and leaves every figure as it is', () => {
    // Source: an invariant (time invariance: in the frame of the drive, a sequence delayed
    // as a whole is the same gate).
    const delayed = { ...spec, line: { ...spec.line, delay: 13 * fine } };
    const pulse = smoothPulse(spec.segments);
    const a = qubitDrive(pulse, parseSpec(spec).line), b = qubitDrive(pulse, parseSpec(delayed).line);
    expectClose(b.startS - a.startS, 13 * fine, { rel: 1e-12 }, 'start');
    expect(Array.from(b.i)).toEqual(Array.from(a.i));
    expect(evaluate(delayed, pulse).meanInfidelity).toBe(evaluate(spec, pulse).meanInfidelity);
  });

  const refusals: { name: string; line: unknown; field: string; says: RegExp }[] = [
    { name: 'a delay between fine steps', line: { ...spec.line, delay: 1e-10 }, field: 'line.delay', says: /1e-10 is not allowed.*whole number of fine steps.*5\.20833e-11 s; the nearest allowed is 1\.04167e-10 s/ },
    { name: 'oversample 0', line: { ...spec.line, oversample: 0 }, field: 'line.oversample', says: /0 is not allowed; an integer from 1 to 64/ },
    { name: 'a negative bandwidth', line: { response: { gaussian: { bandwidth: -3e8 } } }, field: 'line.response.gaussian.bandwidth', says: /-300000000 is not allowed; a finite number > 0 \(Hz\)/ },
    { name: 'two responses', line: { response: { gaussian: { bandwidth: 3e8 }, lowpass: { bandwidth: 1e9 } } }, field: 'line.response', says: /exactly one of/ },
    { name: 'a misspelt key', line: { response: { gausian: { bandwidth: 3e8 } } }, field: 'line.response.gausian', says: /did you mean "gaussian"/ },
    { name: 'a stage of an RC chain', line: { response: { lowpass: { bandwidth: [1e9, 'fast'] } } }, field: 'line.response.lowpass.bandwidth[1]', says: /"fast" is not allowed; a finite number > 0 \(Hz\)/ },
    { name: 'an impulse response summing to 0', line: { response: { impulse: { values: [1, -1] } } }, field: 'line.response.impulse.values', says: /summing to 0.*sum \(the gain at zero frequency\) is > 0/ },
    { name: 'an impulse file given to the library', line: { response: { impulse: { file: 'k.csv' } } }, field: 'line.response.impulse.file', says: /read by the command line/ },
    { name: 'boundOn', line: { boundOn: 'drive' }, field: 'line.boundOn', says: /one of "programmed", "both"/ },
    { name: 'a drive too long', line: { oversample: 64, response: { lowpass: { bandwidth: 1e3 } } }, field: 'line.response.lowpass.bandwidth', says: /1000 Hz is not allowed.*taps/ },
  ];
  for (const r of refusals) {
    it(`refuses ${r.name}, naming ${r.field}, the value and what is allowed`, () => {
      let error: unknown;
      try {
        parseSpec({ ...spec, line: r.line });
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(Error);
      const e = error as SpecError;
      expect(e.message.startsWith(`${r.field}: `), e.message).toBe(true);
      expect(e.message).toMatch(r.says);
    });
  }
});
