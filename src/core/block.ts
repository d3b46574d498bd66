// Problem blocks (assembly/problem.ts) from the TypeScript side: one allocation in the
// core holding a system, its ensemble, target, samples, bounds and optimiser. Every
// entry point of the library places one and calls the core on its pointer.
import { encodeTarget, targetMode, type EncodedMembers } from './encode.ts';
import type { AmplitudeBound, Target } from './types.ts';
import type { Core } from './wasm.ts';

import { SYSTEM_QUBIT } from './system.ts';
/** Drive maps of the core (assembly/drive.ts). */
export const DRIVE_IDENTITY = 0;
/** The line: samples held on dt / oversample and convolved with a kernel (assembly/line.ts, src/core/line.ts). */
export const DRIVE_LINE = 1;
/** Bound kinds of the core (assembly/problem.ts). */
const BOUND = { none: 0, disc: 1, box: 2 } as const;
/** Arrays of a block (assembly/problem.ts, BUFFER_*). */
export const BUFFER = {
  samplesI: 0, samplesQ: 1, members: 2, weight: 3, target: 4, perMember: 5, gradI: 6, gradQ: 7, driveI: 8, driveQ: 9, driveData: 10,
  gradDriveI: 11, gradDriveQ: 12,
} as const;

/** A drive map other than the identity (assembly/drive.ts): its kind, grid and parameters. */
export interface DriveLayout {
  kind: number;
  /** Drive samples the system sees, and their length (s). */
  samples: number;
  dt: number;
  /** The map's parameters, copied to the block's driveData. */
  values: Float64Array;
}

/** What a block holds: the problem, and an optimiser when `optimizer` is given. */
export interface BlockLayout {
  target: Target;
  segments: number;
  dt: number;
  /** Members padded to the system's multiple (encodeMembers with 2). */
  members: EncodedMembers;
  /** System kind (default the qubit) and size (default 2); another system also gives its encodings below. */
  system?: number;
  dim?: number;
  /** The system's member parameters, one padded array each (default: the qubit's scale and detuning). */
  memberParams?: Float64Array[];
  /** The system's target encoding and mode (default: the qubit's, from `target`). */
  targetValues?: Float64Array;
  mode?: number;
  /** The drive map (default: the identity). */
  drive?: DriveLayout;
  bound?: AmplitudeBound;
  zeroEdges?: boolean;
  rabiMax?: number;
  smoothness?: number;
  optimizer?: { memory: number; gradientTolerance: number };
  /** Outlives the current job (a design start): free it with `freeBlock`. */
  held?: boolean;
}

/** Place a problem block and fill its ensemble, target and drive parameters; returns its pointer. */
export function createBlock(core: Core, layout: BlockLayout): number {
  const { members: enc, segments: n, dt } = layout;
  const drive = layout.drive;
  const p = core.exports.problemCreate(
    layout.system ?? SYSTEM_QUBIT, layout.dim ?? 2, layout.mode ?? targetMode(layout.target), n, dt, enc.padded,
    drive?.kind ?? DRIVE_IDENTITY, drive?.samples ?? n, drive?.dt ?? dt, drive?.values.length ?? 0,
    layout.bound ? BOUND[layout.bound] : BOUND.none, layout.zeroEdges ? 1 : 0, layout.rabiMax ?? 0, layout.smoothness ?? 0,
    layout.optimizer?.memory ?? 0, layout.optimizer?.gradientTolerance ?? 0, layout.held ? 1 : 0,
  );
  if (p === 0) throw new RangeError(`the core could not place a problem of ${n} segments x ${enc.padded} members (memory exhausted)`);
  const members = core.exports.problemBuffer(p, BUFFER.members);
  const params = layout.memberParams ?? [enc.scale, enc.detuning];
  params.forEach((values, k) => core.view(members + 8 * k * enc.padded, enc.padded).set(values));
  core.view(core.exports.problemBuffer(p, BUFFER.weight), enc.padded).set(enc.weight);
  const target = layout.targetValues ?? encodeTarget(layout.target);
  core.view(core.exports.problemBuffer(p, BUFFER.target), target.length).set(target);
  if (drive) core.view(core.exports.problemBuffer(p, BUFFER.driveData), drive.values.length).set(drive.values);
  return p;
}

/** Copy samples into a block. */
export function setSamples(core: Core, p: number, i: ArrayLike<number>, q: ArrayLike<number>): void {
  core.view(core.exports.problemBuffer(p, BUFFER.samplesI), i.length).set(i);
  core.view(core.exports.problemBuffer(p, BUFFER.samplesQ), q.length).set(q);
}

/** A copy of `count` values of one of a block's arrays. */
export function readBuffer(core: Core, p: number, which: number, count: number): Float64Array {
  return core.read(core.exports.problemBuffer(p, which), count);
}

/** Free a held block. */
export function freeBlock(core: Core, p: number): void {
  core.exports.problemFree(p);
}
