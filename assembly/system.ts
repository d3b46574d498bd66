// The seam between the optimiser (lbfgs.ts, lbfgsb.ts), the bounded samples (control.ts),
// the maps (index.ts: problemFigure) and the physical system. Every caller goes through
// these functions; each switches once per job on the problem's system kind, never inside
// a sweep, so the dispatch costs one branch per figure or gradient.
//
// A system provides, for a problem block (problem.ts) whose drive (p.driveI, p.driveQ:
// p.nDrive samples of p.driveDt, Hz) is in place:
//   figure:    per-member infidelities into p.perMember, weighted mean returned
//   gradient:  the same, plus d(mean)/d(drive) into p.gradDriveI, p.gradDriveQ (per Hz)
// and, for the layout of the block (p.dim is the system's size: 2 for the qubit, the
// number of levels d of a ladder):
//   params:        member parameters per member (p.members holds params x m, one array each)
//   targetValues:  f64 values of an encoded target (p.target); p.mode says which kind
//   memberValues:  f64 of output per member in p.perMember (the figure first)
//   memberMultiple: members are padded to a multiple of it (zero weight)
//   workValues:    f64 of scratch its figure and gradient need (p.work)
// To add a system: a kind constant here, one case in each function below, its kernels in
// their own file(s) taking pointers; nothing else in assembly/ changes.

import { Problem } from './problem';
import {
  QUBIT_PARAMS, QUBIT_TARGET_VALUES, QUBIT_MEMBER_MULTIPLE, qubitWorkValues, qubitFigure, qubitGradient,
} from './qubit';
import { LADDER_PARAMS, LADDER_MEMBER_VALUES, ladderWorkspaceSize, ladderSystemFigure, ladderSystemGradient } from './ladder-sweep';

/** A two-level system driven by I/Q: docs/physics.md section 1. */
export const SYSTEM_QUBIT: i32 = 0;
/** A d-level ladder (transmon) driven by I/Q, figures on levels 0, 1: docs/transmon.md. */
export const SYSTEM_LADDER: i32 = 1;

/** Member parameters per member of a system kind (0 for an unknown kind). */
export function systemParams(kind: i32): i32 {
  switch (kind) {
    case SYSTEM_QUBIT: return QUBIT_PARAMS;
    case SYSTEM_LADDER: return LADDER_PARAMS;
    default: return 0;
  }
}

/** Values of an encoded target of a system kind and size. */
export function systemTargetValues(kind: i32, dim: i32): i32 {
  switch (kind) {
    case SYSTEM_QUBIT: return QUBIT_TARGET_VALUES;
    case SYSTEM_LADDER: return QUBIT_TARGET_VALUES;
    default: return 0;
  }
}

/** Output values per member (p.perMember holds memberValues x m; the figure first). */
export function systemMemberValues(kind: i32): i32 {
  switch (kind) {
    case SYSTEM_QUBIT: return 1;
    case SYSTEM_LADDER: return LADDER_MEMBER_VALUES;
    default: return 0;
  }
}

/** Members of a system kind are padded to a multiple of this. */
export function systemMemberMultiple(kind: i32): i32 {
  switch (kind) {
    case SYSTEM_QUBIT: return QUBIT_MEMBER_MULTIPLE;
    case SYSTEM_LADDER: return 1;
    default: return 0;
  }
}

/** Scratch values the figure and gradient of a system kind and size need for a drive of nDrive samples. */
export function systemWorkValues(kind: i32, dim: i32, nDrive: i32): i32 {
  switch (kind) {
    case SYSTEM_QUBIT: return qubitWorkValues(nDrive);
    case SYSTEM_LADDER: return ladderWorkspaceSize(nDrive, dim);
    default: return 0;
  }
}

/** Ensemble figure of the problem's drive (per-member into p.perMember). */
export function systemFigure(p: Problem): f64 {
  switch (p.system) {
    case SYSTEM_QUBIT: return qubitFigure(p);
    case SYSTEM_LADDER: return ladderSystemFigure(p);
    default: return NaN;
  }
}

/** Ensemble figure and its gradient with respect to the drive. */
export function systemGradient(p: Problem): f64 {
  switch (p.system) {
    case SYSTEM_QUBIT: return qubitGradient(p);
    case SYSTEM_LADDER: return ladderSystemGradient(p);
    default: return NaN;
  }
}
