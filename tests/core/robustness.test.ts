// Checks of the robustness analysis (src/core/robustness.ts, src/core/threshold-width.ts)
// against outside references: point-by-point evaluation and the plain-TS oracle
// (tests/reference/oracle.ts, docs/physics.md sections 1-2), closed forms for rectangular
// pulses, hand formulas for pulse area and energy, the Lipschitz bound the width search
// relies on, the "demo design beats BB1, SK1 and CORPSE", and Bloch trajectories.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { blochTrajectory, design, evaluate, evaluateMembers, robustnessMap } from '../../src/core/api.ts';
import { buildComposite } from '../../src/core/composites.ts';
import { ArgumentError, PulseFormatError } from '../../src/core/errors.ts';
import { SORT_FIGURES, sortRows, type CompareFigures } from '../../src/core/compare.ts';
import { cut, cuts, pulseFigures, summarise } from '../../src/core/robustness.ts';
import { chooseTarget } from '../../src/core/target-choice.ts';
import { firstCrossing, slopeBounds, thresholdInterval } from '../../src/core/threshold-width.ts';
import type { Member, Pulse, Target, Vec3 } from '../../src/core/types.ts';
import { blochToSpinor, memberInfidelity, segmentPropagator, spinorToBloch, toMatrix, type Spinor } from '../reference/oracle.ts';
import { expectClose, relativeError, ulps } from '../reference/tolerance.ts';

const DEG = Math.PI / 180;
const X90: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
const X180: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI };
const member = (detuning: number, amplitudeError: number): Member => ({ detuning, amplitudeError, weight: 1 });

/** A deterministic, irregular pulse (a linear congruential sequence), n samples of dt. */
function irregularPulse(n: number, dt: number, rabi: number): Pulse {
  let s = 12345;
  const next = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
  const i = Float64Array.from({ length: n }, () => rabi * next());
  const q = Float64Array.from({ length: n }, () => rabi * next());
  return { dt, i, q, metadata: {} };
}

/** A rectangular rotation by `angleDeg` about x at 1 MHz on 1 ns samples. */
const rectangular = (angleDeg: number) => buildComposite('rectangular', { angleDeg, rabiMax: 1e6, dt: 1e-9 });

describe('robustness map', () => {
  // Source: the map is defined as the figure at each grid point, so it must equal
  // point-by-point evaluateMembers calls; the oracle is an independent propagation. One
  // member alone runs blocks of segments in the lanes (assembly/qubit-blocks.ts), whose
  // products are taken in another order: the two agree to rounding, 40 segments of a few
  // eps each (16 eps).
  it('equals point-by-point evaluateMembers (16 eps) and the oracle (1e-13)', () => {
    const pulse = irregularPulse(40, 5e-9, 8e6);
    const detuning = { min: -2e6, max: 3e6, points: 7 };
    const amplitudeError = { min: -0.2, max: 0.1, points: 5 };
    const map = robustnessMap(X90, pulse, detuning, amplitudeError);
    for (let a = 0; a < 5; a++) {
      for (let d = 0; d < 7; d++) {
        const m = member(detuning.min + ((detuning.max - detuning.min) * d) / 6, amplitudeError.min + ((amplitudeError.max - amplitudeError.min) * a) / 4);
        const value = map.infidelity[a * 7 + d];
        expectClose(value, evaluateMembers(X90, pulse, [m]).members[0].infidelity, { abs: ulps(16) }, `map[${a}, ${d}]`);
        expectClose(value, memberInfidelity(X90, pulse, m), { abs: 1e-13 }, `oracle[${a}, ${d}]`);
      }
    }
  });

  it('summarises the grid: mean, worst and its place, fraction below the threshold', () => {
    const pulse = irregularPulse(30, 5e-9, 8e6);
    const { summary, map } = summarise(X90, pulse, { min: -1e6, max: 1e6, points: 9 }, { min: -0.1, max: 0.1, points: 11 }, { threshold: 0.3 });
    const v = Array.from(map.infidelity);
    expectClose(summary.regionMeanInfidelity, v.reduce((s, x) => s + x, 0) / v.length, { rel: 1e-15 }, 'region mean');
    expect(summary.regionWorstInfidelity).toBe(Math.max(...v));
    const j = v.indexOf(summary.regionWorstInfidelity);
    expect(summary.regionWorstAt.detuning).toBeCloseTo(-1e6 + 2.5e5 * (j % 9), 6);
    expect(summary.regionWorstAt.amplitudeError).toBeCloseTo(-0.1 + 0.02 * Math.floor(j / 9), 12);
    expect(summary.areaFraction).toBe(v.filter((x) => x < 0.3).length / v.length);
    expect(summary.threshold).toBe(0.3);
  });

  it('cuts equal the map through zero error, on both axes', () => {
    const pulse = irregularPulse(30, 5e-9, 8e6);
    const grid = { min: -0.2, max: 0.2, points: 9 };
    const c = cut(X90, pulse, 'amplitudeError', grid);
    const map = robustnessMap(X90, pulse, { min: 0, max: 0, points: 1 }, grid);
    expect(Array.from(c.infidelity)).toEqual(Array.from(map.infidelity));
    expect(c.values[0]).toBe(-0.2);
    expect(c.values[8]).toBe(0.2);
    const d = cut(X90, pulse, 'detuning', { min: 0, max: 1e6, points: 3 });
    expectClose(d.infidelity[2], memberInfidelity(X90, pulse, member(1e6, 0)), { abs: 1e-13 }, 'detuning cut');
    expect(() => cut(X90, pulse, 'phase' as 'detuning', grid)).toThrow(ArgumentError);
    expect(c.leakage).toBeUndefined(); // the qubit has no level to leak to
  });

  // Source: the cut is the map through zero error (issue 3), leakage included on a ladder
  // (docs/transmon.md), and each point is evaluateMembers' leakage of that member.
  it('cuts on a ladder carry the leakage of the map through zero error', () => {
    const system = { levels: 4, anharmonicity: -2e8 };
    const pulse = irregularPulse(20, 1e-9, 6e7);
    const grid = { min: -3e7, max: 3e7, points: 7 };
    const both = cuts(X90, pulse, grid, { min: -0.2, max: 0.2, points: 5 }, undefined, system);
    const map = robustnessMap(X90, pulse, grid, { min: 0, max: 0, points: 1 }, undefined, system);
    expect(Array.from(both.detuningLeakage!)).toEqual(Array.from(map.leakage!));
    expect(both.amplitudeErrorLeakage).toHaveLength(5);
    const point = evaluateMembers(X90, pulse, [member(grid.max, 0)], undefined, system).members[0];
    expectClose(both.detuningLeakage![6], point.leakage!, { abs: 1e-15 }, 'leakage at the last point');
    expect(Math.max(...both.detuningLeakage!)).toBeGreaterThan(1e-4); // the pulse leaks: the check has content
    expect(cuts(X90, pulse, grid, { min: -0.2, max: 0.2, points: 5 }).detuningLeakage).toBeUndefined();
  });
});

describe('threshold figures on closed forms', () => {
  // Source: a rectangular rotation by theta under amplitude error eps alone is a rotation by
  // theta (1 + eps) about the same axis, so 1 - F = sin^2(theta eps / 2) exactly (issue 3,
  // docs/physics.md section 1); its half-width at threshold t is 2 arcsin(sqrt(t)) / theta.
  it.each([
    [90, 1e-4],
    [180, 1e-4],
    [37, 1e-2],
    [90, 1e-8],
  ])('rectangular %s deg: amplitude half-width at threshold %s is 2 arcsin(sqrt t) / theta (1e-3 relative)', (angleDeg, t) => {
    const theta = angleDeg * DEG;
    const expected = (2 * Math.asin(Math.sqrt(t))) / theta;
    const interval = thresholdInterval({ kind: 'gate', axis: [1, 0, 0], angleRad: theta }, rectangular(angleDeg), 'amplitudeError', t);
    expect(relativeError(interval.halfWidth, expected)).toBeLessThan(1e-3);
    // The search brackets far tighter than the issue asks (1e-7 relative).
    expect(relativeError(interval.halfWidth, expected)).toBeLessThan(1e-6);
    expect(relativeError(-interval.lower, expected)).toBeLessThan(1e-6);
    expect(interval.reachedLimit).toBe(false);
  });

  it('rectangular: grid figures follow sin^2(theta eps / 2) on an amplitude-only grid', () => {
    const theta = Math.PI / 2;
    const grid = { min: -0.05, max: 0.05, points: 21 };
    const { summary } = summarise(X90, rectangular(90), { min: 0, max: 0, points: 1 }, grid);
    const closed = Array.from({ length: 21 }, (_, k) => Math.sin((theta * (-0.05 + 0.005 * k)) / 2) ** 2);
    expectClose(summary.regionMeanInfidelity, closed.reduce((s, x) => s + x, 0) / 21, { rel: 1e-12 }, 'region mean');
    expectClose(summary.regionWorstInfidelity, Math.max(...closed), { rel: 1e-12 }, 'region worst');
    expect(summary.areaFraction).toBe(closed.filter((x) => x < 1e-4).length / 21);
  });

  // Source: Rabi's formula for a detuned rectangular pulse (standard result, e.g. Allen &
  // Eberly, Optical Resonance and Two-Level Atoms, ch. 3; recalled from memory): with
  // R = sqrt(Omega^2 + Delta^2) the pulse is a rotation by 2 pi R T about (Omega, 0, Delta)/R,
  // so Tr(X(theta)^dag U)/2 = cos(theta/2) cos(pi R T) + sin(theta/2) sin(pi R T) Omega / R.
  it('rectangular 90 deg: detuning half-width matches a bisection of the Rabi formula (1e-6)', () => {
    const pulse = rectangular(90);
    const omega = pulse.i[0];
    const T = pulse.i.length * pulse.dt;
    const rabiInfidelity = (delta: number) => {
      const r = Math.hypot(omega, delta);
      const g = Math.cos(Math.PI / 4) * Math.cos(Math.PI * r * T) + Math.sin(Math.PI / 4) * Math.sin(Math.PI * r * T) * (omega / r);
      return 1 - g * g;
    };
    let lo = 0;
    let hi = omega;
    for (let k = 0; k < 200; k++) {
      const mid = (lo + hi) / 2;
      if (rabiInfidelity(mid) < 1e-4) lo = mid;
      else hi = mid;
    }
    const interval = thresholdInterval(X90, pulse, 'detuning', 1e-4);
    expect(relativeError(interval.upper, lo)).toBeLessThan(1e-6);
    expect(relativeError(interval.halfWidth, lo)).toBeLessThan(1e-6);
  });

  it('a pulse above the threshold at zero error has zero width', () => {
    const interval = thresholdInterval(X180, rectangular(90), 'detuning', 1e-4);
    expect(interval).toEqual({ lower: -0, upper: 0, halfWidth: 0, reachedLimit: false });
  });

  // Source: |d sqrt(1-F)/dx| <= ||dU/dx||, and ||dU/dDelta|| <= pi T, ||dU/deps|| <= pi
  // sum |Omega| dt from H of docs/physics.md section 1; checked here by finite differences.
  it('sqrt(infidelity) never changes faster than the bound the search relies on', () => {
    const pulse = irregularPulse(60, 4e-9, 9e6);
    const bounds = slopeBounds(pulse);
    const steepest = (axis: 'detuning' | 'amplitudeError', span: number) => {
      const c = cut(X90, pulse, axis, { min: -span, max: span, points: 2001 });
      let s = 0;
      for (let k = 1; k < 2001; k++) {
        s = Math.max(s, Math.abs(Math.sqrt(c.infidelity[k]) - Math.sqrt(c.infidelity[k - 1])) / (c.values[k] - c.values[k - 1]));
      }
      return s;
    };
    expect(steepest('detuning', 2e7)).toBeLessThanOrEqual(bounds.detuning);
    expect(steepest('amplitudeError', 0.9)).toBeLessThanOrEqual(bounds.amplitudeError);
  });

  // Invariant: with |g'| <= L the search cannot step over a crossing, however narrow the
  // excursion above the level between two of its first points.
  it('finds a crossing narrower than its own first step', () => {
    const L = 1;
    const level = 0.01;
    // Flat at level/2, with a tent of slope L peaking at 1.001 level around x = 0.3217.
    const peakAt = 0.3217;
    const g = (xs: number[]) => Float64Array.from(xs, (x) => Math.max(level / 2, 1.001 * level - L * Math.abs(x - peakAt)));
    const found = firstCrossing(g, L, level, 10);
    const expected = peakAt - 0.001 * level;
    expect(found.reachedLimit).toBe(false);
    expect(Math.abs(found.at - expected)).toBeLessThan(1e-6 * expected);
    // Where no crossing exists, the search says so at its limit.
    expect(firstCrossing((xs) => new Float64Array(xs.length), L, level, 3)).toEqual({ at: 3, reachedLimit: true });
  });
});

describe('figures of the samples', () => {
  // Hand formulas: N samples of constant |Omega| for dt give duration N dt, area N dt |Omega|
  // turns and energy N dt |Omega|^2; a resonant rotation by theta has area theta / (2 pi) turns.
  it('rectangular pulse: duration, peak, area (turns) and energy (Hz^2 s)', () => {
    const pulse = buildComposite('rectangular', { angleDeg: 90, axisDeg: 30, rabiMax: 1e6, dt: 1e-9 });
    const f = pulseFigures(pulse);
    const n = pulse.i.length;
    const omega = Math.hypot(pulse.i[0], pulse.q[0]);
    expect(n).toBe(250);
    expectClose(f.durationS, 250e-9, { rel: 1e-15 }, 'duration');
    expectClose(f.peakRabiHz, 1e6, { rel: 1e-15 }, 'peak');
    expectClose(f.pulseAreaTurns, 0.25, { rel: 1e-13 }, 'area');
    expectClose(f.energyHz2S, omega * omega * n * 1e-9, { rel: 1e-13 }, 'energy');
    expectClose(f.energyHz2S, 1e12 * 250e-9, { rel: 1e-13 }, 'energy at 1 MHz for 250 ns');
  });

  it('two-level pulse: area and energy add |Omega| and |Omega|^2 sample by sample', () => {
    const pulse: Pulse = { dt: 2e-9, i: Float64Array.from([3e6, 0, -1e6]), q: Float64Array.from([4e6, 2e6, 0]), metadata: {} };
    const f = pulseFigures(pulse);
    expectClose(f.pulseAreaTurns, (5e6 + 2e6 + 1e6) * 2e-9, { rel: 1e-15 }, 'area');
    expectClose(f.energyHz2S, (25e12 + 4e12 + 1e12) * 2e-9, { rel: 1e-15 }, 'energy');
    expect(f.peakRabiHz).toBe(5e6);
  });
});

describe('which target a pulse is judged against', () => {
  it('Knill: meets X(180) up to a z rotation of -60 deg after it; judged against its own ideal, said in the note', () => {
    // Source: Ryan, Hodges, Cory 2010 via docs/physics.md section 4: without error Knill is a
    // pi rotation about the axis at -pi/6, that is X(pi) followed by a z rotation of -pi/3.
    const knill = buildComposite('knill', { angleDeg: 180, rabiMax: 1e6, dt: 1e-9 });
    const { summary } = summarise(X180, knill, { min: -1e4, max: 1e4, points: 3 }, { min: -0.01, max: 0.01, points: 3 });
    expect(summary.targetGiven).toEqual(X180);
    expect(summary.targetUsed).toEqual(knill.metadata.ideal);
    expect(summary.targetNote).toContain('up to a z rotation of -60 degrees after it');
    expect(summary.regionWorstInfidelity).toBeLessThan(1e-6);
    // Against X(180) alone it would be far off: cos^2(30 deg) = 0.75 of the trace survives.
    expect(evaluateMembers(X180, knill, [member(0, 0)]).meanInfidelity).toBeCloseTo(0.25, 12);
  });

  it('a sequence built for another gate is judged against the spec\'s target, with a note', () => {
    // BB1 for 180 deg about 45 deg on an X(90) target: the phase-insensitive fidelity of the two
    // ideals is (q . q')^2 = (sin 45 cos 45)^2 = 0.25 (docs/physics.md section 2), so 0.75 infidelity.
    const bb1 = buildComposite('bb1', { angleDeg: 180, axisDeg: 45, rabiMax: 1e6, dt: 1e-9 });
    const choice = chooseTarget(X90, bb1);
    expect(choice.targetUsed).toEqual(X90);
    expect(choice.targetNote).toContain('does not meet the spec\'s target');
    expect(evaluateMembers(choice.targetUsed, bb1, [member(0, 0)]).meanInfidelity).toBeCloseTo(0.75, 12);
  });

  it('90-180-90 and gates that perform a state transfer meet it: the spec\'s target, with a note; BB1 at the given rotation: none', () => {
    const inversion: Target = { kind: 'state', from: [0, 0, 1], to: [0, 0, -1] };
    const levitt = buildComposite('90-180-90', { angleDeg: 180, rabiMax: 1e6, dt: 1e-9 });
    expect(chooseTarget(inversion, levitt).targetUsed).toEqual(inversion);
    expect(chooseTarget(inversion, levitt).targetNote).toContain('it meets the spec\'s state transfer');
    // |<1|U|0>| = |<0|U|1>| for U in SU(2) (handbook identity): an inversion serves |1> -> |0> too.
    const back: Target = { kind: 'state', from: [0, 0, -1], to: [0, 0, 1] };
    expect(chooseTarget(back, levitt).targetNote).toContain('it meets');
    // As a gate 90-180-90 is Y(180): on an X(180) spec it is judged against X(180) and said not to meet it.
    expect(chooseTarget(X180, levitt).targetUsed).toEqual(X180);
    expect(chooseTarget(X180, levitt).targetNote).toContain('does not meet');
    const bb1 = buildComposite('bb1', { angleDeg: 90, rabiMax: 1e6, dt: 1e-9 });
    expect(chooseTarget(X90, bb1)).toEqual({ targetGiven: X90, targetUsed: X90, targetNote: null });
    // R_{-n}(-theta) is the same gate: no note.
    const same: Target = { kind: 'gate', axis: [-2, 0, 0], angleRad: -Math.PI / 2 };
    expect(chooseTarget(same, bb1).targetNote).toBeNull();
    // A gate ideal that performs a given state transfer meets it (X(90) takes +z to -y, docs/physics.md section 1).
    const toMinusY: Target = { kind: 'state', from: [0, 0, 1], to: [0, -1, 0] };
    expect(chooseTarget(toMinusY, bb1).targetUsed).toEqual(toMinusY);
    expect(chooseTarget(toMinusY, bb1).targetNote).toContain('meets the spec\'s state transfer');
    const toPlusY: Target = { kind: 'state', from: [0, 0, 1], to: [0, 1, 0] };
    expect(chooseTarget(toPlusY, bb1).targetUsed).toEqual(toPlusY);
    expect(chooseTarget(toPlusY, bb1).targetNote).toContain('does not carry');
    const bad = { ...bb1, metadata: { ...bb1.metadata, ideal: { kind: 'gate', axis: [0, 0] } } };
    expect(() => chooseTarget(X90, bad)).toThrow(PulseFormatError);
    expect(() => chooseTarget(X90, bad)).toThrow(/metadata\.ideal/);
  });
});

describe('ordering of rows', () => {
  type Row = { name: string; figures?: CompareFigures };
  const row = (name: string, mean: number, area: number, width: number): Row =>
    ({ name, figures: { meanInfidelity: mean, worstInfidelity: 2 * mean, areaFraction: area, detuningHalfWidth: width } as CompareFigures });
  const rows: Row[] = [row('a', 3e-4, 0.2, 5), row('b', 1e-5, 0.1, 9), row('c', 2e-3, 0.9, 1), row('d', 1e-5, 0.1, 9), { name: 'refused' }];
  it('sorts best first: lower infidelity, higher area and width; ties by mean, then input order; rows without figures last', () => {
    expect(sortRows(rows, 'mean').map((r) => r.name)).toEqual(['b', 'd', 'a', 'c', 'refused']);
    expect(sortRows(rows, 'worst').map((r) => r.name)).toEqual(['b', 'd', 'a', 'c', 'refused']);
    expect(sortRows(rows, 'area').map((r) => r.name)).toEqual(['c', 'a', 'b', 'd', 'refused']);
    expect(sortRows(rows, 'detuning-width').map((r) => r.name)).toEqual(['b', 'd', 'a', 'c', 'refused']);
    expect(rows.map((r) => r.name)).toEqual(['a', 'b', 'c', 'd', 'refused']);
  });
  it('names the allowed figures for an unknown one', () => {
    expect(() => sortRows(rows, 'speed' as 'mean')).toThrow(/sortBy: "speed" is not allowed; one of mean, worst, region-mean/);
    expect(Object.keys(SORT_FIGURES)).toContain('energy');
  });
});

describe('the demo design against published sequences', () => {
  // Source: issue 3's acceptance criterion. The transmon demo (examples/transmon-x90.json)
  // with one start and 300 iterations; composites under the spec's rabiMax and dt.
  it('beats BB1, SK1 and CORPSE on its own ensemble in mean infidelity', async () => {
    const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x90.json', import.meta.url), 'utf8'));
    const quick = { ...spec, optimizer: { starts: 1, seed: 1, maxIterations: 300 } };
    const designed = (await design(quick)).pulse;
    const designedMean = evaluate(quick, designed).meanInfidelity;
    for (const name of ['bb1', 'sk1', 'corpse'] as const) {
      // 2 ns exactly: duration / segments is 1.9999999999999997e-9, which would cost BB1 three samples.
      const composite = buildComposite(name, { angleDeg: 90, rabiMax: spec.rabiMax, dt: 2e-9 });
      const mean = evaluate(quick, composite).meanInfidelity;
      expect(designedMean, `design ${designedMean} vs ${name} ${mean}`).toBeLessThan(mean);
    }
  });
});

/** The spinor M psi for a matrix in quaternion form. */
function apply(m: ReturnType<typeof toMatrix>, psi: Spinor): Spinor {
  const out: Spinor = { re: [0, 0], im: [0, 0] };
  for (let r = 0; r < 2; r++) {
    for (let c = 0; c < 2; c++) {
      const [mr, mi] = m[r][c];
      out.re[r] += mr * psi.re[c] - mi * psi.im[c];
      out.im[r] += mr * psi.im[c] + mi * psi.re[c];
    }
  }
  return out;
}

describe('Bloch trajectory', () => {
  // Source: docs/physics.md section 1: a rotation about +x by pi/2 takes +z to -y; the Bloch
  // vector of a pure state has unit length.
  it('rectangular X(90) from |0> ends at (0, -1, 0), every point of unit length', () => {
    const pulse = rectangular(90);
    const path = blochTrajectory(pulse, member(0, 0), [0, 0, 1]);
    expect(path.length).toBe(3 * (pulse.i.length + 1));
    expect(Array.from(path.subarray(0, 3))).toEqual([0, 0, 1]);
    const n = pulse.i.length;
    // Rounding grows by a few ulps per sample over the n = 250 products.
    const tol = { abs: ulps(4 * n) };
    expectClose(path[3 * n], 0, tol, 'x');
    expectClose(path[3 * n + 1], -1, tol, 'y');
    expectClose(path[3 * n + 2], 0, tol, 'z');
    for (let k = 0; k <= n; k++) expectClose(Math.hypot(path[3 * k], path[3 * k + 1], path[3 * k + 2]), 1, tol, `|r| at ${k}`);
  });

  it('agrees with the oracle spinor propagation, with detuning and amplitude error (1e-13)', () => {
    const pulse = irregularPulse(25, 5e-9, 8e6);
    const from: Vec3 = [0.3, -0.5, 0.8];
    const m = member(7e5, -0.06);
    const path = blochTrajectory(pulse, m, from);
    let psi = blochToSpinor(from);
    for (let k = 0; k <= pulse.i.length; k++) {
      const r = spinorToBloch(psi);
      for (let c = 0; c < 3; c++) expectClose(path[3 * k + c], r[c], { abs: 1e-13 }, `r[${k}][${c}]`);
      if (k < pulse.i.length) psi = apply(toMatrix(segmentPropagator(pulse.i[k], pulse.q[k], m.detuning, m.amplitudeError, pulse.dt)), psi);
    }
  });
});
