// What the core cannot represent is refused before any kernel runs, with a named error
// naming the field, the value and what is allowed, from every entry point.
import { describe, expect, it } from 'vitest';
import { blochTrajectory, design, evaluate, evaluateMembers, robustnessMap, toProblem } from '../../src/core/api.ts';
import { SegmentAngleError, SpecError } from '../../src/core/errors.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import { MAX_SEGMENT_ANGLE } from '../../src/core/limits.ts';
import type { Member, Problem, Pulse, Target } from '../../src/core/types.ts';
import * as oracle from '../reference/oracle.ts';

const spec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 20, rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 } },
  optimizer: { starts: 1, seed: 1, maxIterations: 5 },
};
const gate: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
const members: Member[] = [{ detuning: 1e5, amplitudeError: 0.01, weight: 1 }, { detuning: 0, amplitudeError: 0, weight: 1 }];

/** A pulse of 1 ns samples whose sample 3 turns by `angle` rad (a = pi dt |Omega|). */
function pulseTurning(angle: number): Pulse {
  const dt = 1e-9;
  const i = new Float64Array(8).fill(1e6);
  i[3] = angle / (Math.PI * dt);
  return { dt, i, q: new Float64Array(8), metadata: {} };
}

describe('segment angles beyond the series', () => {
  it('are computed exactly up to the limit: the figure agrees with the Math.sin/cos oracle', () => {
    // At the limit the error stays at the conditioning of the angle itself (a eps ~ 2e-12).
    const pulse = pulseTurning(MAX_SEGMENT_ANGLE * 0.99);
    const got = evaluateMembers(gate, pulse, members);
    got.members.forEach((m, j) => expect(Math.abs(m.infidelity - oracle.memberInfidelity(gate, pulse, members[j]))).toBeLessThan(1e-11));
  });

  it('are refused by every entry point with SegmentAngleError naming the sample (was NaN with exit code 0 above about 4e9 rad)', () => {
    const pulse = pulseTurning(5e9);
    const calls: [string, () => unknown][] = [
      ['evaluate', () => evaluate(spec, pulse)],
      ['evaluateMembers', () => evaluateMembers(gate, pulse, members)],
      ['robustnessMap', () => robustnessMap(gate, pulse, { min: -1e6, max: 1e6, points: 3 }, { min: -0.1, max: 0.1, points: 3 })],
      ['blochTrajectory', () => blochTrajectory(pulse, members[0], [0, 0, 1])],
      ['figureAndGradient', () => figureAndGradient(gate, pulse, members)],
    ];
    for (const [name, call] of calls) {
      let error: unknown;
      try {
        call();
      } catch (e) {
        error = e;
      }
      expect(error, name).toBeInstanceOf(SegmentAngleError);
      expect((error as Error).name).toBe('SegmentAngleError');
      expect((error as SegmentAngleError).field).toBe('pulse.i[3]');
      expect((error as Error).message).toContain(`at most ${MAX_SEGMENT_ANGLE} rad`);
    }
  });

  it('a design whose rabiMax would turn a segment too far is refused before it starts', async () => {
    const tooFast = { ...spec, rabiMax: 1e20 };
    await expect(design(tooFast)).rejects.toThrow(SegmentAngleError);
    await expect(design(tooFast)).rejects.toThrow(/^rabiMax: 100000000000000000000 Hz is not allowed; a segment of 1e-8 s may turn the qubit by at most 10000 rad/);
    const farDetuned = { ...spec, ensemble: { detuning: { values: [0, 1e17] } } };
    await expect(design(farDetuned)).rejects.toThrow(/^ensemble\.detuning: 100000000000000000 Hz/);
  });
});

describe('a hand-built Problem is checked with the spec rules', () => {
  const good = (): Problem => structuredClone(toProblem(spec));

  it('optimizer.memory 0 is a SpecError naming the field, from design and from evaluate', async () => {
    const p = good();
    p.optimizer.memory = 0;
    await expect(design(p)).rejects.toThrow(SpecError);
    await expect(design(p)).rejects.toThrow('optimizer.memory: 0 is not allowed; an integer from 1 to 100');
    expect(() => evaluate(p, pulseTurning(1))).toThrow('optimizer.memory: 0 is not allowed');
  });

  it('non-finite values are refused with the field they sit in', () => {
    const cases: [(p: Problem) => void, string][] = [
      [(p) => { p.rabiMax = NaN; }, 'rabiMax: NaN is not allowed'],
      [(p) => { p.members[1].detuning = Infinity; }, 'members[1].detuning: Infinity is not allowed'],
      [(p) => { p.members[0].amplitudeError = -1; }, 'members[0].amplitudeError: -1 is not allowed'],
      [(p) => { p.constraints.smoothness = -0.1; }, 'constraints.smoothness: -0.1 is not allowed'],
      [(p) => { p.optimizer.gradientTolerance = NaN; }, 'optimizer.gradientTolerance: NaN is not allowed'],
      [(p) => { p.target = { kind: 'gate', axis: [0, 0, 0], angleRad: 1 }; }, 'target.axis: [0,0,0] is not allowed'],
      [(p) => { p.segments = 2.5; }, 'segments: 2.5 is not allowed'],
    ];
    for (const [spoil, message] of cases) {
      const p = good();
      spoil(p);
      expect(() => toProblem(p)).toThrow(SpecError);
      expect(() => toProblem(p)).toThrow(message);
    }
    // An untouched problem passes unchanged.
    expect(toProblem(good())).toEqual(good());
  });
});
