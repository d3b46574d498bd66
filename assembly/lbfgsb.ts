// The box method: projected L-BFGS with the generalised Cauchy point, for variables held
// in [-1, 1] (the samples over rabiMax, control.ts). One call is one iteration; it ends
// where the projected gradient vanishes.
// see: Byrd, Lu, Nocedal, Zhu, "A limited memory algorithm for bound constrained
// optimization", SIAM J. Sci. Comput. 16, 1190 (1995): the compact form B = theta I -
// W M W^T with W = [Y, theta S] and M = [[-D, L'], [L, theta S'S]]^-1 (after Byrd,
// Nocedal, Schnabel, Math. Program. 63, 129 (1994)), the generalised Cauchy point by
// their Algorithm CP, the direct primal method of subspace minimisation with the step
// cut to stay in the box, and a line search along x + alpha (xbar - x) kept feasible.
// The correction pairs, their memory and the line search are lbfgs.ts's; this file keeps
// their Gram matrices up to date, so that W_Z'W_Z costs O(min(free, held) m^2) per
// iteration, not O(n m^2).

import { Lbfgs, at, dot, axpy, pairAt, forgetPairs, lineSearch, acceptStep, STEP_OK, STEP_GRADIENT_TOLERANCE, STEP_LINE_SEARCH_FAILED } from './lbfgs';

const LOWER: f64 = -1.0;
const UPPER: f64 = 1.0;

@inline function f64s(count: i32): usize { return ((<usize>count << 3) + 15) & ~(<usize>15); }
@inline function i32s(count: i32): usize { return ((<usize>count << 2) + 15) & ~(<usize>15); }

/** Bytes the box method adds to an optimiser. */
export function lbfgsbBytes(nVar: i32, mem: i32): usize {
  return 3 * f64s(mem * mem) + 3 * f64s(4 * mem * mem) + 8 * f64s(2 * mem) + 2 * f64s(nVar) + i32s(nVar);
}

// Parts of the box method's region (o.b), in the order of lbfgsbBytes.
@inline function gramSS(o: Lbfgs): usize { return o.b; }
@inline function gramSY(o: Lbfgs): usize { return o.b + f64s(o.mem * o.mem); }
@inline function gramYY(o: Lbfgs): usize { return o.b + 2 * f64s(o.mem * o.mem); }
// middle: K = M^-1 of the stored pairs; scratch: its LU factors; scratch2: the reduced system.
@inline function middle(o: Lbfgs): usize { return o.b + 3 * f64s(o.mem * o.mem); }
@inline function scratch(o: Lbfgs): usize { return middle(o) + f64s(4 * o.mem * o.mem); }
@inline function scratch2(o: Lbfgs): usize { return scratch(o) + f64s(4 * o.mem * o.mem); }
@inline function vec(o: Lbfgs, k: i32): usize { return scratch2(o) + f64s(4 * o.mem * o.mem) + <usize>k * f64s(2 * o.mem); }
@inline function pivots(o: Lbfgs): usize { return vec(o, 6); }
@inline function columns(o: Lbfgs): usize { return vec(o, 7); }
@inline function breaks(o: Lbfgs): usize { return vec(o, 8); }
@inline function cauchy(o: Lbfgs): usize { return breaks(o) + f64s(o.nVar); }
@inline function heap(o: Lbfgs): usize { return cauchy(o) + f64s(o.nVar); }

/** Nothing to lay out beyond o.b (the parts follow from nVar and mem). */
export function lbfgsbPlace(o: Lbfgs, ptr: usize): void { o.b = ptr; }

@inline function el(ptr: usize, stride: i32, i: i32, j: i32): usize { return ptr + (<usize>(i * stride + j) << 3); }

/** y += a x over n values, two per v128 (the bits of lbfgs.ts axpy, inlined for the short rows here). */
@inline function addScaled(y: usize, a: f64, x: usize, n: i32): void {
  const va = f64x2.splat(a);
  let k = 0;
  for (; k + 2 <= n; k += 2) v128.store(at(y, k), f64x2.add(v128.load(at(y, k)), f64x2.mul(va, v128.load(at(x, k)))));
  for (; k < n; k++) store<f64>(at(y, k), load<f64>(at(y, k)) + a * load<f64>(at(x, k)));
}

/** Keep the Gram matrices S'S, S'Y, Y'Y (by ring slot) up to date after a new pair in `slot`. */
export function lbfgsbPairAdded(o: Lbfgs, slot: i32): void {
  const n = o.nVar, mem = o.mem;
  const sN = pairAt(o.s, o, slot), yN = pairAt(o.y, o, slot);
  for (let c = 0; c < o.stored; c++) {
    const j = (o.newest - c + mem) % mem;
    const sJ = pairAt(o.s, o, j), yJ = pairAt(o.y, o, j);
    const ss = dot(sN, sJ, n), yy = dot(yN, yJ, n);
    store<f64>(el(gramSS(o), mem, slot, j), ss); store<f64>(el(gramSS(o), mem, j, slot), ss);
    store<f64>(el(gramYY(o), mem, slot, j), yy); store<f64>(el(gramYY(o), mem, j, slot), yy);
    store<f64>(el(gramSY(o), mem, slot, j), dot(sN, yJ, n));
    store<f64>(el(gramSY(o), mem, j, slot), dot(sJ, yN, n));
  }
}

/** Ring slot of the c-th stored pair, oldest first. */
@inline function slotOf(o: Lbfgs, c: i32): i32 { return (o.newest - o.stored + 1 + c + o.mem) % o.mem; }

/**
 * LU factors (partial pivoting) of the k x k matrix at a (row stride `stride`), in place,
 * pivot rows into piv (as f64); false when it is singular to working precision.
 */
function factor(a: usize, stride: i32, k: i32, piv: usize): bool {
  let scale: f64 = 0.0;
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) scale = Math.max(scale, Math.abs(load<f64>(el(a, stride, i, j))));
  for (let col = 0; col < k; col++) {
    let pr = col;
    let best = Math.abs(load<f64>(el(a, stride, col, col)));
    for (let r = col + 1; r < k; r++) {
      const v = Math.abs(load<f64>(el(a, stride, r, col)));
      if (v > best) { best = v; pr = r; }
    }
    store<f64>(at(piv, col), <f64>pr);
    if (!(best > 1e-14 * scale)) return false;
    if (pr != col) {
      for (let j = 0; j < k; j++) {
        const t = load<f64>(el(a, stride, col, j));
        store<f64>(el(a, stride, col, j), load<f64>(el(a, stride, pr, j)));
        store<f64>(el(a, stride, pr, j), t);
      }
    }
    const d = load<f64>(el(a, stride, col, col));
    for (let r = col + 1; r < k; r++) {
      const f = load<f64>(el(a, stride, r, col)) / d;
      store<f64>(el(a, stride, r, col), f);
      if (f == 0.0) continue;
      // row r -= f row col, as y + (-f) x: the same bits as y - f x, two values per v128.
      addScaled(el(a, stride, r, col + 1), -f, el(a, stride, col, col + 1), k - col - 1);
    }
  }
  return true;
}

/** Solve with the factors of `factor`: b (k values) is overwritten by the solution. */
function solveFactored(a: usize, stride: i32, k: i32, piv: usize, b: usize): void {
  for (let col = 0; col < k; col++) {
    const pr = <i32>load<f64>(at(piv, col));
    if (pr != col) {
      const t = load<f64>(at(b, col));
      store<f64>(at(b, col), load<f64>(at(b, pr)));
      store<f64>(at(b, pr), t);
    }
  }
  // Each row's sum is a dot product of contiguous values (lbfgs.ts dot: two per v128, the
  // even and odd terms summed apart, an order fixed by the code).
  for (let i = 1; i < k; i++) store<f64>(at(b, i), load<f64>(at(b, i)) - dot(el(a, stride, i, 0), b, i));
  for (let i = k - 1; i >= 0; i--) {
    const v = load<f64>(at(b, i)) - dot(el(a, stride, i, i + 1), at(b, i + 1), k - 1 - i);
    store<f64>(at(b, i), v / load<f64>(el(a, stride, i, i)));
  }
}

/**
 * K = M^-1 = [[-D, L'], [L, theta S'S]] of the stored pairs (2k x 2k, stride 2 mem,
 * oldest pair first) into middle(o), its LU factors into scratch(o), and the pointers of
 * W's columns (y then s, oldest first) into columns(o); false when K is singular.
 */
function formMiddle(o: Lbfgs, theta: f64): bool {
  const k = o.stored, mem = o.mem, st = 2 * mem;
  const kk = middle(o), lu = scratch(o), cols = columns(o);
  for (let a = 0; a < k; a++) {
    const sa = slotOf(o, a);
    store<usize>(cols + (<usize>a << 2), pairAt(o.y, o, sa));
    store<usize>(cols + (<usize>(k + a) << 2), pairAt(o.s, o, sa));
    for (let b = 0; b < k; b++) {
      const sb = slotOf(o, b);
      const sy = load<f64>(el(gramSY(o), mem, sa, sb)); // s_a . y_b
      const ys = load<f64>(el(gramSY(o), mem, sb, sa)); // s_b . y_a
      store<f64>(el(kk, st, a, b), a == b ? -sy : 0.0);
      store<f64>(el(kk, st, a, k + b), b > a ? ys : 0.0);            // L' = (s_b . y_a) for b > a
      store<f64>(el(kk, st, k + a, b), a > b ? sy : 0.0);            // L = (s_a . y_b) for a > b
      store<f64>(el(kk, st, k + a, k + b), theta * load<f64>(el(gramSS(o), mem, sa, sb)));
    }
  }
  for (let a = 0; a < 2 * k; a++) memory.copy(el(lu, st, a, 0), el(kk, st, a, 0), <usize>(2 * k) << 3);
  return factor(lu, st, 2 * k, pivots(o));
}

/** out = M v (2k values): a solve with K's factors. */
function middleTimes(o: Lbfgs, v: usize, out: usize): void {
  const k2 = 2 * o.stored;
  if (out != v) memory.copy(out, v, <usize>k2 << 3);
  solveFactored(scratch(o), 2 * o.mem, k2, pivots(o), out);
}

/** out = W a (n values) for a of 2k values: the columns y_c and theta s_c, summed in order. */
function columnsTimes(o: Lbfgs, theta: f64, a: usize, out: usize): void {
  const k = o.stored, n = o.nVar, cols = columns(o);
  memory.fill(out, 0, <usize>n << 3);
  for (let c = 0; c < k; c++) axpy(out, out, load<f64>(at(a, c)), load<usize>(cols + (<usize>c << 2)), n);
  for (let c = 0; c < k; c++) axpy(out, out, theta * load<f64>(at(a, k + c)), load<usize>(cols + (<usize>(k + c) << 2)), n);
}

/** Row i of W = [Y, theta S] into out (2k), from the column pointers of formMiddle. */
@inline function wRow(o: Lbfgs, i: i32, theta: f64, out: usize): void {
  const k = o.stored, cols = columns(o);
  const off = <usize>i << 3;
  for (let c = 0; c < k; c++) {
    store<f64>(at(out, c), load<f64>(load<usize>(cols + (<usize>c << 2)) + off));
    store<f64>(at(out, k + c), theta * load<f64>(load<usize>(cols + (<usize>(k + c) << 2)) + off));
  }
}

// A binary min-heap of variable indices keyed by their breakpoints.
function siftDown(h: usize, t: usize, size: i32, start: i32): void {
  let i = start;
  for (;;) {
    const l = 2 * i + 1;
    if (l >= size) return;
    let c = l;
    const r = l + 1;
    if (r < size && load<f64>(at(t, load<i32>(h + (<usize>r << 2)))) < load<f64>(at(t, load<i32>(h + (<usize>l << 2))))) c = r;
    const hi = load<i32>(h + (<usize>i << 2)), hc = load<i32>(h + (<usize>c << 2));
    if (load<f64>(at(t, hc)) >= load<f64>(at(t, hi))) return;
    store<i32>(h + (<usize>i << 2), hc);
    store<i32>(h + (<usize>c << 2), hi);
    i = c;
  }
}

/** Infinity norm of the projected gradient, P(x - g) - x, on the box [-1, 1]. */
export function projectedGradientNorm(o: Lbfgs): f64 {
  const n = o.nVar;
  const up = f64x2.splat(UPPER), low = f64x2.splat(LOWER), zero = f64x2.splat(0.0);
  let acc = zero;
  let i = 0;
  for (; i + 2 <= n; i += 2) {
    const x = v128.load(at(o.x, i)), g = v128.load(at(o.g, i));
    const pg = v128.bitselect(f64x2.max(f64x2.sub(x, up), g), f64x2.min(f64x2.sub(x, low), g), f64x2.lt(g, zero));
    acc = f64x2.max(acc, f64x2.abs(pg));
  }
  let s = Math.max(f64x2.extract_lane(acc, 0), f64x2.extract_lane(acc, 1));
  for (; i < n; i++) {
    const x = load<f64>(at(o.x, i)), g = load<f64>(at(o.g, i));
    const pg = g < 0.0 ? Math.max(x - UPPER, g) : Math.min(x - LOWER, g);
    s = Math.max(s, Math.abs(pg));
  }
  return s;
}

/**
 * The generalised Cauchy point x^c (into cauchy(o)) of the quadratic model along the
 * projected steepest-descent path, and c = W'(x^c - x) (into vec 1). Algorithm CP.
 */
function cauchyPoint(o: Lbfgs, theta: f64): void {
  const n = o.nVar, k2 = 2 * o.stored;
  const x = o.x, g = o.g, d = o.d, t = breaks(o), xc = cauchy(o), h = heap(o);
  const p = vec(o, 0), c = vec(o, 1), wb = vec(o, 2), mv = vec(o, 3);
  let size = 0;
  let fp: f64 = 0.0;
  for (let i = 0; i < n; i++) {
    const xi = load<f64>(at(x, i)), gi = load<f64>(at(g, i));
    let ti: f64 = Infinity;
    if (gi < 0.0) ti = (xi - UPPER) / gi;
    else if (gi > 0.0) ti = (xi - LOWER) / gi;
    store<f64>(at(t, i), ti);
    const di = ti > 0.0 ? -gi : 0.0;
    store<f64>(at(d, i), di);
    store<f64>(at(xc, i), xi);
    fp -= di * di;
    if (ti > 0.0 && ti < Infinity) { store<i32>(h + (<usize>size << 2), i); size++; }
  }
  // p = W'd
  for (let a = 0; a < k2; a++) store<f64>(at(p, a), 0.0);
  for (let cc = 0; cc < o.stored; cc++) {
    const slot = slotOf(o, cc);
    store<f64>(at(p, cc), dot(pairAt(o.y, o, slot), d, n));
    store<f64>(at(p, o.stored + cc), theta * dot(pairAt(o.s, o, slot), d, n));
  }
  for (let a = 0; a < k2; a++) store<f64>(at(c, a), 0.0);
  middleTimes(o, p, mv);
  let fpp = -theta * fp - dot(p, mv, k2);
  const fpp0 = fpp;
  let dtMin = fpp > 0.0 ? -fp / fpp : Infinity;
  for (let i = (size >> 1) - 1; i >= 0; i--) siftDown(h, t, size, i);
  let tOld: f64 = 0.0;
  while (size > 0) {
    const b = load<i32>(h);
    const tb = load<f64>(at(t, b));
    const dtSeg = tb - tOld;
    if (dtMin < dtSeg) break;
    size--;
    store<i32>(h, load<i32>(h + (<usize>size << 2)));
    siftDown(h, t, size, 0);
    const db = load<f64>(at(d, b)), gb = load<f64>(at(g, b));
    const xcb = db > 0.0 ? UPPER : LOWER;
    const zb = xcb - load<f64>(at(x, b));
    store<f64>(at(xc, b), xcb);
    addScaled(c, dtSeg, p, k2);
    wRow(o, b, theta, wb);
    middleTimes(o, wb, mv);
    const wmc = dot(c, mv, k2), wmp = dot(p, mv, k2), wmw = dot(wb, mv, k2);
    fp = fp + dtSeg * fpp + gb * gb + theta * gb * zb - gb * wmc;
    fpp = fpp - theta * gb * gb - 2.0 * gb * wmp - gb * gb * wmw;
    fpp = Math.max(fpp, 2.2e-16 * fpp0);
    addScaled(p, gb, wb, k2);
    store<f64>(at(d, b), 0.0);
    dtMin = -fp / fpp;
    tOld = tb;
  }
  dtMin = Math.max(dtMin, 0.0);
  if (!isFinite(dtMin)) dtMin = 0.0;
  tOld += dtMin;
  for (let i = 0; i < n; i++) {
    const di = load<f64>(at(d, i));
    if (di != 0.0) store<f64>(at(xc, i), Math.max(LOWER, Math.min(UPPER, load<f64>(at(x, i)) + tOld * di)));
  }
  addScaled(c, dtMin, p, k2);
}

/**
 * Direct primal subspace minimisation from the Cauchy point over its free variables;
 * writes the search direction xbar - x to o.d. False when the reduced system is singular.
 */
function subspaceStep(o: Lbfgs, theta: f64): bool {
  const n = o.nVar, k = o.stored, k2 = 2 * k, mem = o.mem, st = 2 * mem;
  const x = o.x, g = o.g, xc = cauchy(o), r = o.d;
  const c = vec(o, 1), mc = vec(o, 3), v = vec(o, 4), nm = scratch2(o);
  // W times a vector of 2k (u, n values) is a sum of W's columns, and W' times one of n a
  // dot product per column: both run along the pairs' contiguous values, two per v128.
  const u = breaks(o); // the breakpoints are spent once the Cauchy point is found
  if (k > 0) {
    middleTimes(o, c, mc);
    columnsTimes(o, theta, mc, u);
  }
  // r = Z'(g + theta (xc - x) - W M c) on free variables (0 on the others); v = W_Z' r.
  for (let i = 0; i < n; i++) {
    const xci = load<f64>(at(xc, i));
    if (xci <= LOWER || xci >= UPPER) { store<f64>(at(r, i), 0.0); continue; }
    let ri = load<f64>(at(g, i)) + theta * (xci - load<f64>(at(x, i)));
    if (k > 0) ri -= load<f64>(at(u, i));
    store<f64>(at(r, i), ri);
  }
  if (k > 0) {
    for (let a = 0; a < k; a++) {
      store<f64>(at(v, a), dot(load<usize>(columns(o) + (<usize>a << 2)), r, n));
      store<f64>(at(v, k + a), theta * dot(load<usize>(columns(o) + (<usize>(k + a) << 2)), r, n));
    }
    // The paper's v = N^-1 M W_Z'r with N = I - (1/theta) M W_Z'W_Z is, multiplied
    // through by K = M^-1, the solution of (K - (1/theta) W_Z'W_Z) v = W_Z'r; W_Z'W_Z is
    // W'W from the Gram matrices less the rows of the variables held at a bound, or the
    // sum over the free rows, whichever has fewer rows.
    const wz = vec(o, 5), kk = middle(o);
    let held = 0;
    for (let i = 0; i < n; i++) {
      const xci = load<f64>(at(xc, i));
      if (xci <= LOWER || xci >= UPPER) held++;
    }
    // From the free rows directly when they are fewer than the held ones.
    const fromFree = held > n - held;
    for (let a = 0; a < k; a++) {
      const sa = slotOf(o, a);
      for (let b = 0; b < k; b++) {
        const sb = slotOf(o, b);
        const gram = !fromFree;
        store<f64>(el(nm, st, a, b), gram ? load<f64>(el(gramYY(o), mem, sa, sb)) : 0.0);
        store<f64>(el(nm, st, a, k + b), gram ? theta * load<f64>(el(gramSY(o), mem, sb, sa)) : 0.0);
        store<f64>(el(nm, st, k + a, b), gram ? theta * load<f64>(el(gramSY(o), mem, sa, sb)) : 0.0);
        store<f64>(el(nm, st, k + a, k + b), gram ? theta * theta * load<f64>(el(gramSS(o), mem, sa, sb)) : 0.0);
      }
    }
    const sign: f64 = fromFree ? 1.0 : -1.0;
    for (let i = 0; i < n; i++) {
      const xci = load<f64>(at(xc, i));
      const free = xci > LOWER && xci < UPPER;
      if (free != fromFree) continue;
      wRow(o, i, theta, wz);
      for (let a = 0; a < k2; a++) {
        addScaled(el(nm, st, a, 0), sign * load<f64>(at(wz, a)), wz, k2);
      }
    }
    const vt = f64x2.splat(theta);
    for (let a = 0; a < k2; a++) {
      // k2 is even: whole v128s.
      for (let b = 0; b < k2; b += 2) {
        const e = el(nm, st, a, b);
        v128.store(e, f64x2.sub(v128.load(el(kk, st, a, b)), f64x2.div(v128.load(e), vt)));
      }
    }
    // (M c is no longer needed: its vector holds the pivots.)
    if (!factor(nm, st, k2, vec(o, 3))) return false;
    solveFactored(nm, st, k2, vec(o, 3), v);
  }
  // du = -(1/theta) r - (1/theta^2) Z'W v on free variables; cut to stay in the box.
  if (k > 0) columnsTimes(o, theta, v, u);
  let alphaStar: f64 = 1.0;
  for (let i = 0; i < n; i++) {
    const xci = load<f64>(at(xc, i));
    if (xci <= LOWER || xci >= UPPER) continue;
    let du = -load<f64>(at(r, i)) / theta;
    if (k > 0) du -= load<f64>(at(u, i)) / (theta * theta);
    store<f64>(at(r, i), du);
    if (du > 0.0) alphaStar = Math.min(alphaStar, (UPPER - xci) / du);
    else if (du < 0.0) alphaStar = Math.min(alphaStar, (LOWER - xci) / du);
  }
  alphaStar = Math.max(alphaStar, 0.0);
  for (let i = 0; i < n; i++) {
    const xci = load<f64>(at(xc, i));
    let xbar = xci;
    if (xci > LOWER && xci < UPPER) xbar = Math.max(LOWER, Math.min(UPPER, xci + alphaStar * load<f64>(at(r, i))));
    store<f64>(at(r, i), xbar - load<f64>(at(x, i)));
  }
  return true;
}

/** The search direction of one iteration (o.d), or false if the memory must be dropped. */
function searchDirection(o: Lbfgs): bool {
  let theta: f64 = 1.0;
  if (o.stored > 0) {
    const yy = load<f64>(el(gramYY(o), o.mem, o.newest, o.newest));
    const sy = load<f64>(el(gramSY(o), o.mem, o.newest, o.newest));
    theta = yy / sy;
    if (!formMiddle(o, theta)) return false;
  }
  cauchyPoint(o, theta);
  return subspaceStep(o, theta);
}

/** One iteration of the box method. Returns STEP_OK, STEP_GRADIENT_TOLERANCE or STEP_LINE_SEARCH_FAILED. */
export function lbfgsbStep(p: usize, o: Lbfgs): i32 {
  const n = o.nVar;
  if (projectedGradientNorm(o) <= o.gradTol) return STEP_GRADIENT_TOLERANCE;
  for (let attempt = 0; attempt < 2; attempt++) {
    if (!searchDirection(o)) { forgetPairs(o); if (!searchDirection(o)) return STEP_LINE_SEARCH_FAILED; }
    let dphi0 = dot(o.g, o.d, n);
    if (!(dphi0 < 0.0)) {
      // Not a descent direction (curvature information went bad): start again from the Cauchy step alone.
      if (o.stored == 0) return STEP_GRADIENT_TOLERANCE;
      forgetPairs(o);
      continue;
    }
    // Largest step that stays in the box (at least 1: xbar is inside).
    let alphaMax: f64 = Infinity;
    let dNorm2: f64 = 0.0;
    for (let i = 0; i < n; i++) {
      const di = load<f64>(at(o.d, i)), xi = load<f64>(at(o.x, i));
      dNorm2 += di * di;
      if (di > 0.0) alphaMax = Math.min(alphaMax, (UPPER - xi) / di);
      else if (di < 0.0) alphaMax = Math.min(alphaMax, (LOWER - xi) / di);
    }
    alphaMax = Math.max(alphaMax, 1.0);
    const alpha1 = o.stored == 0 ? Math.min(1.0, 1.0 / Math.sqrt(dNorm2)) : 1.0;
    if (lineSearch(p, o, o.fx, dphi0, alpha1, alphaMax)) {
      clampTrial(o);
      acceptStep(o);
      return STEP_OK;
    }
    if (o.stored == 0) return STEP_LINE_SEARCH_FAILED;
    forgetPairs(o);
  }
  return STEP_LINE_SEARCH_FAILED;
}

/** Rounding in x + alpha d may leave the box by an ulp: hold the accepted point inside. */
function clampTrial(o: Lbfgs): void {
  const n = o.nVar;
  const up = f64x2.splat(UPPER), low = f64x2.splat(LOWER);
  let i = 0;
  for (; i + 2 <= n; i += 2) v128.store(at(o.xt, i), f64x2.max(low, f64x2.min(up, v128.load(at(o.xt, i)))));
  for (; i < n; i++) {
    const v = load<f64>(at(o.xt, i));
    store<f64>(at(o.xt, i), Math.max(LOWER, Math.min(UPPER, v)));
  }
}
