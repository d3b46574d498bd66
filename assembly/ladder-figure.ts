// Figures of a ladder member on the qubit subspace, and the adjoint that starts the
// backward sweep of the gradient (ladder-sweep.ts).
//
// The forward sweep ends with X = U H0 (d x 2: the images of the two columns of the
// target's H, embedded in levels 0, 1). With the target's G (2 x 2) acting on levels 0, 1,
// Z = blockdiag(G, 1) X. Every figure is a sum of non-negative terms (no cancellation):
//   gate  (mode 0): W = Z[0:2, 0:2] = V^dag M with M = P U P; W = w0 1 - i w.sigma,
//                   1 - |Tr W|^2/4 = L + |w|^2,
//                   |w|^2 = |Z00 - Z11|^2/4 + (|Z01|^2 + |Z10|^2)/2,
//                   L = 1 - Tr(M^dag M)/2 = (1/2) sum_{i>=2, c<2} |Z_ic|^2 (populations that left);
//   gate with a free phase after (mode 2): the same for G Rz(phi) with the phi that
//                   maximises |Tr(V^dag Rz(phi) M)|, Rz(phi) = exp(-i phi sz/2);
//   state (mode 1): 1 - |<to|U|from>|^2 = |Z10|^2 + sum_{i>=2} |Z_i0|^2, L = sum_{i>=2} |Z_i0|^2.
// The figure's differential is dJ = Re sum conj(E_ic) dZ_ic; the adjoint handed to the
// backward sweep is blockdiag(G, 1)^dag E, times the member's weight.

import { getf, setf } from './ladder';

export const LADDER_GATE: i32 = 0;
export const LADDER_STATE: i32 = 1;
export const LADDER_GATE_FREE_PHASE: i32 = 2;

/**
 * From the final block X (d x 2 complex) and the target (8 f64: G = (u, v), H = (u, v) as
 * in memory.ts), write res[0] = figure, res[1] = leakage, res[2] = free phase (radians, 0
 * unless mode 2) and the weighted adjoint (d x 2 complex) at adjPtr. gPtr: 8 f64 scratch.
 */
export function ladderFinal(
  d: i32, xPtr: usize, targetPtr: usize, mode: i32, weight: f64,
  resPtr: usize, adjPtr: usize, gPtr: usize,
): void {
  // G = [[u, -conj v], [v, conj u]], row-major interleaved.
  const ur = getf(targetPtr, 0), ui = getf(targetPtr, 1), vr = getf(targetPtr, 2), vi = getf(targetPtr, 3);
  setf(gPtr, 0, ur); setf(gPtr, 1, ui);
  setf(gPtr, 2, -vr); setf(gPtr, 3, vi);
  setf(gPtr, 4, vr); setf(gPtr, 5, vi);
  setf(gPtr, 6, ur); setf(gPtr, 7, -ui);
  let phase: f64 = 0.0;
  if (mode == LADDER_GATE_FREE_PHASE) {
    // N = X_top G; Tr(Rz(phi) N) is largest in modulus at phi = arg N00 - arg N11.
    const n00r = cmulR(xr(xPtr, 0, 0), xi(xPtr, 0, 0), getf(gPtr, 0), getf(gPtr, 1))
      + cmulR(xr(xPtr, 0, 1), xi(xPtr, 0, 1), getf(gPtr, 4), getf(gPtr, 5));
    const n00i = cmulI(xr(xPtr, 0, 0), xi(xPtr, 0, 0), getf(gPtr, 0), getf(gPtr, 1))
      + cmulI(xr(xPtr, 0, 1), xi(xPtr, 0, 1), getf(gPtr, 4), getf(gPtr, 5));
    const n11r = cmulR(xr(xPtr, 1, 0), xi(xPtr, 1, 0), getf(gPtr, 2), getf(gPtr, 3))
      + cmulR(xr(xPtr, 1, 1), xi(xPtr, 1, 1), getf(gPtr, 6), getf(gPtr, 7));
    const n11i = cmulI(xr(xPtr, 1, 0), xi(xPtr, 1, 0), getf(gPtr, 2), getf(gPtr, 3))
      + cmulI(xr(xPtr, 1, 1), xi(xPtr, 1, 1), getf(gPtr, 6), getf(gPtr, 7));
    phase = Math.atan2(n00i, n00r) - Math.atan2(n11i, n11r);
    if (phase > Math.PI) phase -= 2.0 * Math.PI;
    if (phase < -Math.PI) phase += 2.0 * Math.PI;
    // G <- G Rz(phase): column 0 times e^{-i phase/2}, column 1 times e^{+i phase/2}.
    const c = Math.cos(0.5 * phase), s = Math.sin(0.5 * phase);
    for (let row = 0; row < 2; row++) {
      const o0 = 4 * row, o1 = 4 * row + 2;
      const ar = getf(gPtr, o0), ai = getf(gPtr, o0 + 1);
      setf(gPtr, o0, ar * c + ai * s); setf(gPtr, o0 + 1, ai * c - ar * s);
      const br = getf(gPtr, o1), bi = getf(gPtr, o1 + 1);
      setf(gPtr, o1, br * c - bi * s); setf(gPtr, o1 + 1, bi * c + br * s);
    }
  }
  // Z_top = G X_top, kept in locals.
  let z00r: f64 = 0, z00i: f64 = 0, z01r: f64 = 0, z01i: f64 = 0;
  let z10r: f64 = 0, z10i: f64 = 0, z11r: f64 = 0, z11i: f64 = 0;
  for (let k = 0; k < 2; k++) {
    const g0r = getf(gPtr, 2 * k), g0i = getf(gPtr, 2 * k + 1);
    const g1r = getf(gPtr, 4 + 2 * k), g1i = getf(gPtr, 4 + 2 * k + 1);
    z00r += cmulR(g0r, g0i, xr(xPtr, k, 0), xi(xPtr, k, 0)); z00i += cmulI(g0r, g0i, xr(xPtr, k, 0), xi(xPtr, k, 0));
    z01r += cmulR(g0r, g0i, xr(xPtr, k, 1), xi(xPtr, k, 1)); z01i += cmulI(g0r, g0i, xr(xPtr, k, 1), xi(xPtr, k, 1));
    z10r += cmulR(g1r, g1i, xr(xPtr, k, 0), xi(xPtr, k, 0)); z10i += cmulI(g1r, g1i, xr(xPtr, k, 0), xi(xPtr, k, 0));
    z11r += cmulR(g1r, g1i, xr(xPtr, k, 1), xi(xPtr, k, 1)); z11i += cmulI(g1r, g1i, xr(xPtr, k, 1), xi(xPtr, k, 1));
  }
  let leak: f64 = 0.0, figure: f64;
  // E_top, then the adjoint; rows >= 2 of E are the leaked amplitudes (scaled).
  let e00r: f64, e00i: f64, e01r: f64, e01i: f64, e10r: f64, e10i: f64, e11r: f64, e11i: f64;
  if (mode == LADDER_STATE) {
    for (let r = 2; r < d; r++) {
      const a = xr(xPtr, r, 0), b = xi(xPtr, r, 0);
      leak += a * a + b * b;
      setf(adjPtr, 4 * r, 2.0 * weight * a); setf(adjPtr, 4 * r + 1, 2.0 * weight * b);
      setf(adjPtr, 4 * r + 2, 0.0); setf(adjPtr, 4 * r + 3, 0.0);
    }
    figure = z10r * z10r + z10i * z10i + leak;
    e00r = 0; e00i = 0; e01r = 0; e01i = 0; e11r = 0; e11i = 0;
    e10r = 2.0 * weight * z10r; e10i = 2.0 * weight * z10i;
  } else {
    for (let r = 2; r < d; r++) {
      for (let c = 0; c < 2; c++) {
        const a = xr(xPtr, r, c), b = xi(xPtr, r, c);
        leak += a * a + b * b;
        setf(adjPtr, 2 * (2 * r + c), weight * a); setf(adjPtr, 2 * (2 * r + c) + 1, weight * b);
      }
    }
    leak *= 0.5;
    const dr = z00r - z11r, di = z00i - z11i;
    figure = leak + 0.25 * (dr * dr + di * di) + 0.5 * (z01r * z01r + z01i * z01i + z10r * z10r + z10i * z10i);
    e00r = 0.5 * weight * dr; e00i = 0.5 * weight * di;
    e11r = -e00r; e11i = -e00i;
    e01r = weight * z01r; e01i = weight * z01i;
    e10r = weight * z10r; e10i = weight * z10i;
  }
  // Adjoint top rows: G^dag E_top, (G^dag)_{kj} = conj(G_jk).
  for (let k = 0; k < 2; k++) {
    const a0r = getf(gPtr, 2 * k), a0i = -getf(gPtr, 2 * k + 1);
    const a1r = getf(gPtr, 4 + 2 * k), a1i = -getf(gPtr, 4 + 2 * k + 1);
    setf(adjPtr, 4 * k, cmulR(a0r, a0i, e00r, e00i) + cmulR(a1r, a1i, e10r, e10i));
    setf(adjPtr, 4 * k + 1, cmulI(a0r, a0i, e00r, e00i) + cmulI(a1r, a1i, e10r, e10i));
    setf(adjPtr, 4 * k + 2, cmulR(a0r, a0i, e01r, e01i) + cmulR(a1r, a1i, e11r, e11i));
    setf(adjPtr, 4 * k + 3, cmulI(a0r, a0i, e01r, e01i) + cmulI(a1r, a1i, e11r, e11i));
  }
  setf(resPtr, 0, figure);
  setf(resPtr, 1, leak);
  setf(resPtr, 2, phase);
}

/** The target's H (u, v) embedded in levels 0, 1 as the d x 2 start block at xPtr. */
export function ladderStart(d: i32, targetPtr: usize, xPtr: usize): void {
  for (let k = 0; k < 4 * d; k++) setf(xPtr, k, 0.0);
  const ur = getf(targetPtr, 4), ui = getf(targetPtr, 5), vr = getf(targetPtr, 6), vi = getf(targetPtr, 7);
  setf(xPtr, 0, ur); setf(xPtr, 1, ui);
  setf(xPtr, 2, -vr); setf(xPtr, 3, vi);
  setf(xPtr, 4, vr); setf(xPtr, 5, vi);
  setf(xPtr, 6, ur); setf(xPtr, 7, -ui);
}

@inline function xr(xPtr: usize, r: i32, c: i32): f64 { return getf(xPtr, 2 * (2 * r + c)); }
@inline function xi(xPtr: usize, r: i32, c: i32): f64 { return getf(xPtr, 2 * (2 * r + c) + 1); }
@inline function cmulR(ar: f64, ai: f64, br: f64, bi: f64): f64 { return ar * br - ai * bi; }
@inline function cmulI(ar: f64, ai: f64, br: f64, bi: f64): f64 { return ar * bi + ai * br; }
