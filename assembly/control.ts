// The design objective of a problem block: from optimiser variables x to bounded
// samples, through the drive stage to the system's figure and gradient, the smoothness
// penalty, and the chain rule back (the pipeline is drawn in drive.ts).
//
// Bounds (the bound holds for every x, so no exported sample can exceed it):
//   disc (default): (I, Q) = rabiMax * tanh(rho)/rho * (x, y),  rho = |(x, y)|
//     tanh is capped one part in 2^50 below 1 so that rounding cannot reach the limit.
//   box (named option): I = rabiMax x, Q = rabiMax y with |x|, |y| <= 1 held by the
//     optimiser itself (lbfgsb.ts); clamped here too, so rounding cannot leave the box.
// Variables are interleaved (x_k, y_k) over the free samples; with zero edges the first
// and last samples are held at zero and carry no variable.

import { Problem, BOUND_BOX } from './problem';
import { driveForward, driveTranspose, drivePenalty } from './drive';
import { systemFigure, systemGradient } from './system';

/**
 * The figure and gradient of p's drive from member shares, summed in share order into
 * p.gradDriveI/Q (src/core/member-split.ts); the weighted mean returned.
 */
@external("env", "memberShares")
declare function memberShares(p: usize): f64;

const TANH_CAP: f64 = 1.0 - 8.881784197001252e-16;

/** tanh(r)/r, with its series below r = 0.01 (terms to r^8; error below 1e-18). */
@inline function tanhRatio(r: f64, t: f64): f64 {
  if (r < 0.01) {
    const r2 = r * r;
    return 1.0 + r2 * (-1.0 / 3.0 + r2 * (2.0 / 15.0 + r2 * (-17.0 / 315.0 + r2 * (62.0 / 2835.0))));
  }
  return t / r;
}

/** (d/dr (tanh(r)/r)) / r, with its series below r = 0.01. */
@inline function tanhRatioSlope(r: f64, t: f64): f64 {
  if (r < 0.01) {
    const r2 = r * r;
    return -2.0 / 3.0 + r2 * (8.0 / 15.0 + r2 * (-102.0 / 315.0 + r2 * (496.0 / 2835.0)));
  }
  const sech2 = 1.0 - t * t;
  return (r * sech2 - t) / (r * r * r);
}

@inline function at(ptr: usize, k: i32): usize { return ptr + (<usize>k << 3); }

/** Write the samples I, Q (Hz) that the variables x stand for. */
export function controlsFromVariables(ptr: usize, xPtr: usize): void {
  const p = changetype<Problem>(ptr);
  const rabiMax = p.rabiMax;
  memory.fill(p.samplesI, 0, <usize>p.n << 3);
  memory.fill(p.samplesQ, 0, <usize>p.n << 3);
  for (let f = 0; f < p.free; f++) {
    const x = load<f64>(at(xPtr, 2 * f));
    const y = load<f64>(at(xPtr, 2 * f + 1));
    let i: f64, q: f64;
    if (p.bound == BOUND_BOX) {
      i = rabiMax * Math.max(-1.0, Math.min(x, 1.0));
      q = rabiMax * Math.max(-1.0, Math.min(y, 1.0));
    } else {
      const r = Math.sqrt(x * x + y * y);
      const t = Math.min(Math.tanh(r), TANH_CAP);
      const ratio = tanhRatio(r, t);
      i = rabiMax * ratio * x;
      q = rabiMax * ratio * y;
    }
    store<f64>(at(p.samplesI, f + p.first), i);
    store<f64>(at(p.samplesQ, f + p.first), q);
  }
}

/** Smoothness penalty lambda/(n-1) sum ((dI)^2 + (dQ)^2)/rabiMax^2; adds its gradient to gradI, gradQ. */
function smoothnessPenalty(p: Problem): f64 {
  const n = p.n;
  if (p.smoothness == 0.0 || n < 2) return 0.0;
  const scale = p.smoothness / (<f64>(n - 1) * p.rabiMax * p.rabiMax);
  const sI = p.samplesI, sQ = p.samplesQ, gI = p.gradI, gQ = p.gradQ;
  let sum: f64 = 0.0;
  for (let k = 0; k < n - 1; k++) {
    const di = load<f64>(at(sI, k + 1)) - load<f64>(at(sI, k));
    const dq = load<f64>(at(sQ, k + 1)) - load<f64>(at(sQ, k));
    sum += di * di + dq * dq;
    const gi = 2.0 * scale * di, gq = 2.0 * scale * dq;
    store<f64>(at(gI, k + 1), load<f64>(at(gI, k + 1)) + gi);
    store<f64>(at(gI, k), load<f64>(at(gI, k)) - gi);
    store<f64>(at(gQ, k + 1), load<f64>(at(gQ, k + 1)) + gq);
    store<f64>(at(gQ, k), load<f64>(at(gQ, k)) - gq);
  }
  return scale * sum;
}

/** The drive the system sees from the problem's samples (the drive stage alone). */
export function problemDrive(ptr: usize): void {
  driveForward(changetype<Problem>(ptr));
}

/** Figure of the problem's samples: drive stage, then the system's figure (maps, evaluations). */
export function problemFigure(ptr: usize): f64 {
  const p = changetype<Problem>(ptr);
  driveForward(p);
  const fig = systemFigure(p);
  p.infidelity = fig;
  return fig;
}

/** Figure of the problem's samples and its gradient with respect to them (p.gradI, p.gradQ). */
export function problemGradient(ptr: usize): f64 {
  const p = changetype<Problem>(ptr);
  driveForward(p);
  const fig = systemGradient(p);
  driveTranspose(p);
  p.infidelity = fig;
  return fig;
}

/** Objective (mean infidelity + smoothness penalty + the drive's own penalty) at x; writes its gradient with respect to x to g. */
export function objective(ptr: usize, xPtr: usize, gPtr: usize): f64 {
  const p = changetype<Problem>(ptr);
  controlsFromVariables(ptr, xPtr);
  driveForward(p);
  const fig = p.shares != 0 ? memberShares(ptr) : systemGradient(p);
  p.infidelity = fig;
  // The drive's own penalty acts on d/d(drive), so it joins before the transpose.
  const drivePen = drivePenalty(p);
  driveTranspose(p);
  const pen = smoothnessPenalty(p) + drivePen;
  const rabiMax = p.rabiMax;
  const box = p.bound == BOUND_BOX;
  for (let f = 0; f < p.free; f++) {
    const x = load<f64>(at(xPtr, 2 * f));
    const y = load<f64>(at(xPtr, 2 * f + 1));
    const gi = load<f64>(at(p.gradI, f + p.first));
    const gq = load<f64>(at(p.gradQ, f + p.first));
    let gx: f64, gy: f64;
    if (box) {
      gx = gi * rabiMax;
      gy = gq * rabiMax;
    } else {
      const r = Math.sqrt(x * x + y * y);
      const t = Math.tanh(r);
      const f0 = tanhRatio(r, t);
      const f1 = tanhRatioSlope(r, t);
      // d(Omega f(r) x)/dx = Omega (f + f'(r)/r x^2), cross terms Omega f'(r)/r x y
      const dIdx = rabiMax * (f0 + f1 * x * x), dIdy = rabiMax * f1 * x * y;
      const dQdy = rabiMax * (f0 + f1 * y * y);
      gx = gi * dIdx + gq * dIdy;
      gy = gi * dIdy + gq * dQdy;
    }
    store<f64>(at(gPtr, 2 * f), gx);
    store<f64>(at(gPtr, 2 * f + 1), gy);
  }
  return fig + pen;
}

/** Weighted mean infidelity at the last evaluation (penalty excluded). */
export function problemInfidelity(ptr: usize): f64 { return changetype<Problem>(ptr).infidelity; }
/** Number of optimiser variables. */
export function problemVariables(ptr: usize): i32 { return changetype<Problem>(ptr).nVar; }
/** Series settings of the last figure or gradient (terms | halvings << 8), for tests and the benchmark. */
export function problemSeries(ptr: usize): i32 { return changetype<Problem>(ptr).series; }
