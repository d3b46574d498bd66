// The qubit's gradient for one member, with blocks of segments side by side in the lanes
// of the v128s (the sweeps: blocksForward, blocksBackward in qubit-sweeps.template.ts).
// Members padded in pairs would leave half of every vector to a zero-weight copy; here
// each of four lanes (two copies of the sweep) runs a block of h consecutive segments
// (block b: segments b h .. (b+1) h - 1).
//
// With P_b the product of block b (P_0 starting from H), the member's product is
// A = P_{B-1} .. P_0 and W = G A (figure and factors as in qubit.ts). The backward vector
// at block b's last segment is M = R_b^dag (A G) R_b = L_b G R_b with L_b = P_b .. P_0 and
// R_b = P_{B-1} .. P_{b+1} (for states M' = L_b K G R_b), as the one-lane sweep has it
// there; from it each lane rotates m back through its own block, so every segment sees
// the same M_k as in the one-lane sweep and the gradient is exact (the two differ by
// rounding only).

import { vadd, vsplat } from './su2';
import { MODE_GATE, blocksForward, blocksBackward, blocksFigureForward } from './generated/qubit-sweeps';

/** Lanes given to one member: four blocks of segments, two per v128 over two copies. */
const BLOCKS: i32 = 4;

/**
 * Bytes of work the block sweeps need for n segments: with h = ceil(n/4) slots, two
 * sample regions of 80 h, cos a, S, T of two copies (96 h), two ends of 160 and the
 * combining scratch (320): at most 64 n + 832.
 */
export function blocksWorkBytes(n: i32): usize { return <usize>((n + BLOCKS - 1) / BLOCKS) * 256 + 640; }

/**
 * Members that need their own sweep: m less the trailing zero-weight copies of member 0
 * (the padding of encodeMembers), whose infidelity is member 0's and whose gradient is 0.
 */
export function distinctMembers(scalePtr: usize, detPtr: usize, wPtr: usize, m: i32): i32 {
  const s0 = load<f64>(scalePtr), d0 = load<f64>(detPtr);
  let r = m;
  while (r > 1) {
    const o = <usize>(r - 1) << 3;
    if (load<f64>(wPtr + o) != 0.0 || load<f64>(scalePtr + o) != s0 || load<f64>(detPtr + o) != d0) break;
    r--;
  }
  return r;
}

/** out = a b for elements (ur, ui, vr, vi) at a, b (4 f64 each); out may alias a or b. */
function qmul(out: usize, a: usize, b: usize): void {
  const ar = load<f64>(a), ai = load<f64>(a, 8), avr = load<f64>(a, 16), avi = load<f64>(a, 24);
  const br = load<f64>(b), bi = load<f64>(b, 8), bvr = load<f64>(b, 16), bvi = load<f64>(b, 24);
  store<f64>(out, (ar * br - ai * bi) - (avr * bvr + avi * bvi));
  store<f64>(out, (ar * bi + ai * br) - (avr * bvi - avi * bvr), 8);
  store<f64>(out, (avr * br - avi * bi) + (ar * bvr + ai * bvi), 16);
  store<f64>(out, (avr * bi + avi * br) + (ar * bvi - ai * bvr), 24);
}

/** Component k of block b's lane in the ends records (copy b >> 1, lane b & 1). */
@inline function endAt(ends: usize, b: i32, offset: usize): usize {
  return ends + <usize>(b >> 1) * 160 + offset + (<usize>(b & 1) << 3);
}

/** Write the starting products: H for block 0, the identity for the others. */
function startEnds(ends: usize, blocks: i32, targetPtr: usize): void {
  for (let b = 0; b < blocks; b++) {
    for (let k = 0; k < 4; k++) {
      const v = b == 0 ? load<f64>(targetPtr + 32 + (<usize>k << 3)) : (k == 0 ? 1.0 : 0.0);
      store<f64>(endAt(ends, b, <usize>k << 4), v);
    }
  }
}

/**
 * The infidelity of one member from its block products (blocks of them in the ends
 * records): L_b = P_b .. P_0 into scratch (32 bytes each), W = G A (A = L_{B-1}) into the
 * element after the blocks' right products (blockEnds' layout of scratch).
 */
function blocksProductFigure(ends: usize, blocks: i32, targetPtr: usize, mode: i32, scratch: usize): f64 {
  const left = scratch;
  const x = scratch + (<usize>blocks << 6);
  for (let b = 0; b < blocks; b++) {
    const lb = left + (<usize>b << 5);
    for (let k = 0; k < 4; k++) store<f64>(x + (<usize>k << 3), load<f64>(endAt(ends, b, <usize>k << 4)));
    if (b == 0) memory.copy(lb, x, 32);
    else qmul(lb, x, lb - 32);
  }
  qmul(x, targetPtr, left + (<usize>(blocks - 1) << 5));
  const wui = load<f64>(x, 8), wvr = load<f64>(x, 16), wvi = load<f64>(x, 24);
  let fig = wvr * wvr + wvi * wvi;
  if (mode == MODE_GATE) fig = wui * wui + fig;
  return fig;
}

/**
 * From the block products of one member (blocks of them in the ends records), its
 * infidelity (returned) and the backward vectors m, m' at each block's last segment
 * (written to the records), pre-scaled by the gradient's factors as in the one-lane sweep
 * (qubit-sweeps.template.ts). scratch holds 2 blocks + 2 elements (32 bytes each).
 */
function blockEnds(ends: usize, blocks: i32, c: f64, scale: f64, w: f64, targetPtr: usize, mode: i32, scratch: usize): f64 {
  const left = scratch, right = scratch + (<usize>blocks << 5);
  const x = right + (<usize>blocks << 5), y = x + 32;
  const fig = blocksProductFigure(ends, blocks, targetPtr, mode, scratch);
  const wur = load<f64>(x), wui = load<f64>(x, 8);
  // R_b = P_{B-1} .. P_{b+1} into right[b].
  for (let b = blocks - 1; b >= 0; b--) {
    const rb = right + (<usize>b << 5);
    if (b == blocks - 1) {
      store<f64>(rb, 1.0); store<f64>(rb, 0.0, 8); store<f64>(rb, 0.0, 16); store<f64>(rb, 0.0, 24);
    } else {
      for (let k = 0; k < 4; k++) store<f64>(x + (<usize>k << 3), load<f64>(endAt(ends, b + 1, <usize>k << 4)));
      qmul(rb, rb + 32, x);
    }
  }
  const wcs2 = (w + w) * (scale * c);
  const fa = wcs2 * wur, fb = wcs2 * wui;
  for (let b = 0; b < blocks; b++) {
    const lb = left + (<usize>b << 5), rb = right + (<usize>b << 5);
    // G R_b into rb, then L_b G R_b; vector part of (ur, ui, vr, vi) = m0 - i m.sigma is m = (-vi, vr, -ui).
    qmul(rb, targetPtr, rb);
    qmul(y, lb, rb);
    store<f64>(endAt(ends, b, 64), fa * -load<f64>(y, 24));
    store<f64>(endAt(ends, b, 80), fa * load<f64>(y, 16));
    store<f64>(endAt(ends, b, 96), fa * -load<f64>(y, 8));
    if (mode != MODE_GATE) {
      // L_b K with K = -i sz: X K = (ui, -ur, vi, -vr).
      store<f64>(x, load<f64>(lb, 8)); store<f64>(x, -load<f64>(lb), 8);
      store<f64>(x, load<f64>(lb, 24), 16); store<f64>(x, -load<f64>(lb, 16), 24);
      qmul(y, x, rb);
      store<f64>(endAt(ends, b, 112), fb * -load<f64>(y, 24));
      store<f64>(endAt(ends, b, 128), fb * load<f64>(y, 16));
      store<f64>(endAt(ends, b, 144), fb * -load<f64>(y, 8));
    }
  }
  return fig;
}

/**
 * Lay out the samples of one region: slot t holds segments first + t and first + h + t
 * (0 and not live past n). The backward sweep writes the region's gradient.
 */
function fillRegion(region: usize, iPtr: usize, qPtr: usize, n: i32, h: i32, first: i32): void {
  const ones = i64x2.splat(-1);
  // Slots whose two segments are both below n (all but the last block's tail) go without tests.
  const full = max(0, min(h, n - first - h));
  for (let t = 0; t < full; t++) {
    const sp = region + <usize>t * 48;
    const o0 = <usize>(first + t) << 3, o1 = <usize>(first + h + t) << 3;
    v128.store(sp, f64x2.replace_lane(vsplat(load<f64>(iPtr + o0)), 1, load<f64>(iPtr + o1)));
    v128.store(sp, f64x2.replace_lane(vsplat(load<f64>(qPtr + o0)), 1, load<f64>(qPtr + o1)), 16);
    v128.store(sp, ones, 32);
  }
  for (let t = full; t < h; t++) {
    const sp = region + <usize>t * 48;
    const k0 = first + t, k1 = first + h + t;
    const i0 = k0 < n ? load<f64>(iPtr + (<usize>k0 << 3)) : 0.0, q0 = k0 < n ? load<f64>(qPtr + (<usize>k0 << 3)) : 0.0;
    const i1 = k1 < n ? load<f64>(iPtr + (<usize>k1 << 3)) : 0.0, q1 = k1 < n ? load<f64>(qPtr + (<usize>k1 << 3)) : 0.0;
    v128.store(sp, f64x2.replace_lane(vsplat(i0), 1, i1));
    v128.store(sp, f64x2.replace_lane(vsplat(q0), 1, q1), 16);
    v128.store(sp, i64x2.replace_lane(i64x2.replace_lane(ones, 0, k0 < n ? -1 : 0), 1, k1 < n ? -1 : 0), 32);
  }
}

/** Copy a region's gradient to gradI, gradQ (segments first + t and first + h + t below n). */
function drainRegion(region: usize, gradIPtr: usize, gradQPtr: usize, n: i32, h: i32, first: i32): void {
  const full = max(0, min(h, n - first - h));
  const zero = vsplat(0.0);
  for (let t = 0; t < h; t++) {
    const gp = region + <usize>h * 48 + <usize>t * 32;
    // + 0, as when the sweep added to a cleared sum: a -0 reads +0, so the bits stay those.
    const gI = vadd(v128.load(gp), zero), gQ = vadd(v128.load(gp, 16), zero);
    const k0 = first + t, k1 = first + h + t;
    if (t < full) {
      const o0 = <usize>k0 << 3, o1 = <usize>k1 << 3;
      store<f64>(gradIPtr + o0, f64x2.extract_lane(gI, 0));
      store<f64>(gradQPtr + o0, f64x2.extract_lane(gQ, 0));
      store<f64>(gradIPtr + o1, f64x2.extract_lane(gI, 1));
      store<f64>(gradQPtr + o1, f64x2.extract_lane(gQ, 1));
      continue;
    }
    if (k0 < n) {
      store<f64>(gradIPtr + (<usize>k0 << 3), f64x2.extract_lane(gI, 0));
      store<f64>(gradQPtr + (<usize>k0 << 3), f64x2.extract_lane(gQ, 0));
    }
    if (k1 < n) {
      store<f64>(gradIPtr + (<usize>k1 << 3), f64x2.extract_lane(gI, 1));
      store<f64>(gradQPtr + (<usize>k1 << 3), f64x2.extract_lane(gQ, 1));
    }
  }
}

/**
 * ensembleGradient (qubit.ts) for member 0 by blocks of segments in the lanes; the
 * members 1 .. m-1 must be zero-weight copies of member 0 (distinctMembers == 1).
 * gradI, gradQ are overwritten; work holds blocksWorkBytes(n).
 */
export function blocksGradient(
  iPtr: usize, qPtr: usize, n: i32, c: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize,
  gradIPtr: usize, gradQPtr: usize, work: usize, series: i32,
): f64 {
  const h = (n + BLOCKS - 1) / BLOCKS;
  const region = <usize>h * 80;
  const cst = work + 2 * region;
  const ends = cst + <usize>h * 96;
  fillRegion(work, iPtr, qPtr, n, h, 0);
  fillRegion(work + region, iPtr, qPtr, n, h, 2 * h);
  startEnds(ends, BLOCKS, targetPtr);
  blocksForward(work, region, h, c, 0, scalePtr, detPtr, cst, ends, series);
  const w = load<f64>(wPtr);
  const fig = blockEnds(ends, BLOCKS, c, load<f64>(scalePtr), w, targetPtr, mode, ends + 320);
  for (let j = 0; j < m; j++) store<f64>(outPtr + (<usize>j << 3), fig);
  blocksBackward(work, region, h, c, 0, scalePtr, detPtr, mode, cst, ends);
  drainRegion(work, gradIPtr, gradQPtr, n, h, 0);
  drainRegion(work + region, gradIPtr, gradQPtr, n, h, 2 * h);
  return fig * w;
}

/**
 * ensembleFigure (qubit.ts) for member 0 by blocks of segments in the lanes (the members
 * 1 .. m-1 zero-weight copies of member 0, distinctMembers == 1): its infidelity to every
 * out[j], the weighted figure returned. work holds blocksWorkBytes(n).
 */
export function blocksFigure(
  iPtr: usize, qPtr: usize, n: i32, c: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize, work: usize, series: i32,
): f64 {
  const h = (n + BLOCKS - 1) / BLOCKS;
  const region = <usize>h * 80;
  const ends = work + 2 * region + <usize>h * 96;
  fillRegion(work, iPtr, qPtr, n, h, 0);
  fillRegion(work + region, iPtr, qPtr, n, h, 2 * h);
  startEnds(ends, BLOCKS, targetPtr);
  blocksFigureForward(work, region, h, c, 0, scalePtr, detPtr, ends, series);
  const fig = blocksProductFigure(ends, BLOCKS, targetPtr, mode, ends + 320);
  for (let j = 0; j < m; j++) store<f64>(outPtr + (<usize>j << 3), fig);
  return fig * load<f64>(wPtr);
}
