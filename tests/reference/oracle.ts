// Plain TypeScript reference of the physics (docs/physics.md sections 1-3): the test oracle
// and the benchmark baseline. Written to be read and checked, not to be fast: every
// quantity is an SU(2) element in the quaternion form U = [[u, -conj(v)], [v, conj(u)]],
// and every figure and derivative follows the formulas of docs/physics.md line by line.
import { ArgumentError } from '../../src/core/errors.ts';
import type { Member, Pulse, Target, Vec3 } from '../../src/core/types.ts';

/**
 * A 2x2 complex matrix of the form [[u, -conj(v)], [v, conj(u)]], stored as four reals.
 * SU(2) elements have |u|^2 + |v|^2 = 1; derivatives of them (real-linear combinations
 * of 1 and -i s_j) keep the same form without that constraint.
 */
export interface Su2 {
  ur: number;
  ui: number;
  vr: number;
  vi: number;
}

/** The identity matrix. */
export function identity(): Su2 {
  return { ur: 1, ui: 0, vr: 0, vi: 0 };
}

/** The product a * b (b acts first). */
export function multiply(a: Su2, b: Su2): Su2 {
  // [[ua, -va*], [va, ua*]] [[ub, -vb*], [vb, ub*]]: first column is
  // u = ua ub - conj(va) vb, v = va ub + conj(ua) vb.
  return {
    ur: a.ur * b.ur - a.ui * b.ui - (a.vr * b.vr + a.vi * b.vi),
    ui: a.ur * b.ui + a.ui * b.ur - (a.vr * b.vi - a.vi * b.vr),
    vr: a.vr * b.ur - a.vi * b.ui + (a.ur * b.vr + a.ui * b.vi),
    vi: a.vr * b.ui + a.vi * b.ur + (a.ur * b.vi - a.ui * b.vr),
  };
}

/** The adjoint U^dag = [[conj u, conj v], [-v, u]], i.e. (u, v) -> (conj u, -v). */
export function dagger(a: Su2): Su2 {
  return { ur: a.ur, ui: -a.ui, vr: -a.vr, vi: -a.vi };
}

/** The quaternion components (w0, w1, w2, w3) of U = w0 1 - i (w . s). */
export function quaternion(a: Su2): [number, number, number, number] {
  // u = w0 - i w3 and v = w2 - i w1.
  return [a.ur, -a.vi, a.vr, -a.ui];
}

/** The matrix built from quaternion components, U = w0 1 - i (w . s). */
export function fromQuaternion(w0: number, w1: number, w2: number, w3: number): Su2 {
  return { ur: w0, ui: -w3, vr: w2, vi: -w1 };
}

/** The full 2x2 matrix as [row][column] = [re, im], for comparison with other libraries. */
export function toMatrix(a: Su2): [number, number][][] {
  return [
    [[a.ur, a.ui], [-a.vr, a.vi]],
    [[a.vr, a.vi], [a.ur, -a.ui]],
  ];
}

/** R_n(theta) = exp(-i theta n.s / 2) for a unit axis n (docs/physics.md section 1). */
export function rotation(axis: Vec3, angleRad: number): Su2 {
  const n = unitVector(axis, 'axis');
  const c = Math.cos(angleRad / 2);
  const s = Math.sin(angleRad / 2);
  return fromQuaternion(c, s * n[0], s * n[1], s * n[2]);
}

/** The ideal gate V = R_n(theta) of a gate target. */
export function targetUnitary(target: Target): Su2 {
  if (target.kind !== 'gate') {
    throw new ArgumentError(`targetUnitary: target.kind is ${JSON.stringify(target.kind)}; only "gate" targets have a unitary`);
  }
  return rotation(target.axis, target.angleRad);
}

/** sin(a)/a, by its series where the quotient would be 0/0. */
export function sinc(a: number): number {
  if (Math.abs(a) < 1e-4) return 1 - (a * a) / 6 + (a * a * a * a) / 120;
  return Math.sin(a) / a;
}

/** (a cos a - sin a)/a^3 = sinc'(a)/a, by its series where the formula cancels. */
export function sincPrimeOverA(a: number): number {
  if (Math.abs(a) < 0.25) {
    // sinc'(a)/a = sum_{n>=1} (-1)^n 2n a^(2n-2) / (2n+1)!; the first omitted term is
    // below 1e-17 relative for |a| < 0.25.
    const x = a * a;
    return -1 / 3 + x * (1 / 30 + x * (-1 / 840 + x * (1 / 45360 + x * (-1 / 3991680 + x / 518918400))));
  }
  return (a * Math.cos(a) - Math.sin(a)) / (a * a * a);
}

/** The drive vector h = 2 pi ((1+eps) I, (1+eps) Q, -Delta) of one segment (rad/s): H = h.sigma/2, docs/physics.md. */
function driveVector(iHz: number, qHz: number, detuningHz: number, amplitudeError: number): Vec3 {
  const scale = 2 * Math.PI * (1 + amplitudeError);
  return [scale * iHz, scale * qHz, -2 * Math.PI * detuningHz];
}

/**
 * The exact segment propagator exp(-i dt h.s/2) = cos(a) 1 - i sin(a) (n . s),
 * a = |h| dt / 2 (docs/physics.md section 1), written as cos(a) - i (dt/2) sinc(a) (h . s)
 * so that zero drive needs no special case.
 */
export function segmentPropagator(iHz: number, qHz: number, detuningHz: number, amplitudeError: number, dt: number): Su2 {
  const h = driveVector(iHz, qHz, detuningHz, amplitudeError);
  const b = dt / 2;
  const a = b * Math.hypot(h[0], h[1], h[2]);
  const s = b * sinc(a);
  return fromQuaternion(Math.cos(a), s * h[0], s * h[1], s * h[2]);
}

/**
 * The exact derivatives of the segment propagator with respect to I and Q (per Hz).
 * With b = dt/2, f = sinc(a), g = sinc'(a)/a: U = cos(a) - i b f (h . s), so
 * dw0/dh_j = -b^2 f h_j and dw_k/dh_j = b^3 g h_j h_k + b f delta_jk; both stay finite
 * as |h| -> 0. Then dh_x/dI = dh_y/dQ = 2 pi (1 + eps).
 */
export function segmentDerivative(
  iHz: number,
  qHz: number,
  detuningHz: number,
  amplitudeError: number,
  dt: number,
): { dI: Su2; dQ: Su2 } {
  const h = driveVector(iHz, qHz, detuningHz, amplitudeError);
  const b = dt / 2;
  const a = b * Math.hypot(h[0], h[1], h[2]);
  const f = sinc(a);
  const g = sincPrimeOverA(a);
  const chain = 2 * Math.PI * (1 + amplitudeError);
  const byComponent = (j: 0 | 1): Su2 => {
    const dw = [0, 1, 2].map((k) => b * b * b * g * h[j] * h[k] + (k === j ? b * f : 0));
    return fromQuaternion(-b * b * f * h[j] * chain, dw[0] * chain, dw[1] * chain, dw[2] * chain);
  };
  return { dI: byComponent(0), dQ: byComponent(1) };
}

/** Every segment's propagator of a pulse for one member, in time order. */
export function segmentPropagators(pulse: Pulse, member: Member): Su2[] {
  checkPulse(pulse);
  const out: Su2[] = [];
  for (let k = 0; k < pulse.i.length; k++) {
    out.push(segmentPropagator(pulse.i[k], pulse.q[k], member.detuning, member.amplitudeError, pulse.dt));
  }
  return out;
}

/** The total propagator U = U_N ... U_1 of a pulse for one member. */
export function pulsePropagator(pulse: Pulse, member: Member): Su2 {
  let total = identity();
  for (const segment of segmentPropagators(pulse, member)) total = multiply(segment, total);
  return total;
}

/** A pure state a|0> + b|1> as real and imaginary parts of (a, b). */
export interface Spinor {
  re: [number, number];
  im: [number, number];
}

/** The spinor cos(t/2)|0> + e^{ip} sin(t/2)|1> whose Bloch vector points along r. */
export function blochToSpinor(r: Vec3): Spinor {
  const n = unitVector(r, 'Bloch vector');
  // atan2 rather than acos(z): acos loses half the digits near the poles.
  const t = Math.atan2(Math.hypot(n[0], n[1]), n[2]);
  const p = Math.atan2(n[1], n[0]);
  return { re: [Math.cos(t / 2), Math.cos(p) * Math.sin(t / 2)], im: [0, Math.sin(p) * Math.sin(t / 2)] };
}

/** The Bloch vector <psi|s|psi> of a spinor. */
export function spinorToBloch(psi: Spinor): Vec3 {
  const [ar, br] = psi.re;
  const [ai, bi] = psi.im;
  // <s_x> = 2 Re(conj(a) b), <s_y> = 2 Im(conj(a) b), <s_z> = |a|^2 - |b|^2.
  return [2 * (ar * br + ai * bi), 2 * (ar * bi - ai * br), ar * ar + ai * ai - br * br - bi * bi];
}

/** <p| M |s> for a matrix M in quaternion form and spinors p, s, as [re, im]. */
function matrixElement(p: Spinor, m: Su2, s: Spinor): [number, number] {
  const rows = toMatrix(m);
  let re = 0;
  let im = 0;
  for (let r = 0; r < 2; r++) {
    // (M s)_r
    const msr = rows[r][0][0] * s.re[0] - rows[r][0][1] * s.im[0] + rows[r][1][0] * s.re[1] - rows[r][1][1] * s.im[1];
    const msi = rows[r][0][0] * s.im[0] + rows[r][0][1] * s.re[0] + rows[r][1][0] * s.im[1] + rows[r][1][1] * s.re[1];
    // conj(p_r) (M s)_r
    re += p.re[r] * msr + p.im[r] * msi;
    im += p.re[r] * msi - p.im[r] * msr;
  }
  return [re, im];
}

/** The state orthogonal to psi, (-conj b, conj a): its Bloch vector is the antipode. */
function orthogonalSpinor(psi: Spinor): Spinor {
  return { re: [-psi.re[1], psi.re[0]], im: [psi.im[1], -psi.im[0]] };
}

/** What a member's figure needs from the target: V^dag for gates, the two spinors for states. */
interface PreparedTarget {
  kind: 'gate' | 'state';
  /** V^dag for a gate; the identity for a state transfer. */
  left: Su2;
  from: Spinor;
  /** The state orthogonal to the target state. */
  toPerp: Spinor;
}

function prepareTarget(target: Target): PreparedTarget {
  if (target.kind === 'gate') {
    const zero: Spinor = { re: [1, 0], im: [0, 0] };
    return { kind: 'gate', left: dagger(targetUnitary(target)), from: zero, toPerp: zero };
  }
  if (target.kind === 'state') {
    return { kind: 'state', left: identity(), from: blochToSpinor(target.from), toPerp: orthogonalSpinor(blochToSpinor(target.to)) };
  }
  throw new ArgumentError(`target.kind: ${JSON.stringify((target as { kind: unknown }).kind)} is not allowed; "gate" or "state"`);
}

/**
 * The infidelity of M = left * U without cancellation (docs/physics.md section 2):
 * gate: 1 - |Tr W|^2/4 = |w|^2 for W = V^dag U; state: 1 - |<to|U|from>|^2 = |<to_perp|U|from>|^2.
 */
function infidelityOf(prepared: PreparedTarget, m: Su2): number {
  if (prepared.kind === 'gate') {
    const [, w1, w2, w3] = quaternion(m);
    return w1 * w1 + w2 * w2 + w3 * w3;
  }
  const [re, im] = matrixElement(prepared.toPerp, m, prepared.from);
  return re * re + im * im;
}

/** The infidelity of a pulse for one ensemble member (1 - F, see MemberFigure). */
export function memberInfidelity(target: Target, pulse: Pulse, member: Member): number {
  const prepared = prepareTarget(target);
  return infidelityOf(prepared, multiply(prepared.left, pulsePropagator(pulse, member)));
}

/** Weights normalised to sum 1; they must be finite, non-negative and not all zero. */
export function normalisedWeights(members: Member[]): number[] {
  if (members.length === 0) throw new ArgumentError('members: the list is empty; give at least one member');
  let sum = 0;
  members.forEach((m, j) => {
    if (!Number.isFinite(m.weight) || m.weight < 0) {
      throw new ArgumentError(`members[${j}].weight: ${m.weight} is not allowed; a finite number >= 0`);
    }
    sum += m.weight;
  });
  if (!(sum > 0)) throw new ArgumentError('members: the weights sum to 0; at least one must be positive');
  return members.map((m) => m.weight / sum);
}

/** The ensemble figure: weighted mean, worst member (value and index), and every member's infidelity. */
export function ensembleFigure(
  target: Target,
  pulse: Pulse,
  members: Member[],
): { mean: number; worst: number; worstIndex: number; perMember: Float64Array } {
  const weights = normalisedWeights(members);
  const perMember = new Float64Array(members.map((m) => memberInfidelity(target, pulse, m)));
  let mean = 0;
  let worstIndex = 0;
  perMember.forEach((value, j) => {
    mean += weights[j] * value;
    if (value > perMember[worstIndex]) worstIndex = j;
  });
  return { mean, worst: perMember[worstIndex], worstIndex, perMember };
}

/**
 * The weighted mean infidelity and its exact gradient with respect to every sample's
 * I and Q (per Hz), by one forward and one backward sweep per member (docs/physics.md
 * section 3): with A_{k-1} = U_{k-1} ... U_1 and B_k = left U_N ... U_{k+1},
 * dM/dc = B_k (dU_k/dc) A_{k-1}. The figure's derivative is then taken from the
 * small components themselves (2 w . dw for a gate, 2 Re(conj z dz) for a state),
 * which keeps it accurate where the infidelity is tiny.
 */
export function ensembleGradient(
  target: Target,
  pulse: Pulse,
  members: Member[],
): { mean: number; gradI: Float64Array; gradQ: Float64Array } {
  checkPulse(pulse);
  const prepared = prepareTarget(target);
  const weights = normalisedWeights(members);
  const n = pulse.i.length;
  const gradI = new Float64Array(n);
  const gradQ = new Float64Array(n);
  let mean = 0;
  members.forEach((member, j) => {
    const segments = segmentPropagators(pulse, member);
    // before[k] = U_{k-1} ... U_0 (the identity for k = 0).
    const before: Su2[] = [identity()];
    for (let k = 0; k < n; k++) before.push(multiply(segments[k], before[k]));
    const total = multiply(prepared.left, before[n]);
    mean += weights[j] * infidelityOf(prepared, total);
    const [, w1, w2, w3] = quaternion(total);
    const z = prepared.kind === 'state' ? matrixElement(prepared.toPerp, total, prepared.from) : [0, 0];
    const slope = (dm: Su2): number => {
      if (prepared.kind === 'gate') {
        const [, d1, d2, d3] = quaternion(dm);
        return 2 * (w1 * d1 + w2 * d2 + w3 * d3);
      }
      const [dr, di] = matrixElement(prepared.toPerp, dm, prepared.from);
      return 2 * (z[0] * dr + z[1] * di);
    };
    // after = left U_{N-1} ... U_{k+1}, grown from the end.
    let after = prepared.left;
    for (let k = n - 1; k >= 0; k--) {
      const d = segmentDerivative(pulse.i[k], pulse.q[k], member.detuning, member.amplitudeError, pulse.dt);
      gradI[k] += weights[j] * slope(multiply(after, multiply(d.dI, before[k])));
      gradQ[k] += weights[j] * slope(multiply(after, multiply(d.dQ, before[k])));
      after = multiply(after, segments[k]);
    }
  });
  return { mean, gradI, gradQ };
}

function unitVector(v: Vec3, what: string): Vec3 {
  const norm = Math.hypot(v[0], v[1], v[2]);
  if (!Number.isFinite(norm) || norm === 0) {
    throw new ArgumentError(`${what}: ${JSON.stringify(v)} is not allowed; a finite, non-zero 3-vector`);
  }
  return [v[0] / norm, v[1] / norm, v[2] / norm];
}

function checkPulse(pulse: Pulse): void {
  if (!(pulse.dt > 0) || !Number.isFinite(pulse.dt)) {
    throw new ArgumentError(`pulse.dt: ${pulse.dt} is not allowed; a finite sample period > 0 (s)`);
  }
  if (pulse.i.length !== pulse.q.length) {
    throw new ArgumentError(`pulse.q: ${pulse.q.length} samples is not allowed; as many as pulse.i (${pulse.i.length})`);
  }
}

/**
 * The drive a line gives, written plainly: each sample held for `oversample` fine steps,
 * then the full direct convolution sum with the kernel h (docs/physics.md section 5).
 */
export function heldLineDrive(i: ArrayLike<number>, q: ArrayLike<number>, h: ArrayLike<number>, oversample: number): { i: number[]; q: number[] } {
  const held = (x: ArrayLike<number>): number[] => Array.from({ length: x.length * oversample }, (_, k) => x[Math.floor(k / oversample)]);
  const convolve = (u: number[]): number[] => {
    const out = new Array<number>(u.length + h.length - 1).fill(0);
    for (let k = 0; k < u.length; k++) for (let j = 0; j < h.length; j++) out[k + j] += h[j] * u[k];
    return out;
  };
  return { i: convolve(held(i)), q: convolve(held(q)) };
}
