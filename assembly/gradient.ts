// The exact gradient of the ensemble figure (GRAPE with exact segment derivatives:
// Khaneja et al., J. Magn. Reson. 172, 296 (2005); de Fouquieres et al., J. Magn. Reson.
// 212, 412 (2011)). Conventions and the figure itself: ensemble.ts.
//
// The two-pair body below was written from the one-pair body (gradientPair) by giving
// every per-pair variable the suffix A or B; keep the halves and gradientPair identical.

import {
  vadd, vsub, vmul, vneg, vsplat, vmad, vsum,
  seriesCos, seriesSinc, seriesT,
  qmulUr, qmulUi, qmulVr, qmulVi,
} from './su2';
import { MODE_GATE, MODE_STATE, prepareAngles, jobTerms, jobHalvings, ld } from './ensemble';

/**
 * One pair of members (j, j + 1) of ensembleGradient, for a member count that is not a
 * multiple of 4: the same sweeps as one half of the two-pair body. Adds to gradI, gradQ
 * and returns the pair's weighted infidelity.
 */
function gradientPair(
  iPtr: usize, qPtr: usize, n: i32, c: f64, j: i32,
  scalePtr: usize, detPtr: usize, wPtr: usize,
  targetPtr: usize, mode: i32, outPtr: usize,
  gradIPtr: usize, gradQPtr: usize, workPtr: usize,
): f64 {
  const terms = jobTerms;
  const halv = jobHalvings;
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
  let mean: f64 = 0.0;
  const s = ld(scalePtr, j);
  const s2 = vmul(s, s);
  const cs = vmul(s, vsplat(c));
  const bz = vmul(ld(detPtr, j), vsplat(-c));
  const bz2 = vmul(bz, bz);
  const nbz = vneg(bz);

  // Forward sweep: the product A = U_n ... U_1 H; cos a, S and T kept per segment.
  let aur = hur, aui = hui, avr = hvr, avi = hvi;
  for (let k = 0; k < n; k++) {
    const iS = load<f64>(iPtr + (<usize>k << 3));
    const qS = load<f64>(qPtr + (<usize>k << 3));
    const vni = vsplat(-iS), vq = vsplat(qS);
    const full = vmad(s2, vsplat(c2 * (iS * iS + qS * qS)), bz2);
    let x = full;
    if (halv > 0) x = vmul(x, reduce);
    let co = seriesCos(x, terms);
    let si = seriesSinc(x, terms);
    let tt: v128;
    if (halv == 0) {
      tt = seriesT(x, terms);
    } else {
      for (let h = 0; h < halv; h++) {
        const nc = vsub(one, vmul(vmul(two, x), vmul(si, si)));
        si = vmul(si, co); co = nc; x = vmul(x, four);
      }
      // T = (cos a - S)/a^2; its rounding error is at most eps/a^2 and it only
      // enters multiplied by components of b (of size a^2). a = 0 gives -1/3.
      const pos = f64x2.gt(full, zero);
      tt = v128.bitselect(f64x2.div(vsub(co, si), v128.bitselect(full, one, pos)), third, pos);
    }
    const slot = workPtr + <usize>k * 48;
    v128.store(slot, co); v128.store(slot, si, 16); v128.store(slot, tt, 32);
    const sig = vmul(si, cs);
    const uur = co, uui = vmul(si, nbz), uvr = vmul(sig, vq), uvi = vmul(sig, vni);
    const nur = qmulUr(uur, uui, uvr, uvi, aur, aui, avr, avi);
    const nui = qmulUi(uur, uui, uvr, uvi, aur, aui, avr, avi);
    const nvr = qmulVr(uur, uui, uvr, uvi, aur, aui, avr, avi);
    const nvi = qmulVi(uur, uui, uvr, uvi, aur, aui, avr, avi);
    aur = nur; aui = nui; avr = nvr; avi = nvi;
  }
  const wur = qmulUr(gur, gui, gvr, gvi, aur, aui, avr, avi);
  const wui = qmulUi(gur, gui, gvr, gvi, aur, aui, avr, avi);
  const wvr = qmulVr(gur, gui, gvr, gvi, aur, aui, avr, avi);
  const wvi = qmulVi(gur, gui, gvr, gvi, aur, aui, avr, avi);
  let fig = vadd(vmul(wvr, wvr), vmul(wvi, wvi));
  if (mode == MODE_GATE) fig = vmad(wui, wui, fig);
  v128.store(outPtr + (<usize>j << 3), fig);
  const w = ld(wPtr, j);
  mean += vsum(vmul(fig, w));
  // d(1-F)/dI = w (1+eps) c * (-uW_r Tr(dU P) - uW_i Tr(dU P')) = 2 w c (1+eps) (uW_r g.m + uW_i g.m').
  const wcs2 = vmul(vadd(w, w), cs);
  const fa = vmul(wcs2, wur);
  const fb = vmul(wcs2, wui);
  // m from M_{n-1} = A G; m' from A K G (K = -i sz: A K = (ui, -ur, vi, -vr)).
  // Vector part of (ur, ui, vr, vi) = m0 - i m.sigma is m = (-vi, vr, -ui).
  let mx = vneg(qmulVi(aur, aui, avr, avi, gur, gui, gvr, gvi));
  let my = qmulVr(aur, aui, avr, avi, gur, gui, gvr, gvi);
  let mz = vneg(qmulUi(aur, aui, avr, avi, gur, gui, gvr, gvi));
  const kur = aui, kui = vneg(aur), kvr = avi, kvi = vneg(avr);
  let px = vneg(qmulVi(kur, kui, kvr, kvi, gur, gui, gvr, gvi));
  let py = qmulVr(kur, kui, kvr, kvi, gur, gui, gvr, gvi);
  let pz = vneg(qmulUi(kur, kui, kvr, kvi, gur, gui, gvr, gvi));

  for (let k = n - 1; k >= 0; k--) {
    const slot = workPtr + <usize>k * 48;
    const co = v128.load(slot), si = v128.load(slot, 16), tt = v128.load(slot, 32);
    const iS = load<f64>(iPtr + (<usize>k << 3));
    const qS = load<f64>(qPtr + (<usize>k << 3));
    const bx = vmul(cs, vsplat(iS));
    const by = vmul(cs, vsplat(qS));
    const ss = vmul(si, si);
    const kap = vmad(co, tt, ss);
    const csn = vmul(co, si);
    // g_x . m and g_y . m
    const bm = vmad(bx, mx, vmad(by, my, vmul(bz, mz)));
    const kbm = vmul(kap, bm);
    const gxm = vmad(bx, kbm, vmad(csn, mx, vmul(ss, vsub(vmul(bz, my), vmul(by, mz)))));
    const gym = vmad(by, kbm, vmad(csn, my, vmul(ss, vsub(vmul(bx, mz), vmul(bz, mx)))));
    let gI = vmul(fa, gxm);
    let gQ = vmul(fa, gym);
    // w = S b; rotation coefficients
    const wx = vmul(si, bx), wy = vmul(si, by), wz = vmul(si, bz);
    const c2c = vadd(co, co);
    const c2a = vsub(vmul(c2c, co), one); // cos 2a = 2 cos^2 a - 1
    {
      const mw = vmad(mx, wx, vmad(my, wy, vmul(mz, wz)));
      const mw2 = vadd(mw, mw);
      const nx = vmad(c2a, mx, vmad(c2c, vsub(vmul(my, wz), vmul(mz, wy)), vmul(mw2, wx)));
      const ny = vmad(c2a, my, vmad(c2c, vsub(vmul(mz, wx), vmul(mx, wz)), vmul(mw2, wy)));
      const nz = vmad(c2a, mz, vmad(c2c, vsub(vmul(mx, wy), vmul(my, wx)), vmul(mw2, wz)));
      mx = nx; my = ny; mz = nz;
    }
    if (mode == MODE_STATE) {
      const pbm = vmul(kap, vmad(bx, px, vmad(by, py, vmul(bz, pz))));
      gI = vmad(fb, vmad(bx, pbm, vmad(csn, px, vmul(ss, vsub(vmul(bz, py), vmul(by, pz))))), gI);
      gQ = vmad(fb, vmad(by, pbm, vmad(csn, py, vmul(ss, vsub(vmul(bx, pz), vmul(bz, px))))), gQ);
      const pw = vmad(px, wx, vmad(py, wy, vmul(pz, wz)));
      const pw2 = vadd(pw, pw);
      const nx = vmad(c2a, px, vmad(c2c, vsub(vmul(py, wz), vmul(pz, wy)), vmul(pw2, wx)));
      const ny = vmad(c2a, py, vmad(c2c, vsub(vmul(pz, wx), vmul(px, wz)), vmul(pw2, wy)));
      const nz = vmad(c2a, pz, vmad(c2c, vsub(vmul(px, wy), vmul(py, wx)), vmul(pw2, wz)));
      px = nx; py = ny; pz = nz;
    }
    const gIp = gradIPtr + (<usize>k << 3);
    const gQp = gradQPtr + (<usize>k << 3);
    store<f64>(gIp, load<f64>(gIp) + vsum(gI));
    store<f64>(gQp, load<f64>(gQp) + vsum(gQ));
  }
  return mean;
}

/**
 * Weighted mean infidelity (returned), each member's infidelity (out[m]) and the exact
 * gradient of the mean with respect to every sample (gradI[n], gradQ[n], per Hz).
 * m must be even (two pairs run side by side, a last odd pair alone); work holds 12 n f64.
 *
 * The backward sweep carries only the vector part m of M_k = R_{k+1} L_k (and m' of
 * M'_k = R_{k+1} K L_k for states): M_{k-1} = U_k^dag M_k U_k is a rotation of m,
 *   m <- (cos^2 a - sin^2 a) m + 2 cos a (m x w) + 2 (m . w) w,   w = S b,
 * and with dU/dbx U^dag = -i g_x . sigma (traceless, since U stays in SU(2)),
 *   Tr(dU/dbx P_k) = -2 g_x . m,   g_x = bx (S^2 + C T) b + C S e_x - S^2 (e_x x b)
 * (likewise for y). So the gradient needs no stored products, only cos a, S, T.
 */
export function ensembleGradient(
  iPtr: usize, qPtr: usize, n: i32, dt: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize,
  gradIPtr: usize, gradQPtr: usize, workPtr: usize,
): f64 {
  const c = Math.PI * dt;
  prepareAngles(iPtr, qPtr, n, c, scalePtr, detPtr, m);
  const terms = jobTerms;
  const halv = jobHalvings;
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
  memory.fill(gradIPtr, 0, <usize>n << 3);
  memory.fill(gradQPtr, 0, <usize>n << 3);
  let mean: f64 = 0.0;

  const workB = workPtr + <usize>n * 48;
  const quads = m & ~3;
  for (let j = 0; j < quads; j += 4) {
    const sA = ld(scalePtr, j);
    const sB = ld(scalePtr, j + 2);
    const s2A = vmul(sA, sA);
    const s2B = vmul(sB, sB);
    const csA = vmul(sA, vsplat(c));
    const csB = vmul(sB, vsplat(c));
    const bzA = vmul(ld(detPtr, j), vsplat(-c));
    const bzB = vmul(ld(detPtr, j + 2), vsplat(-c));
    const bz2A = vmul(bzA, bzA);
    const bz2B = vmul(bzB, bzB);
    const nbzA = vneg(bzA);
    const nbzB = vneg(bzB);

    // Forward sweep: the product A = U_n ... U_1 H; cos a, S and T kept per segment.
    let aurA = hur, auiA = hui, avrA = hvr, aviA = hvi;
    let aurB = hur, auiB = hui, avrB = hvr, aviB = hvi;
    for (let k = 0; k < n; k++) {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const vni = vsplat(-iS), vq = vsplat(qS);
      const fullA = vmad(s2A, vsplat(c2 * (iS * iS + qS * qS)), bz2A);
      const fullB = vmad(s2B, vsplat(c2 * (iS * iS + qS * qS)), bz2B);
      let xA = fullA;
      let xB = fullB;
      if (halv > 0) xA = vmul(xA, reduce);
      if (halv > 0) xB = vmul(xB, reduce);
      let coA = seriesCos(xA, terms);
      let coB = seriesCos(xB, terms);
      let siA = seriesSinc(xA, terms);
      let siB = seriesSinc(xB, terms);
      let ttA: v128;
      let ttB: v128;
      if (halv == 0) {
        ttA = seriesT(xA, terms);
        ttB = seriesT(xB, terms);
      } else {
        for (let h = 0; h < halv; h++) {
          const ncA = vsub(one, vmul(vmul(two, xA), vmul(siA, siA)));
          const ncB = vsub(one, vmul(vmul(two, xB), vmul(siB, siB)));
          siA = vmul(siA, coA); coA = ncA; xA = vmul(xA, four);
          siB = vmul(siB, coB); coB = ncB; xB = vmul(xB, four);
        }
        // T = (cos a - S)/a^2; its rounding error is at most eps/a^2 and it only
        // enters multiplied by components of b (of size a^2). a = 0 gives -1/3.
        const posA = f64x2.gt(fullA, zero);
        const posB = f64x2.gt(fullB, zero);
        ttA = v128.bitselect(f64x2.div(vsub(coA, siA), v128.bitselect(fullA, one, posA)), third, posA);
        ttB = v128.bitselect(f64x2.div(vsub(coB, siB), v128.bitselect(fullB, one, posB)), third, posB);
      }
      const slotA = workPtr + <usize>k * 48;
      const slotB = workB + <usize>k * 48;
      v128.store(slotA, coA); v128.store(slotA, siA, 16); v128.store(slotA, ttA, 32);
      v128.store(slotB, coB); v128.store(slotB, siB, 16); v128.store(slotB, ttB, 32);
      const sigA = vmul(siA, csA);
      const sigB = vmul(siB, csB);
      const uurA = coA, uuiA = vmul(siA, nbzA), uvrA = vmul(sigA, vq), uviA = vmul(sigA, vni);
      const uurB = coB, uuiB = vmul(siB, nbzB), uvrB = vmul(sigB, vq), uviB = vmul(sigB, vni);
      const nurA = qmulUr(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nurB = qmulUr(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nuiA = qmulUi(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nuiB = qmulUi(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nvrA = qmulVr(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nvrB = qmulVr(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nviA = qmulVi(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nviB = qmulVi(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      aurA = nurA; auiA = nuiA; avrA = nvrA; aviA = nviA;
      aurB = nurB; auiB = nuiB; avrB = nvrB; aviB = nviB;
    }
    const wurA = qmulUr(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wurB = qmulUr(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    const wuiA = qmulUi(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wuiB = qmulUi(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    const wvrA = qmulVr(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wvrB = qmulVr(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    const wviA = qmulVi(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wviB = qmulVi(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    let figA = vadd(vmul(wvrA, wvrA), vmul(wviA, wviA));
    let figB = vadd(vmul(wvrB, wvrB), vmul(wviB, wviB));
    if (mode == MODE_GATE) figA = vmad(wuiA, wuiA, figA);
    if (mode == MODE_GATE) figB = vmad(wuiB, wuiB, figB);
    v128.store(outPtr + (<usize>j << 3), figA);
    v128.store(outPtr + (<usize>(j + 2) << 3), figB);
    const wA = ld(wPtr, j);
    const wB = ld(wPtr, j + 2);
    mean += vsum(vmul(figA, wA));
    mean += vsum(vmul(figB, wB));
    // d(1-F)/dI = w (1+eps) c * (-uW_r Tr(dU P) - uW_i Tr(dU P')) = 2 w c (1+eps) (uW_r g.m + uW_i g.m').
    const wcs2A = vmul(vadd(wA, wA), csA);
    const wcs2B = vmul(vadd(wB, wB), csB);
    const faA = vmul(wcs2A, wurA);
    const faB = vmul(wcs2B, wurB);
    const fbA = vmul(wcs2A, wuiA);
    const fbB = vmul(wcs2B, wuiB);
    // m from M_{n-1} = A G; m' from A K G (K = -i sz: A K = (ui, -ur, vi, -vr)).
    // Vector part of (ur, ui, vr, vi) = m0 - i m.sigma is m = (-vi, vr, -ui).
    let mxA = vneg(qmulVi(aurA, auiA, avrA, aviA, gur, gui, gvr, gvi));
    let mxB = vneg(qmulVi(aurB, auiB, avrB, aviB, gur, gui, gvr, gvi));
    let myA = qmulVr(aurA, auiA, avrA, aviA, gur, gui, gvr, gvi);
    let myB = qmulVr(aurB, auiB, avrB, aviB, gur, gui, gvr, gvi);
    let mzA = vneg(qmulUi(aurA, auiA, avrA, aviA, gur, gui, gvr, gvi));
    let mzB = vneg(qmulUi(aurB, auiB, avrB, aviB, gur, gui, gvr, gvi));
    const kurA = auiA, kuiA = vneg(aurA), kvrA = aviA, kviA = vneg(avrA);
    const kurB = auiB, kuiB = vneg(aurB), kvrB = aviB, kviB = vneg(avrB);
    let pxA = vneg(qmulVi(kurA, kuiA, kvrA, kviA, gur, gui, gvr, gvi));
    let pxB = vneg(qmulVi(kurB, kuiB, kvrB, kviB, gur, gui, gvr, gvi));
    let pyA = qmulVr(kurA, kuiA, kvrA, kviA, gur, gui, gvr, gvi);
    let pyB = qmulVr(kurB, kuiB, kvrB, kviB, gur, gui, gvr, gvi);
    let pzA = vneg(qmulUi(kurA, kuiA, kvrA, kviA, gur, gui, gvr, gvi));
    let pzB = vneg(qmulUi(kurB, kuiB, kvrB, kviB, gur, gui, gvr, gvi));

    for (let k = n - 1; k >= 0; k--) {
      const slotA = workPtr + <usize>k * 48;
      const slotB = workB + <usize>k * 48;
      const coA = v128.load(slotA), siA = v128.load(slotA, 16), ttA = v128.load(slotA, 32);
      const coB = v128.load(slotB), siB = v128.load(slotB, 16), ttB = v128.load(slotB, 32);
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const bxA = vmul(csA, vsplat(iS));
      const bxB = vmul(csB, vsplat(iS));
      const byA = vmul(csA, vsplat(qS));
      const byB = vmul(csB, vsplat(qS));
      const ssA = vmul(siA, siA);
      const ssB = vmul(siB, siB);
      const kapA = vmad(coA, ttA, ssA);
      const kapB = vmad(coB, ttB, ssB);
      const csnA = vmul(coA, siA);
      const csnB = vmul(coB, siB);
      // g_x . m and g_y . m
      const bmA = vmad(bxA, mxA, vmad(byA, myA, vmul(bzA, mzA)));
      const bmB = vmad(bxB, mxB, vmad(byB, myB, vmul(bzB, mzB)));
      const kbmA = vmul(kapA, bmA);
      const kbmB = vmul(kapB, bmB);
      const gxmA = vmad(bxA, kbmA, vmad(csnA, mxA, vmul(ssA, vsub(vmul(bzA, myA), vmul(byA, mzA)))));
      const gxmB = vmad(bxB, kbmB, vmad(csnB, mxB, vmul(ssB, vsub(vmul(bzB, myB), vmul(byB, mzB)))));
      const gymA = vmad(byA, kbmA, vmad(csnA, myA, vmul(ssA, vsub(vmul(bxA, mzA), vmul(bzA, mxA)))));
      const gymB = vmad(byB, kbmB, vmad(csnB, myB, vmul(ssB, vsub(vmul(bxB, mzB), vmul(bzB, mxB)))));
      let gIA = vmul(faA, gxmA);
      let gIB = vmul(faB, gxmB);
      let gQA = vmul(faA, gymA);
      let gQB = vmul(faB, gymB);
      // w = S b; rotation coefficients
      const wxA = vmul(siA, bxA), wyA = vmul(siA, byA), wzA = vmul(siA, bzA);
      const wxB = vmul(siB, bxB), wyB = vmul(siB, byB), wzB = vmul(siB, bzB);
      const c2cA = vadd(coA, coA);
      const c2aA = vsub(vmul(c2cA, coA), one); // cos 2a = 2 cos^2 a - 1
      const c2cB = vadd(coB, coB);
      const c2aB = vsub(vmul(c2cB, coB), one); // cos 2a = 2 cos^2 a - 1
      {
        const mwA = vmad(mxA, wxA, vmad(myA, wyA, vmul(mzA, wzA)));
        const mwB = vmad(mxB, wxB, vmad(myB, wyB, vmul(mzB, wzB)));
        const mw2A = vadd(mwA, mwA);
        const mw2B = vadd(mwB, mwB);
        const nxA = vmad(c2aA, mxA, vmad(c2cA, vsub(vmul(myA, wzA), vmul(mzA, wyA)), vmul(mw2A, wxA)));
        const nxB = vmad(c2aB, mxB, vmad(c2cB, vsub(vmul(myB, wzB), vmul(mzB, wyB)), vmul(mw2B, wxB)));
        const nyA = vmad(c2aA, myA, vmad(c2cA, vsub(vmul(mzA, wxA), vmul(mxA, wzA)), vmul(mw2A, wyA)));
        const nyB = vmad(c2aB, myB, vmad(c2cB, vsub(vmul(mzB, wxB), vmul(mxB, wzB)), vmul(mw2B, wyB)));
        const nzA = vmad(c2aA, mzA, vmad(c2cA, vsub(vmul(mxA, wyA), vmul(myA, wxA)), vmul(mw2A, wzA)));
        const nzB = vmad(c2aB, mzB, vmad(c2cB, vsub(vmul(mxB, wyB), vmul(myB, wxB)), vmul(mw2B, wzB)));
        mxA = nxA; myA = nyA; mzA = nzA;
        mxB = nxB; myB = nyB; mzB = nzB;
      }
      if (mode == MODE_STATE) {
        const pbmA = vmul(kapA, vmad(bxA, pxA, vmad(byA, pyA, vmul(bzA, pzA))));
        const pbmB = vmul(kapB, vmad(bxB, pxB, vmad(byB, pyB, vmul(bzB, pzB))));
        gIA = vmad(fbA, vmad(bxA, pbmA, vmad(csnA, pxA, vmul(ssA, vsub(vmul(bzA, pyA), vmul(byA, pzA))))), gIA);
        gIB = vmad(fbB, vmad(bxB, pbmB, vmad(csnB, pxB, vmul(ssB, vsub(vmul(bzB, pyB), vmul(byB, pzB))))), gIB);
        gQA = vmad(fbA, vmad(byA, pbmA, vmad(csnA, pyA, vmul(ssA, vsub(vmul(bxA, pzA), vmul(bzA, pxA))))), gQA);
        gQB = vmad(fbB, vmad(byB, pbmB, vmad(csnB, pyB, vmul(ssB, vsub(vmul(bxB, pzB), vmul(bzB, pxB))))), gQB);
        const pwA = vmad(pxA, wxA, vmad(pyA, wyA, vmul(pzA, wzA)));
        const pwB = vmad(pxB, wxB, vmad(pyB, wyB, vmul(pzB, wzB)));
        const pw2A = vadd(pwA, pwA);
        const pw2B = vadd(pwB, pwB);
        const nxA = vmad(c2aA, pxA, vmad(c2cA, vsub(vmul(pyA, wzA), vmul(pzA, wyA)), vmul(pw2A, wxA)));
        const nxB = vmad(c2aB, pxB, vmad(c2cB, vsub(vmul(pyB, wzB), vmul(pzB, wyB)), vmul(pw2B, wxB)));
        const nyA = vmad(c2aA, pyA, vmad(c2cA, vsub(vmul(pzA, wxA), vmul(pxA, wzA)), vmul(pw2A, wyA)));
        const nyB = vmad(c2aB, pyB, vmad(c2cB, vsub(vmul(pzB, wxB), vmul(pxB, wzB)), vmul(pw2B, wyB)));
        const nzA = vmad(c2aA, pzA, vmad(c2cA, vsub(vmul(pxA, wyA), vmul(pyA, wxA)), vmul(pw2A, wzA)));
        const nzB = vmad(c2aB, pzB, vmad(c2cB, vsub(vmul(pxB, wyB), vmul(pyB, wxB)), vmul(pw2B, wzB)));
        pxA = nxA; pyA = nyA; pzA = nzA;
        pxB = nxB; pyB = nyB; pzB = nzB;
      }
      const gIp = gradIPtr + (<usize>k << 3);
      const gQp = gradQPtr + (<usize>k << 3);
      store<f64>(gIp, load<f64>(gIp) + vsum(vadd(gIA, gIB)));
      store<f64>(gQp, load<f64>(gQp) + vsum(vadd(gQA, gQB)));
    }
  }
  if (quads < m) {
    mean += gradientPair(iPtr, qPtr, n, c, quads, scalePtr, detPtr, wPtr, targetPtr, mode, outPtr, gradIPtr, gradQPtr, workPtr);
  }
  return mean;
}
