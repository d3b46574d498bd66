// Ensemble figure and exact gradient of a piecewise-constant I/Q pulse on a d-level
// ladder (model and segment method: ladder.ts; figures: ladder-figure.ts). One member at
// a time, scalar f64: the caller hands every buffer in, the kernels never allocate.
//
// Members are four f64 arrays of length m: scale (1 + amplitude error), detuning (Hz),
// alpha (anharmonicity, Hz) and weight (normalised by the caller). Outputs: out[3 m] =
// figure[m], leakage[m], free phase[m] (radians); gradI[n], gradQ[n] (per Hz).
//
// Workspace (f64 slots, ladderWorkspaceSize(n, d)):
//   records[n * recordSize(d)]   each segment's eigendecomposition (gradient only)
//   states[(n + 1) * 4 d]        X_k = U_k ... U_1 H0 (d x 2 complex) before segment k+1
//   scratch[8 d^2 + 32 d + 16]   tridiagonal matrix, adjoint, eigenbasis blocks, Y, T
//
// Gradient (GRAPE, Khaneja et al., J. Magn. Reson. 172, 296, 2005): with the adjoint
// L_k = (U_n ... U_{k+1})^dag blockdiag(G,1)^dag E (ladder-figure.ts),
//   dJ/dc_k = Re Tr(L_k^dag dU_k X_{k-1}).
// dU_k from the eigenbasis (Daleckii-Krein divided differences): with H = Vf lam Vf^dag,
//   Vf^dag dU Vf = (-i F) o (Vf^dag dH Vf),  F_jk = dt e^{-i (lam_j + lam_k) dt/2} sinc((lam_j - lam_k) dt/2),
// exact for any spectrum (no division by a small eigenvalue gap). Vf = D V, so
//   dJ/dc = Re sum_pq K_pq (V Y V^T)_pq,  Y = (-i F) o X,  X_jk = sum_c conj(l'_jc) a'_kc,
// with l' = V^T D^dag L, a' = V^T D^dag X, and K = D^dag dH/dc D, tridiagonal:
//   K_I(k-1,k) = pi s sqrt(k) e^{i phi}, K_Q(k-1,k) = -i pi s sqrt(k) e^{i phi}, Hermitian.

import {
  getf, setf, recordSize, recLam, recHc, recHs, recPhi, segmentEigen, applySegment, toEigenbasis,
} from './ladder';
import { ladderFinal, ladderStart } from './ladder-figure';
import { Problem } from './problem';

/** Member parameters per member of the ladder: scale, detuning, anharmonicity (Hz). */
export const LADDER_PARAMS: i32 = 3;
/** Output per member: figure, leakage, free phase. */
export const LADDER_MEMBER_VALUES: i32 = 3;

/** Scratch f64 slots of the ladder kernels for d levels. */
function scratchSize(d: i32): i32 { return 8 * d * d + 32 * d + 16; }

/** Workspace f64 slots the ladder kernels need for n segments and d levels. */
export function ladderWorkspaceSize(n: i32, d: i32): i32 {
  return n * recordSize(d) + (n + 1) * 4 * d + scratchSize(d);
}

@inline function at(ptr: usize, k: i32): usize { return ptr + (<usize>k << 3); }

/**
 * Figure of every member (out[3 m]: figure, leakage, free phase) and the weighted mean
 * figure (returned). Modes: 0 gate, 1 state, 2 gate with a free phase after.
 */
export function ladderFigure(
  iPtr: usize, qPtr: usize, n: i32, dt: f64, d: i32,
  scalePtr: usize, detPtr: usize, alphaPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize, workPtr: usize,
): f64 {
  const rec = workPtr;
  const x = at(rec, recordSize(d));
  const s = at(x, 4 * d);
  const tmp = at(s, d * d);
  const adj = at(tmp, 8 * d);
  const res = at(adj, 4 * d);
  const g = at(res, 4);
  let mean: f64 = 0.0;
  for (let j = 0; j < m; j++) {
    const scale = getf(scalePtr, j), det = getf(detPtr, j), alpha = getf(alphaPtr, j);
    ladderStart(d, targetPtr, x);
    for (let k = 0; k < n; k++) {
      segmentEigen(d, dt, getf(iPtr, k), getf(qPtr, k), det, scale, alpha, rec, s);
      applySegment(d, rec, x, false, tmp);
    }
    ladderFinal(d, x, targetPtr, mode, 0.0, res, adj, g);
    const figure = getf(res, 0);
    setf(outPtr, j, figure);
    setf(outPtr, m + j, getf(res, 1));
    setf(outPtr, 2 * m + j, getf(res, 2));
    mean += getf(wPtr, j) * figure;
  }
  return mean;
}

/**
 * ladderFigure plus the exact gradient of the weighted mean figure with respect to every
 * sample's I and Q (gradI[n], gradQ[n], per Hz, overwritten). Returns the weighted mean.
 */
export function ladderGradient(
  iPtr: usize, qPtr: usize, n: i32, dt: f64, d: i32,
  scalePtr: usize, detPtr: usize, alphaPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize, gIPtr: usize, gQPtr: usize, workPtr: usize,
): f64 {
  const rs = recordSize(d);
  const recs = workPtr;
  const states = at(recs, n * rs);
  const s = at(states, (n + 1) * 4 * d);
  const tmp = at(s, d * d);
  const adj = at(tmp, 8 * d);
  const res = at(adj, 4 * d);
  const g = at(res, 4);
  const la = at(g, 8);
  const ll = at(la, 4 * d);
  const y = at(ll, 4 * d);
  const t = at(y, 2 * d * d);
  for (let k = 0; k < n; k++) { setf(gIPtr, k, 0.0); setf(gQPtr, k, 0.0); }
  let mean: f64 = 0.0;
  for (let j = 0; j < m; j++) {
    const scale = getf(scalePtr, j), det = getf(detPtr, j), alpha = getf(alphaPtr, j);
    const w = getf(wPtr, j);
    ladderStart(d, targetPtr, states);
    for (let k = 0; k < n; k++) {
      const rec = at(recs, k * rs);
      segmentEigen(d, dt, getf(iPtr, k), getf(qPtr, k), det, scale, alpha, rec, s);
      const next = at(states, (k + 1) * 4 * d);
      memory.copy(next, at(states, k * 4 * d), <usize>(32 * d));
      applySegment(d, rec, next, false, tmp);
    }
    ladderFinal(d, at(states, n * 4 * d), targetPtr, mode, w, res, adj, g);
    const figure = getf(res, 0);
    setf(outPtr, j, figure);
    setf(outPtr, m + j, getf(res, 1));
    setf(outPtr, 2 * m + j, getf(res, 2));
    mean += w * figure;
    if (w == 0.0) continue;
    for (let k = n - 1; k >= 0; k--) {
      const rec = at(recs, k * rs);
      segmentSlope(d, dt, scale, rec, at(states, k * 4 * d), adj, la, ll, y, t, at(gIPtr, k), at(gQPtr, k));
      applySegment(d, rec, adj, true, tmp);
    }
  }
  return mean;
}

/**
 * sin(x)/x for x = x_j - x_k, given cos x_j, -sin x_j, cos x_k, -sin x_k: by its series
 * below 0.5 (the first omitted term, x^14/15!, is below 1e-16 relative), else from the
 * difference formula, whose rounding is a few ulps of |x_j| + |x_k| over |x| >= 0.5. No
 * sine call per pair of eigenvalues.
 */
@inline function sincOfDifference(x: f64, cj: f64, sj: f64, ck: f64, sk: f64): f64 {
  const x2 = x * x;
  if (x2 < 0.25) {
    return 1.0 - x2 / 6.0 * (1.0 - x2 / 20.0 * (1.0 - x2 / 42.0 * (1.0 - x2 / 72.0 * (1.0 - x2 / 110.0 * (1.0 - x2 / 156.0)))));
  }
  return (cj * sk - sj * ck) / x;
}

/**
 * Add Re Tr(L^dag dU/dI X) and the same for Q (per Hz) to gI, gQ for one segment: X the
 * block before the segment, L the adjoint after it (both d x 2 complex).
 */
export function segmentSlope(
  d: i32, dt: f64, scale: f64, rec: usize, xPtr: usize, lPtr: usize,
  la: usize, ll: usize, y: usize, t: usize, gI: usize, gQ: usize,
): void {
  // t is free until T = V Y below: scratch for the changes of basis.
  toEigenbasis(d, rec, xPtr, la, t);
  toEigenbasis(d, rec, lPtr, ll, t);
  const lam = recLam(d), hc = recHc(d), hs = recHs(d);
  // Y_jk = -i F_jk sum_c conj(l'_jc) a'_kc
  for (let j = 0; j < d; j++) {
    const lj = getf(rec, lam + j), cj = getf(rec, hc + j), sj = getf(rec, hs + j);
    for (let k = 0; k < d; k++) {
      let xr: f64 = 0.0, xi: f64 = 0.0;
      for (let c = 0; c < 2; c++) {
        const lr = getf(ll, 2 * (2 * j + c)), li = getf(ll, 2 * (2 * j + c) + 1);
        const ar = getf(la, 2 * (2 * k + c)), ai = getf(la, 2 * (2 * k + c) + 1);
        xr += lr * ar + li * ai;
        xi += lr * ai - li * ar;
      }
      const ck = getf(rec, hc + k), sk = getf(rec, hs + k);
      const f = dt * sincOfDifference(0.5 * (lj - getf(rec, lam + k)) * dt, cj, sj, ck, sk);
      const fr = f * (cj * ck - sj * sk), fi = f * (cj * sk + sj * ck);
      // (-i)(fr + i fi) = fi - i fr
      const pr = fi, pi = -fr;
      setf(y, 2 * (j * d + k), pr * xr - pi * xi);
      setf(y, 2 * (j * d + k) + 1, pr * xi + pi * xr);
    }
  }
  // T = V Y
  for (let p = 0; p < d; p++) {
    for (let k = 0; k < d; k++) {
      let tr: f64 = 0.0, ti: f64 = 0.0;
      for (let j = 0; j < d; j++) {
        const v = getf(rec, p * d + j);
        tr += v * getf(y, 2 * (j * d + k));
        ti += v * getf(y, 2 * (j * d + k) + 1);
      }
      setf(t, 2 * (p * d + k), tr);
      setf(t, 2 * (p * d + k) + 1, ti);
    }
  }
  const cphi = getf(rec, recPhi(d)), sphi = getf(rec, recPhi(d) + 1);
  let dI: f64 = 0.0, dQ: f64 = 0.0;
  for (let q = 1; q < d; q++) {
    const p = q - 1;
    // Z'_pq and Z'_qp of Z' = T V^T
    let ur: f64 = 0.0, ui: f64 = 0.0, lr: f64 = 0.0, li: f64 = 0.0;
    for (let k = 0; k < d; k++) {
      const vq = getf(rec, q * d + k), vp = getf(rec, p * d + k);
      ur += getf(t, 2 * (p * d + k)) * vq; ui += getf(t, 2 * (p * d + k) + 1) * vq;
      lr += getf(t, 2 * (q * d + k)) * vp; li += getf(t, 2 * (q * d + k) + 1) * vp;
    }
    const c = Math.PI * scale * Math.sqrt(<f64>q);
    // e^{i phi} Z'_pq and e^{-i phi} Z'_qp
    const ar = cphi * ur - sphi * ui, ai = cphi * ui + sphi * ur;
    const br = cphi * lr + sphi * li, bi = cphi * li - sphi * lr;
    dI += c * (ar + br);
    dQ += c * (ai - bi);
  }
  store<f64>(gI, load<f64>(gI) + dI);
  store<f64>(gQ, load<f64>(gQ) + dQ);
}

/**
 * Populations of every level after each sample for one member, starting from the state
 * H|0> of the target block (8 f64, as for the figures): out[(n + 1) d], sample-major.
 * Workspace: ladderWorkspaceSize(1, d) f64.
 */
export function ladderPopulations(
  iPtr: usize, qPtr: usize, n: i32, dt: f64, d: i32,
  scale: f64, detuning: f64, alpha: f64, targetPtr: usize, outPtr: usize, workPtr: usize,
): void {
  const rec = workPtr;
  const x = at(rec, recordSize(d));
  const s = at(x, 4 * d);
  const tmp = at(s, d * d);
  ladderStart(d, targetPtr, x);
  for (let k = 0; k <= n; k++) {
    for (let r = 0; r < d; r++) {
      const re = getf(x, 4 * r), im = getf(x, 4 * r + 1);
      setf(outPtr, k * d + r, re * re + im * im);
    }
    if (k == n) break;
    segmentEigen(d, dt, getf(iPtr, k), getf(qPtr, k), detuning, scale, alpha, rec, s);
    applySegment(d, rec, x, false, tmp);
  }
}

/** The problem's ensemble figure on a ladder of p.dim levels (system seam: figure). */
export function ladderSystemFigure(p: Problem): f64 {
  const m = p.m;
  const det = p.members + (<usize>m << 3), alpha = p.members + (<usize>(2 * m) << 3);
  return ladderFigure(p.driveI, p.driveQ, p.nDrive, p.driveDt, p.dim, p.members, det, alpha, p.weight, m,
    p.target, p.mode, p.perMember, p.work);
}

/** The problem's ensemble figure on a ladder and its gradient with respect to the drive (system seam: gradient). */
export function ladderSystemGradient(p: Problem): f64 {
  const m = p.m;
  const det = p.members + (<usize>m << 3), alpha = p.members + (<usize>(2 * m) << 3);
  return ladderGradient(p.driveI, p.driveQ, p.nDrive, p.driveDt, p.dim, p.members, det, alpha, p.weight, m,
    p.target, p.mode, p.perMember, p.gradDriveI, p.gradDriveQ, p.work);
}
