// Checks of the reference physics (tests/reference/oracle.ts) against sources outside
// the project: mathjs's matrix exponential, handbook identities of the Pauli algebra,
// closed forms of rotations and state-vector figures, and finite differences.
import { describe, expect, it } from 'vitest';
import * as fc from 'fast-check';
import { add, complex, expm, matrix, multiply as mmultiply, type Complex, type Matrix } from 'mathjs';
import {
  blochToSpinor,
  ensembleFigure,
  ensembleGradient,
  fromQuaternion,
  identity,
  memberInfidelity,
  multiply,
  pulsePropagator,
  rotation,
  segmentPropagator,
  spinorToBloch,
  toMatrix,
  type Su2,
} from '../reference/oracle.ts';
import { EPS, expectClose, normwiseRelativeError, ulps } from '../reference/tolerance.ts';
import type { Member, Pulse, Target, Vec3 } from '../../src/core/types.ts';

const TWO_PI = 2 * Math.PI;
const FC = { seed: 20240607, numRuns: 200 };

// The Pauli matrices of docs/physics.md section 1, in mathjs form.
const SX = matrix([[complex(0, 0), complex(1, 0)], [complex(1, 0), complex(0, 0)]]);
const SY = matrix([[complex(0, 0), complex(0, -1)], [complex(0, 1), complex(0, 0)]]);
const SZ = matrix([[complex(1, 0), complex(0, 0)], [complex(0, 0), complex(-1, 0)]]);

/** H = 2 pi [ -(Delta/2) sz + (1 + eps) (I/2 sx + Q/2 sy) ] of docs/physics.md (the model), in rad/s. */
function hamiltonian(i: number, q: number, detuning: number, eps: number): Matrix {
  const drive = (TWO_PI * (1 + eps)) / 2;
  return add(add(mmultiply((-TWO_PI * detuning) / 2, SZ), mmultiply(drive * i, SX)), mmultiply(drive * q, SY)) as Matrix;
}

function entries(m: Matrix): Complex[][] {
  return (m.toArray() as unknown as (Complex | number)[][]).map((row) => row.map((x) => complex(x as Complex)));
}

function maxEntryDifference(a: Su2, m: Matrix): number {
  const ours = toMatrix(a);
  const theirs = entries(m);
  let worst = 0;
  for (let r = 0; r < 2; r++) {
    for (let c = 0; c < 2; c++) {
      worst = Math.max(worst, Math.hypot(ours[r][c][0] - theirs[r][c].re, ours[r][c][1] - theirs[r][c].im));
    }
  }
  return worst;
}

/** A small deterministic generator (mulberry32), so random cases repeat exactly. */
function prng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe('segment propagator', () => {
  // Source: mathjs expm (Pade approximation with scaling and squaring), an
  // independent implementation of exp(-i H dt) for H of docs/physics.md section 1.
  it('matches mathjs expm(-i H dt) to 1e-12 on random drives, detunings and errors', () => {
    const hz = fc.double({ min: -2e7, max: 2e7, noNaN: true });
    fc.assert(
      fc.property(
        hz,
        hz,
        fc.double({ min: -1e7, max: 1e7, noNaN: true }),
        fc.double({ min: -0.3, max: 0.3, noNaN: true }),
        fc.double({ min: 1e-10, max: 1e-7, noNaN: true }),
        (i, q, detuning, eps, dt) => {
          const exact = expm(mmultiply(complex(0, -dt), hamiltonian(i, q, detuning, eps)) as Matrix);
          expect(maxEntryDifference(segmentPropagator(i, q, detuning, eps, dt), exact)).toBeLessThan(1e-12);
        },
      ),
      FC,
    );
  });

  // Same source, at the points where a = |h| dt / 2 is zero or tiny (sin(a)/a by its series).
  it('matches mathjs expm at zero and tiny drive', () => {
    const cases: [number, number, number, number][] = [
      [0, 0, 0, 0],
      [0, 0, 3e5, 0],
      [1e-3, 0, 0, 0.1],
      [0, -2e-2, 1e-2, -0.2],
      [5, 5, 0, 0],
    ];
    for (const [i, q, detuning, eps] of cases) {
      const dt = 1e-8;
      const exact = expm(mmultiply(complex(0, -dt), hamiltonian(i, q, detuning, eps)) as Matrix);
      expect(maxEntryDifference(segmentPropagator(i, q, detuning, eps, dt), exact)).toBeLessThan(1e-15);
    }
  });

  // Source: mathjs matrix multiply, on the full 2x2 matrices.
  it('multiplies like the full 2x2 matrices (mathjs multiply)', () => {
    const rand = prng(7);
    for (let trial = 0; trial < 50; trial++) {
      const a = segmentPropagator(2e7 * (rand() - 0.5), 2e7 * (rand() - 0.5), 1e7 * (rand() - 0.5), 0.1, 5e-8);
      const b = segmentPropagator(2e7 * (rand() - 0.5), 2e7 * (rand() - 0.5), 1e7 * (rand() - 0.5), -0.1, 5e-8);
      const full = (x: Su2) => matrix(toMatrix(x).map((row) => row.map(([re, im]) => complex(re, im))));
      expect(maxEntryDifference(multiply(a, b), mmultiply(full(a), full(b)) as Matrix)).toBeLessThan(ulps(16));
    }
  });
});

describe('Pauli algebra and rotations', () => {
  const basis = [fromQuaternion(0, 1, 0, 0), fromQuaternion(0, 0, 1, 0), fromQuaternion(0, 0, 0, 1)];

  // Source: docs/physics.md section 1 matrices; the quaternion form stores q_j = -i s_j.
  it('stores -i s_j for the quaternion basis', () => {
    for (const [j, s] of [SX, SY, SZ].entries()) {
      expect(maxEntryDifference(basis[j], mmultiply(complex(0, -1), s) as Matrix)).toBe(0);
    }
  });

  // Source: handbook identity [s_j, s_k] = 2i e_jkl s_l, i.e. [q_j, q_k] = 2 e_jkl q_l for q = -i s.
  it('satisfies [s_j, s_k] = 2i e_jkl s_l', () => {
    for (let j = 0; j < 3; j++) {
      for (let k = 0; k < 3; k++) {
        const ab = multiply(basis[j], basis[k]);
        const ba = multiply(basis[k], basis[j]);
        const commutator = { ur: ab.ur - ba.ur, ui: ab.ui - ba.ui, vr: ab.vr - ba.vr, vi: ab.vi - ba.vi };
        const l = 3 - j - k;
        const sign = j === k ? 0 : (k - j + 3) % 3 === 1 ? 1 : -1; // e_jkl for a permutation of 0,1,2
        const expected = j === k ? { ur: 0, ui: 0, vr: 0, vi: 0 } : basis[l];
        // Exact in floating point: every entry is 0 or +-2.
        const keys = ['ur', 'ui', 'vr', 'vi'] as const;
        for (const key of keys) expect(Math.abs(commutator[key] - 2 * sign * expected[key])).toBe(0);
      }
    }
  });

  // Source: R_n(2 pi) = -1 (spin-1/2 double cover; docs/physics.md section 1).
  it('gives -1 for a rotation by 2 pi, about any axis including a detuning-tilted one', () => {
    const rand = prng(11);
    for (let trial = 0; trial < 20; trial++) {
      const rabi = 1e6 * (0.5 + rand());
      const phase = TWO_PI * rand();
      const detuning = 1e6 * (rand() - 0.5);
      // Generalised Rabi frequency sqrt(rabi^2 + detuning^2) turns by 2 pi in 1/that.
      const dt = 1 / Math.hypot(rabi, detuning);
      const u = segmentPropagator(rabi * Math.cos(phase), rabi * Math.sin(phase), detuning, 0, dt);
      expectClose(u.ur, -1, { abs: ulps(8) }, 'Re u');
      for (const x of [u.ui, u.vr, u.vi]) expectClose(x, 0, { abs: ulps(8) }, 'other components');
      const r = rotation([rand() - 0.5, rand() - 0.5, rand() - 0.5], TWO_PI);
      expectClose(r.ur, -1, { abs: ulps(2) }, 'R_n(2 pi)');
    }
  });

  // Source: docs/physics.md section 1, a resonant drive I = Omega for time t rotates the Bloch
  // vector about +x by 2 pi Omega t: z goes to (0, -sin theta, cos theta) (right-hand rule).
  it('rotates the Bloch vector about +x for positive I', () => {
    for (const theta of [0.3, Math.PI / 2, 2.5]) {
      const u = segmentPropagator(1e6, 0, 0, 0, theta / (TWO_PI * 1e6));
      // U|0> is the first column (u, v).
      const r = spinorToBloch({ re: [u.ur, u.vr], im: [u.ui, u.vi] });
      expectClose(r[0], 0, { abs: ulps(4) }, 'x');
      expectClose(r[1], -Math.sin(theta), { abs: ulps(4) }, 'y');
      expectClose(r[2], Math.cos(theta), { abs: ulps(4) }, 'z');
    }
  });

  // Source: textbook Bloch-sphere parametrisation (docs/physics.md section 1).
  it('gives (sin t cos p, sin t sin p, cos t) for cos(t/2)|0> + e^{ip} sin(t/2)|1>', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: Math.PI, noNaN: true }), fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }), (t, p) => {
        const psi = { re: [Math.cos(t / 2), Math.cos(p) * Math.sin(t / 2)] as [number, number], im: [0, Math.sin(p) * Math.sin(t / 2)] as [number, number] };
        const r = spinorToBloch(psi);
        const expected: Vec3 = [Math.sin(t) * Math.cos(p), Math.sin(t) * Math.sin(p), Math.cos(t)];
        for (let k = 0; k < 3; k++) expectClose(r[k], expected[k], { abs: ulps(8) }, `component ${k}`);
        const back = spinorToBloch(blochToSpinor(expected));
        for (let k = 0; k < 3; k++) expectClose(back[k], expected[k], { abs: ulps(8) }, `round trip ${k}`);
      }),
      FC,
    );
  });
});

describe('products and figures', () => {
  // Source: unitarity of SU(2) products; rounding grows at most linearly in N (1e5 * eps ~ 2e-11).
  it('keeps |u|^2 + |v|^2 = 1 to 1e-11 over 10^5 random segments', () => {
    const rand = prng(3);
    let total = identity();
    for (let k = 0; k < 100_000; k++) {
      total = multiply(segmentPropagator(2e7 * (rand() - 0.5), 2e7 * (rand() - 0.5), 2e6 * (rand() - 0.5), 0.05, 1e-9), total);
    }
    const norm = total.ur ** 2 + total.ui ** 2 + total.vr ** 2 + total.vi ** 2;
    expect(Math.abs(norm - 1)).toBeLessThan(1e-11);
  });

  // Source: closed form. A rectangular X(theta) under amplitude error eps is X(theta(1+eps)),
  // so 1 - F = sin^2(theta eps / 2); at eps = 1e-9 that is ~2.5e-18, far below what
  // 1 - |Tr|^2/4 can resolve (docs/physics.md section 2).
  it('resolves infidelities of ~1e-18 for a rectangular pulse under tiny amplitude error', () => {
    const eps = 1e-9;
    for (const theta of [Math.PI, Math.PI / 2]) {
      for (const segments of [1, 4]) {
        const dt = 1e-8;
        const rabi = theta / (TWO_PI * segments * dt);
        const pulse: Pulse = { dt, i: new Float64Array(segments).fill(rabi), q: new Float64Array(segments), metadata: {} };
        const member: Member = { detuning: 0, amplitudeError: eps, weight: 1 };
        const expected = Math.sin((theta * eps) / 2) ** 2;
        const gate = memberInfidelity({ kind: 'gate', axis: [1, 0, 0], angleRad: theta }, pulse, member);
        expect(gate).toBeGreaterThan(0);
        expectClose(gate, expected, { rel: 1e-6 }, `gate infidelity, theta ${theta}, ${segments} segments`);
        if (theta === Math.PI) {
          // State transfer |0> -> |1>: 1 - |<1|U|0>|^2 = cos^2(pi (1+eps)/2) = sin^2(pi eps / 2).
          const state = memberInfidelity({ kind: 'state', from: [0, 0, 1], to: [0, 0, -1] }, pulse, member);
          expect(state).toBeGreaterThan(0);
          expectClose(state, expected, { rel: 1e-6 }, `state infidelity, ${segments} segments`);
        }
      }
    }
  });

  // Source: closed form; a detuned square pulse of Rabi rate W and detuning D (Rabi's
  // formula) transfers |0> -> |1> with probability W^2/(W^2+D^2) sin^2(pi sqrt(W^2+D^2) t).
  it('gives Rabi\'s formula for a detuned square pulse', () => {
    const rabi = 1e6;
    const dt = 1e-8;
    const pulse: Pulse = { dt, i: new Float64Array(50).fill(rabi), q: new Float64Array(50), metadata: {} };
    for (const detuning of [0, 2e5, -7e5, 3e6]) {
      const w = Math.hypot(rabi, detuning);
      const p = ((rabi * rabi) / (w * w)) * Math.sin(Math.PI * w * 50 * dt) ** 2;
      const inf = memberInfidelity({ kind: 'state', from: [0, 0, 1], to: [0, 0, -1] }, pulse, { detuning, amplitudeError: 0, weight: 1 });
      expectClose(inf, 1 - p, { abs: ulps(64) }, `detuning ${detuning}`);
    }
  });

  // Source: definition of the weighted mean and worst member (docs/physics.md section 2).
  it('weights the ensemble mean by normalised weights and finds the worst member', () => {
    const pulse = randomPulse(prng(5), 20, 0);
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const members: Member[] = [
      { detuning: 0, amplitudeError: 0, weight: 2 },
      { detuning: 1e6, amplitudeError: 0.1, weight: 1 },
      { detuning: -5e5, amplitudeError: -0.2, weight: 1 },
    ];
    const figure = ensembleFigure(target, pulse, members);
    const each = members.map((m) => memberInfidelity(target, pulse, m));
    expectClose(figure.mean, (2 * each[0] + each[1] + each[2]) / 4, { rel: ulps(8) }, 'mean');
    expect(figure.worst).toBe(Math.max(...each));
    expect(each[figure.worstIndex]).toBe(figure.worst);
  });
});

function randomPulse(rand: () => number, n: number, zeroEvery: number): Pulse {
  const rabi = 1e7;
  const i = new Float64Array(n);
  const q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    if (zeroEvery > 0 && k % zeroEvery === 0) continue; // zero-drive samples: |h| = |detuning|, or 0
    i[k] = rabi * (2 * rand() - 1);
    q[k] = rabi * (2 * rand() - 1);
  }
  return { dt: 4e-9, i, q, metadata: {} };
}

function randomUnit(rand: () => number): Vec3 {
  const v: Vec3 = [rand() - 0.5, rand() - 0.5, rand() - 0.5];
  const n = Math.hypot(...v);
  return [v[0] / n, v[1] / n, v[2] / n];
}

/** Central differences of the ensemble mean infidelity for every I and Q. */
function finiteDifferenceGradient(target: Target, pulse: Pulse, members: Member[], step: number) {
  const f = (p: Pulse) => ensembleFigure(target, p, members).mean;
  const n = pulse.i.length;
  const gradI = new Float64Array(n);
  const gradQ = new Float64Array(n);
  for (const [channel, grad] of [['i', gradI], ['q', gradQ]] as const) {
    for (let k = 0; k < n; k++) {
      const plus = { ...pulse, [channel]: Float64Array.from(pulse[channel]) };
      const minus = { ...pulse, [channel]: Float64Array.from(pulse[channel]) };
      plus[channel][k] += step;
      minus[channel][k] -= step;
      grad[k] = (f(plus) - f(minus)) / (2 * step);
    }
  }
  return { gradI, gradQ };
}

describe('exact gradient', () => {
  // Source: central finite differences. A step of 2e3 Hz turns a 4 ns segment by 5e-5
  // rad; the O(step^2) method error and the rounding (EPS over the change of the figure)
  // then both stay near 1e-10 relative, well inside the 1e-6 asked for.
  const step = 2e3;
  const rand = prng(42);
  const cases: { name: string; target: () => Target; zeroEvery: number; members: () => Member[] }[] = [
    {
      name: 'gate, random axis, three weighted members, zero-drive samples',
      target: () => ({ kind: 'gate', axis: randomUnit(rand), angleRad: 3 * rand() }),
      zeroEvery: 3,
      members: () => [
        { detuning: 2e6 * (rand() - 0.5), amplitudeError: 0.2 * (rand() - 0.5), weight: rand() },
        { detuning: 0, amplitudeError: 0, weight: rand() },
        { detuning: 2e6 * (rand() - 0.5), amplitudeError: 0.2 * (rand() - 0.5), weight: rand() },
      ],
    },
    {
      name: 'state transfer between random Bloch vectors, zero-drive samples',
      target: () => ({ kind: 'state', from: randomUnit(rand), to: randomUnit(rand) }),
      zeroEvery: 2,
      members: () => [
        { detuning: 2e6 * (rand() - 0.5), amplitudeError: 0.2 * (rand() - 0.5), weight: 1 },
        { detuning: 0, amplitudeError: 0.05, weight: 3 },
      ],
    },
    {
      name: 'gate X(90), single resonant member, every other sample at zero drive and zero detuning',
      target: () => ({ kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 }),
      zeroEvery: 2,
      members: () => [{ detuning: 0, amplitudeError: 0, weight: 1 }],
    },
    {
      name: 'inversion |0> -> |1>, detuned members',
      target: () => ({ kind: 'state', from: [0, 0, 1], to: [0, 0, -1] }),
      zeroEvery: 0,
      members: () => [
        { detuning: 1e6, amplitudeError: 0, weight: 1 },
        { detuning: -1e6, amplitudeError: 0.1, weight: 1 },
      ],
    },
  ];
  for (const c of cases) {
    it(`agrees with central differences to 1e-6: ${c.name}`, () => {
      for (let trial = 0; trial < 3; trial++) {
        const pulse = randomPulse(rand, 12, c.zeroEvery);
        const target = c.target();
        const members = c.members();
        const exact = ensembleGradient(target, pulse, members);
        const fd = finiteDifferenceGradient(target, pulse, members, step);
        expect(normwiseRelativeError(exact.gradI, fd.gradI)).toBeLessThan(1e-6);
        expect(normwiseRelativeError(exact.gradQ, fd.gradQ)).toBeLessThan(1e-6);
        expectClose(exact.mean, ensembleFigure(target, pulse, members).mean, { rel: ulps(8) }, 'mean');
      }
    });
  }

  // Source: central differences at an all-zero pulse with zero detuning, where every
  // segment has |h| = 0 and only the series of sin(a)/a keeps the derivative finite.
  it('is finite and right at an all-zero pulse with zero detuning', () => {
    const pulse: Pulse = { dt: 4e-9, i: new Float64Array(6), q: new Float64Array(6), metadata: {} };
    const target: Target = { kind: 'gate', axis: [0, 1, 0], angleRad: 1 };
    const members = [{ detuning: 0, amplitudeError: 0, weight: 1 }];
    const exact = ensembleGradient(target, pulse, members);
    const fd = finiteDifferenceGradient(target, pulse, members, step);
    expect([...exact.gradI, ...exact.gradQ].every(Number.isFinite)).toBe(true);
    expect(normwiseRelativeError(exact.gradQ, fd.gradQ)).toBeLessThan(1e-6);
    // About y, the I derivatives vanish by symmetry; they are compared in absolute terms.
    expect(normwiseRelativeError(exact.gradI, fd.gradI)).toBeLessThan(1e-6 * Math.max(...fd.gradQ.map(Math.abs)) + EPS);
  });

  // Source: the definition 1 - |Tr(V^dag U)|^2 / 4 (docs/physics.md section 2), evaluated
  // directly for a value far from 0, where the trace form loses nothing.
  it('gives the trace-formula infidelity, in the figure and in the gradient sweep', () => {
    const pulse = randomPulse(prng(9), 30, 4);
    const target: Target = { kind: 'gate', axis: [0, 0, 1], angleRad: 0.7 };
    const member = { detuning: 3e5, amplitudeError: -0.05, weight: 1 };
    const u = pulsePropagator(pulse, member);
    const direct = memberInfidelity(target, pulse, member);
    const v = rotation([0, 0, 1], 0.7);
    // Tr(V^dag U) = 2 Re(conj(u_V) u_U + conj(v_V) v_U) for matrices [[u, -conj v], [v, conj u]].
    const trace = 2 * (v.ur * u.ur + v.ui * u.ui + v.vr * u.vr + v.vi * u.vi);
    expectClose(direct, 1 - (trace * trace) / 4, { abs: ulps(16) }, 'infidelity');
    expectClose(ensembleGradient(target, pulse, [member]).mean, direct, { rel: ulps(8) }, 'gradient sweep figure');
  });
});
