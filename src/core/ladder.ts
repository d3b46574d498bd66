// The transmon ladder's own entry points over the wasm core (assembly/ladder*.ts): one
// segment's propagator and the populations of every level against time. Figures, leakage
// and gradients of a pulse on a ladder go through the system seam like the qubit's
// (evaluateMembers and robustnessMap in api.ts, figureAndGradient in gradient.ts, with a
// `system`). Validation happens here; the kernels trust their inputs.
import { ArgumentError, describeValue } from './errors.ts';
import { checkPulse, encodeTarget } from './encode.ts';
import type { LadderSystem, Member, Pulse, Vec3 } from './types.ts';
import { getCore, type Core } from './wasm.ts';

/** Fewest levels of a ladder (2: the qubit). */
export const MIN_LEVELS = 2;
/** Most levels of a ladder in a spec. */
export const MAX_LEVELS = 8;

export type { LadderSystem, TruncationCheck } from './types.ts';

/** An ensemble member of a ladder: a qubit member plus an error of the anharmonicity (Hz). */
export interface LadderMember extends Member {
  anharmonicityError: number;
}

/** The ladder kernels the core exports (assembly/index.ts). */
interface LadderExports {
  ladderPropagator(d: number, dt: number, i: number, q: number, detuning: number, scale: number, alpha: number,
    outPtr: number, workPtr: number): void;
  ladderPopulations(iPtr: number, qPtr: number, n: number, dt: number, d: number, scale: number, detuning: number,
    alpha: number, targetPtr: number, outPtr: number, workPtr: number): void;
  ladderWorkspaceSize(n: number, d: number): number;
}

function ladderCore(core: Core): LadderExports {
  return core.exports as unknown as LadderExports;
}

/** Check a system description (levels 2..maxLevels, finite anharmonicity). */
export function checkSystem(system: LadderSystem, maxLevels = MAX_LEVELS): void {
  if (!Number.isInteger(system.levels) || system.levels < MIN_LEVELS || system.levels > maxLevels) {
    throw new ArgumentError(`system.levels: ${describeValue(system.levels)} is not allowed; an integer from ${MIN_LEVELS} to ${maxLevels}`);
  }
  if (!Number.isFinite(system.anharmonicity)) {
    throw new ArgumentError(`system.anharmonicity: ${describeValue(system.anharmonicity)} is not a finite number of Hz`);
  }
}

interface EncodedLadderMembers {
  scale: Float64Array;
  detuning: Float64Array;
  alpha: Float64Array;
  weight: Float64Array;
}

/** Members as the ladder kernels read them (no padding: one member at a time); weights normalised. */
export function encodeLadderMembers(members: readonly LadderMember[], system: LadderSystem): EncodedLadderMembers {
  if (members.length === 0) throw new ArgumentError('members: the ensemble is empty; give at least one member');
  const m = members.length;
  const out = { scale: new Float64Array(m), detuning: new Float64Array(m), alpha: new Float64Array(m), weight: new Float64Array(m) };
  let total = 0;
  members.forEach((member, j) => {
    if (!Number.isFinite(member.detuning)) throw new ArgumentError(`members[${j}].detuning: ${describeValue(member.detuning)} is not a finite number of Hz`);
    if (!Number.isFinite(member.amplitudeError) || member.amplitudeError <= -1) {
      throw new ArgumentError(`members[${j}].amplitudeError: ${describeValue(member.amplitudeError)} is not allowed; it must be a finite number above -1`);
    }
    if (!Number.isFinite(member.anharmonicityError)) {
      throw new ArgumentError(`members[${j}].anharmonicityError: ${describeValue(member.anharmonicityError)} is not a finite number of Hz`);
    }
    if (!Number.isFinite(member.weight) || member.weight < 0) {
      throw new ArgumentError(`members[${j}].weight: ${describeValue(member.weight)} is not allowed; it must be finite and >= 0`);
    }
    out.scale[j] = 1 + member.amplitudeError;
    out.detuning[j] = member.detuning;
    out.alpha[j] = system.anharmonicity + member.anharmonicityError;
    out.weight[j] = member.weight;
    total += member.weight;
  });
  if (!(total > 0)) throw new ArgumentError('members: the weights sum to 0; at least one must be positive');
  for (let j = 0; j < m; j++) out.weight[j] /= total;
  return out;
}

/** Qubit members as ladder members with no anharmonicity error. */
export function asLadderMembers(members: readonly Member[]): LadderMember[] {
  return members.map((m) => ({ ...m, anharmonicityError: 'anharmonicityError' in m ? (m as LadderMember).anharmonicityError : 0 }));
}

/** One segment's exact propagator exp(-i H dt) on `levels` levels: [row][column] = [re, im]. */
export function ladderSegmentPropagator(
  levels: number, dt: number, iHz: number, qHz: number, member: LadderMember, anharmonicity: number,
): [number, number][][] {
  checkSystem({ levels, anharmonicity });
  checkPulse({ dt, i: Float64Array.of(iHz), q: Float64Array.of(qHz), metadata: {} });
  const core = getCore();
  const ex = ladderCore(core);
  const d = levels;
  const flat = core.job(() => {
    const outPtr = core.alloc(2 * d * d);
    const workPtr = core.alloc(ex.ladderWorkspaceSize(1, d));
    ex.ladderPropagator(d, dt, iHz, qHz, member.detuning, 1 + member.amplitudeError,
      anharmonicity + member.anharmonicityError, outPtr, workPtr);
    return core.read(outPtr, 2 * d * d);
  });
  return Array.from({ length: d }, (_, r) => Array.from({ length: d }, (_, c) => [flat[2 * (r * d + c)], flat[2 * (r * d + c) + 1]] as [number, number]));
}

/** Population of every level after each sample for one member, from the qubit state with Bloch vector `from`: (N+1) x levels, sample-major. */
export function ladderPopulations(pulse: Pulse, member: LadderMember, system: LadderSystem, from: Vec3 = [0, 0, 1]): Float64Array {
  checkPulse(pulse);
  checkSystem(system);
  const norm = Math.hypot(from[0], from[1], from[2]);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new ArgumentError(`from: ${describeValue(from)} is not allowed; give a non-zero Bloch vector`);
  const enc = encodeLadderMembers([{ ...member, weight: 1 }], system);
  const core = getCore();
  const ex = ladderCore(core);
  const n = pulse.i.length, d = system.levels;
  return core.job(() => {
    const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
    // H rotates |0> onto `from`; G is unused.
    const tPtr = core.put(encodeTarget({ kind: 'state', from, to: from }));
    const outPtr = core.alloc((n + 1) * d);
    const workPtr = core.alloc(ex.ladderWorkspaceSize(1, d));
    ex.ladderPopulations(iPtr, qPtr, n, pulse.dt, d, enc.scale[0], enc.detuning[0], enc.alpha[0], tPtr, outPtr, workPtr);
    return core.read(outPtr, (n + 1) * d);
  });
}

/**
 * The leakage L = 1 - Tr(M^dag M)/2 of one member, from the populations kernel: the mean of
 * what left levels 0 and 1 from |0> and from |1> (L is the same mean over any orthonormal
 * pair of qubit states). It is the gate figures' leakage, and so the leakage map's value at
 * that member, computed here by another kernel.
 */
export function ladderSubspaceLeakage(pulse: Pulse, member: LadderMember, system: LadderSystem): number {
  const d = system.levels;
  const leaked = (from: Vec3): number => {
    const values = ladderPopulations(pulse, member, system, from);
    let sum = 0;
    for (let l = 2; l < d; l++) sum += values[values.length - d + l];
    return sum;
  };
  return (leaked([0, 0, 1]) + leaked([0, 0, -1])) / 2;
}
