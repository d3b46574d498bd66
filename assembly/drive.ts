// The drive stage: the linear map from the programmed samples (p.samplesI/Q, p.n of
// p.dt) to the drive the system sees (p.driveI/Q, p.nDrive of p.driveDt), and its
// transpose, which carries the gradient with respect to the drive back to the samples.
// The pipeline of every figure and gradient is
//   optimiser variables -> bounded samples (control.ts) -> drive (forward)
//   -> system figure / gradient (system.ts) -> transpose -> chain rule (control.ts).
// The identity map aliases the drive buffers to the sample buffers (problem.ts), so both
// directions cost nothing. A line (line.ts: samples held on a finer grid and convolved
// with the line's kernel) has drive buffers of its own and its parameters in p.driveData,
// filled from JavaScript. To add a map: a kind, its parameters, one case in each function
// below.

import { Problem } from './problem';
import { lineForward, lineTranspose, lineBoundPenalty } from './line';

/** The drive is the samples themselves. */
export const DRIVE_IDENTITY: i32 = 0;
/** The samples held on dt / oversample and convolved with a line's kernel (line.ts). */
export const DRIVE_LINE: i32 = 1;

/** Whether the drive of a kind has buffers of its own (false: it aliases the samples). */
export function driveHasBuffers(kind: i32): bool {
  return kind != DRIVE_IDENTITY;
}

/** Samples -> drive. */
export function driveForward(p: Problem): void {
  switch (p.drive) {
    case DRIVE_IDENTITY: return;
    case DRIVE_LINE: lineForward(p); return;
    default: return;
  }
}

/** Gradient with respect to the drive -> gradient with respect to the samples (the transpose). */
export function driveTranspose(p: Problem): void {
  switch (p.drive) {
    case DRIVE_IDENTITY: return;
    case DRIVE_LINE: lineTranspose(p); return;
    default: return;
  }
}

/** A penalty on the drive itself (the line's drive bound), its gradient added to p.gradDriveI/Q; 0 for the identity. */
export function drivePenalty(p: Problem): f64 {
  switch (p.drive) {
    case DRIVE_LINE: return lineBoundPenalty(p);
    default: return 0.0;
  }
}
