// The ensemble figure of a piecewise-constant I/Q pulse, the series settings shared with
// the gradient (gradient.ts), and the Bloch path of one member.
//
// Members are processed two per v128 (lanes 0, 1); the figure kernel runs two such
// pairs side by side so that the CPU has independent chains to overlap. Each member's
// total propagator U = U_n ... U_1 enters through W = G U H (see memory.ts), and
//   gate  (mode 0): 1 - F = (Im uW)^2 + |vW|^2 = |w|^2 of W = w0 - i w.sigma (no cancellation)
//   state (mode 1): 1 - |<0|W|0>|^2 = |vW|^2

import {
  vadd, vsub, vmul, vneg, vsplat, vmad, vsum,
  seriesCos, seriesSinc, seriesTerms, halvings,
  qmulUr, qmulUi, qmulVr, qmulVi,
} from './su2';

export const MODE_GATE: i32 = 0;
export const MODE_STATE: i32 = 1;

// Series settings of the current job, chosen from its largest segment angle.
export let jobTerms: i32 = 2;
export let jobHalvings: i32 = 0;

/** Choose the series length and halvings for the largest angle of a job. */
export function prepareAngles(iPtr: usize, qPtr: usize, n: i32, c: f64, scalePtr: usize, detPtr: usize, m: i32): void {
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

@inline export function ld(ptr: usize, j: i32): v128 { return v128.load(ptr + (<usize>j << 3)); }

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
    const bzA = vmul(ld(detPtr, j), vsplat(-c)), bzB = vmul(ld(detPtr, j + 2), vsplat(-c));
    const bz2A = vmul(bzA, bzA), bz2B = vmul(bzB, bzB);
    // Negated once per member so that the segment's ui = -S bz costs one multiply.
    const nbzA = vneg(bzA), nbzB = vneg(bzB);
    let aurA = vsplat(hur), auiA = vsplat(hui), avrA = vsplat(hvr), aviA = vsplat(hvi);
    let aurB = aurA, auiB = auiA, avrB = avrA, aviB = aviA;

    for (let k = 0; k < n; k++) {
      const iS = load<f64>(iPtr + (<usize>k << 3));
      const qS = load<f64>(qPtr + (<usize>k << 3));
      const r2 = vsplat(c2 * (iS * iS + qS * qS));
      const vni = vsplat(-iS), vq = vsplat(qS);
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
      const uurA = cosA, uuiA = vmul(sA_, nbzA), uvrA = vmul(sigA, vq), uviA = vmul(sigA, vni);
      const uurB = cosB, uuiB = vmul(sB_, nbzB), uvrB = vmul(sigB, vq), uviB = vmul(sigB, vni);
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
    const bz = -c * detuning;
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

