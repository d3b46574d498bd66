// The drive stage: the linear map from the programmed samples (p.samplesI/Q, p.n of
// p.dt) to the drive the system sees (p.driveI/Q, p.nDrive of p.driveDt), and its
// transpose, which carries the gradient with respect to the drive back to the samples.
// The pipeline of every figure and gradient is
//   optimiser variables -> bounded samples (control.ts) -> drive (forward)
//   -> system figure / gradient (system.ts) -> transpose -> chain rule (control.ts).
// Today the map is the identity: the drive buffers alias the sample buffers (problem.ts),
// so both directions cost nothing. To add a map (a line: samples held, oversampled,
// convolved with a kernel), add a kind, its nDrive and driveDt in driveSamples/driveStep
// (the block then gets separate drive buffers), its parameters in p.driveData
// (p.driveValues f64, filled from JavaScript), and one case in each function below.

import { Problem } from './problem';

/** The drive is the samples themselves. */
export const DRIVE_IDENTITY: i32 = 0;

/** Whether the drive of a kind has buffers of its own (false: it aliases the samples). */
export function driveHasBuffers(kind: i32): bool {
  return kind != DRIVE_IDENTITY;
}

/** Samples -> drive. */
export function driveForward(p: Problem): void {
  switch (p.drive) {
    case DRIVE_IDENTITY: return;
    default: return;
  }
}

/** Gradient with respect to the drive -> gradient with respect to the samples (the transpose). */
export function driveTranspose(p: Problem): void {
  switch (p.drive) {
    case DRIVE_IDENTITY: return;
    default: return;
  }
}
