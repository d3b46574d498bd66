// The problem block: one system, its ensemble, target, controls, bounds and (for a
// design) the optimiser's state, in one allocation reached by a pointer (layout in
// memory.ts). Every export of the core takes such a pointer; nothing is kept between
// calls, so problems interleave freely.

import { arenaAlloc, arenaHold, arenaDrop } from './memory';
import { systemParams, systemTargetValues, systemMemberValues, systemWorkValues } from './system';
import { driveHasBuffers } from './drive';
import { Lbfgs, lbfgsBytes, lbfgsPlace } from './lbfgs';

/** No bound: the samples are given (maps, evaluations). */
export const BOUND_NONE: i32 = 0;
/** sqrt(I^2 + Q^2) <= rabiMax by the exact parametrisation rabiMax tanh(r)/r (x, y). */
export const BOUND_DISC: i32 = 1;
/** |I|, |Q| <= rabiMax on the samples themselves (projected L-BFGS with a Cauchy point). */
export const BOUND_BOX: i32 = 2;

/** The header of a problem block (an unmanaged struct: field access is one load). */
@unmanaged export class Problem {
  system: i32;
  dim: i32;
  mode: i32;
  n: i32;
  nDrive: i32;
  m: i32;
  drive: i32;
  bound: i32;
  first: i32;
  free: i32;
  nVar: i32;
  series: i32;
  held: i32;
  /** Non-zero: the design's figure and gradient come from member shares (JavaScript's memberShares). */
  shares: i32;
  dt: f64;
  driveDt: f64;
  rabiMax: f64;
  smoothness: f64;
  infidelity: f64;
  samplesI: usize;
  samplesQ: usize;
  driveI: usize;
  driveQ: usize;
  members: usize;
  weight: usize;
  target: usize;
  perMember: usize;
  gradI: usize;
  gradQ: usize;
  gradDriveI: usize;
  gradDriveQ: usize;
  work: usize;
  driveData: usize;
  opt: usize;
}

@inline function f64s(count: i32): usize { return ((<usize>count << 3) + 15) & ~(<usize>15); }

/**
 * A new problem block (0 when memory is exhausted or a kind is unknown). `dim` is the
 * system's size (2 for the qubit, d levels for a ladder). `held` blocks
 * outlive the current job (a design start) and are freed by problemFree; others are
 * released with the job. `memory` > 0 adds an optimiser with that many correction pairs.
 */
export function problemCreate(
  system: i32, dim: i32, mode: i32, n: i32, dt: f64, m: i32,
  drive: i32, nDrive: i32, driveDt: f64, driveValues: i32,
  bound: i32, zeroEdges: bool, rabiMax: f64, smoothness: f64,
  memory_: i32, gradientTolerance: f64, held: bool,
): usize {
  const params = systemParams(system);
  if (params == 0) return 0;
  const own = driveHasBuffers(drive);
  const first = zeroEdges && n >= 3 ? 1 : 0;
  const free = zeroEdges && n >= 3 ? n - 2 : n;
  const nVar = bound == BOUND_NONE ? 0 : 2 * free;
  const header = (offsetof<Problem>() + 15) & ~(<usize>15);
  let bytes = header;
  bytes += 2 * f64s(n);                                  // samples
  if (own) bytes += 2 * f64s(nDrive);                    // drive
  bytes += f64s(params * m) + f64s(m);                   // members, weight
  bytes += f64s(systemTargetValues(system, dim)) + f64s(systemMemberValues(system) * m); // target, perMember
  bytes += 2 * f64s(n);                                  // gradient
  if (own) bytes += 2 * f64s(nDrive);                    // drive gradient
  bytes += f64s(systemWorkValues(system, dim, nDrive)) + f64s(driveValues);
  const optBytes = memory_ > 0 && nVar > 0 ? lbfgsBytes(nVar, memory_, bound == BOUND_BOX) : 0;
  bytes += optBytes;
  const ptr = held ? arenaHold(bytes) : arenaAlloc(bytes);
  if (ptr == 0) return 0;
  memory.fill(ptr, 0, bytes);
  const p = changetype<Problem>(ptr);
  p.system = system; p.dim = dim; p.mode = mode; p.n = n; p.nDrive = nDrive; p.m = m; p.drive = drive;
  p.bound = bound; p.first = first; p.free = free; p.nVar = nVar; p.held = held ? 1 : 0;
  p.dt = dt; p.driveDt = driveDt; p.rabiMax = rabiMax; p.smoothness = smoothness;
  let at = ptr + header;
  p.samplesI = at; at += f64s(n);
  p.samplesQ = at; at += f64s(n);
  if (own) {
    p.driveI = at; at += f64s(nDrive);
    p.driveQ = at; at += f64s(nDrive);
  } else {
    p.driveI = p.samplesI; p.driveQ = p.samplesQ;
  }
  p.members = at; at += f64s(params * m);
  p.weight = at; at += f64s(m);
  p.target = at; at += f64s(systemTargetValues(system, dim));
  p.perMember = at; at += f64s(systemMemberValues(system) * m);
  p.gradI = at; at += f64s(n);
  p.gradQ = at; at += f64s(n);
  if (own) {
    p.gradDriveI = at; at += f64s(nDrive);
    p.gradDriveQ = at; at += f64s(nDrive);
  } else {
    p.gradDriveI = p.gradI; p.gradDriveQ = p.gradQ;
  }
  p.work = at; at += f64s(systemWorkValues(system, dim, nDrive));
  p.driveData = at; at += f64s(driveValues);
  if (optBytes > 0) {
    p.opt = at;
    lbfgsPlace(changetype<Lbfgs>(at), nVar, memory_, gradientTolerance, bound == BOUND_BOX);
  }
  return ptr;
}

/**
 * Let the design objective of block p take its figure and gradient from member shares: the
 * import memberShares(p) (src/core/member-split.ts) evaluates them, in this core or on other
 * threads, and sums them in a fixed order into p.gradDriveI/Q.
 */
export function problemSetShares(ptr: usize, on: bool): void {
  changetype<Problem>(ptr).shares = on ? 1 : 0;
}

/** Free a held problem block (a block of a short job goes with the job's release). */
export function problemFree(ptr: usize): void {
  if (changetype<Problem>(ptr).held != 0) arenaDrop(ptr);
}

/** Where the block's arrays start, for JavaScript to fill and read them. */
export const BUFFER_SAMPLES_I: i32 = 0;
export const BUFFER_SAMPLES_Q: i32 = 1;
export const BUFFER_MEMBERS: i32 = 2;
export const BUFFER_WEIGHT: i32 = 3;
export const BUFFER_TARGET: i32 = 4;
export const BUFFER_PER_MEMBER: i32 = 5;
export const BUFFER_GRAD_I: i32 = 6;
export const BUFFER_GRAD_Q: i32 = 7;
export const BUFFER_DRIVE_I: i32 = 8;
export const BUFFER_DRIVE_Q: i32 = 9;
export const BUFFER_DRIVE_DATA: i32 = 10;
export const BUFFER_GRAD_DRIVE_I: i32 = 11;
export const BUFFER_GRAD_DRIVE_Q: i32 = 12;

/** Pointer to one of the block's arrays (BUFFER_*), 0 for an unknown one. */
export function problemBuffer(ptr: usize, which: i32): usize {
  const p = changetype<Problem>(ptr);
  switch (which) {
    case BUFFER_SAMPLES_I: return p.samplesI;
    case BUFFER_SAMPLES_Q: return p.samplesQ;
    case BUFFER_MEMBERS: return p.members;
    case BUFFER_WEIGHT: return p.weight;
    case BUFFER_TARGET: return p.target;
    case BUFFER_PER_MEMBER: return p.perMember;
    case BUFFER_GRAD_I: return p.gradI;
    case BUFFER_GRAD_Q: return p.gradQ;
    case BUFFER_DRIVE_I: return p.driveI;
    case BUFFER_DRIVE_Q: return p.driveQ;
    case BUFFER_DRIVE_DATA: return p.driveData;
    case BUFFER_GRAD_DRIVE_I: return p.gradDriveI;
    case BUFFER_GRAD_DRIVE_Q: return p.gradDriveQ;
    default: return 0;
  }
}
