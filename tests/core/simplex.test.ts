// The Nelder-Mead minimiser (src/core/simplex.ts) on handbook test functions with known minima.
import { describe, expect, it } from 'vitest';
import { nelderMead } from '../../src/core/simplex.ts';

describe('Nelder-Mead', () => {
  // Source: Rosenbrock's function (Rosenbrock, Comput. J. 3, 175, 1960), minimum 0 at (1, 1).
  it('finds the minimum of Rosenbrock\'s valley from the classic start (-1.2, 1)', () => {
    const f = (x: number[]): number => 100 * (x[1] - x[0] ** 2) ** 2 + (1 - x[0]) ** 2;
    const r = nelderMead(f, [-1.2, 1], { steps: [0.1, 0.1], maxEvaluations: 2000, valueTolerance: 1e-20 });
    expect(Math.abs(r.x[0] - 1)).toBeLessThan(1e-5);
    expect(Math.abs(r.x[1] - 1)).toBeLessThan(1e-5);
    expect(r.evaluations).toBeLessThanOrEqual(2002);
  });

  // Source: a quadratic bowl with minimum at a known point; one and three variables.
  it('finds the centre of a quadratic bowl in one and three variables', () => {
    const centre = [0.3, -2, 5];
    for (const n of [1, 3]) {
      const f = (x: number[]): number => x.reduce((s, v, k) => s + (k + 1) * (v - centre[k]) ** 2, 0);
      const r = nelderMead(f, new Array(n).fill(0), { steps: new Array(n).fill(0.5), maxEvaluations: 3000, valueTolerance: 1e-24 });
      r.x.forEach((v, k) => expect(Math.abs(v - centre[k])).toBeLessThan(1e-8));
    }
  });
});
