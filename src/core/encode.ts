// Turning targets, members and pulses into the flat arrays the wasm core reads
// (assembly/memory.ts), and checking them first: kernels trust their inputs.
import { ArgumentError, describeValue } from './errors.ts';
import type { Member, Pulse, Target, Vec3 } from './types.ts';
import * as pm from './portable-math.ts';

/** Figure mode of the core: 0 gate, 1 state transfer. */
export function targetMode(target: Target): number {
  return target.kind === 'gate' ? 0 : 1;
}

/** SU(2) element (ur, ui, vr, vi) of R_n(theta) = cos(theta/2) - i sin(theta/2) n.sigma. */
export function rotation(axis: Vec3, angleRad: number): [number, number, number, number] {
  const norm = Math.hypot(axis[0], axis[1], axis[2]);
  const c = pm.cos(angleRad / 2);
  const s = pm.sin(angleRad / 2) / norm;
  return [c, -s * axis[2], s * axis[1], -s * axis[0]];
}

/** An SU(2) element whose first column is the state with Bloch vector r (|0> -> state). */
function stateRotation(r: Vec3): [number, number, number, number] {
  const norm = Math.hypot(r[0], r[1], r[2]);
  const z = Math.max(-1, Math.min(1, r[2] / norm));
  // cos(theta/2), sin(theta/2) of the polar angle and cos, sin of the azimuth, from square
  // roots and quotients alone (the same bits on every engine, unlike acos and atan2).
  const half = [Math.sqrt((1 + z) / 2), Math.sqrt((1 - z) / 2)];
  const rho = Math.hypot(r[0], r[1]);
  const [cphi, sphi] = rho > 0 ? [r[0] / rho, r[1] / rho] : [1, 0];
  return [half[0], 0, half[1] * cphi, half[1] * sphi];
}

function adjoint(q: [number, number, number, number]): [number, number, number, number] {
  return [q[0], -q[1], -q[2], -q[3]];
}

/** The 8 values (G, H) such that the figure is taken of W = G U H. */
export function encodeTarget(target: Target): Float64Array {
  if (target.kind === 'gate') {
    return Float64Array.from([...adjoint(rotation(target.axis, target.angleRad)), 1, 0, 0, 0]);
  }
  return Float64Array.from([...adjoint(stateRotation(target.to)), ...stateRotation(target.from)]);
}

/** Members as padded structure-of-arrays: length a multiple of `multiple`, padding weighs 0. */
export interface EncodedMembers {
  count: number;
  padded: number;
  scale: Float64Array;
  detuning: Float64Array;
  weight: Float64Array;
}

/** Encode members, normalising weights to sum 1 (throws ArgumentError on bad members). */
export function encodeMembers(members: readonly Member[], multiple = 4, normalise = true): EncodedMembers {
  if (members.length === 0) throw new ArgumentError('members: the ensemble is empty; give at least one member');
  const padded = Math.ceil(members.length / multiple) * multiple;
  const scale = new Float64Array(padded);
  const detuning = new Float64Array(padded);
  const weight = new Float64Array(padded);
  let total = 0;
  members.forEach((m, j) => {
    if (!Number.isFinite(m.detuning)) throw new ArgumentError(`members[${j}].detuning: ${describeValue(m.detuning)} is not a finite number of Hz`);
    if (!Number.isFinite(m.amplitudeError) || m.amplitudeError <= -1) {
      throw new ArgumentError(`members[${j}].amplitudeError: ${describeValue(m.amplitudeError)} is not allowed; it must be a finite number above -1`);
    }
    if (!Number.isFinite(m.weight) || m.weight < 0) throw new ArgumentError(`members[${j}].weight: ${describeValue(m.weight)} is not allowed; it must be finite and >= 0`);
    scale[j] = 1 + m.amplitudeError;
    detuning[j] = m.detuning;
    weight[j] = m.weight;
    total += m.weight;
  });
  if (normalise) {
    if (!(total > 0)) throw new ArgumentError('members: the weights sum to 0; at least one must be positive');
    for (let j = 0; j < members.length; j++) weight[j] /= total;
  }
  for (let j = members.length; j < padded; j++) {
    scale[j] = scale[0];
    detuning[j] = detuning[0];
  }
  return { count: members.length, padded, scale, detuning, weight };
}

/** Check that a pulse has a finite dt > 0 and equal-length, non-empty, finite samples (every entry point: core, files, export). */
export function checkPulse(pulse: Pulse): void {
  if (!(pulse.dt > 0) || !Number.isFinite(pulse.dt)) throw new ArgumentError(`pulse.dt: ${describeValue(pulse.dt)} is not allowed; a finite sample length > 0 (s)`);
  if (pulse.i.length !== pulse.q.length) throw new ArgumentError(`pulse.q: ${pulse.q.length} samples is not allowed; as many as pulse.i (${pulse.i.length})`);
  if (pulse.i.length === 0) throw new ArgumentError('pulse.i: 0 samples is not allowed; the pulse needs at least 1');
  for (let k = 0; k < pulse.i.length; k++) {
    if (!Number.isFinite(pulse.i[k])) throw new ArgumentError(`pulse.i[${k}]: ${describeValue(pulse.i[k])} is not allowed; a finite Rabi frequency (Hz)`);
    if (!Number.isFinite(pulse.q[k])) throw new ArgumentError(`pulse.q[${k}]: ${describeValue(pulse.q[k])} is not allowed; a finite Rabi frequency (Hz)`);
  }
}
