// Ensemble figure and exact gradient of a piecewise-constant I/Q pulse.
//
// Members are processed two per v128 (lanes 0, 1); the figure kernel runs two such
// pairs side by side so that the CPU has independent chains to overlap. Each member's
// total propagator U = U_n ... U_1 enters through W = G U H (see memory.ts), and
//   gate  (mode 0): 1 - F = |Tr(W)/2|^2 complement = (Im uW)^2 + |vW|^2   (no cancellation)
//   state (mode 1): 1 - |<0|W|0>|^2 = |vW|^2
// Gradient (GRAPE with exact segment derivatives: Khaneja et al., J. Magn. Reson. 172,
// 296 (2005); de Fouquieres et al., J. Magn. Reson. 212, 412 (2011)): with forward
// products R_k = U_{k-1} ... U_1 H and backward products L_k = G U_n ... U_{k+1},
//   d uW = Tr(dU_k P)/2 + i Tr(dU_k P')/2,   P = R_k L_k,   P' = R_k K L_k,   K = -i sz,
// and  d(1-F) = -(Re uW) Tr(dU P)  (gate),  -(Re uW) Tr(dU P) - (Im uW) Tr(dU P')  (state).
// Tr(dU P) is real because both factors are real combinations of SU(2) elements.

import {
  vadd, vsub, vmul, vneg, vsplat, vmad, vsum,
  seriesCos, seriesSinc, seriesT, seriesTerms, halvings,
  qmulUr, qmulUi, qmulVr, qmulVi,
} from './su2';

export const MODE_GATE: i32 = 0;
export const MODE_STATE: i32 = 1;

// Series settings of the current job, chosen from its largest segment angle.
let jobTerms: i32 = 2;
let jobHalvings: i32 = 0;

/** Choose the series length and halvings for the largest angle of a job. */
function prepareAngles(iPtr: usize, qPtr: usize, n: i32, c: f64, scalePtr: usize, detPtr: usize, m: i32): void {
  let r2max: f64 = 0.0;
  for (let k = 0; k < n; k++) {
    const i = load<f64>(iPtr + (<usize>k << 3));
    const q = load<f64>(qPtr + (<usize>k << 3));
    const r2 = i * i + q * q;
    if (r2 > r2max) r2max = r2;
  }
  let s2max: f64 = 0.0;
  let d2max: f64 = 0.0;
  for (let j = 0; j < m; j++) {
    const s = load<f64>(scalePtr + (<usize>j << 3));
    const d = load<f64>(detPtr + (<usize>j << 3));
    if (s * s > s2max) s2max = s * s;
    if (d * d > d2max) d2max = d * d;
  }
  // Small relative margin: the bound must hold for every member after rounding.
  const amax = c * Math.sqrt(s2max * r2max + d2max) * (1.0 + 1e-12);
  jobHalvings = halvings(amax);
  jobTerms = seriesTerms(amax / <f64>(<i64>1 << jobHalvings));
}

/** Series length in use (for tests and the benchmark). */
export function currentSeriesTerms(): i32 { return jobTerms; }
/** Halvings in use (for tests). */
export function currentHalvings(): i32 { return jobHalvings; }

@inline function ld(ptr: usize, j: i32): v128 { return v128.load(ptr + (<usize>j << 3)); }

/**
 * Infidelity of each member (written to out[m]) and their weighted mean (returned).
 * m must be a multiple of 4 (pad with zero-weight members).
 */
export function ensembleFigure(
  iPtr: usize, qPtr: usize, n: i32, dt: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize,
): f64 {
  const c = Math.PI * dt;
  prepareAngles(iPtr, qPtr, n, c, scalePtr, detPtr, m);
  const terms = jobTerms;
  const halv = jobHalvings;
  const reduce = vsplat(1.0 / <f64>(<i64>1 << (2 * halv)));
  const one = vsplat(1.0);
  const two = vsplat(2.0);
  const four = vsplat(4.0);
  const c2 = c * c;
  const gur = vsplat(load<f64>(targetPtr)), gui = vsplat(load<f64>(targetPtr, 8));
  const gvr = vsplat(load<f64>(targetPtr, 16)), gvi = vsplat(load<f64>(targetPtr, 24));
  const hur = load<f64>(targetPtr, 32), hui = load<f64>(targetPtr, 40);
  const hvr = load<f64>(targetPtr, 48), hvi = load<f64>(targetPtr, 56);
  let mean: f64 = 0.0;

  for (let j = 0; j < m; j += 4) {
    const sA = ld(scalePtr, j), sB = ld(scalePtr, j + 2);
    const s2A = vmul(sA, sA), s2B = vmul(sB, sB);
    const csA = vmul(sA, vsplat(c)), csB = vmul(sB, vsplat(c));
    const bzA = vmul(ld(detPtr, j), vsplat(c)), bzB = vmul(ld(detPtr, j + 2), vsplat(c));
    const bz2A = vmul(bzA, bzA), bz2B = vmul(bzB, bzB);
    let aurA = vsplat(hur), auiA = vsplat(hui), avrA = vsplat(hvr), aviA = vsplat(hvi);
    let aurB = aurA, auiB = auiA, avrB = avrA, aviB = aviA;

    for (let k = 0; k < n; k++) {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const r2 = vsplat(c2 * (iS * iS + qS * qS));
      const vi = vsplat(iS), vq = vsplat(qS);
      let xA = vmad(s2A, r2, bz2A), xB = vmad(s2B, r2, bz2B);
      if (halv > 0) { xA = vmul(xA, reduce); xB = vmul(xB, reduce); }
      let cosA = seriesCos(xA, terms), cosB = seriesCos(xB, terms);
      let sA_ = seriesSinc(xA, terms), sB_ = seriesSinc(xB, terms);
      for (let h = 0; h < halv; h++) {
        const nA = vsub(one, vmul(vmul(two, xA), vmul(sA_, sA_)));
        const nB = vsub(one, vmul(vmul(two, xB), vmul(sB_, sB_)));
        sA_ = vmul(sA_, cosA); sB_ = vmul(sB_, cosB);
        cosA = nA; cosB = nB;
        xA = vmul(xA, four); xB = vmul(xB, four);
      }
      const sigA = vmul(sA_, csA), sigB = vmul(sB_, csB);
      const uurA = cosA, uuiA = vneg(vmul(sA_, bzA)), uvrA = vmul(sigA, vq), uviA = vneg(vmul(sigA, vi));
      const uurB = cosB, uuiB = vneg(vmul(sB_, bzB)), uvrB = vmul(sigB, vq), uviB = vneg(vmul(sigB, vi));
      const nurA = qmulUr(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nuiA = qmulUi(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nvrA = qmulVr(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nviA = qmulVi(uurA, uuiA, uvrA, uviA, aurA, auiA, avrA, aviA);
      const nurB = qmulUr(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nuiB = qmulUi(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nvrB = qmulVr(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      const nviB = qmulVi(uurB, uuiB, uvrB, uviB, aurB, auiB, avrB, aviB);
      aurA = nurA; auiA = nuiA; avrA = nvrA; aviA = nviA;
      aurB = nurB; auiB = nuiB; avrB = nvrB; aviB = nviB;
    }
    // W = G A
    const wuiA = qmulUi(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wvrA = qmulVr(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wviA = qmulVi(gur, gui, gvr, gvi, aurA, auiA, avrA, aviA);
    const wuiB = qmulUi(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    const wvrB = qmulVr(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    const wviB = qmulVi(gur, gui, gvr, gvi, aurB, auiB, avrB, aviB);
    let jA = vadd(vmul(wvrA, wvrA), vmul(wviA, wviA));
    let jB = vadd(vmul(wvrB, wvrB), vmul(wviB, wviB));
    if (mode == MODE_GATE) { jA = vmad(wuiA, wuiA, jA); jB = vmad(wuiB, wuiB, jB); }
    v128.store(outPtr + (<usize>j << 3), jA);
    v128.store(outPtr + (<usize>(j + 2) << 3), jB);
    mean += vsum(vmul(jA, ld(wPtr, j))) + vsum(vmul(jB, ld(wPtr, j + 2)));
  }
  return mean;
}

/**
 * Weighted mean infidelity (returned), each member's infidelity (out[m]) and the exact
 * gradient of the mean with respect to every sample (gradI[n], gradQ[n], per Hz).
 * m must be even; work holds 6 n f64.
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

  for (let j = 0; j < m; j += 2) {
    const s = ld(scalePtr, j);
    const s2 = vmul(s, s);
    const cs = vmul(s, vsplat(c));
    const bz = vmul(ld(detPtr, j), vsplat(c));
    const bz2 = vmul(bz, bz);

    // Forward sweep: the product A = U_n ... U_1 H; cos a, S and T kept per segment.
    let aur = hur, aui = hui, avr = hvr, avi = hvi;
    for (let k = 0; k < n; k++) {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
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
      const uur = co, uui = vneg(vmul(si, bz)), uvr = vmul(sig, vsplat(qS)), uvi = vneg(vmul(sig, vsplat(iS)));
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
      const c2a = vsub(vmul(co, co), vmul(ss, vmad(bx, bx, vmad(by, by, vmul(bz, bz)))));
      const c2c = vadd(co, co);
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
  }
  return mean;
}

/**
 * Bloch vector after each sample for one member, starting from the state H|0>:
 * out[3 (n+1)] = (x, y, z) per step. Scalar path; the trajectory is O(n).
 */
export function blochPath(
  iPtr: usize, qPtr: usize, n: i32, dt: f64,
  scale: f64, detuning: f64, targetPtr: usize, outPtr: usize,
): void {
  const c = Math.PI * dt;
  let pr = load<f64>(targetPtr, 32), pi = load<f64>(targetPtr, 40);
  let qr = load<f64>(targetPtr, 48), qi = load<f64>(targetPtr, 56);
  for (let k = 0; k <= n; k++) {
    // <psi|sigma|psi> for psi = (p, q)
    const o = outPtr + (<usize>(3 * k) << 3);
    store<f64>(o, 2.0 * (pr * qr + pi * qi));
    store<f64>(o, 2.0 * (pr * qi - pi * qr), 8);
    store<f64>(o, pr * pr + pi * pi - qr * qr - qi * qi, 16);
    if (k == n) break;
    const bx = c * scale * load<f64>(iPtr + (<usize>k << 3));
    const by = c * scale * load<f64>(qPtr + (<usize>k << 3));
    const bz = c * detuning;
    const a = Math.sqrt(bx * bx + by * by + bz * bz);
    const co = Math.cos(a);
    const si = a < 1e-8 ? 1.0 - a * a / 6.0 : Math.sin(a) / a;
    const ur = co, ui = -si * bz, vr = si * by, vi = -si * bx;
    // (p, q) <- U (p, q),  U = [[u, -conj v], [v, conj u]]
    const np_r = ur * pr - ui * pi - (vr * qr + vi * qi);
    const np_i = ur * pi + ui * pr - (vr * qi - vi * qr);
    const nq_r = vr * pr - vi * pi + (ur * qr + ui * qi);
    const nq_i = vr * pi + vi * pr + (ur * qi - ui * qr);
    pr = np_r; pi = np_i; qr = nq_r; qi = nq_i;
  }
}

