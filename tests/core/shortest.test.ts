// The shortest duration that meets a goal, and the design's initial pulse (its warm start):
// a rectangular pulse's known answer, a robust case bracketed to one sample, and the
// seeded start's first figure checked against an independent evaluation of its pulse.
import { describe, expect, it } from 'vitest';
import { design, evaluate } from '../../src/core/api.ts';
import { rectangularTime, shortestDuration, stretchPulse, targetAngle } from '../../src/core/shortest.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Progress } from '../../src/core/types.ts';
import * as oracle from '../reference/oracle.ts';

// X(90) with no ensemble, 10 MHz peak, 2 ns samples.
const rectSpec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  optimizer: { starts: 2, seed: 3, maxIterations: 300 },
};

// X(180) robust to +-10 % amplitude error: longer than the rectangular pulse, by a margin
// the search has to find.
const robustSpec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } },
  duration: 1.2e-7, segments: 60, rabiMax: 1e7,
  ensemble: { amplitudeError: { min: -0.1, max: 0.1, points: 3 } },
  optimizer: { starts: 2, seed: 5, maxIterations: 300 },
};

describe('the rectangular lower bound', () => {
  it('is theta / (2 pi rabiMax): a resonant constant drive rotates by 2 pi Omega t (docs/physics.md section 1)', () => {
    const p = parseSpec(rectSpec);
    expect(rectangularTime(p)).toBeCloseTo(0.25 / 1e7, 20); // (pi/2) / (2 pi 1e7) = 25 ns
    // A gate of 270 degrees is a 90 degree rotation about the opposite axis (up to a global phase).
    expect(targetAngle({ kind: 'gate', axis: [1, 0, 0], angleRad: (3 * Math.PI) / 2 })).toBeCloseTo(Math.PI / 2, 15);
    // A state transfer's angle is the angle between the Bloch vectors.
    expect(targetAngle({ kind: 'state', from: [0, 0, 1], to: [1, 0, 0] })).toBeCloseTo(Math.PI / 2, 15);
    // The box bound lets the amplitude reach sqrt(2) rabiMax.
    expect(rectangularTime(parseSpec({ ...rectSpec, constraints: { amplitudeBound: 'box' } }))).toBeCloseTo(0.25 / 1e7 / Math.SQRT2, 20);
  });
});

describe('shortestDuration', () => {
  it('with no ensemble, meets any tight goal at theta / (2 pi rabiMax) rounded up to whole samples, and not one sample less', async () => {
    const r = await shortestDuration(rectSpec, { goalMean: 1e-9 });
    // 25 ns / 2 ns = 12.5 samples -> 13 (docs/physics.md section 1: angle 2 pi Omega t).
    expect(r.segments).toBe(Math.ceil(25e-9 / 2e-9));
    expect(r.durationS).toBeCloseTo(26e-9, 20);
    const twelve = r.tried.find((t) => t.segments === 12)!;
    expect(twelve.met).toBe(false);
    // At 12 samples the largest angle is 2 pi 1e7 24e-9 = 0.48 pi; the best gate is R_x(0.48 pi),
    // whose phase-insensitive infidelity to R_x(pi/2) is sin^2(0.01 pi) (docs/physics.md sections 1, 2).
    expect(twelve.meanInfidelity).toBeGreaterThanOrEqual(Math.sin(0.01 * Math.PI) ** 2 * (1 - 1e-9));
    expect(r.meanInfidelity!).toBeLessThanOrEqual(1e-9);
    // The winner checked by the plain-TypeScript oracle.
    expect(oracle.memberInfidelity(parseSpec(rectSpec).target, r.pulse!, { detuning: 0, amplitudeError: 0, weight: 1 })).toBeLessThanOrEqual(1e-9);
    // The curve lists every duration tried, shortest first, at whole samples of 2 ns.
    const lengths = r.tried.map((t) => t.segments);
    expect(lengths).toEqual([...lengths].sort((a, b) => a - b));
    for (const t of r.tried) expect(t.durationS).toBeCloseTo(t.segments * 2e-9, 20);
  });

  it('on a robust case returns a duration that meets the goal while the next shorter sample count did not', async () => {
    const goal = { goalMean: 1e-4, goalWorst: 3e-4 };
    const r = await shortestDuration(robustSpec, goal);
    expect(r.segments).not.toBeNull();
    const n = r.segments!;
    const shorter = r.tried.find((t) => t.segments === n - 1)!;
    expect(shorter, 'the next shorter duration was tried').toBeDefined();
    expect(shorter.met).toBe(false);
    expect(shorter.meanInfidelity > goal.goalMean || shorter.worstInfidelity > goal.goalWorst).toBe(true);
    // The winning pulse, evaluated again on the spec's ensemble, meets the goal; and robustness costs time:
    // it is longer than the rectangular pulse (50 ns).
    const again = evaluate({ ...robustSpec, duration: r.durationS, segments: n }, r.pulse!);
    expect(again.meanInfidelity).toBeLessThanOrEqual(goal.goalMean);
    expect(again.worstInfidelity).toBeLessThanOrEqual(goal.goalWorst);
    expect(r.durationS!).toBeGreaterThan(r.lowerBoundS);
    // Every trial's "met" is the goal applied to its figures.
    for (const t of r.tried) expect(t.met).toBe(t.meanInfidelity <= goal.goalMean && t.worstInfidelity <= goal.goalWorst);
  });

  it('reports none when no duration up to the maximum meets the goal', async () => {
    const r = await shortestDuration(rectSpec, { goalMean: 1e-9, maxSegments: 12 });
    expect(r.segments).toBeNull();
    expect(r.pulse).toBeNull();
    expect(r.tried.every((t) => !t.met && t.segments <= 12)).toBe(true);
  });

  it('names a bad goal or range with its value and what is allowed', async () => {
    await expect(shortestDuration(rectSpec, { goalMean: 0 })).rejects.toThrow('goalMean: 0 is not allowed; an infidelity > 0 and <= 1');
    await expect(shortestDuration(rectSpec, { goalMean: 1e-3, minSegments: 20, maxSegments: 10 })).rejects.toThrow('minSegments: 20 is not allowed; it must not exceed maxSegments (10)');
  });
});

describe('initialPulse (warm start)', () => {
  const spec = { ...robustSpec, optimizer: { starts: 1, seed: 2, maxIterations: 40 } };

  it("start 0 begins at the given samples: its first figure is the given pulse's own (checked by the oracle)", async () => {
    const n = 60;
    const i = new Float64Array(n), q = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      i[k] = 6e6 * Math.sin((Math.PI * (k + 0.5)) / n);
      q[k] = 2e6 * Math.cos((3 * Math.PI * (k + 0.5)) / n);
    }
    const seen: Progress[] = [];
    await design(spec, { initialPulse: { i, q }, onProgress: (p) => seen.push(p) });
    const problem = parseSpec(spec);
    const expected = problem.members.reduce((s, m) => s + m.weight * oracle.memberInfidelity(problem.target, { dt: problem.dt, i, q, metadata: {} }, m), 0);
    expect(seen[0].iteration).toBe(0);
    // The inverse of the bounded map and back: a few rounding steps (tanh, atanh).
    expect(Math.abs(seen[0].meanInfidelity - expected) / expected).toBeLessThan(1e-12);
  });

  it('keeps the design deterministic, and a designed pulse given back starts where it ended', async () => {
    const first = await design(spec);
    const a = await design(spec, { initialPulse: first.pulse });
    const b = await design(spec, { initialPulse: first.pulse });
    expect(Array.from(a.pulse.i)).toEqual(Array.from(b.pulse.i));
    expect(a.evaluation.meanInfidelity).toBeLessThanOrEqual(first.evaluation.meanInfidelity * (1 + 1e-9));
  });

  it('refuses samples of another length, naming the field', async () => {
    await expect(design(spec, { initialPulse: { i: new Float64Array(3), q: new Float64Array(3) } })).rejects.toThrow(
      "initialPulse.i: 3 samples is not allowed; it must have the spec's 60 segments",
    );
  });
});

describe('stretchPulse', () => {
  it('keeps the area of a one-axis pulse (its rotation angle, docs/physics.md section 1) when the length changes', () => {
    const i = Float64Array.from({ length: 40 }, (_, k) => 5e6 * Math.sin((Math.PI * (k + 0.5)) / 40));
    const q = new Float64Array(40);
    const area = (x: ArrayLike<number>): number => Array.from(x).reduce((s, v) => s + v, 0);
    for (const n of [20, 33, 80]) {
      const s = stretchPulse({ i, q }, n);
      expect(s.i.length).toBe(n);
      // Linear interpolation of a smooth pulse: the area (sum x samples, in units of the old length) within 1 %.
      expect(Math.abs(area(s.i) - area(i)) / area(i)).toBeLessThan(0.01);
    }
  });
});
