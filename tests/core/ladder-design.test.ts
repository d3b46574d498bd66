// The ladder gradient drives a design: an X(180) of an invented lab's transmon at 6.25 ns
// (15 samples at 2.4 GS/s), alpha -212 MHz, peak 250 MHz, designed on 5 levels with the
// exact gradient (ladder kernels) and a plain BFGS (tests/reference/bfgs.ts), then checked
// on 7 levels. Source of the target figure: the transmon issue's statement that below 1e-6
// on 7 levels is reachable here (checked there with an independent implementation).
import { describe, expect, it } from 'vitest';
import { evaluateMembers } from '../../src/core/api.ts';
import { calibrateDrag } from '../../src/core/drag.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { LadderSystem, Pulse } from '../../src/core/types.ts';
import { bfgs } from '../reference/bfgs.ts';

const RABI_MAX = 2.5e8;

/** Samples within the disc |W| < rabiMax from unbounded variables: W = rabiMax tanh(r)/r (x + iy). */
function samples(x: Float64Array, n: number): { i: Float64Array; q: Float64Array; jac: number[][] } {
  const i = new Float64Array(n), q = new Float64Array(n);
  const jac: number[][] = [];
  for (let k = 0; k < n; k++) {
    const a = x[2 * k], b = x[2 * k + 1];
    const r = Math.hypot(a, b), t = Math.tanh(r);
    const f = r < 1e-6 ? 1 - (r * r) / 3 : t / r;
    // (df/dr)/r, its limit -2/3 at r = 0
    const g = r < 1e-4 ? -2 / 3 + (8 * r * r) / 15 : ((1 - t * t) * r - t) / (r * r * r);
    i[k] = RABI_MAX * f * a;
    q[k] = RABI_MAX * f * b;
    jac.push([RABI_MAX * (f + g * a * a), RABI_MAX * g * a * b, RABI_MAX * (f + g * b * b)]);
  }
  return { i, q, jac };
}

describe('a transmon design with the ladder gradient', () => {
  it('X(180) at 6.25 ns designed on 5 levels stays below 1e-6 on 7 levels', () => {
    const problem = parseSpec({
      target: { gate: { axis: [1, 0, 0], angleDeg: 180 } }, duration: 6.25e-9, segments: 15, rabiMax: RABI_MAX,
      system: { levels: 5, anharmonicity: -2.12e8 },
    });
    const { members } = problem;
    const system = problem.system!;
    const n = problem.segments, dt = problem.dt;
    // Start from the calibrated cosine DRAG pulse, the lab's own best analytic guess.
    const start = calibrateDrag(problem, { envelope: 'cosine' }).pulse;
    const x0 = new Float64Array(2 * n);
    for (let k = 0; k < n; k++) {
      const a = Math.hypot(start.i[k], start.q[k]) / RABI_MAX;
      const scale = a === 0 ? 1 : Math.atanh(a) / a;
      x0[2 * k] = (scale * start.i[k]) / RABI_MAX;
      x0[2 * k + 1] = (scale * start.q[k]) / RABI_MAX;
    }
    const pulseOf = (x: Float64Array): Pulse => ({ dt, ...samples(x, n), metadata: {} });
    const result = bfgs((x) => {
      const s = samples(x, n);
      const fg = figureAndGradient(problem.target, { dt, i: s.i, q: s.q, metadata: {} }, members, undefined, undefined, system);
      const gradient = new Float64Array(2 * n);
      for (let k = 0; k < n; k++) {
        const [ixx, ixy, iyy] = s.jac[k];
        gradient[2 * k] = fg.gradI[k] * ixx + fg.gradQ[k] * ixy;
        gradient[2 * k + 1] = fg.gradI[k] * ixy + fg.gradQ[k] * iyy;
      }
      return { value: fg.mean, gradient };
    }, x0, 3000, 1e-12);
    const designed = pulseOf(result.x);
    const seven: LadderSystem = { levels: 7, anharmonicity: -2.12e8 };
    const on5 = evaluateMembers(problem.target, designed, members, undefined, system);
    const on7 = evaluateMembers(problem.target, designed, members, undefined, seven);
    // One run here: 42 iterations, 2e-13 on 5 levels, 4.3e-8 on 7 levels.
    expect(on5.meanInfidelity).toBeLessThan(1e-9);
    expect(on7.meanInfidelity).toBeLessThan(1e-6);
    for (let k = 0; k < n; k++) expect(Math.hypot(designed.i[k], designed.q[k])).toBeLessThan(RABI_MAX);
  });
});
