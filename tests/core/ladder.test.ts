// The transmon ladder kernels (assembly/ladder*.ts through the library's system seam:
// evaluateMembers and figureAndGradient with a system; src/core/ladder.ts for one segment's
// propagator and the populations) against
// sources outside them: mathjs expm of the model written out with mathjs operators, the
// plain-TypeScript ladder oracle (tests/reference/ladder-oracle.ts: Taylor exponential,
// Van Loan derivatives, Pauli-trace figures), the qubit kernels, central differences,
// closed forms and second-order perturbation theory.
import { describe, expect, it } from 'vitest';
import { add, complex, expm, identity as mIdentity, matrix, multiply as mmul, type Complex, type Matrix } from 'mathjs';
import { evaluateMembers } from '../../src/core/api.ts';
import { BUFFER, createBlock, readBuffer, setSamples } from '../../src/core/block.ts';
import { figureAndGradient } from '../../src/core/gradient.ts';
import { ladderPopulations, ladderSegmentPropagator, type LadderMember, type LadderSystem } from '../../src/core/ladder.ts';
import { blockSystem, encodeLadder } from '../../src/core/system.ts';
import { getCore } from '../../src/core/wasm.ts';
import { mulberry32 } from '../../src/core/start.ts';
import type { Pulse, Target } from '../../src/core/types.ts';
import * as oracle from '../reference/ladder-oracle.ts';
import { blochToSpinor } from '../reference/oracle.ts';
import { expectClose, normwiseRelativeError } from '../reference/tolerance.ts';

const rand = mulberry32(20261202);
const uniform = (lo: number, hi: number): number => lo + (hi - lo) * rand();
const TWO_PI = 2 * Math.PI;

/** H (rad/s) of docs/transmon.md written with mathjs operators: a, a^dag, n built as matrices. */
function mathjsHamiltonian(d: number, i: number, q: number, member: LadderMember, alpha: number): Matrix {
  const a = matrix(Array.from({ length: d }, (_, r) => Array.from({ length: d }, (_, c) => complex(c === r + 1 ? Math.sqrt(c) : 0, 0))));
  const adag = matrix(Array.from({ length: d }, (_, r) => Array.from({ length: d }, (_, c) => complex(r === c + 1 ? Math.sqrt(r) : 0, 0))));
  const n = mmul(adag, a) as Matrix;
  const nn1 = mmul(n, add(n, mmul(-1, mIdentity(d)) as Matrix)) as Matrix;
  const w = complex(i, q);
  const drive = add(mmul(complex(i, -q), a), mmul(w, adag)) as Matrix;
  const h = add(add(mmul(member.detuning, n), mmul(alpha / 2, nn1)), mmul((1 + member.amplitudeError) / 2, drive)) as Matrix;
  return mmul(TWO_PI, h) as Matrix;
}

function entries(m: Matrix): Complex[][] {
  return (m.toArray() as unknown as (Complex | number)[][]).map((row) => row.map((x) => complex(x as Complex)));
}

function maxDifference(ours: [number, number][][], theirs: Matrix): number {
  const t = entries(theirs);
  let worst = 0;
  ours.forEach((row, r) => row.forEach(([re, im], c) => (worst = Math.max(worst, Math.hypot(re - t[r][c].re, im - t[r][c].im)))));
  return worst;
}

function toCMatrix(m: Matrix): oracle.CMatrix {
  const t = entries(m);
  const out = oracle.zeros(t.length, t.length);
  t.forEach((row, r) => row.forEach((x, c) => { out.re[r * t.length + c] = x.re; out.im[r * t.length + c] = x.im; }));
  return out;
}

function randomPulse(n: number, dt: number, rabi: number): Pulse {
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) { i[k] = uniform(-rabi, rabi); q[k] = uniform(-rabi, rabi); }
  return { dt, i, q, metadata: {} };
}

function randomMembers(count: number): LadderMember[] {
  return Array.from({ length: count }, () => ({
    detuning: uniform(-5e6, 5e6), amplitudeError: uniform(-0.1, 0.1), anharmonicityError: uniform(-1e7, 1e7), weight: uniform(0.2, 1),
  }));
}

const targets: { name: string; target: Target; free: boolean }[] = [
  { name: 'gate', target: { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI }, free: false },
  { name: 'gate with a free phase after', target: { kind: 'gate', axis: [0.3, 0.9, 0.2], angleRad: Math.PI / 2 }, free: true },
  { name: 'state transfer', target: { kind: 'state', from: [0, 0, 1], to: [0.2, -1, 0.1] }, free: false },
];

/** A gate target with a free phase after, when asked. */
const withFreePhase = (target: Target, free = false): Target => (free && target.kind === 'gate' ? { ...target, freePhaseAfter: true } : target);

/** The library's evaluation on a ladder (the system seam), with leakage and the average infidelity as numbers. */
function onLadder(target: Target, pulse: Pulse, members: LadderMember[], system: LadderSystem, options: { freePhaseAfter?: boolean } = {}) {
  const e = evaluateMembers(withFreePhase(target, options.freePhaseAfter), pulse, members, undefined, system);
  return {
    ...e, meanLeakage: e.meanLeakage ?? NaN, meanAverageInfidelity: e.meanAverageInfidelity ?? NaN,
    members: e.members.map((m) => ({ ...m, leakage: m.leakage ?? NaN })),
  };
}

/** The library's figure and exact gradient on a ladder (the system seam), with every member's leakage. */
function ladderGradient(target: Target, pulse: Pulse, members: LadderMember[], system: LadderSystem, options: { freePhaseAfter?: boolean } = {}) {
  const g = figureAndGradient(withFreePhase(target, options.freePhaseAfter), pulse, members, undefined, undefined, system);
  return { ...g, leakage: g.leakage ?? new Float64Array(0) };
}

/** The ladder kernels on two levels (the seam sends a two-level problem to the qubit kernels): each member's figure and leakage. */
function twoLevelLadder(target: Target, pulse: Pulse, members: LadderMember[]): { infidelity: Float64Array; leakage: Float64Array } {
  const core = getCore();
  const enc = encodeLadder(target, members, { levels: 2, anharmonicity: -2e8 });
  const m = members.length, padded = enc.members.padded;
  return core.job(() => {
    const p = createBlock(core, { ...blockSystem(enc), target, segments: pulse.i.length, dt: pulse.dt });
    setSamples(core, p, pulse.i, pulse.q);
    core.exports.problemFigure(p);
    const values = readBuffer(core, p, BUFFER.perMember, 3 * padded);
    return { infidelity: values.slice(0, m), leakage: values.slice(padded, padded + m) };
  });
}

describe('ladder segment propagator', () => {
  // Source: mathjs expm (Pade with scaling and squaring) of -i H dt, H built from a, a^dag, n.
  it('matches mathjs expm(-i H dt) to 1e-12 for 3 to 8 levels', () => {
    for (let d = 3; d <= 8; d++) {
      for (let trial = 0; trial < 6; trial++) {
        const member: LadderMember = { detuning: uniform(-5e7, 5e7), amplitudeError: uniform(-0.2, 0.2), anharmonicityError: 0, weight: 1 };
        const alpha = uniform(-3e8, -1e8);
        const dt = uniform(1e-10, 2e-9);
        const i = uniform(-3e8, 3e8), q = trial === 0 ? 0 : uniform(-3e8, 3e8);
        const exact = expm(mmul(complex(0, -dt), mathjsHamiltonian(d, i, q, member, alpha)) as Matrix);
        expect(maxDifference(ladderSegmentPropagator(d, dt, i, q, member, alpha), exact), `d = ${d}, trial ${trial}`).toBeLessThan(1e-12);
      }
    }
  });

  // Source: the oracle's Taylor exponential with scaling and squaring: at |H| dt of hundreds
  // of radians both are exact to rounding, a few ulps times |H| dt.
  it('stays exact to rounding at large |H| dt (the oracle, 1e-14 |H| dt)', () => {
    for (const [d, i, q, dt] of [[8, 3e8, -2e8, 2e-8], [6, 1e9, 5e8, 1e-8], [3, 5e7, 0, 1e-6]] as const) {
      const member: LadderMember = { detuning: 3e7, amplitudeError: 0.1, anharmonicityError: 0, weight: 1 };
      const system: LadderSystem = { levels: d, anharmonicity: -2e8 };
      const ours = ladderSegmentPropagator(d, dt, i, q, member, -2e8);
      const want = oracle.ladderSegment(d, dt, i, q, member, system);
      const angle = TWO_PI * 1.1 * Math.hypot(i, q) * Math.sqrt(d) * dt;
      expect(angle).toBeGreaterThan(100);
      let worst = 0;
      ours.forEach((row, r) => row.forEach(([re, im], c) => (worst = Math.max(worst, Math.hypot(re - want.re[r * d + c], im - want.im[r * d + c])))));
      expect(worst, `d = ${d}, |H| dt about ${angle.toFixed(0)}`).toBeLessThan(1e-14 * angle);
    }
  });

  // Source: mathjs expm, at zero drive (diagonal H: the QL iteration must stop at once);
  // phases up to 8 rad on the top level, so rounding of a few 1e-15.
  it('matches mathjs expm at zero drive', () => {
    const member: LadderMember = { detuning: 3e6, amplitudeError: 0, anharmonicityError: 0, weight: 1 };
    const exact = expm(mmul(complex(0, -1e-9), mathjsHamiltonian(5, 0, 0, member, -2e8)) as Matrix);
    expect(maxDifference(ladderSegmentPropagator(5, 1e-9, 0, 0, member, -2e8), exact)).toBeLessThan(1e-14);
  });

  // Source: docs/physics.md section 1, H = 2 pi [-(Delta/2) sz + (1+eps)(I sx + Q sy)/2]; with
  // n = (1 - sz)/2 the ladder's Delta n is -(Delta/2) sz + Delta/2: equal up to the offset 2 pi Delta/2.
  it('on two levels is the qubit model up to the energy offset Delta/2', () => {
    const sx = matrix([[complex(0, 0), complex(1, 0)], [complex(1, 0), complex(0, 0)]]);
    const sy = matrix([[complex(0, 0), complex(0, -1)], [complex(0, 1), complex(0, 0)]]);
    const sz = matrix([[complex(1, 0), complex(0, 0)], [complex(0, 0), complex(-1, 0)]]);
    for (let trial = 0; trial < 10; trial++) {
      const member: LadderMember = { detuning: uniform(-2e7, 2e7), amplitudeError: uniform(-0.2, 0.2), anharmonicityError: 0, weight: 1 };
      const i = uniform(-2e7, 2e7), q = uniform(-2e7, 2e7), dt = uniform(1e-9, 2e-8);
      const qubit = mmul(TWO_PI, add(add(mmul(-member.detuning / 2, sz), mmul(((1 + member.amplitudeError) * i) / 2, sx)),
        mmul(((1 + member.amplitudeError) * q) / 2, sy))) as Matrix;
      const shifted = add(qubit, mmul(TWO_PI * member.detuning / 2, mIdentity(2))) as Matrix;
      const ladder = entries(mathjsHamiltonian(2, i, q, member, -2e8));
      entries(shifted).forEach((row, r) => row.forEach((x, c) => {
        expect(Math.hypot(x.re - ladder[r][c].re, x.im - ladder[r][c].im)).toBeLessThan(1e-7); // rad/s of size 1e8
      }));
      // exp(-i (H_q + c) dt) = e^{-i c dt} exp(-i H_q dt): the kernel against the qubit model.
      const exact = mmul(complex(Math.cos(Math.PI * member.detuning * dt), -Math.sin(Math.PI * member.detuning * dt)),
        expm(mmul(complex(0, -dt), qubit) as Matrix)) as Matrix;
      expect(maxDifference(ladderSegmentPropagator(2, dt, i, q, member, -2e8), exact)).toBeLessThan(1e-12);
    }
  });
});

describe('ladder figures', () => {
  // Source: the qubit kernels (evaluateMembers), already checked against their own oracle.
  // Angles per sample small and near 1 (the qubit kernels' plain series); above 1 the qubit
  // kernels halve and recover, and agree with their own oracle to 1e-13 (tests/core/core.test.ts).
  it('on two levels equal the qubit kernels to 1e-14 (1e-13 where the qubit kernels halve)', () => {
    for (const { target } of targets.filter((t) => !t.free)) {
      for (const [dt, rabi, tol] of [[2e-9, 1e7, 1e-14], [1e-8, 2.5e7, 1e-14], [1e-6, 2e6, 1e-13]]) {
        const pulse = randomPulse(37, dt, rabi);
        const members = randomMembers(9).map((m) => ({ ...m, anharmonicityError: 0 }));
        const qubit = evaluateMembers(target, pulse, members);
        const ladder = twoLevelLadder(target, pulse, members);
        ladder.infidelity.forEach((f, j) => expectClose(f, qubit.members[j].infidelity, { abs: tol }, `member ${j}`));
        expect(Math.max(...ladder.leakage)).toBe(0);
      }
    }
  });

  // Source: a many-segment product against mathjs expm of the whole constant pulse; figures
  // of that matrix from the oracle's Pauli traces.
  it('of a many-segment constant pulse equal those of mathjs expm of the whole pulse (1e-12)', () => {
    const system: LadderSystem = { levels: 4, anharmonicity: -2.2e8 };
    const member: LadderMember = { detuning: 2e6, amplitudeError: 0.03, anharmonicityError: 1e6, weight: 1 };
    const n = 40, dt = 2.5e-10, i = 6e7, q = -2e7;
    const pulse: Pulse = { dt, i: new Float64Array(n).fill(i), q: new Float64Array(n).fill(q), metadata: {} };
    const whole = toCMatrix(expm(mmul(complex(0, -n * dt), mathjsHamiltonian(4, i, q, member, -2.2e8 + 1e6)) as Matrix));
    for (const { target, free } of targets) {
      const got = onLadder(target, pulse, [member], system, { freePhaseAfter: free });
      const want = oracle.ladderFigures(whole, target, free);
      expectClose(got.members[0].infidelity, want.infidelity, { abs: 1e-12 }, 'infidelity');
      expectClose(got.members[0].leakage, want.leakage, { abs: 1e-12 }, 'leakage');
      expect(got.members[0].leakage).toBeGreaterThan(1e-4); // the pulse does leak: the check has content
    }
  });

  // Source: closed forms. Zero drive with detuning Delta for T on an identity target leaves
  // M = diag(1, e^{-i 2 pi Delta T}): 1 - F = sin^2(pi Delta T) exactly, no leakage; with a
  // free phase after, the best z rotation undoes it: phase 2 pi Delta T, figure ~ 0.
  it('give 1e-12 right (never 0 or negative) and the free phase of a pure z error', () => {
    const n = 10, dt = 1e-8;
    const detuning = Math.asin(1e-6) / (Math.PI * n * dt);
    const pulse: Pulse = { dt, i: new Float64Array(n), q: new Float64Array(n), metadata: {} };
    const member: LadderMember = { detuning, amplitudeError: 0, anharmonicityError: 0, weight: 1 };
    const identity: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: 0 };
    const got = onLadder(identity, pulse, [member], { levels: 5, anharmonicity: -2e8 });
    expectClose(got.meanInfidelity, 1e-12, { rel: 1e-9 }, 'infidelity');
    expectClose(got.meanAverageInfidelity, (2 / 3) * 1e-12, { rel: 1e-9 }, '1 - F_avg = (2/3)(1 - F) without leakage');
    const free = onLadder(identity, pulse, [member], { levels: 5, anharmonicity: -2e8 }, { freePhaseAfter: true });
    expect(free.meanInfidelity).toBeLessThan(1e-28);
    expectClose(free.members[0].phaseAfter ?? NaN, TWO_PI * detuning * n * dt, { rel: 1e-12 }, 'phase');
    // Two levels, a resonant pulse of angle theta (1 + eps) against theta: 1 - F = sin^2(theta eps / 2).
    const theta = Math.PI / 2, eps = (2 * Math.asin(1e-6)) / theta;
    const square: Pulse = { dt: 1e-8, i: new Float64Array(5).fill(theta / (TWO_PI * 5e-8)), q: new Float64Array(5), metadata: {} };
    const x90 = onLadder({ kind: 'gate', axis: [1, 0, 0], angleRad: theta }, square,
      [{ detuning: 0, amplitudeError: eps, anharmonicityError: 0, weight: 1 }], { levels: 2, anharmonicity: -2e8 });
    expectClose(x90.meanInfidelity, 1e-12, { rel: 1e-8 }, 'amplitude error infidelity');
  });

  // Source: Pedersen, Moller, Molmer, Phys. Lett. A 367, 47 (2007): F_avg = (Tr(M^dag M) +
  // |Tr(V^dag M)|^2)/(n(n+1)), n = 2, and L = 1 - Tr(M^dag M)/2, both computed here directly
  // from the oracle's propagator (cancellation is harmless at these sizes).
  it('average gate fidelity and leakage follow their definitions on a leaky pulse', () => {
    const system: LadderSystem = { levels: 3, anharmonicity: -1.5e8 };
    const pulse = randomPulse(12, 1e-9, 1.2e8);
    const member = randomMembers(1)[0];
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const evaluation = onLadder(target, pulse, [member], system);
    const got = { ...evaluation.members[0], averageInfidelity: evaluation.meanAverageInfidelity };
    const u = oracle.ladderPulsePropagator(pulse, member, system);
    const d = 3;
    let trMM = 0;
    for (let r = 0; r < 2; r++) for (let c = 0; c < 2; c++) trMM += u.re[r * d + c] ** 2 + u.im[r * d + c] ** 2;
    // Tr(V^dag M) for V = R_x(pi/2) = cos(pi/4) - i sin(pi/4) sx
    const cs = Math.SQRT1_2;
    const tr: [number, number] = [
      cs * (u.re[0] + u.re[d + 1]) - cs * (u.im[1] + u.im[d]),
      cs * (u.im[0] + u.im[d + 1]) + cs * (u.re[1] + u.re[d]),
    ];
    expect(got.leakage).toBeGreaterThan(1e-3);
    expectClose(got.leakage, 1 - trMM / 2, { abs: 1e-14 }, 'leakage');
    expectClose(got.infidelity, 1 - (tr[0] ** 2 + tr[1] ** 2) / 4, { abs: 1e-14 }, 'infidelity');
    expectClose(got.averageInfidelity, 1 - (trMM + tr[0] ** 2 + tr[1] ** 2) / 6, { abs: 1e-14 }, 'average infidelity');
  });

  // Source: the oracle's figure at a dense scan of z rotations after the gate: none beats the
  // reported phase.
  it('free phase after the gate is the best z rotation', () => {
    const system: LadderSystem = { levels: 4, anharmonicity: -2e8 };
    const pulse = randomPulse(10, 2e-9, 3e7);
    const member = randomMembers(1)[0];
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const got = onLadder(target, pulse, [member], system, { freePhaseAfter: true }).members[0];
    const plain = onLadder(target, pulse, [member], system).members[0];
    expect(got.infidelity).toBeLessThanOrEqual(plain.infidelity);
    const u = oracle.ladderPulsePropagator(pulse, member, system);
    for (let k = 0; k < 720; k++) {
      const p = (k / 720) * TWO_PI;
      // Rz(p) after the gate acts on rows 0, 1 of U.
      const rotated = oracle.mul(rz(4, p), u);
      expect(oracle.ladderFigures(rotated, target).infidelity).toBeGreaterThanOrEqual(got.infidelity - 1e-15);
    }
    const best = oracle.ladderFigures(oracle.mul(rz(4, got.phaseAfter ?? NaN), u), target).infidelity;
    expectClose(got.infidelity, best, { abs: 1e-14 }, 'figure at the reported phase');
  });
});

describe('ladder input checks', () => {
  // The library names the field, the value and what is allowed (README: bad input).
  it('name the field, the value and what is allowed', () => {
    const pulse = randomPulse(3, 1e-9, 1e7);
    const members = randomMembers(2);
    const target = targets[0].target;
    expect(() => onLadder(target, pulse, members, { levels: 9, anharmonicity: -2e8 })).toThrow(/^system\.levels: 9 is not allowed; an integer from 2 to 8$/);
    expect(() => onLadder(target, pulse, members, { levels: 3, anharmonicity: Infinity })).toThrow(/^system\.anharmonicity: Infinity is not a finite number of Hz$/);
    const bad = [members[0], { ...members[1], anharmonicityError: NaN }];
    expect(() => onLadder(target, pulse, bad, { levels: 3, anharmonicity: -2e8 })).toThrow(/^members\[1\]\.anharmonicityError: NaN is not a finite number of Hz$/);
    expect(() => ladderPopulations(pulse, members[0], { levels: 3, anharmonicity: -2e8 }, [0, 0, 0])).toThrow(/^from: \[0,0,0\] is not allowed/);
  });
});

describe('ladder populations', () => {
  // Source: the oracle's propagators of the pulse's first k samples applied to the start
  // state; populations sum to 1 (unitarity).
  it('after each sample equal the oracle\'s, from any qubit state', () => {
    const system: LadderSystem = { levels: 5, anharmonicity: -2e8 };
    const pulse = randomPulse(9, 1e-9, 8e7);
    const member = randomMembers(1)[0];
    const from: [number, number, number] = [0.3, -0.5, 0.8];
    const got = ladderPopulations(pulse, member, system, from);
    const psi = blochToSpinor(from);
    for (let k = 0; k <= 9; k++) {
      const u = oracle.ladderPulsePropagator({ ...pulse, i: pulse.i.slice(0, k), q: pulse.q.slice(0, k) }, member, system);
      let total = 0;
      for (let r = 0; r < 5; r++) {
        const re = u.re[r * 5] * psi.re[0] - u.im[r * 5] * psi.im[0] + u.re[r * 5 + 1] * psi.re[1] - u.im[r * 5 + 1] * psi.im[1];
        const im = u.re[r * 5] * psi.im[0] + u.im[r * 5] * psi.re[0] + u.re[r * 5 + 1] * psi.im[1] + u.im[r * 5 + 1] * psi.re[1];
        expectClose(got[k * 5 + r], re * re + im * im, { abs: 1e-13 }, `level ${r} after ${k} samples`);
        total += got[k * 5 + r];
      }
      expectClose(total, 1, { abs: 1e-14 }, 'total population');
    }
  });
});

function rz(d: number, p: number): oracle.CMatrix {
  const m = oracle.eye(d);
  m.re[0] = Math.cos(p / 2); m.im[0] = -Math.sin(p / 2);
  m.re[d + 1] = Math.cos(p / 2); m.im[d + 1] = Math.sin(p / 2);
  return m;
}

describe('ladder gradient', () => {
  for (const d of [3, 5, 8]) {
    for (const { name, target, free } of targets) {
      // Source: the oracle (Taylor exponentials, Van Loan derivatives, Pauli-trace figures).
      it(`${d} levels, ${name}: figure and gradient equal the oracle's to 1e-12`, () => {
        const system: LadderSystem = { levels: d, anharmonicity: -2.1e8 };
        const pulse = randomPulse(d === 8 ? 6 : 11, 4e-10, 1.5e8);
        const members = randomMembers(3);
        const got = ladderGradient(target, pulse, members, system, { freePhaseAfter: free });
        const want = oracle.ladderEnsembleGradient(target, pulse, members, system, free);
        expectClose(got.mean, want.mean, { rel: 1e-12 }, 'mean');
        got.leakage.forEach((l, j) => expectClose(l, want.leakage[j], { abs: 1e-13 }, `leakage ${j}`));
        expect(normwiseRelativeError([...got.gradI, ...got.gradQ], [...want.gradI, ...want.gradQ])).toBeLessThan(1e-12);
      });
    }
  }

  // Source: the oracle, where the divided differences meet equal eigenvalues: samples of zero
  // drive, and a member whose levels 1 and 2 coincide in the frame (Delta = -alpha).
  it('equals the oracle at zero-drive samples and degenerate levels', () => {
    const system: LadderSystem = { levels: 4, anharmonicity: -2e8 };
    const pulse = randomPulse(8, 5e-10, 1e8);
    pulse.i[0] = pulse.q[0] = pulse.i[5] = pulse.q[5] = 0;
    const members: LadderMember[] = [
      { detuning: 2e8, amplitudeError: 0, anharmonicityError: 0, weight: 1 },
      { detuning: 0, amplitudeError: 0.05, anharmonicityError: 0, weight: 1 },
    ];
    for (const { target, free } of targets) {
      const got = ladderGradient(target, pulse, members, system, { freePhaseAfter: free });
      const want = oracle.ladderEnsembleGradient(target, pulse, members, system, free);
      expectClose(got.mean, want.mean, { rel: 1e-12 }, 'mean');
      expect(normwiseRelativeError([...got.gradI, ...got.gradQ], [...want.gradI, ...want.gradQ])).toBeLessThan(1e-12);
    }
  });

  // Source: central finite differences of the kernels' own figure (O(h^2) error).
  it('equals central differences to 1e-6 relative (4 levels, free phase, three members)', () => {
    const system: LadderSystem = { levels: 4, anharmonicity: -2e8 };
    const pulse = randomPulse(9, 1e-9, 8e7);
    const members = randomMembers(3);
    const target = targets[1].target;
    const got = ladderGradient(target, pulse, members, system, { freePhaseAfter: true });
    const h = 1e3; // Hz, against samples of 1e7..1e8 Hz
    const fd: number[] = [];
    for (const channel of ['i', 'q'] as const) {
      for (let k = 0; k < pulse.i.length; k++) {
        const at = (delta: number): number => {
          const p = { ...pulse, i: pulse.i.slice(), q: pulse.q.slice() };
          p[channel][k] += delta;
          return onLadder(target, p, members, system, { freePhaseAfter: true }).meanInfidelity;
        };
        fd.push((at(h) - at(-h)) / (2 * h));
      }
    }
    expect(normwiseRelativeError([...got.gradI, ...got.gradQ], fd)).toBeLessThan(1e-6);
  });
});

describe('ladder physics', () => {
  // Source: second-order perturbation theory: off-resonant excitation of |2> at detuning alpha
  // has probability of order (Omega/alpha)^2, so leakage falls a hundredfold as |alpha| grows
  // tenfold; the shift of |1> by |2>, of order Omega^2/alpha, changes the figure of an
  // imperfect pulse at first order, so the difference from the qubit falls tenfold.
  it('tends to the qubit as |alpha| grows (leakage as alpha^-2, figure difference as alpha^-1)', () => {
    const pulse = randomPulse(20, 2e-9, 1e7);
    const members = randomMembers(4).map((m) => ({ ...m, anharmonicityError: 0 }));
    const target: Target = { kind: 'gate', axis: [0, 1, 0], angleRad: 1.1 };
    const qubit = evaluateMembers(target, pulse, members).meanInfidelity;
    const at = (alpha: number): { leak: number; diff: number } => {
      const e = onLadder(target, pulse, members, { levels: 5, anharmonicity: alpha });
      return { leak: e.meanLeakage, diff: Math.abs(e.meanInfidelity - qubit) };
    };
    const a = at(-1e10), b = at(-1e11);
    expect(b.leak).toBeLessThan(1e-7);
    expect(a.leak / b.leak).toBeGreaterThan(50);
    expect(a.leak / b.leak).toBeLessThan(200);
    expect(a.diff / b.diff).toBeGreaterThan(7);
    expect(a.diff / b.diff).toBeLessThan(14);
    expect(b.diff).toBeLessThan(1e-4);
  });

  // Source: second-order (Rayleigh-Schrodinger) perturbation theory for a constant drive W
  // detuned by Delta from the qubit, levels E0 = 0, E1 = Delta, E2 = 2 Delta + alpha, couplings
  // |W|/2 (0-1) and sqrt(2)|W|/2 (1-2) in Hz: the qubit transition moves by
  //   delta = |W|^2/(2 Delta) - |W|^2/(2 (Delta + alpha)),
  // whose second term at Delta -> 0, -|W|^2/(2 alpha), is the |2>-induced shift that DRAG's
  // drive detuning follows (Gambetta, Motzoi, Merkel, Wilhelm, PRA 83, 012308, 2011; derived
  // here, the paper's equation number not checked). Measured as the best z rotation after
  // the pulse (identity target, free phase), 2 pi delta T, with Delta T a whole number.
  it('AC Stark shift of the qubit under a constant off-resonant drive follows second order', () => {
    for (const levels of [3, 6]) {
      for (const alpha of [-2e8, -3.3e8]) {
        const w = 2e6, detuning = 5e7, n = 200, dt = 1e-8;
        const pulse: Pulse = { dt, i: new Float64Array(n).fill(w), q: new Float64Array(n), metadata: {} };
        const member: LadderMember = { detuning, amplitudeError: 0, anharmonicityError: 0, weight: 1 };
        const e = onLadder({ kind: 'gate', axis: [1, 0, 0], angleRad: 0 }, pulse, [member], { levels, anharmonicity: alpha }, { freePhaseAfter: true });
        const measured = (e.members[0].phaseAfter ?? NaN) / (TWO_PI * n * dt);
        const predicted = (w * w) / (2 * detuning) - (w * w) / (2 * (detuning + alpha));
        // Fourth order and the fast wiggle of the dressed states are of relative size (W/Delta)^2 = 1.6e-3.
        expectClose(measured, predicted, { rel: 1e-2 }, `shift, ${levels} levels, alpha ${alpha}`);
      }
    }
  });
});
