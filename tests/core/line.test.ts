// The line between the instrument and the qubit (docs/physics.md section 5, "The line"):
// the core's drive map against a plain-TypeScript direct sum, the FFT against the direct
// sum, the transpose and the figure's gradient through the line against central finite
// differences, and the discrete kernels against their continuous responses.
import { describe, expect, it } from 'vitest';
import { evaluateMembers } from '../../src/core/api.ts';
import { createBlock } from '../../src/core/block.ts';
import { encodeMembers } from '../../src/core/encode.ts';
import { lineLayout } from '../../src/core/line.ts';
import { getCore } from '../../src/core/wasm.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import { qubitDrive } from '../../src/core/line.ts';
import { heldKernel, kernelOf } from '../../src/core/line-spec.ts';
import { mulberry32 } from '../../src/core/start.ts';
import type { Line, Member, Pulse, Target } from '../../src/core/types.ts';
import { heldLineDrive } from '../reference/oracle.ts';
import { normwiseRelativeError } from '../reference/tolerance.ts';

const rand = mulberry32(1207);
const uniform = (lo: number, hi: number): number => lo + (hi - lo) * rand();

function randomPulse(n: number, dt: number, rabi: number): Pulse {
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    i[k] = uniform(-rabi, rabi);
    q[k] = uniform(-rabi, rabi);
  }
  return { dt, i, q, metadata: {} };
}

const dt = 1 / 2.4e9;
const lines: { name: string; line: Line }[] = [
  { name: 'Gaussian 300 MHz, oversample 8', line: { oversample: 8, response: { kind: 'gaussian', bandwidth: 3e8 }, delay: 0, boundOn: 'programmed' } },
  { name: 'two RC stages 400 and 900 MHz, oversample 4', line: { oversample: 4, response: { kind: 'lowpass', bandwidths: [4e8, 9e8] }, delay: 0, boundOn: 'programmed' } },
  { name: 'measured impulse with an undershoot, oversample 3', line: { oversample: 3, response: { kind: 'impulse', values: [0.1, 0.5, 0.9, 0.4, -0.15, -0.05, 0.02] }, delay: 0, boundOn: 'programmed' } },
];

describe('the line drive map', () => {
  for (const { name, line } of lines) {
    it(`${name}: direct sum and FFT equal a plain direct sum on the held samples (1e-12)`, () => {
      const pulse = randomPulse(23, dt, 2e7);
      const h = kernelOf(line, dt / line.oversample).h;
      const want = heldLineDrive(pulse.i, pulse.q, h, line.oversample);
      for (const method of ['direct', 'fft'] as const) {
        const got = qubitDrive(pulse, line, method);
        expect(got.dt).toBe(dt / line.oversample);
        expect(normwiseRelativeError(got.i, want.i), `${method} I`).toBeLessThan(1e-12);
        expect(normwiseRelativeError(got.q, want.q), `${method} Q`).toBeLessThan(1e-12);
      }
      // And the two methods against each other.
      const direct = qubitDrive(pulse, line, 'direct'), fft = qubitDrive(pulse, line, 'fft');
      expect(normwiseRelativeError(fft.i, direct.i)).toBeLessThan(1e-12);
      expect(normwiseRelativeError(fft.q, direct.q)).toBeLessThan(1e-12);
    });
  }

  it('holding then convolving is one kernel h * box of length L + oversample - 1 (sum oversample)', () => {
    const c = heldKernel(Float64Array.of(0.25, 0.5, 0.25), 4);
    expect(Array.from(c)).toEqual([0.25, 0.75, 1, 1, 0.75, 0.25]);
  });

  const members: Member[] = [
    { detuning: 3e6, amplitudeError: 0.05, weight: 1 },
    { detuning: -2e6, amplitudeError: -0.04, weight: 2 },
    { detuning: 0, amplitudeError: 0, weight: 1 },
  ];
  const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
  for (const { name, line } of lines) {
    for (const method of ['direct', 'fft'] as const) {
      it(`${name}, ${method}: gradient through the line against central differences (1e-6)`, () => {
        // Source: central finite differences, error O(step^2) (Nocedal & Wright, section 8.1).
        const pulse = randomPulse(12, dt, 2e7);
        const got = figureAndGradient(target, pulse, members, line, method);
        const step = 2e2;
        const figure = (p: Pulse): number => evaluateMembers(target, p, members, line).meanInfidelity;
        let scale = 0, diff = 0;
        for (const ch of ['i', 'q'] as const) {
          for (let k = 0; k < pulse.i.length; k++) {
            const plus = { ...pulse, [ch]: pulse[ch].slice() }, minus = { ...pulse, [ch]: pulse[ch].slice() };
            plus[ch][k] += step;
            minus[ch][k] -= step;
            const fd = (figure(plus) - figure(minus)) / (2 * step);
            const g = ch === 'i' ? got.gradI[k] : got.gradQ[k];
            scale = Math.max(scale, Math.abs(fd));
            diff = Math.max(diff, Math.abs(g - fd));
          }
        }
        expect(scale).toBeGreaterThan(0);
        expect(diff / scale).toBeLessThan(1e-6);
        // The figure of the gradient job is the evaluation's figure (the same drive).
        expect(Math.abs(got.mean - figure(pulse))).toBeLessThan(1e-15);
      });
    }
  }
});

describe('the design objective through the line with the drive bound ("boundOn": "both")', () => {
  const line: Line = { oversample: 3, response: { kind: 'impulse', values: [-0.2, 1.4, -0.2] }, delay: 0, boundOn: 'both' };
  const members: Member[] = [{ detuning: 1e6, amplitudeError: 0.02, weight: 1 }, { detuning: -1e6, amplitudeError: 0, weight: 1 }];
  const target: Target = { kind: 'gate', axis: [0, 1, 0], angleRad: Math.PI };
  const rabiMax = 3e7;

  /** Objective and its gradient with respect to the optimiser's variables, from the core. */
  function objectiveAt(method: 'direct' | 'fft', x: Float64Array): { f: number; fig: number; g: Float64Array } {
    const core = getCore();
    return core.job(() => {
      const p = createBlock(core, {
        target, segments: 10, dt, members: encodeMembers(members, 2, true), bound: 'disc', rabiMax, drive: lineLayout(line, 10, dt, method),
      });
      const xPtr = core.put(x), gPtr = core.alloc(x.length);
      const f = core.exports.objective(p, xPtr, gPtr);
      return { f, fig: core.exports.problemInfidelity(p), g: core.read(gPtr, x.length) };
    });
  }

  for (const method of ['direct', 'fft'] as const) {
    it(`${method}: the penalty is active, excluded from the figure, and its gradient matches central differences (1e-6 normwise)`, () => {
      // Source: central finite differences (Nocedal & Wright, section 8.1). Alternating
      // samples near the bound make the overshooting line exceed it, so the penalty acts.
      const x = Float64Array.from({ length: 20 }, (_, v) => (v % 2 === 0 ? (Math.floor(v / 2) % 2 === 0 ? 3 : -3) : uniform(-0.3, 0.3)));
      const at = objectiveAt(method, x);
      expect(at.f - at.fig).toBeGreaterThan(1e-3);
      // The penalty's weight makes the objective large (1e4 per unit excess squared), so
      // the comparison is normwise: the largest difference over the largest component.
      const h = 1e-6;
      let diff = 0, scale = 0;
      for (let v = 0; v < x.length; v++) {
        const xp = x.slice(), xm = x.slice();
        xp[v] += h;
        xm[v] -= h;
        const fd = (objectiveAt(method, xp).f - objectiveAt(method, xm).f) / (2 * h);
        diff = Math.max(diff, Math.abs(at.g[v] - fd));
        scale = Math.max(scale, Math.abs(fd));
      }
      expect(diff / scale).toBeLessThan(1e-6);
    });
  }
});
