// The wasm core against the plain-TypeScript oracle (tests/reference/oracle.ts), and
// its gradients against central finite differences.
import { describe, expect, it } from 'vitest';
import { evaluateMembers } from '../../src/core/api.ts';
import { BUFFER, createBlock, readBuffer } from '../../src/core/block.ts';
import { encodeMembers } from '../../src/core/encode.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import type { Member, Pulse, Target } from '../../src/core/types.ts';
import { getCore } from '../../src/core/wasm.ts';
import * as oracle from '../reference/oracle.ts';
import { mulberry32 } from '../../src/core/start.ts';

const rand = mulberry32(20261201);
const uniform = (lo: number, hi: number): number => lo + (hi - lo) * rand();

function randomPulse(n: number, dt: number, rabi: number, zeroEvery = 0): Pulse {
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    if (zeroEvery && k % zeroEvery === 0) continue; // zero-drive samples
    i[k] = uniform(-rabi, rabi);
    q[k] = uniform(-rabi, rabi);
  }
  return { dt, i, q, metadata: {} };
}

function randomMembers(count: number, detuning: number, amp: number): Member[] {
  return Array.from({ length: count }, () => ({ detuning: uniform(-detuning, detuning), amplitudeError: uniform(-amp, amp), weight: uniform(0.2, 1) }));
}

const targets: Target[] = [
  { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 },
  { kind: 'gate', axis: [0.3, -0.8, 0.5], angleRad: 2.1 },
  { kind: 'state', from: [0, 0, 1], to: [1, 0, 0] },
  { kind: 'state', from: [0.2, 0.5, -0.6], to: [-0.7, 0.1, 0.4] },
];

// Angles per segment: small (series only), about 1 (longest series) and well above 1
// (halving and double-angle recovery), so every path of the kernels is exercised.
const regimes = [
  { name: 'small angles', dt: 2e-9, rabi: 1e7, det: 1e6 },
  { name: 'angles near 1', dt: 1e-8, rabi: 2.5e7, det: 5e6 },
  { name: 'angles above 1 (halving)', dt: 1e-6, rabi: 2e6, det: 5e5 },
];

describe('wasm figure against the oracle', () => {
  for (const r of regimes) {
    for (const target of targets) {
      it(`${r.name}, ${target.kind} target: per-member infidelity within 1e-13`, () => {
        const pulse = randomPulse(37, r.dt, r.rabi, 7);
        const members = randomMembers(11, r.det, 0.2);
        const got = evaluateMembers(target, pulse, members);
        const want = oracle.ensembleFigure(target, pulse, members);
        got.members.forEach((m, j) => expect(Math.abs(m.infidelity - want.perMember[j])).toBeLessThan(1e-13));
        expect(Math.abs(got.meanInfidelity - want.mean)).toBeLessThan(1e-13);
        expect(got.worstIndex).toBe(want.worstIndex);
      });
    }
  }
});

/** The core's figure and gradient, after checking the gradient against the oracle's to 1e-12 relative. */
function gradientAgainstOracle(target: Target, pulse: Pulse, members: Member[]): ReturnType<typeof figureAndGradient> {
  const got = figureAndGradient(target, pulse, members);
  const want = oracle.ensembleGradient(target, pulse, members);
  const scale = Math.max(...want.gradI.map(Math.abs), ...want.gradQ.map(Math.abs));
  for (let k = 0; k < pulse.i.length; k++) {
    expect(Math.abs(got.gradI[k] - want.gradI[k]) / scale).toBeLessThan(1e-12);
    expect(Math.abs(got.gradQ[k] - want.gradQ[k]) / scale).toBeLessThan(1e-12);
  }
  return got;
}

/** The core's gradient against central differences of its figure, relative error < 1e-6 (Nocedal & Wright, section 8.1: error O(h^2)). */
function expectCentralDifferences(target: Target, pulse: Pulse, members: Member[]): void {
  const got = figureAndGradient(target, pulse, members);
  const h = 100; // Hz, on samples of order 1e6 Hz: rounding error ~1e-16/h, truncation ~h^2
  for (const channel of ['i', 'q'] as const) {
    for (let k = 0; k < pulse.i.length; k++) {
      const plus = { ...pulse, [channel]: pulse[channel].slice() } as Pulse;
      const minus = { ...pulse, [channel]: pulse[channel].slice() } as Pulse;
      plus[channel][k] += h;
      minus[channel][k] -= h;
      const fd = (evaluateMembers(target, plus, members).meanInfidelity - evaluateMembers(target, minus, members).meanInfidelity) / (2 * h);
      const g = channel === 'i' ? got.gradI[k] : got.gradQ[k];
      expect(Math.abs(g - fd)).toBeLessThan(1e-6 * Math.max(Math.abs(fd), 1e-9));
    }
  }
}

describe('wasm gradient against the oracle and finite differences', () => {
  for (const r of regimes) {
    for (const target of targets) {
      it(`${r.name}, ${target.kind} target: gradient agrees with the oracle to 1e-12 relative`, () => {
        const pulse = randomPulse(23, r.dt, r.rabi, 5);
        const members = randomMembers(7, r.det, 0.15);
        const got = gradientAgainstOracle(target, pulse, members);
        expect(Math.abs(got.mean - oracle.ensembleGradient(target, pulse, members).mean)).toBeLessThan(1e-13);
      });
    }
  }

  it('gives the same gradient whatever the member count (pairs of pairs, and a last pair alone)', () => {
    const pulse = randomPulse(17, 5e-9, 1e7, 6);
    for (const count of [1, 2, 3, 4, 5, 6, 9]) {
      for (const target of [targets[1], targets[3]]) {
        const members = randomMembers(count, 1e6, 0.1);
        const got = gradientAgainstOracle(target, pulse, members);
        got.perMember.forEach((f, j) => expect(Math.abs(f - oracle.memberInfidelity(target, pulse, members[j]))).toBeLessThan(1e-13));
      }
    }
  });

  it('matches central finite differences of the wasm figure (relative error < 1e-6), zero-drive samples included', () => {
    // Central differences: error O(h^2) (Nocedal & Wright, section 8.1).
    for (const target of targets) {
      expectCentralDifferences(target, randomPulse(15, 2e-8, 5e6, 4), randomMembers(5, 1e6, 0.1));
    }
  });
});

describe('one member: blocks of segments side by side in the lanes (assembly/qubit-blocks.ts)', () => {
  // Zero-weight members that are not copies of member 0 make every member need its own
  // sweep, which sends the ensemble down the paired-member path: the reference here.
  const paired = (members: Member[]): Member[] => [
    ...members, ...[0.31, 0.47, 0.59].map((f) => ({ detuning: f * 1e6, amplitudeError: f / 10, weight: 0 })),
  ];
  for (const r of regimes) {
    for (const target of targets) {
      it(`${r.name}, ${target.kind} target: agrees with the oracle (1e-12) and the paired path (1e-13), N odd, N below the block count`, () => {
        for (const n of [1, 2, 3, 5, 8, 13, 30]) {
          const pulse = randomPulse(n, r.dt, r.rabi, 3);
          const members = randomMembers(1, r.det, 0.15);
          const got = gradientAgainstOracle(target, pulse, members);
          got.perMember.forEach((f, j) => expect(Math.abs(f - oracle.memberInfidelity(target, pulse, members[j]))).toBeLessThan(1e-13));
          const ref = figureAndGradient(target, pulse, paired(members));
          expect(Math.abs(got.mean - ref.mean)).toBeLessThanOrEqual(1e-13 * ref.mean);
          got.perMember.forEach((f, j) => expect(Math.abs(f - ref.perMember[j])).toBeLessThanOrEqual(1e-13 * ref.perMember[j]));
          const scale = Math.max(...ref.gradI.map(Math.abs), ...ref.gradQ.map(Math.abs));
          for (let k = 0; k < n; k++) {
            expect(Math.abs(got.gradI[k] - ref.gradI[k])).toBeLessThanOrEqual(1e-13 * scale);
            expect(Math.abs(got.gradQ[k] - ref.gradQ[k])).toBeLessThanOrEqual(1e-13 * scale);
          }
        }
      });
    }
  }

  for (const r of regimes) {
    it(`${r.name}: the figure alone (evaluations, maps) of one member agrees with the oracle (1e-12) and the paired path (1e-13)`, () => {
      for (const target of targets) {
        for (const n of [1, 2, 3, 5, 8, 13, 30, 101]) {
          const pulse = randomPulse(n, r.dt, r.rabi, 3);
          const members = randomMembers(1, r.det, 0.15);
          const got = evaluateMembers(target, pulse, members).members[0].infidelity;
          expect(Math.abs(got - oracle.memberInfidelity(target, pulse, members[0]))).toBeLessThan(1e-12);
          const ref = evaluateMembers(target, pulse, paired(members)).members[0].infidelity;
          expect(Math.abs(got - ref)).toBeLessThanOrEqual(1e-13 * Math.max(ref, 1e-3));
          // The figure alone and the gradient's figure come from the same block products.
          expect(figureAndGradient(target, pulse, members).perMember[0]).toBe(got);
        }
      }
    });
  }

  it('one member with zero-drive stretches matches central finite differences (relative error < 1e-6)', () => {
    // Central differences: error O(h^2) (Nocedal & Wright, section 8.1).
    for (const target of targets) {
      for (const n of [3, 11]) expectCentralDifferences(target, randomPulse(n, 2e-8, 5e6, 2), randomMembers(1, 1e6, 0.1));
    }
  });

  it('a pulse with no drive at all: the free precession of every block, exact to 1e-13', () => {
    // No drive: every block is a rotation about z by the detuning alone (identity slots and
    // series at a = pi dt Delta only); the oracle evaluates it with Math.sin/cos.
    const pulse = randomPulse(9, 1e-8, 1e6, 1);
    expect([...pulse.i, ...pulse.q].every((v) => v === 0)).toBe(true);
    for (const target of targets) {
      const members = randomMembers(1, 2e6, 0.1);
      const got = gradientAgainstOracle(target, pulse, members);
      expect(Math.abs(got.mean - oracle.ensembleGradient(target, pulse, members).mean)).toBeLessThan(1e-13);
    }
  });

  it('gives zero-weight copies of member 0 (the padding) member 0\'s infidelity and no gradient', () => {
    const pulse = randomPulse(7, 1e-8, 1e7, 0);
    const [member] = randomMembers(1, 1e6, 0.1);
    const alone = figureAndGradient(targets[1], pulse, [member]);
    const padded = figureAndGradient(targets[1], pulse, [member, { ...member, weight: 0 }, { ...member, weight: 0 }]);
    expect(padded.perMember).toEqual(Float64Array.from([alone.perMember[0], alone.perMember[0], alone.perMember[0]]));
    expect(padded.gradI).toEqual(alone.gradI);
    expect(padded.gradQ).toEqual(alone.gradQ);
  });
});

/** The optimiser's objective and its gradient with respect to the variables, from the core. */
function objectiveAt(target: Target, n: number, dt: number, rabiMax: number, members: Member[],
  opts: { box: boolean; zeroEdges: boolean; smoothness: number }, x: Float64Array): { f: number; g: Float64Array; i: Float64Array; q: Float64Array } {
  const core = getCore();
  const enc = encodeMembers(members, 2, true);
  return core.job(() => {
    const p = createBlock(core, { target, segments: n, dt, members: enc, bound: opts.box ? 'box' : 'disc', zeroEdges: opts.zeroEdges,
      rabiMax, smoothness: opts.smoothness });
    const nVar = core.exports.problemVariables(p);
    expect(nVar).toBe(x.length);
    const xPtr = core.put(x), gPtr = core.alloc(nVar);
    const f = core.exports.objective(p, xPtr, gPtr);
    return { f, g: core.read(gPtr, nVar), i: readBuffer(core, p, BUFFER.samplesI, n), q: readBuffer(core, p, BUFFER.samplesQ, n) };
  });
}

describe('design objective: bounded variables, penalty, chain rule', () => {
  const cases = [
    { box: false, zeroEdges: false, smoothness: 0 },
    { box: false, zeroEdges: true, smoothness: 0.3 },
    { box: true, zeroEdges: false, smoothness: 0.05 },
  ];
  for (const opts of cases) {
    it(`gradient with respect to the variables matches central differences (${JSON.stringify(opts)})`, () => {
      const n = 12;
      const free = opts.zeroEdges ? n - 2 : n;
      // The box's variables are the samples over rabiMax, held in [-1, 1] by the optimiser.
      const x = new Float64Array(2 * free).map(() => (opts.box ? uniform(-0.95, 0.95) : uniform(-2, 2)));
      x[0] = 1e-4; x[1] = -2e-4; // a sample near zero amplitude exercises the tanh(r)/r series
      const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI };
      const members = randomMembers(6, 1e6, 0.1);
      const at = objectiveAt(target, n, 1e-8, 1e7, members, opts, x);
      const h = 1e-6;
      for (let v = 0; v < x.length; v++) {
        const xp = x.slice(), xm = x.slice();
        xp[v] += h; xm[v] -= h;
        const fd = (objectiveAt(target, n, 1e-8, 1e7, members, opts, xp).f - objectiveAt(target, n, 1e-8, 1e7, members, opts, xm).f) / (2 * h);
        expect(Math.abs(at.g[v] - fd)).toBeLessThan(1e-6 * Math.max(Math.abs(fd), 1e-7));
      }
    });
  }

  it('never exceeds the bound, even for huge variables (disc: sqrt(I^2+Q^2) <= rabiMax; box: |I|,|Q| <= rabiMax)', () => {
    const n = 8;
    const x = Float64Array.from([40, 40, -1e6, 3, 1e300, -1e300, 0, 0, 25, -25, 18.5, 0.001, -30, 30, 7, 7]);
    const members = [{ detuning: 0, amplitudeError: 0, weight: 1 }];
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: 1 };
    const disc = objectiveAt(target, n, 1e-8, 1e7, members, { box: false, zeroEdges: false, smoothness: 0 }, x);
    for (let k = 0; k < n; k++) expect(Math.hypot(disc.i[k], disc.q[k])).toBeLessThanOrEqual(1e7);
    const box = objectiveAt(target, n, 1e-8, 1e7, members, { box: true, zeroEdges: false, smoothness: 0 }, x);
    for (let k = 0; k < n; k++) {
      expect(Math.abs(box.i[k])).toBeLessThanOrEqual(1e7);
      expect(Math.abs(box.q[k])).toBeLessThanOrEqual(1e7);
    }
    // The box really is larger: its corner reaches sqrt(2) rabiMax (docs/physics.md section 3).
    expect(Math.hypot(box.i[0], box.q[0])).toBeGreaterThan(1.41e7);
  });

  it('holds zero edges at exactly zero', () => {
    const n = 9;
    const x = new Float64Array(2 * (n - 2)).map(() => uniform(-2, 2));
    const r = objectiveAt({ kind: 'gate', axis: [0, 1, 0], angleRad: 1 }, n, 1e-8, 1e7, [{ detuning: 1e5, amplitudeError: 0, weight: 1 }],
      { box: false, zeroEdges: true, smoothness: 0 }, x);
    expect([r.i[0], r.q[0], r.i[n - 1], r.q[n - 1]]).toEqual([0, 0, 0, 0]);
  });
});

describe('precision of small infidelities', () => {
  it('a rectangular X(theta) under amplitude error eps gives sin^2(theta eps/2) down to 1e-20', () => {
    // Closed form: the pulse is a rotation by theta (1+eps) about x, so W = R_x(theta eps)
    // and 1 - F = sin^2(theta eps / 2) (docs/physics.md sections 1-2).
    const theta = Math.PI;
    const n = 50, dt = 1e-9;
    const rabi = theta / (2 * Math.PI * n * dt);
    const pulse: Pulse = { dt, i: new Float64Array(n).fill(rabi), q: new Float64Array(n), metadata: {} };
    for (const eps of [1e-3, 1e-6, 1e-9, 1e-10]) {
      const got = evaluateMembers({ kind: 'gate', axis: [1, 0, 0], angleRad: theta }, pulse, [{ detuning: 0, amplitudeError: eps, weight: 1 }]);
      const want = Math.sin((theta * eps) / 2) ** 2;
      expect(got.meanInfidelity).toBeGreaterThan(0);
      expect(Math.abs(got.meanInfidelity - want) / want).toBeLessThan(1e-5);
    }
  });

  it('BB1 at amplitude error 1e-3 has infidelity of order 1e-18 (sixth order), positive', () => {
    // Wimperis, J. Magn. Reson. A 109, 221 (1994): theta_0 pi_p1 2pi_3p1 pi_p1 with
    // p1 = arccos(-theta/(4 pi)); its propagator error is O(eps^3), so 1 - F = O(eps^6).
    const theta = Math.PI / 2;
    const p1 = Math.acos(-theta / (4 * Math.PI));
    const rabi = 1e7, dt = 1e-10;
    const elements: [number, number][] = [[theta, 0], [Math.PI, p1], [2 * Math.PI, 3 * p1], [Math.PI, p1]];
    const i: number[] = [], q: number[] = [];
    for (const [angle, phase] of elements) {
      const t = angle / (2 * Math.PI * rabi);
      const samples = Math.ceil(t / dt - 1e-9);
      const amp = angle / (2 * Math.PI * samples * dt);
      for (let k = 0; k < samples; k++) { i.push(amp * Math.cos(phase)); q.push(amp * Math.sin(phase)); }
    }
    const pulse: Pulse = { dt, i: Float64Array.from(i), q: Float64Array.from(q), metadata: {} };
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: theta };
    const at = (eps: number) => evaluateMembers(target, pulse, [{ detuning: 0, amplitudeError: eps, weight: 1 }]).meanInfidelity;
    const f3 = at(1e-3);
    expect(f3).toBeGreaterThan(1e-20);
    expect(f3).toBeLessThan(1e-16);
    const slope = Math.log(at(2e-3) / f3) / Math.log(2);
    expect(slope).toBeGreaterThan(5.9);
    expect(slope).toBeLessThan(6.1);
    // And the oracle agrees on the value to rounding: both sum 2250 segments whose products
    // have O(1) components, so each component of w (|w|^2 = 1 - F, |w| ~ 1e-9) carries about
    // sqrt(2250) eps = 5e-15 of rounding (a random walk), 5e-6 of |w| and 1e-5 of 1 - F.
    const ref = oracle.memberInfidelity(target, pulse, { detuning: 0, amplitudeError: 1e-3, weight: 1 });
    expect(Math.abs(f3 - ref) / ref).toBeLessThan(2e-5);
  });

  it('stays unitary over 10^5 segments: the ideal-pulse infidelity of a full rotation stays at rounding level', () => {
    // Unitarity of products (docs/physics.md section 1): 10^5 segments of a 2 pi rotation in total.
    const n = 100000, dt = 1e-9;
    const rabi = 1 / (n * dt);
    const pulse: Pulse = { dt, i: new Float64Array(n).fill(rabi), q: new Float64Array(n), metadata: {} };
    const got = evaluateMembers({ kind: 'gate', axis: [1, 0, 0], angleRad: 2 * Math.PI }, pulse, [{ detuning: 0, amplitudeError: 0, weight: 1 }]);
    expect(got.meanInfidelity).toBeLessThan(1e-20);
  });
});
