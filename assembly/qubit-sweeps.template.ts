// The two-level (qubit) sweeps: the ensemble figure (forward sweep) and its exact
// gradient (forward and backward sweeps), over groups of members. This is a template
// (see bin/unroll.js): every line holding `$` is repeated once per pair of members, so
// that `gradientQuad` runs two pairs (four members) side by side for the CPU to overlap
// and `gradientPair` runs a last pair alone, from one written body. Conventions,
// layout and the derivation of the backward sweep: qubit.ts.

import {
  vadd, vsub, vmul, vneg, vsplat, vmad, vsum,
  seriesCos, seriesSinc, seriesT,
  qmulUr, qmulUi, qmulVr, qmulVi,
} from '../su2';

/** Figure of a gate target (phase-insensitive). */
export const MODE_GATE: i32 = 0;
/** Figure of a state transfer. */
export const MODE_STATE: i32 = 1;

@inline function ld(ptr: usize, j: i32): v128 { return v128.load(ptr + (<usize>j << 3)); }

// Snippets (bin/unroll.js): text shared by the sweeps below, inserted where a line says
// `//#insert name` and then expanded with the sweep that holds it.

// cos a, S and T of the segment from full = a^2 (halved and recovered above 1).
//#snippet segmentSeries
    let x$ = full$;
    if (halv > 0) x$ = vmul(x$, reduce);
    let co$ = seriesCos(x$, terms);
    let si$ = seriesSinc(x$, terms);
    let tt$: v128;
    if (halv == 0) {
      tt$ = seriesT(x$, terms);
    } else {
      for (let step = 0; step < halv; step++) {
        const nc$ = vsub(one, vmul(vmul(two, x$), vmul(si$, si$)));
        si$ = vmul(si$, co$); co$ = nc$; x$ = vmul(x$, four);
      }
      // T = (cos a - S)/a^2; its rounding error is at most eps/a^2 and it only
      // enters multiplied by components of b (of size a^2). a = 0 gives -1/3.
      const pos$ = f64x2.gt(full$, zero);
      tt$ = v128.bitselect(f64x2.div(vsub(co$, si$), v128.bitselect(full$, one, pos$)), third, pos$);
    }
//#end

// The factors of one segment that the backward sweep needs, from cos a, S, T (co, si, tt):
// S^2, cos a S, kappa = cos a T + S^2 and cos 2a (ss, csn, kap, c2a).
//#snippet backwardFactors
      const ss$ = vmul(si$, si$);
      const csn$ = vmul(co$, si$);
      const kap$ = vmad(co$, tt$, ss$);
      const c2a$ = vsub(vmul(vadd(co$, co$), co$), one);
//#end

// One segment of the backward sweep for a gate: its gradient (gI, gQ) from m
// (backwardGateGradient), then m rotated by U_k^-1 (backwardGateRotate; qubit.ts), from the
// segment's factors (backwardFactors) and b (bx, by, bz).
//#snippet backwardGateGradient
      const ex$ = vsub(vmul(my$, bz$), vmul(mz$, by$));
      const ey$ = vsub(vmul(mz$, bx$), vmul(mx$, bz$));
      const ez$ = vsub(vmul(mx$, by$), vmul(my$, bx$));
      const bm$ = vmad(bx$, mx$, vmad(by$, my$, vmul(bz$, mz$)));
      const kbm$ = vmul(kap$, bm$);
      const gI$ = vmad(bx$, kbm$, vmad(csn$, mx$, vmul(ss$, ex$)));
      const gQ$ = vmad(by$, kbm$, vmad(csn$, my$, vmul(ss$, ey$)));
//#end

// The rest of a gate's backward step: m rotated by U_k^-1 (after backwardGateGradient).
// 2 S^2 (b.m) as (S^2 + S^2) b.m, the same bits as S^2 (b.m + b.m), one add shorter on
// the chain from m to the next m.
//#snippet backwardGateRotate
      const csn2$ = vadd(csn$, csn$);
      const sbm2$ = vmul(vadd(ss$, ss$), bm$);
      mx$ = vmad(c2a$, mx$, vmad(csn2$, ex$, vmul(sbm2$, bx$)));
      my$ = vmad(c2a$, my$, vmad(csn2$, ey$, vmul(sbm2$, by$)));
      mz$ = vmad(c2a$, mz$, vmad(csn2$, ez$, vmul(sbm2$, bz$)));
//#end

// The same for a state: m and m' (p) together.
//#snippet backwardState
    const csn2$ = vadd(csn$, csn$);
    const ex$ = vsub(vmul(my$, bz$), vmul(mz$, by$));
    const ey$ = vsub(vmul(mz$, bx$), vmul(mx$, bz$));
    const ez$ = vsub(vmul(mx$, by$), vmul(my$, bx$));
    const bm$ = vmad(bx$, mx$, vmad(by$, my$, vmul(bz$, mz$)));
    const kbm$ = vmul(kap$, bm$);
    const fx$ = vsub(vmul(py$, bz$), vmul(pz$, by$));
    const fy$ = vsub(vmul(pz$, bx$), vmul(px$, bz$));
    const fz$ = vsub(vmul(px$, by$), vmul(py$, bx$));
    const bp$ = vmad(bx$, px$, vmad(by$, py$, vmul(bz$, pz$)));
    const kbp$ = vmul(kap$, bp$);
    const gI$ = vadd(vmad(bx$, kbm$, vmad(csn$, mx$, vmul(ss$, ex$))), vmad(bx$, kbp$, vmad(csn$, px$, vmul(ss$, fx$))));
    const gQ$ = vadd(vmad(by$, kbm$, vmad(csn$, my$, vmul(ss$, ey$))), vmad(by$, kbp$, vmad(csn$, py$, vmul(ss$, fy$))));
    const sbm2$ = vmul(vadd(ss$, ss$), bm$);
    mx$ = vmad(c2a$, mx$, vmad(csn2$, ex$, vmul(sbm2$, bx$)));
    my$ = vmad(c2a$, my$, vmad(csn2$, ey$, vmul(sbm2$, by$)));
    mz$ = vmad(c2a$, mz$, vmad(csn2$, ez$, vmul(sbm2$, bz$)));
    const sbp2$ = vmul(vadd(ss$, ss$), bp$);
    px$ = vmad(c2a$, px$, vmad(csn2$, fx$, vmul(sbp2$, bx$)));
    py$ = vmad(c2a$, py$, vmad(csn2$, fy$, vmul(sbp2$, by$)));
    pz$ = vmad(c2a$, pz$, vmad(csn2$, fz$, vmul(sbp2$, bz$)));
//#end

// A <- U A for the segment propagator U = (uur, uui, uvr, uvi) (read all inputs first).
//#snippet leftMultiply
      const nur$ = qmulUr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
      const nui$ = qmulUi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
      const nvr$ = qmulVr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
      const nvi$ = qmulVi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
      aur$ = nur$; aui$ = nui$; avr$ = nvr$; avi$ = nvi$;
//#end

//#unroll figureQuad:2 figurePair:1
/**
 * Infidelity of the members j.. of one group (written to out) added, weighted, to `mean`
 * (returned). `series` packs the series terms and halvings of the job (qubit.ts).
 */
export function __NAME__(
  iPtr: usize, qPtr: usize, n: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, wPtr: usize,
  targetPtr: usize, mode: i32, outPtr: usize, series: i32, mean: f64,
): f64 {
  const terms = series & 0xff;
  const halv = series >> 8;
  const reduce = vsplat(1.0 / <f64>(<i64>1 << (2 * halv)));
  const one = vsplat(1.0);
  const two = vsplat(2.0);
  const four = vsplat(4.0);
  const c2 = c * c;
  const gur = vsplat(load<f64>(targetPtr)), gui = vsplat(load<f64>(targetPtr, 8));
  const gvr = vsplat(load<f64>(targetPtr, 16)), gvi = vsplat(load<f64>(targetPtr, 24));
  const hur = load<f64>(targetPtr, 32), hui = load<f64>(targetPtr, 40);
  const hvr = load<f64>(targetPtr, 48), hvi = load<f64>(targetPtr, 56);
  const s$ = ld(scalePtr, j + 2 * $index);
  const s2$ = vmul(s$, s$);
  const cs$ = vmul(s$, vsplat(c));
  const bz$ = vmul(ld(detPtr, j + 2 * $index), vsplat(-c));
  const bz2$ = vmul(bz$, bz$);
  // Negated once per member so that the segment's ui = -S bz costs one multiply.
  const nbz$ = vneg(bz$);
  let aur$ = vsplat(hur), aui$ = vsplat(hui), avr$ = vsplat(hvr), avi$ = vsplat(hvi);

  // Software-pipelined: each turn computes the propagator P of segment k while the
  // product takes the one of the turn before, so the CPU overlaps the two chains.
  let pur$ = vsplat(1.0), pui$ = vsplat(0.0), pvr$ = vsplat(0.0), pvi$ = vsplat(0.0);
  for (let k = 0; k < n; k++) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const r2 = vsplat(c2 * (iS * iS + qS * qS));
      const vni = vsplat(-iS), vq = vsplat(qS);
      let x$ = vmad(s2$, r2, bz2$);
      if (halv > 0) { x$ = vmul(x$, reduce); }
      let co$ = seriesCos(x$, terms);
      let si$ = seriesSinc(x$, terms);
      for (let h = 0; h < halv; h++) {
        const nc$ = vsub(one, vmul(vmul(two, x$), vmul(si$, si$)));
        si$ = vmul(si$, co$);
        co$ = nc$;
        x$ = vmul(x$, four);
      }
      const sig$ = vmul(si$, cs$);
      pur$ = co$; pui$ = vmul(si$, nbz$); pvr$ = vmul(sig$, vq); pvi$ = vmul(sig$, vni);
    }
    if (k > 0) {
      //#insert leftMultiply
    }
  }
  if (n > 0) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    //#insert leftMultiply
  }
  // W = G A
  const wui$ = qmulUi(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  const wvr$ = qmulVr(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  const wvi$ = qmulVi(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  let fig$ = vadd(vmul(wvr$, wvr$), vmul(wvi$, wvi$));
  if (mode == MODE_GATE) { fig$ = vmad(wui$, wui$, fig$); }
  v128.store(outPtr + (<usize>(j + 2 * $index) << 3), fig$);
  mean += vsum(vmul(fig$, ld(wPtr, j + 2 * $index)));
  return mean;
}
//#end

//#unroll gradientQuad:2 gradientPair:1
/**
 * The members j.. of one group of ensembleGradient (qubit.ts): infidelities to out, their
 * gradient added to gradI, gradQ, the weighted infidelity added to `mean` (returned).
 * work holds 6 n f64 per pair.
 */
export function __NAME__(
  iPtr: usize, qPtr: usize, n: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, wPtr: usize,
  targetPtr: usize, mode: i32, outPtr: usize,
  gradIPtr: usize, gradQPtr: usize, workPtr: usize, series: i32, mean: f64,
): f64 {
  const terms = series & 0xff;
  const halv = series >> 8;
  const reduce = vsplat(1.0 / <f64>(<i64>1 << (2 * halv)));
  const one = vsplat(1.0);
  const two = vsplat(2.0);
  const four = vsplat(4.0);
  const third = vsplat(-1.0 / 3.0);
  const zero = vsplat(0.0);
  const c2 = c * c;
  const gur = vsplat(load<f64>(targetPtr)), gui = vsplat(load<f64>(targetPtr, 8));
  const gvr = vsplat(load<f64>(targetPtr, 16)), gvi = vsplat(load<f64>(targetPtr, 24));
  const hur = vsplat(load<f64>(targetPtr, 32)), hui = vsplat(load<f64>(targetPtr, 40));
  const hvr = vsplat(load<f64>(targetPtr, 48)), hvi = vsplat(load<f64>(targetPtr, 56));
  const work$ = workPtr + <usize>($index * n) * 48;
  const s$ = ld(scalePtr, j + 2 * $index);
  const s2$ = vmul(s$, s$);
  const cs$ = vmul(s$, vsplat(c));
  const bz$ = vmul(ld(detPtr, j + 2 * $index), vsplat(-c));
  const bz2$ = vmul(bz$, bz$);
  const nbz$ = vneg(bz$);

  // Forward sweep: the product A = U_n ... U_1 H; cos a, S and T kept per segment.
  let aur$ = hur, aui$ = hui, avr$ = hvr, avi$ = hvi;
  // Software-pipelined: each turn computes the propagator P of segment k while the
  // product takes the one of the turn before, so the CPU overlaps the two chains.
  let pur$ = vsplat(1.0), pui$ = vsplat(0.0), pvr$ = vsplat(0.0), pvi$ = vsplat(0.0);
  for (let k = 0; k < n; k++) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const vni = vsplat(-iS), vq = vsplat(qS);
      const full$ = vmad(s2$, vsplat(c2 * (iS * iS + qS * qS)), bz2$);
      //#insert segmentSeries
      const slot$ = work$ + <usize>k * 48;
      v128.store(slot$, co$); v128.store(slot$, si$, 16); v128.store(slot$, tt$, 32);
      const sig$ = vmul(si$, cs$);
      pur$ = co$; pui$ = vmul(si$, nbz$); pvr$ = vmul(sig$, vq); pvi$ = vmul(sig$, vni);
    }
    if (k > 0) {
      //#insert leftMultiply
    }
  }
  if (n > 0) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    //#insert leftMultiply
  }
  const wur$ = qmulUr(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  const wui$ = qmulUi(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  const wvr$ = qmulVr(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  const wvi$ = qmulVi(gur, gui, gvr, gvi, aur$, aui$, avr$, avi$);
  let fig$ = vadd(vmul(wvr$, wvr$), vmul(wvi$, wvi$));
  if (mode == MODE_GATE) fig$ = vmad(wui$, wui$, fig$);
  v128.store(outPtr + (<usize>(j + 2 * $index) << 3), fig$);
  const w$ = ld(wPtr, j + 2 * $index);
  mean += vsum(vmul(fig$, w$));
  // d(1-F)/dI = w (1+eps) c * (-uW_r Tr(dU P) - uW_i Tr(dU P')) = 2 w c (1+eps) (uW_r g.m + uW_i g.m').
  // m and m' are carried pre-scaled by these factors (the backward rotation is linear), so
  // g.m is the gradient's share with no multiply.
  const wcs2$ = vmul(vadd(w$, w$), cs$);
  const fa$ = vmul(wcs2$, wur$);
  const fb$ = vmul(wcs2$, wui$);
  // m from M_{n-1} = A G; m' from A K G (K = -i sz: A K = (ui, -ur, vi, -vr)).
  // Vector part of (ur, ui, vr, vi) = m0 - i m.sigma is m = (-vi, vr, -ui).
  let mx$ = vmul(fa$, vneg(qmulVi(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi)));
  let my$ = vmul(fa$, qmulVr(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi));
  let mz$ = vmul(fa$, vneg(qmulUi(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi)));

  // The backward sweep, per segment (b = (bx, by, bz), a = |b|, S = sin(a)/a, kappa = cos(a) T + S^2):
  //   g_x.m = bx kappa (b.m) + cos(a) S mx + S^2 e_x,  g_y.m likewise, with e = m x b;
  //   m <- cos(2a) m + 2 cos(a) S e + 2 S^2 (b.m) b   (the rotation by U_k^-1),
  // e and b.m computed once for both. A gate target needs only m: its loop holds no m'
  // (fewer live vectors than the machine's 16 registers, so no spills).
  if (mode == MODE_GATE) {
    for (let k = n - 1; k >= 0; k--) {
      const slot$ = work$ + <usize>k * 48;
      const co$ = v128.load(slot$), si$ = v128.load(slot$, 16), tt$ = v128.load(slot$, 32);
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const vi = vsplat(iS), vq = vsplat(qS);
      const bx$ = vmul(cs$, vi);
      const by$ = vmul(cs$, vq);
      //#insert backwardFactors
      //#insert backwardGateGradient
      //#insert backwardGateRotate
      const gIp = gradIPtr + (<usize>k << 3);
      const gQp = gradQPtr + (<usize>k << 3);
      store<f64>(gIp, load<f64>(gIp) + vsum(JOIN(vadd, gI$)));
      store<f64>(gQp, load<f64>(gQp) + vsum(JOIN(vadd, gQ$)));
    }
    return mean;
  }
  const kur$ = aui$, kui$ = vneg(aur$), kvr$ = avi$, kvi$ = vneg(avr$);
  let px$ = vmul(fb$, vneg(qmulVi(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi)));
  let py$ = vmul(fb$, qmulVr(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi));
  let pz$ = vmul(fb$, vneg(qmulUi(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi)));
  for (let k = n - 1; k >= 0; k--) {
    const slot$ = work$ + <usize>k * 48;
    const co$ = v128.load(slot$), si$ = v128.load(slot$, 16), tt$ = v128.load(slot$, 32);
    const iS = load<f64>(iPtr + (<usize>k << 3));
    const qS = load<f64>(qPtr + (<usize>k << 3));
    const vi = vsplat(iS), vq = vsplat(qS);
    const bx$ = vmul(cs$, vi);
    const by$ = vmul(cs$, vq);
    //#insert backwardFactors
    //#insert backwardState
    const gIp = gradIPtr + (<usize>k << 3);
    const gQp = gradQPtr + (<usize>k << 3);
    store<f64>(gIp, load<f64>(gIp) + vsum(JOIN(vadd, gI$)));
    store<f64>(gQp, load<f64>(gQp) + vsum(JOIN(vadd, gQ$)));
  }
  return mean;
}
//#end

// Blocks of segments side by side (qubit-blocks.ts): for one member, each lane of the two
// copies runs its own block of consecutive segments, so no lane holds a padding member.
// Copy $ works on the sample region samples + $ step: slot t of a region holds the
// segments of its two lanes ([I, Q, live] 48 bytes per slot, then h slots of [gI, gQ]
// 32 bytes); a lane whose block has ended runs the identity (its `live` lane is 0). cst
// holds cos a, S, T per slot per copy (48 bytes); ends per copy 160 bytes: the lanes'
// products (ur, ui, vr, vi; the starting ones on entry) and the backward vectors m, m'
// at each lane's last segment.

//#unroll blocksForward:2
/**
 * Forward sweep of member j, two blocks per copy: cos a, S and T per slot into cst, and each lane's
 * product U_last .. U_first P (P: the product in ends on entry) back into ends.
 */
export function __NAME__(
  samples: usize, step: usize, h: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, cst: usize, ends: usize, series: i32,
): void {
  const terms = series & 0xff;
  const halv = series >> 8;
  const reduce = vsplat(1.0 / <f64>(<i64>1 << (2 * halv)));
  const one = vsplat(1.0);
  const two = vsplat(2.0);
  const four = vsplat(4.0);
  const third = vsplat(-1.0 / 3.0);
  const zero = vsplat(0.0);
  const c2 = vsplat(c * c);
  const region$ = samples + <usize>$index * step;
  const cw$ = cst + <usize>($index * h) * 48;
  const e$ = ends + <usize>$index * 160;
  const s = vsplat(load<f64>(scalePtr + (<usize>j << 3)));
  const s2 = vmul(s, s);
  const cs = vmul(s, vsplat(c));
  const bz = vmul(vsplat(load<f64>(detPtr + (<usize>j << 3))), vsplat(-c));
  const bz2 = vmul(bz, bz);
  const nbz = vneg(bz);
  let aur$ = v128.load(e$), aui$ = v128.load(e$, 16), avr$ = v128.load(e$, 32), avi$ = v128.load(e$, 48);
  // Software-pipelined: each turn computes the propagator P of segment t while the
  // product takes the one of the turn before, so the CPU overlaps the two chains.
  let pur$ = vsplat(1.0), pui$ = vsplat(0.0), pvr$ = vsplat(0.0), pvi$ = vsplat(0.0);
  for (let t = 0; t < h; t++) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    {
      const sp$ = region$ + <usize>t * 48;
      const vi$ = v128.load(sp$), vq$ = v128.load(sp$, 16), live$ = v128.load(sp$, 32);
      const r2$ = vmul(c2, vmad(vi$, vi$, vmul(vq$, vq$)));
      const full$ = vmad(s2, r2$, bz2);
      //#insert segmentSeries
      // A slot past the end of a block is the identity: cos a = 1, S = 0.
      co$ = v128.bitselect(co$, one, live$);
      si$ = v128.and(si$, live$);
      const ws$ = cw$ + <usize>t * 48;
      v128.store(ws$, co$); v128.store(ws$, si$, 16); v128.store(ws$, tt$, 32);
      const sig$ = vmul(si$, cs);
      pur$ = co$; pui$ = vmul(si$, nbz); pvr$ = vmul(sig$, vq$); pvi$ = vmul(sig$, vneg(vi$));
    }
    if (t > 0) {
      //#insert leftMultiply
    }
  }
  if (h > 0) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    //#insert leftMultiply
  }
  v128.store(e$, aur$); v128.store(e$, aui$, 16); v128.store(e$, avr$, 32); v128.store(e$, avi$, 48);
}
//#end

//#unroll blocksFigureForward:2
/**
 * The figure's forward sweep of member j, two blocks per copy (blocksForward without the
 * stored cos a, S, T and without T): each lane's product back into ends.
 */
export function __NAME__(
  samples: usize, step: usize, h: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, ends: usize, series: i32,
): void {
  const terms = series & 0xff;
  const halv = series >> 8;
  const reduce = vsplat(1.0 / <f64>(<i64>1 << (2 * halv)));
  const one = vsplat(1.0);
  const two = vsplat(2.0);
  const four = vsplat(4.0);
  const c2 = vsplat(c * c);
  const region$ = samples + <usize>$index * step;
  const e$ = ends + <usize>$index * 160;
  const s = vsplat(load<f64>(scalePtr + (<usize>j << 3)));
  const s2 = vmul(s, s);
  const cs = vmul(s, vsplat(c));
  const bz = vmul(vsplat(load<f64>(detPtr + (<usize>j << 3))), vsplat(-c));
  const bz2 = vmul(bz, bz);
  const nbz = vneg(bz);
  let aur$ = v128.load(e$), aui$ = v128.load(e$, 16), avr$ = v128.load(e$, 32), avi$ = v128.load(e$, 48);
  // Software-pipelined like blocksForward.
  let pur$ = vsplat(1.0), pui$ = vsplat(0.0), pvr$ = vsplat(0.0), pvi$ = vsplat(0.0);
  for (let t = 0; t < h; t++) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    {
      const sp$ = region$ + <usize>t * 48;
      const vi$ = v128.load(sp$), vq$ = v128.load(sp$, 16), live$ = v128.load(sp$, 32);
      let x$ = vmad(s2, vmul(c2, vmad(vi$, vi$, vmul(vq$, vq$))), bz2);
      if (halv > 0) { x$ = vmul(x$, reduce); }
      let co$ = seriesCos(x$, terms);
      let si$ = seriesSinc(x$, terms);
      for (let step = 0; step < halv; step++) {
        const nc$ = vsub(one, vmul(vmul(two, x$), vmul(si$, si$)));
        si$ = vmul(si$, co$); co$ = nc$; x$ = vmul(x$, four);
      }
      // A slot past the end of a block is the identity: cos a = 1, S = 0.
      co$ = v128.bitselect(co$, one, live$);
      si$ = v128.and(si$, live$);
      const sig$ = vmul(si$, cs);
      pur$ = co$; pui$ = vmul(si$, nbz); pvr$ = vmul(sig$, vq$); pvi$ = vmul(sig$, vneg(vi$));
    }
    if (t > 0) {
      //#insert leftMultiply
    }
  }
  if (h > 0) {
    const uur$ = pur$, uui$ = pui$, uvr$ = pvr$, uvi$ = pvi$;
    //#insert leftMultiply
  }
  v128.store(e$, aur$); v128.store(e$, aui$, 16); v128.store(e$, avr$, 32); v128.store(e$, avi$, 48);
}
//#end

//#unroll blocksBackward:2
/**
 * Backward sweep of member j, two blocks per copy, from the vectors m (and m' for states) that ends
 * holds at each lane's last segment; each slot's gradient is written to its region's (one
 * member: every slot is written once, and drainRegion adds the +0 a cleared sum would).
 */
export function __NAME__(
  samples: usize, step: usize, h: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, mode: i32, cst: usize, ends: usize,
): void {
  const one = vsplat(1.0);
  const region$ = samples + <usize>$index * step;
  const grads$ = region$ + <usize>h * 48;
  const cw$ = cst + <usize>($index * h) * 48;
  const e$ = ends + <usize>$index * 160;
  const cs = vmul(vsplat(load<f64>(scalePtr + (<usize>j << 3))), vsplat(c));
  const bz = vmul(vsplat(load<f64>(detPtr + (<usize>j << 3))), vsplat(-c));
  // Both copies run the same member; the shared text names its detuning term per copy.
  const bz$ = bz;
  let mx$ = v128.load(e$, 64), my$ = v128.load(e$, 80), mz$ = v128.load(e$, 96);
  if (mode == MODE_GATE) {
    for (let t = h - 1; t >= 0; t--) {
      const sp$ = region$ + <usize>t * 48;
      const gp$ = grads$ + <usize>t * 32;
      const ws$ = cw$ + <usize>t * 48;
      const co$ = v128.load(ws$), si$ = v128.load(ws$, 16), tt$ = v128.load(ws$, 32);
      //#insert backwardFactors
      const bx$ = vmul(cs, v128.load(sp$));
      const by$ = vmul(cs, v128.load(sp$, 16));
      //#insert backwardGateGradient
      // Stored before the rotation, so that gI, gQ free their registers.
      v128.store(gp$, gI$);
      v128.store(gp$, gQ$, 16);
      //#insert backwardGateRotate
    }
    return;
  }
  let px$ = v128.load(e$, 112), py$ = v128.load(e$, 128), pz$ = v128.load(e$, 144);
  for (let t = h - 1; t >= 0; t--) {
    const sp$ = region$ + <usize>t * 48;
    const gp$ = grads$ + <usize>t * 32;
    const ws$ = cw$ + <usize>t * 48;
    const co$ = v128.load(ws$), si$ = v128.load(ws$, 16), tt$ = v128.load(ws$, 32);
    //#insert backwardFactors
    const bx$ = vmul(cs, v128.load(sp$));
    const by$ = vmul(cs, v128.load(sp$, 16));
    //#insert backwardState
    v128.store(gp$, gI$);
    v128.store(gp$, gQ$, 16);
  }
}
//#end
