// Designs that end at optima of the bounded problem. The check is first-order optimality
// (Karush-Kuhn-Tucker; Nocedal & Wright, Numerical Optimization, Theorem 12.1) in the
// samples themselves, with the exact gradient (itself checked against the oracle and
// finite differences in core.test.ts), and a finite-difference probe along feasible
// directions.
import { describe, expect, it } from 'vitest';
import { design, evaluate, toProblem } from '../../src/core/api.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import type { Pulse } from '../../src/core/types.ts';
import { mulberry32 } from '../../src/core/start.ts';
import { readFileSync } from 'node:fs';

const demo = JSON.parse(readFileSync(new URL('../../examples/transmon-x90.json', import.meta.url), 'utf8'));

/** Infinity norm of the projected gradient of the mean infidelity on the box |I|, |Q| <= rabiMax, in units of rabiMax. */
function boxResidual(spec: unknown, pulse: Pulse, rabiMax: number): number {
  const problem = toProblem(spec);
  const g = figureAndGradient(problem.target, pulse, problem.members);
  let worst = 0;
  for (let k = 0; k < pulse.i.length; k++) {
    for (const [v, gv] of [[pulse.i[k], g.gradI[k]], [pulse.q[k], g.gradQ[k]]]) {
      const x = v / rabiMax, gx = gv * rabiMax;
      worst = Math.max(worst, Math.abs(gx < 0 ? Math.max(x - 1, gx) : Math.min(x + 1, gx)));
    }
  }
  return worst;
}

/** The same on the disc sqrt(I^2 + Q^2) <= rabiMax: across the bound, and outward-pulled along it. */
function discResidual(spec: unknown, pulse: Pulse, rabiMax: number): number {
  const problem = toProblem(spec);
  const g = figureAndGradient(problem.target, pulse, problem.members);
  let worst = 0;
  for (let k = 0; k < pulse.i.length; k++) {
    const i = pulse.i[k], q = pulse.q[k], a = Math.hypot(i, q);
    const gi = g.gradI[k] * rabiMax, gq = g.gradQ[k] * rabiMax;
    if (a > rabiMax * (1 - 1e-6)) {
      const radial = (gi * i + gq * q) / a, across = (gq * i - gi * q) / a;
      worst = Math.max(worst, Math.abs(across), Math.max(radial, 0));
    } else worst = Math.max(worst, Math.hypot(gi, gq));
  }
  return worst;
}

describe('box bound: projected L-BFGS with the generalised Cauchy point', () => {
  const rabiMax = 5e6;
  // Run to the optimiser's own end (no stall rule, no outpacing): the checks are of the end point.
  const spec = { ...demo, rabiMax, constraints: { amplitudeBound: 'box' }, optimizer: { starts: 6, seed: 2, maxIterations: 5000, stallIterations: 0, outpaceEvery: 0 } };

  it('ends where the projected gradient vanishes, and no feasible finite-difference step lowers the figure', async () => {
    const r = await design(spec, { startIndices: [3] });
    const pulse = r.pulse;
    // At this limit most samples sit on the box: the bound is active.
    const onBox = pulse.i.filter((v) => Math.abs(v) >= rabiMax * (1 - 1e-12)).length;
    expect(onBox).toBeGreaterThan(20);
    expect(boxResidual(spec, pulse, rabiMax)).toBeLessThan(1e-9);
    // Random feasible directions (components at a bound point inward or along it).
    const f0 = evaluate(spec, pulse).meanInfidelity;
    const rand = mulberry32(11);
    const h = 1e-4 * rabiMax;
    for (let trial = 0; trial < 20; trial++) {
      const moved = { ...pulse, i: pulse.i.slice(), q: pulse.q.slice() };
      for (const ch of ['i', 'q'] as const) {
        for (let k = 0; k < pulse.i.length; k++) {
          let d = rand() * 2 - 1;
          if (pulse[ch][k] >= rabiMax) d = -Math.abs(d);
          if (pulse[ch][k] <= -rabiMax) d = Math.abs(d);
          moved[ch][k] = pulse[ch][k] + h * d;
        }
      }
      // First order: f(x + h d) - f(x) = h g.d + O(h^2). The same probes lowered the
      // figure by up to 5.5e-7 at the point where the earlier tanh-box core stopped
      // from this start (measured), so the bound below separates the two.
      expect(evaluate(spec, moved).meanInfidelity - f0).toBeGreaterThan(-1e-9);
    }
  });

  it('lowers the figure of the earlier tanh-box parametrisation from the same starting pulse', async () => {
    // Measured with the previous core (I = rabiMax tanh(x), plain L-BFGS), same spec and
    // seeds: starts 0 and 3 stopped at 2.3239e-2 and 1.2478e-2, with projected gradients
    // of 3.2e-4 and 8.2e-5 (not optima).
    const r = await design(spec, { startIndices: [0, 3] });
    expect(r.starts[0].objective).toBeLessThan(2.3239e-2 * 0.9);
    expect(r.starts[1].objective).toBeLessThan(1.2478e-2);
    for (const s of r.starts) {
      expect(boxResidual(spec, s.pulse, rabiMax)).toBeLessThan(1e-8);
      for (const v of [...s.pulse.i, ...s.pulse.q]) expect(Math.abs(v)).toBeLessThanOrEqual(rabiMax);
    }
  });
});

describe('disc bound: no stall where tanh saturates', () => {
  it('starts that stopped on the gradient tolerance with samples at the bound now end at optima', async () => {
    // Measured before the re-centring (same spec and seed): starts 1 and 2 stopped on the
    // gradient tolerance at 2.556e-2 and 2.800e-2 with variables of radius up to 1e10 and
    // a sample-space optimality residual of 2.2e-4 and 4.5e-5.
    // 5000 iterations: where a start ends depends on the last bits of the arithmetic, and
    // start 2 needs about 4500 with the current backward sweep.
    // Each start to the optimiser's own end (no stall rule, no outpacing).
    const spec = { ...demo, rabiMax: 5e6, optimizer: { starts: 12, seed: 3, maxIterations: 5000, stallIterations: 0, outpaceEvery: 0 } };
    const r = await design(spec, { startIndices: [1, 2] });
    for (const s of r.starts) {
      for (let k = 0; k < s.pulse.i.length; k++) expect(Math.hypot(s.pulse.i[k], s.pulse.q[k])).toBeLessThanOrEqual(5e6);
      if (s.stopReason !== 'max-iterations') expect(discResidual(spec, s.pulse, 5e6)).toBeLessThan(1e-8);
    }
    expect(r.starts[0].meanInfidelity).toBeLessThan(2.556e-2 * 0.97);
    expect(r.starts[1].meanInfidelity).toBeLessThan(2.800e-2);
    expect(r.starts[1].stopReason).not.toBe('gradient-tolerance');
  });
});
