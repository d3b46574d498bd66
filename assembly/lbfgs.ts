// L-BFGS with a line search satisfying the strong Wolfe conditions, over the objective
// of a problem block (control.ts). One call of optStep is one iteration, so that
// JavaScript can stream progress, watch the clock and stop a run between iterations.
// The state lives in the block (an Lbfgs header and its arrays, memory.ts), so runs
// interleave. With the box bound the iteration is lbfgsb.ts's; the memory of correction
// pairs, the line search and the bookkeeping are shared.
// see: Nocedal & Wright, Numerical Optimization (2nd ed.), Algorithm 7.4 (two-loop
// recursion, H0 = gamma I with gamma = s'y / y'y, eq. 7.20), Algorithms 3.5 and 3.6
// (line search and zoom), and eq. 3.59 (cubic interpolation of the zoom step).

import { objective } from './control';
import { Problem, BOUND_BOX } from './problem';
import { lbfgsbBytes, lbfgsbPlace, lbfgsbStep, lbfgsbPairAdded, projectedGradientNorm } from './lbfgsb';

/** Status of optStep: an iteration was taken. */
export const STEP_OK: i32 = 0;
/** Status of optStep: the (projected) gradient is below the tolerance. */
export const STEP_GRADIENT_TOLERANCE: i32 = 1;
/** Status of optStep: no step lowered the objective. */
export const STEP_LINE_SEARCH_FAILED: i32 = 2;

const C1: f64 = 1e-4;
const C2: f64 = 0.9;
const MAX_BRACKET: i32 = 20;
const MAX_ZOOM: i32 = 30;

/** The optimiser's state (an unmanaged struct in the problem block). */
@unmanaged export class Lbfgs {
  nVar: i32;
  mem: i32;
  stored: i32;
  newest: i32;
  evaluations: i32;
  iterations: i32;
  box: i32;
  _pad: i32;
  gradTol: f64;
  fx: f64;
  ft: f64;
  x: usize;
  g: usize;
  xt: usize;
  gt: usize;
  d: usize;
  s: usize;
  y: usize;
  rho: usize;
  alpha: usize;
  b: usize;
}

@inline function f64s(count: i32): usize { return ((<usize>count << 3) + 15) & ~(<usize>15); }
/** Address of f64 number k of an array. */
@inline export function at(p: usize, k: i32): usize { return p + (<usize>k << 3); }

/** Bytes of an optimiser for nVar variables and `mem` pairs (header included). */
export function lbfgsBytes(nVar: i32, mem: i32, box: bool): usize {
  const header = (offsetof<Lbfgs>() + 15) & ~(<usize>15);
  let bytes = header + 5 * f64s(nVar) + 2 * <usize>mem * f64s(nVar) + 2 * f64s(mem);
  if (box) bytes += lbfgsbBytes(nVar, mem);
  return bytes;
}

/** Lay the optimiser's arrays out after its header (memory already zeroed). */
export function lbfgsPlace(o: Lbfgs, nVar: i32, mem: i32, gradientTolerance: f64, box: bool): void {
  o.nVar = nVar; o.mem = mem; o.stored = 0; o.newest = -1; o.gradTol = gradientTolerance;
  o.box = box ? 1 : 0;
  let ptr = changetype<usize>(o) + ((offsetof<Lbfgs>() + 15) & ~(<usize>15));
  o.x = ptr; ptr += f64s(nVar);
  o.g = ptr; ptr += f64s(nVar);
  o.xt = ptr; ptr += f64s(nVar);
  o.gt = ptr; ptr += f64s(nVar);
  o.d = ptr; ptr += f64s(nVar);
  o.s = ptr; ptr += <usize>mem * f64s(nVar);
  o.y = ptr; ptr += <usize>mem * f64s(nVar);
  o.rho = ptr; ptr += f64s(mem);
  o.alpha = ptr; ptr += f64s(mem);
  if (box) { o.b = ptr; lbfgsbPlace(o, ptr); }
}

/** The optimiser of a problem block. */
@inline export function optimiserOf(ptr: usize): Lbfgs { return changetype<Lbfgs>(changetype<Problem>(ptr).opt); }

// The optimiser's vector arithmetic runs two values per v128: its arrays are 16-byte
// aligned and padded (f64s), zeroed when placed, so loops that step by two may read the
// zero after an odd last value (the pair ring's pads stay zero differences). Sums keep the even and the odd k apart and add the two at the end: an
// order fixed by the code, so every engine gives the same bits.

/** a . b over n values. */
export function dot(a: usize, b: usize, n: i32): f64 {
  let acc = f64x2.splat(0.0);
  let k = 0;
  for (; k + 2 <= n; k += 2) acc = f64x2.add(acc, f64x2.mul(v128.load(at(a, k)), v128.load(at(b, k))));
  let s = f64x2.extract_lane(acc, 0) + f64x2.extract_lane(acc, 1);
  for (; k < n; k++) s += load<f64>(at(a, k)) * load<f64>(at(b, k));
  return s;
}

/** out = y + a x over n values (out may be y). */
export function axpy(out: usize, y: usize, a: f64, x: usize, n: i32): void {
  const va = f64x2.splat(a);
  let k = 0;
  for (; k + 2 <= n; k += 2) v128.store(at(out, k), f64x2.add(v128.load(at(y, k)), f64x2.mul(va, v128.load(at(x, k)))));
  for (; k < n; k++) store<f64>(at(out, k), load<f64>(at(y, k)) + a * load<f64>(at(x, k)));
}

/** x = a x over n values. */
export function scale(x: usize, a: f64, n: i32): void {
  const va = f64x2.splat(a);
  let k = 0;
  for (; k + 2 <= n; k += 2) v128.store(at(x, k), f64x2.mul(va, v128.load(at(x, k))));
  for (; k < n; k++) store<f64>(at(x, k), a * load<f64>(at(x, k)));
}

/** Largest |a_k| over n values. */
export function normInf(a: usize, n: i32): f64 {
  let s: f64 = 0.0;
  for (let k = 0; k < n; k++) s = Math.max(s, Math.abs(load<f64>(at(a, k))));
  return s;
}

/** Pointer to correction vector `slot` of a ring (S or Y). */
@inline export function pairAt(base: usize, o: Lbfgs, slot: i32): usize { return base + <usize>slot * f64s(o.nVar); }

/** Evaluate the trial point x + alpha d into xt, gt; returns phi'(alpha) = gt.d. */
function trial(p: usize, o: Lbfgs, alpha: f64): f64 {
  const n = o.nVar, x = o.x, d = o.d, xt = o.xt;
  axpy(xt, x, alpha, d, n);
  o.ft = objective(p, xt, o.gt);
  o.evaluations++;
  return dot(o.gt, d, n);
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
 * Start the problem's optimiser from the variables at x0. Returns the objective at x0.
 */
export function optInit(p: usize, x0: usize): f64 {
  const o = optimiserOf(p);
  o.stored = 0; o.newest = -1; o.evaluations = 0; o.iterations = 0;
  memory.copy(o.x, x0, <usize>o.nVar << 3);
  o.fx = objective(p, o.x, o.g);
  o.evaluations = 1;
  return o.fx;
}

/** Forget every correction pair (the next step is along the steepest descent). */
export function forgetPairs(o: Lbfgs): void {
  o.stored = 0; o.newest = -1;
}

/** d = -H g by the two-loop recursion. */
function direction(o: Lbfgs): void {
  const n = o.nVar, mem = o.mem, d = o.d, g = o.g;
  for (let k = 0; k < n; k += 2) v128.store(at(d, k), f64x2.neg(v128.load(at(g, k))));
  if (o.stored == 0) return;
  let idx = o.newest;
  for (let c = 0; c < o.stored; c++) {
    const s = pairAt(o.s, o, idx), y = pairAt(o.y, o, idx);
    const a = load<f64>(at(o.rho, idx)) * dot(s, d, n);
    store<f64>(at(o.alpha, idx), a);
    axpy(d, d, -a, y, n);
    idx = idx == 0 ? mem - 1 : idx - 1;
  }
  const sN = pairAt(o.s, o, o.newest), yN = pairAt(o.y, o, o.newest);
  const gamma = dot(sN, yN, n) / dot(yN, yN, n);
  scale(d, gamma, n);
  idx = (o.newest - o.stored + 1 + mem) % mem;
  for (let c = 0; c < o.stored; c++) {
    const s = pairAt(o.s, o, idx), y = pairAt(o.y, o, idx);
    const b = load<f64>(at(o.rho, idx)) * dot(y, d, n);
    const a = load<f64>(at(o.alpha, idx));
    axpy(d, d, a - b, s, n);
    idx = (idx + 1) % mem;
  }
}

/**
 * Strong-Wolfe line search along d, steps at most alphaMax; on success xt, gt, ft hold
 * the accepted point. A step cut at alphaMax is accepted once it decreases enough.
 */
export function lineSearch(p: usize, o: Lbfgs, f0: f64, dphi0: f64, alpha1: f64, alphaMax: f64): bool {
  let aPrev: f64 = 0.0, fPrev = f0, dPrev = dphi0;
  let alpha = Math.min(alpha1, alphaMax);
  for (let i = 0; i < MAX_BRACKET; i++) {
    const dphi = trial(p, o, alpha);
    const f = o.ft;
    if (!isFinite(f)) { alpha = 0.5 * (aPrev + alpha); continue; }
    if (f > f0 + C1 * alpha * dphi0 || (i > 0 && f >= fPrev)) return zoom(p, o, f0, dphi0, aPrev, fPrev, dPrev, alpha, f, dphi);
    if (Math.abs(dphi) <= -C2 * dphi0) return true;
    if (dphi >= 0.0) return zoom(p, o, f0, dphi0, alpha, f, dphi, aPrev, fPrev, dPrev);
    if (alpha >= alphaMax) return true;
    aPrev = alpha; fPrev = f; dPrev = dphi;
    alpha = Math.min(2.0 * alpha, alphaMax);
  }
  return false;
}

function zoom(p: usize, o: Lbfgs, f0: f64, dphi0: f64, lo: f64, flo: f64, dlo: f64, hi: f64, fhi: f64, dhi: f64): bool {
  for (let j = 0; j < MAX_ZOOM; j++) {
    const alpha = cubicStep(lo, flo, dlo, hi, fhi, dhi);
    const dphi = trial(p, o, alpha);
    const f = o.ft;
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
  if (lo > 0.0 && flo < f0) { trial(p, o, lo); return o.ft < f0; }
  return false;
}

/**
 * Keep the pair s = xt - x, y = gt - g when its curvature s'y is positive enough; then
 * move to xt. The test comes first, so a rejected pair leaves the ring as it was.
 */
export function acceptStep(o: Lbfgs): void {
  const n = o.nVar, x = o.x, xt = o.xt, g = o.g, gt = o.gt;
  let vsy = f64x2.splat(0.0), vss = f64x2.splat(0.0), vyy = f64x2.splat(0.0);
  for (let k = 0; k < n; k += 2) {
    const s = f64x2.sub(v128.load(at(xt, k)), v128.load(at(x, k)));
    const y = f64x2.sub(v128.load(at(gt, k)), v128.load(at(g, k)));
    vsy = f64x2.add(vsy, f64x2.mul(s, y)); vss = f64x2.add(vss, f64x2.mul(s, s)); vyy = f64x2.add(vyy, f64x2.mul(y, y));
  }
  const sy = f64x2.extract_lane(vsy, 0) + f64x2.extract_lane(vsy, 1);
  const ss = f64x2.extract_lane(vss, 0) + f64x2.extract_lane(vss, 1);
  const yy = f64x2.extract_lane(vyy, 0) + f64x2.extract_lane(vyy, 1);
  if (sy > 1e-300 && sy > 2.2e-16 * Math.sqrt(ss * yy)) {
    const slot = (o.newest + 1) % o.mem;
    const sP = pairAt(o.s, o, slot), yP = pairAt(o.y, o, slot);
    for (let k = 0; k < n; k += 2) {
      v128.store(at(sP, k), f64x2.sub(v128.load(at(xt, k)), v128.load(at(x, k))));
      v128.store(at(yP, k), f64x2.sub(v128.load(at(gt, k)), v128.load(at(g, k))));
    }
    store<f64>(at(o.rho, slot), 1.0 / sy);
    o.newest = slot;
    if (o.stored < o.mem) o.stored++;
    if (o.box != 0) lbfgsbPairAdded(o, slot);
  }
  memory.copy(x, xt, <usize>n << 3);
  memory.copy(g, gt, <usize>n << 3);
  o.fx = o.ft;
  o.iterations++;
}

/** One iteration. Returns STEP_OK, STEP_GRADIENT_TOLERANCE or STEP_LINE_SEARCH_FAILED. */
export function optStep(p: usize): i32 {
  const o = optimiserOf(p);
  if (o.box != 0) return lbfgsbStep(p, o);
  const n = o.nVar;
  if (normInf(o.g, n) <= o.gradTol) return STEP_GRADIENT_TOLERANCE;
  direction(o);
  let dphi0 = dot(o.g, o.d, n);
  if (!(dphi0 < 0.0)) {
    // Not a descent direction (curvature information went bad): restart from -g.
    forgetPairs(o);
    direction(o);
    dphi0 = dot(o.g, o.d, n);
  }
  const alpha1 = o.stored == 0 ? Math.min(1.0, 0.5 / normInf(o.g, n)) : 1.0;
  if (!lineSearch(p, o, o.fx, dphi0, alpha1, Infinity)) {
    if (o.stored == 0) return STEP_LINE_SEARCH_FAILED;
    // Retry once along steepest descent with the memory cleared.
    forgetPairs(o);
    direction(o);
    dphi0 = dot(o.g, o.d, n);
    if (!lineSearch(p, o, o.fx, dphi0, Math.min(1.0, 0.5 / normInf(o.g, n)), Infinity)) return STEP_LINE_SEARCH_FAILED;
  }
  acceptStep(o);
  return STEP_OK;
}

/**
 * Move the optimiser to the variables at xPtr: evaluate there and accept the point as
 * the next iterate, offering the pair like a step would (re-centring, tests). With
 * `forget` the correction pairs are dropped after the move. Returns the objective there.
 */
export function optMoveTo(p: usize, xPtr: usize, forget: bool): f64 {
  const o = optimiserOf(p);
  memory.copy(o.xt, xPtr, <usize>o.nVar << 3);
  o.ft = objective(p, o.xt, o.gt);
  o.evaluations++;
  acceptStep(o);
  o.iterations--;
  if (forget) forgetPairs(o);
  return o.fx;
}

/** Objective at the current point. */
export function optObjective(p: usize): f64 { return optimiserOf(p).fx; }
/** Infinity norm of the gradient (projected onto the box for the box bound) at the current point. */
export function optGradientNorm(p: usize): f64 {
  const o = optimiserOf(p);
  return o.box != 0 ? projectedGradientNorm(o) : normInf(o.g, o.nVar);
}
/** Pointer to the current variables. */
export function optVariables(p: usize): usize { return optimiserOf(p).x; }
/** Pointer to the gradient at the current variables. */
export function optGradient(p: usize): usize { return optimiserOf(p).g; }
/** Objective evaluations so far. */
export function optEvaluations(p: usize): i32 { return optimiserOf(p).evaluations; }
/** Iterations so far. */
export function optIterations(p: usize): i32 { return optimiserOf(p).iterations; }
/** Correction pairs held (for tests of the memory). */
export function optStoredPairs(p: usize): i32 { return optimiserOf(p).stored; }
