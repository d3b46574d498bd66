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

  for (let k = 0; k < n; k++) {
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
    const uur$ = co$, uui$ = vmul(si$, nbz$), uvr$ = vmul(sig$, vq), uvi$ = vmul(sig$, vni);
    const nur$ = qmulUr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nui$ = qmulUi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nvr$ = qmulVr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nvi$ = qmulVi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    aur$ = nur$; aui$ = nui$; avr$ = nvr$; avi$ = nvi$;
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
  for (let k = 0; k < n; k++) {
    const iS = load<f64>(iPtr + (<usize>k << 3));
    const qS = load<f64>(qPtr + (<usize>k << 3));
    const vni = vsplat(-iS), vq = vsplat(qS);
    const full$ = vmad(s2$, vsplat(c2 * (iS * iS + qS * qS)), bz2$);
    let x$ = full$;
    if (halv > 0) x$ = vmul(x$, reduce);
    let co$ = seriesCos(x$, terms);
    let si$ = seriesSinc(x$, terms);
    let tt$: v128;
    if (halv == 0) {
      tt$ = seriesT(x$, terms);
    } else {
      for (let h = 0; h < halv; h++) {
        const nc$ = vsub(one, vmul(vmul(two, x$), vmul(si$, si$)));
        si$ = vmul(si$, co$); co$ = nc$; x$ = vmul(x$, four);
      }
      // T = (cos a - S)/a^2; its rounding error is at most eps/a^2 and it only
      // enters multiplied by components of b (of size a^2). a = 0 gives -1/3.
      const pos$ = f64x2.gt(full$, zero);
      tt$ = v128.bitselect(f64x2.div(vsub(co$, si$), v128.bitselect(full$, one, pos$)), third, pos$);
    }
    const slot$ = work$ + <usize>k * 48;
    v128.store(slot$, co$); v128.store(slot$, si$, 16); v128.store(slot$, tt$, 32);
    const sig$ = vmul(si$, cs$);
    const uur$ = co$, uui$ = vmul(si$, nbz$), uvr$ = vmul(sig$, vq), uvi$ = vmul(sig$, vni);
    const nur$ = qmulUr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nui$ = qmulUi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nvr$ = qmulVr(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    const nvi$ = qmulVi(uur$, uui$, uvr$, uvi$, aur$, aui$, avr$, avi$);
    aur$ = nur$; aui$ = nui$; avr$ = nvr$; avi$ = nvi$;
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
  const wcs2$ = vmul(vadd(w$, w$), cs$);
  const fa$ = vmul(wcs2$, wur$);
  const fb$ = vmul(wcs2$, wui$);
  // m from M_{n-1} = A G; m' from A K G (K = -i sz: A K = (ui, -ur, vi, -vr)).
  // Vector part of (ur, ui, vr, vi) = m0 - i m.sigma is m = (-vi, vr, -ui).
  let mx$ = vneg(qmulVi(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi));
  let my$ = qmulVr(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi);
  let mz$ = vneg(qmulUi(aur$, aui$, avr$, avi$, gur, gui, gvr, gvi));
  const kur$ = aui$, kui$ = vneg(aur$), kvr$ = avi$, kvi$ = vneg(avr$);
  let px$ = vneg(qmulVi(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi));
  let py$ = qmulVr(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi);
  let pz$ = vneg(qmulUi(kur$, kui$, kvr$, kvi$, gur, gui, gvr, gvi));

  for (let k = n - 1; k >= 0; k--) {
    const slot$ = work$ + <usize>k * 48;
    const co$ = v128.load(slot$), si$ = v128.load(slot$, 16), tt$ = v128.load(slot$, 32);
    const iS = load<f64>(iPtr + (<usize>k << 3));
    const qS = load<f64>(qPtr + (<usize>k << 3));
    const bx$ = vmul(cs$, vsplat(iS));
    const by$ = vmul(cs$, vsplat(qS));
    const ss$ = vmul(si$, si$);
    const kap$ = vmad(co$, tt$, ss$);
    const csn$ = vmul(co$, si$);
    // g_x . m and g_y . m
    const bm$ = vmad(bx$, mx$, vmad(by$, my$, vmul(bz$, mz$)));
    const kbm$ = vmul(kap$, bm$);
    const gxm$ = vmad(bx$, kbm$, vmad(csn$, mx$, vmul(ss$, vsub(vmul(bz$, my$), vmul(by$, mz$)))));
    const gym$ = vmad(by$, kbm$, vmad(csn$, my$, vmul(ss$, vsub(vmul(bx$, mz$), vmul(bz$, mx$)))));
    let gI$ = vmul(fa$, gxm$);
    let gQ$ = vmul(fa$, gym$);
    // w = S b; rotation coefficients
    const wx$ = vmul(si$, bx$), wy$ = vmul(si$, by$), wz$ = vmul(si$, bz$);
    const c2c$ = vadd(co$, co$);
    const c2a$ = vsub(vmul(c2c$, co$), one);
    {
      const mw$ = vmad(mx$, wx$, vmad(my$, wy$, vmul(mz$, wz$)));
      const mw2$ = vadd(mw$, mw$);
      const nx$ = vmad(c2a$, mx$, vmad(c2c$, vsub(vmul(my$, wz$), vmul(mz$, wy$)), vmul(mw2$, wx$)));
      const ny$ = vmad(c2a$, my$, vmad(c2c$, vsub(vmul(mz$, wx$), vmul(mx$, wz$)), vmul(mw2$, wy$)));
      const nz$ = vmad(c2a$, mz$, vmad(c2c$, vsub(vmul(mx$, wy$), vmul(my$, wx$)), vmul(mw2$, wz$)));
      mx$ = nx$; my$ = ny$; mz$ = nz$;
    }
    if (mode == MODE_STATE) {
      const pbm$ = vmul(kap$, vmad(bx$, px$, vmad(by$, py$, vmul(bz$, pz$))));
      gI$ = vmad(fb$, vmad(bx$, pbm$, vmad(csn$, px$, vmul(ss$, vsub(vmul(bz$, py$), vmul(by$, pz$))))), gI$);
      gQ$ = vmad(fb$, vmad(by$, pbm$, vmad(csn$, py$, vmul(ss$, vsub(vmul(bx$, pz$), vmul(bz$, px$))))), gQ$);
      const pw$ = vmad(px$, wx$, vmad(py$, wy$, vmul(pz$, wz$)));
      const pw2$ = vadd(pw$, pw$);
      const nx$ = vmad(c2a$, px$, vmad(c2c$, vsub(vmul(py$, wz$), vmul(pz$, wy$)), vmul(pw2$, wx$)));
      const ny$ = vmad(c2a$, py$, vmad(c2c$, vsub(vmul(pz$, wx$), vmul(px$, wz$)), vmul(pw2$, wy$)));
      const nz$ = vmad(c2a$, pz$, vmad(c2c$, vsub(vmul(px$, wy$), vmul(py$, wx$)), vmul(pw2$, wz$)));
      px$ = nx$; py$ = ny$; pz$ = nz$;
    }
    const gIp = gradIPtr + (<usize>k << 3);
    const gQp = gradQPtr + (<usize>k << 3);
    store<f64>(gIp, load<f64>(gIp) + vsum(JOIN(vadd, gI$)));
    store<f64>(gQp, load<f64>(gQp) + vsum(JOIN(vadd, gQ$)));
  }
  return mean;
}
//#end
