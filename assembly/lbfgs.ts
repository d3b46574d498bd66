// L-BFGS with a line search satisfying the strong Wolfe conditions, over the objective
// of control.ts. One call of optStep is one iteration, so that JavaScript can stream
// progress, watch the clock and stop a run between iterations.
// see: Nocedal & Wright, Numerical Optimization (2nd ed.), Algorithm 7.4 (two-loop
// recursion, H0 = gamma I with gamma = s'y / y'y, eq. 7.20), Algorithms 3.5 and 3.6
// (line search and zoom), and eq. 3.59 (cubic interpolation of the zoom step).

import { objective } from './control';
import { arenaAlloc } from './memory';

export const STEP_OK: i32 = 0;
export const STEP_GRADIENT_TOLERANCE: i32 = 1;
export const STEP_LINE_SEARCH_FAILED: i32 = 2;
export const STEP_NO_MEMORY: i32 = 3;

const C1: f64 = 1e-4;
const C2: f64 = 0.9;
const MAX_BRACKET: i32 = 20;
const MAX_ZOOM: i32 = 30;

let nVar: i32 = 0;
let mem: i32 = 0;
let stored: i32 = 0;
let newest: i32 = -1;
let gradTol: f64 = 0.0;
let xPtr: usize = 0;
let gPtr: usize = 0;
let xtPtr: usize = 0;
let gtPtr: usize = 0;
let dPtr: usize = 0;
let sPtr: usize = 0;
let yPtr: usize = 0;
let rhoPtr: usize = 0;
let alphaPtr: usize = 0;
let fx: f64 = 0.0;
let ft: f64 = 0.0;
let evaluations: i32 = 0;
let iterations: i32 = 0;

@inline function at(p: usize, k: i32): usize { return p + (<usize>k << 3); }

function dot(a: usize, b: usize, n: i32): f64 {
  let s: f64 = 0.0;
  for (let k = 0; k < n; k++) s += load<f64>(at(a, k)) * load<f64>(at(b, k));
  return s;
}

function normInf(a: usize, n: i32): f64 {
  let s: f64 = 0.0;
  for (let k = 0; k < n; k++) s = Math.max(s, Math.abs(load<f64>(at(a, k))));
  return s;
}

/** Evaluate the trial point x + alpha d into xt, gt; returns phi'(alpha) = gt.d. */
function trial(alpha: f64): f64 {
  for (let k = 0; k < nVar; k++) store<f64>(at(xtPtr, k), load<f64>(at(xPtr, k)) + alpha * load<f64>(at(dPtr, k)));
  ft = objective(xtPtr, gtPtr);
  evaluations++;
  return dot(gtPtr, dPtr, nVar);
}

/** Minimiser of the cubic through (a, fa, da), (b, fb, db), kept inside the interval's middle 80 %. */
function cubicStep(a: f64, fa: f64, da: f64, b: f64, fb: f64, db: f64): f64 {
  const lo = Math.min(a, b), hi = Math.max(a, b);
  const width = hi - lo;
  const d1 = da + db - 3.0 * (fa - fb) / (a - b);
  const disc = d1 * d1 - da * db;
  let t = 0.5 * (a + b);
  if (disc >= 0.0) {
    const d2 = (b > a ? 1.0 : -1.0) * Math.sqrt(disc);
    const denom = db - da + 2.0 * d2;
    if (denom != 0.0) t = b - (b - a) * (db + d2 - d1) / denom;
  }
  if (!isFinite(t) || t < lo + 0.1 * width || t > hi - 0.1 * width) t = 0.5 * (a + b);
  return t;
}

/**
 * Start a run from the variables at x0 (n values) with `memory` correction pairs.
 * Returns the objective at x0 (NaN when the arena is exhausted).
 */
export function optInit(x0: usize, n: i32, memory_: i32, gradientTolerance: f64): f64 {
  nVar = n; mem = memory_; stored = 0; newest = -1; gradTol = gradientTolerance;
  evaluations = 0; iterations = 0;
  const bytes = <usize>n << 3;
  xPtr = arenaAlloc(bytes); gPtr = arenaAlloc(bytes);
  xtPtr = arenaAlloc(bytes); gtPtr = arenaAlloc(bytes); dPtr = arenaAlloc(bytes);
  sPtr = arenaAlloc(bytes * <usize>mem); yPtr = arenaAlloc(bytes * <usize>mem);
  rhoPtr = arenaAlloc(<usize>mem << 3); alphaPtr = arenaAlloc(<usize>mem << 3);
  if (alphaPtr == 0 || xPtr == 0 || sPtr == 0 || yPtr == 0) return NaN;
  memory.copy(xPtr, x0, bytes);
  fx = objective(xPtr, gPtr);
  evaluations = 1;
  return fx;
}

/** d = -H g by the two-loop recursion. */
function direction(): void {
  for (let k = 0; k < nVar; k++) store<f64>(at(dPtr, k), -load<f64>(at(gPtr, k)));
  if (stored == 0) return;
  const bytes = <usize>nVar << 3;
  let idx = newest;
  for (let c = 0; c < stored; c++) {
    const s = sPtr + <usize>idx * bytes, y = yPtr + <usize>idx * bytes;
    const a = load<f64>(at(rhoPtr, idx)) * dot(s, dPtr, nVar);
    store<f64>(at(alphaPtr, idx), a);
    for (let k = 0; k < nVar; k++) store<f64>(at(dPtr, k), load<f64>(at(dPtr, k)) - a * load<f64>(at(y, k)));
    idx = idx == 0 ? mem - 1 : idx - 1;
  }
  const sN = sPtr + <usize>newest * bytes, yN = yPtr + <usize>newest * bytes;
  const gamma = dot(sN, yN, nVar) / dot(yN, yN, nVar);
  for (let k = 0; k < nVar; k++) store<f64>(at(dPtr, k), gamma * load<f64>(at(dPtr, k)));
  idx = (newest - stored + 1 + mem) % mem;
  for (let c = 0; c < stored; c++) {
    const s = sPtr + <usize>idx * bytes, y = yPtr + <usize>idx * bytes;
    const b = load<f64>(at(rhoPtr, idx)) * dot(y, dPtr, nVar);
    const a = load<f64>(at(alphaPtr, idx));
    for (let k = 0; k < nVar; k++) store<f64>(at(dPtr, k), load<f64>(at(dPtr, k)) + (a - b) * load<f64>(at(s, k)));
    idx = (idx + 1) % mem;
  }
}

/** Strong-Wolfe line search along d; on success xt, gt, ft hold the accepted point. */
function lineSearch(f0: f64, dphi0: f64, alpha1: f64): bool {
  let aPrev: f64 = 0.0, fPrev = f0, dPrev = dphi0;
  let alpha = alpha1;
  for (let i = 0; i < MAX_BRACKET; i++) {
    const dphi = trial(alpha);
    const f = ft;
    if (!isFinite(f)) { alpha = 0.5 * (aPrev + alpha); continue; }
    if (f > f0 + C1 * alpha * dphi0 || (i > 0 && f >= fPrev)) return zoom(f0, dphi0, aPrev, fPrev, dPrev, alpha, f, dphi);
    if (Math.abs(dphi) <= -C2 * dphi0) return true;
    if (dphi >= 0.0) return zoom(f0, dphi0, alpha, f, dphi, aPrev, fPrev, dPrev);
    aPrev = alpha; fPrev = f; dPrev = dphi;
    alpha *= 2.0;
  }
  return false;
}

function zoom(f0: f64, dphi0: f64, lo: f64, flo: f64, dlo: f64, hi: f64, fhi: f64, dhi: f64): bool {
  for (let j = 0; j < MAX_ZOOM; j++) {
    const alpha = cubicStep(lo, flo, dlo, hi, fhi, dhi);
    const dphi = trial(alpha);
    const f = ft;
    if (f > f0 + C1 * alpha * dphi0 || f >= flo) {
      hi = alpha; fhi = f; dhi = dphi;
    } else {
      if (Math.abs(dphi) <= -C2 * dphi0) return true;
      if (dphi * (hi - lo) >= 0.0) { hi = lo; fhi = flo; dhi = dlo; }
      lo = alpha; flo = f; dlo = dphi;
    }
    if (Math.abs(hi - lo) <= 1e-16 * Math.max(1.0, Math.abs(lo))) break;
  }
  // The interval has closed: accept the best decrease found, if any (sufficient decrease holds there).
  if (lo > 0.0 && flo < f0) { trial(lo); return ft < f0; }
  return false;
}

/** One L-BFGS iteration. Returns STEP_OK, STEP_GRADIENT_TOLERANCE or STEP_LINE_SEARCH_FAILED. */
export function optStep(): i32 {
  if (normInf(gPtr, nVar) <= gradTol) return STEP_GRADIENT_TOLERANCE;
  direction();
  let dphi0 = dot(gPtr, dPtr, nVar);
  if (!(dphi0 < 0.0)) {
    // Not a descent direction (curvature information went bad): restart from -g.
    stored = 0; newest = -1;
    direction();
    dphi0 = dot(gPtr, dPtr, nVar);
  }
  const alpha1 = stored == 0 ? Math.min(1.0, 0.5 / normInf(gPtr, nVar)) : 1.0;
  if (!lineSearch(fx, dphi0, alpha1)) {
    if (stored == 0) return STEP_LINE_SEARCH_FAILED;
    // Retry once along steepest descent with the memory cleared.
    stored = 0; newest = -1;
    direction();
    dphi0 = dot(gPtr, dPtr, nVar);
    if (!lineSearch(fx, dphi0, Math.min(1.0, 0.5 / normInf(gPtr, nVar)))) return STEP_LINE_SEARCH_FAILED;
  }
  // New pair s = xt - x, y = gt - g, kept only when the curvature s'y is positive.
  const bytes = <usize>nVar << 3;
  const slot = (newest + 1) % mem;
  const s = sPtr + <usize>slot * bytes, y = yPtr + <usize>slot * bytes;
  for (let k = 0; k < nVar; k++) {
    store<f64>(at(s, k), load<f64>(at(xtPtr, k)) - load<f64>(at(xPtr, k)));
    store<f64>(at(y, k), load<f64>(at(gtPtr, k)) - load<f64>(at(gPtr, k)));
  }
  const sy = dot(s, y, nVar);
  if (sy > 1e-300 && sy > 2.2e-16 * Math.sqrt(dot(s, s, nVar) * dot(y, y, nVar))) {
    store<f64>(at(rhoPtr, slot), 1.0 / sy);
    newest = slot;
    if (stored < mem) stored++;
  }
  memory.copy(xPtr, xtPtr, bytes);
  memory.copy(gPtr, gtPtr, bytes);
  fx = ft;
  iterations++;
  return STEP_OK;
}

/** Objective at the current point. */
export function optObjective(): f64 { return fx; }
/** Infinity norm of the gradient at the current point. */
export function optGradientNorm(): f64 { return normInf(gPtr, nVar); }
/** Pointer to the current variables. */
export function optVariables(): usize { return xPtr; }
/** Objective evaluations so far. */
export function optEvaluations(): i32 { return evaluations; }
/** Iterations so far. */
export function optIterations(): i32 { return iterations; }
