// Which target a pulse is judged against, and what to say beside it. Every pulse is ranked
// by its figure against the spec's target. A pulse whose metadata names its own ideal
// operation (composites do) gets a note: whether that ideal meets the spec's target and
// how (the Knill sequence up to a z rotation after it, 90-180-90 as an inversion, a gate
// that carries the spec's `from` to its `to`), or that it does not. Plain arithmetic, no
// core: the command line, the worker and the page judge pulses here.
import { PulseFormatError, describeValue } from './errors.ts';
import type { Pulse, Target, Vec3 } from './types.ts';

/** Which target a figure was taken against, and what the pulse's own ideal has to do with it. */
export interface TargetChoice {
  /** The spec's target. */
  targetGiven: Target;
  /**
   * What the figures are taken against: the spec's target, or, for a sequence that meets
   * it only up to a z rotation after it (a frame change), the spec's target followed by
   * that rotation (its own ideal).
   */
  targetUsed: Target;
  /** Null for a pulse with no ideal of its own or whose ideal is the spec's gate; otherwise the note shown beside it. */
  targetNote: string | null;
}

/** Relative size below which two operations count as the same. */
const CLOSE = 1e-9;

type Quaternion = [number, number, number, number];

const unit = (v: readonly number[]): Vec3 => {
  const n = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / n, v[1] / n, v[2] / n];
};
const dot = (u: readonly number[], v: readonly number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
const cross = (u: readonly number[], v: readonly number[]): Vec3 => [
  u[1] * v[2] - u[2] * v[1],
  u[2] * v[0] - u[0] * v[2],
  u[0] * v[1] - u[1] * v[0],
];

/** R_n(t) as the unit quaternion (cos t/2, sin t/2 n); q and -q are the same gate. */
function quaternionOf(gate: Extract<Target, { kind: 'gate' }>): Quaternion {
  const n = unit(gate.axis);
  const s = Math.sin(gate.angleRad / 2);
  return [Math.cos(gate.angleRad / 2), s * n[0], s * n[1], s * n[2]];
}

/** The quaternion of the product a b (b acts first). */
function product(a: Quaternion, b: Quaternion): Quaternion {
  const av = [a[1], a[2], a[3]];
  const bv = [b[1], b[2], b[3]];
  const c = cross(av, bv);
  return [a[0] * b[0] - dot(av, bv), a[0] * b[1] + b[0] * a[1] + c[0], a[0] * b[2] + b[0] * a[2] + c[1], a[0] * b[3] + b[0] * a[3] + c[2]];
}

/** Rodrigues' formula: the Bloch vector r turned by the gate, r cos t + (n x r) sin t + n (n . r)(1 - cos t). */
export function rotateBloch(gate: Extract<Target, { kind: 'gate' }>, r: readonly number[]): Vec3 {
  const n = unit(gate.axis);
  const c = Math.cos(gate.angleRad);
  const s = Math.sin(gate.angleRad);
  const nr = dot(n, r);
  const nxr = cross(n, r);
  return [0, 1, 2].map((k) => r[k] * c + nxr[k] * s + n[k] * nr * (1 - c)) as Vec3;
}

/** The angle (radians) of the z rotation Z with a = Z b as gates, or null when a b^-1 is not a z rotation. */
function zRotationBetween(a: Extract<Target, { kind: 'gate' }>, b: Extract<Target, { kind: 'gate' }>): number | null {
  const qb = quaternionOf(b);
  const w = product(quaternionOf(a), [qb[0], -qb[1], -qb[2], -qb[3]]);
  if (Math.hypot(w[1], w[2]) > CLOSE) return null;
  // The angle in (-pi, pi]: w and -w are the same gate.
  const sign = w[0] < 0 || (w[0] === 0 && w[3] < 0) ? -1 : 1;
  return 2 * Math.atan2(sign * w[3], sign * w[0]);
}

/** Whether two targets ask for the same operation (gates up to a global phase). */
export function sameOperation(a: Target, b: Target): boolean {
  if (a.kind === 'gate' && b.kind === 'gate') {
    const angle = zRotationBetween(a, b);
    return angle !== null && Math.abs(angle) < CLOSE;
  }
  if (a.kind === 'state' && b.kind === 'state') {
    return 1 - dot(unit(a.from), unit(b.from)) < CLOSE && 1 - dot(unit(a.to), unit(b.to)) < CLOSE;
  }
  return false;
}

/** Whether the gate carries the state target's `from` to its `to`. */
export function performsTransfer(gate: Extract<Target, { kind: 'gate' }>, target: Extract<Target, { kind: 'state' }>): boolean {
  return 1 - dot(rotateBloch(gate, unit(target.from)), unit(target.to)) < CLOSE;
}

/** +1 or -1 for a Bloch vector at the north or south pole, 0 elsewhere. */
export function poleOf(r: readonly number[]): number {
  return Math.hypot(r[0], r[1]) <= CLOSE * Math.abs(r[2]) ? Math.sign(r[2]) : 0;
}

/** Whether a state target is an inversion between the poles (|0> -> |1> or |1> -> |0>). */
export function isInversion(target: Target): boolean {
  return target.kind === 'state' && poleOf(target.from) !== 0 && poleOf(target.to) === -poleOf(target.from);
}

/** A target in words, e.g. "a 180 degree rotation about [0.866, -0.5, 0]". */
export function describeTarget(t: Target): string {
  const vec = (v: Vec3) => `[${unit(v).map((x) => Number(x.toFixed(4)) || 0).join(', ')}]`;
  if (t.kind === 'gate') return `a ${Number(((t.angleRad * 180) / Math.PI).toFixed(4))} degree rotation about ${vec(t.axis)}`;
  return `the state transfer ${vec(t.from)} -> ${vec(t.to)}`;
}

/** The target a pulse is judged against and the note beside it (see TargetChoice). */
export function chooseTarget(target: Target, pulse: Pulse): TargetChoice {
  const ideal = pulse.metadata?.ideal;
  const plain: TargetChoice = { targetGiven: target, targetUsed: target, targetNote: null };
  if (ideal === undefined) return plain;
  const own = readIdeal(ideal);
  const who = typeof pulse.metadata.name === 'string' && pulse.metadata.name !== '' ? pulse.metadata.name : 'the pulse';
  const note = (text: string, used: Target = target): TargetChoice => ({ targetGiven: target, targetUsed: used, targetNote: `${who}: ${text}` });

  if (own.kind === 'gate' && target.kind === 'gate') {
    const angle = zRotationBetween(own, target);
    if (angle === null) return note(`built for ${describeTarget(own)}, which does not meet the spec's target (${describeTarget(target)}); figures are against the spec's target`);
    if (Math.abs(angle) < CLOSE) return plain;
    const degrees = Number(((angle * 180) / Math.PI).toFixed(4));
    return note(
      `meets the spec's target up to a z rotation of ${degrees} degrees after it (its own ideal is ${describeTarget(own)}); figures are against that ideal: apply the z rotation as a frame change`,
      own,
    );
  }
  if (own.kind === 'gate' && target.kind === 'state') {
    if (performsTransfer(own, target)) return note(`its own ideal, ${describeTarget(own)}, meets the spec's state transfer; judged as that transfer`);
    return note(`built for ${describeTarget(own)}, which does not carry the spec's from to its to; figures are against the spec's target`);
  }
  if (own.kind === 'state' && target.kind === 'state') {
    // For every U in SU(2), |<1|U|0>| = |<0|U|1>|: an inversion sequence inverts either pole.
    if (sameOperation(own, target) || (isInversion(own) && isInversion(target))) {
      return note(`a point-to-point sequence (its own ideal is ${describeTarget(own)}, not a gate): it meets the spec's state transfer`);
    }
    return note(`a point-to-point sequence for ${describeTarget(own)}, which is not the spec's state transfer; figures are against the spec's target`);
  }
  return note(`a point-to-point sequence (its own ideal is ${describeTarget(own)}), not a gate: it does not meet the spec's gate; figures are against the spec's target`);
}

function isVec3(v: unknown): v is Vec3 {
  return Array.isArray(v) && v.length === 3 && v.every((x) => typeof x === 'number' && Number.isFinite(x)) && v.some((x) => x !== 0);
}

/** metadata.ideal as a Target, or a PulseFormatError naming the field. */
function readIdeal(ideal: unknown): Target {
  const t = ideal as Record<string, unknown>;
  if (t && t.kind === 'gate' && isVec3(t.axis) && typeof t.angleRad === 'number' && Number.isFinite(t.angleRad)) {
    return { kind: 'gate', axis: t.axis, angleRad: t.angleRad };
  }
  if (t && t.kind === 'state' && isVec3(t.from) && isVec3(t.to)) return { kind: 'state', from: t.from, to: t.to };
  // The spec's form, angle in degrees, as the command line writes it into pulse files.
  const gate = t?.gate as Record<string, unknown> | undefined;
  if (gate && isVec3(gate.axis) && typeof gate.angleDeg === 'number' && Number.isFinite(gate.angleDeg)) {
    return { kind: 'gate', axis: gate.axis, angleRad: (gate.angleDeg * Math.PI) / 180 };
  }
  const state = t?.state as Record<string, unknown> | undefined;
  if (state && isVec3(state.from) && isVec3(state.to)) return { kind: 'state', from: state.from, to: state.to };
  throw new PulseFormatError(
    `metadata.ideal: ${describeValue(ideal)} is not allowed; {"gate": {"axis": [x, y, z], "angleDeg": a}} or {"state": {"from": [x, y, z], "to": [x, y, z]}} (or the core's {"kind": "gate", "axis", "angleRad"})`,
  );
}
