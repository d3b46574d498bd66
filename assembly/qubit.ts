// The two-level system (a qubit driven by I/Q): one implementation of the system seam
// (system.ts). The sweeps themselves are generated from qubit-sweeps.template.ts.
//
// Members are processed two per v128 (lanes 0, 1); the sweeps run two such pairs side by
// side so that the CPU has independent chains to overlap, and a last pair alone. Each
// member's total propagator U = U_n ... U_1 enters through W = G U H (see memory.ts), and
//   gate  (mode 0): 1 - F = (Im uW)^2 + |vW|^2 = |w|^2 of W = w0 - i w.sigma (no cancellation)
//   state (mode 1): 1 - |<0|W|0>|^2 = |vW|^2
//
// Member parameters (structure of arrays, m each): scale = 1 + amplitude error, then
// detuning (Hz). Target: G = (u, v) then H = (u, v) as re, im pairs (8 values).
//
// The gradient's backward sweep carries only the vector part m of M_k = R_{k+1} L_k (and
// m' of M'_k = R_{k+1} K L_k for states): M_{k-1} = U_k^dag M_k U_k is a rotation of m,
//   m <- (cos^2 a - sin^2 a) m + 2 cos a (m x w) + 2 (m . w) w,   w = S b,
// and with dU/dbx U^dag = -i g_x . sigma (traceless, since U stays in SU(2)),
//   Tr(dU/dbx P_k) = -2 g_x . m,   g_x = bx (S^2 + C T) b + C S e_x - S^2 (e_x x b)
// (likewise for y). So the gradient needs no stored products, only cos a, S, T
// (GRAPE with exact segment derivatives: Khaneja et al., J. Magn. Reson. 172, 296 (2005);
// de Fouquieres et al., J. Magn. Reson. 212, 412 (2011)).

import { seriesTerms, halvings } from './su2';
import { figureQuad, figurePair, gradientQuad, gradientPair } from './generated/qubit-sweeps';
import { Problem } from './problem';
import { blocksFigure, blocksGradient, blocksWorkBytes, distinctMembers } from './qubit-blocks';

/** Member parameters per member: scale (1 + amplitude error) and detuning. */
export const QUBIT_PARAMS: i32 = 2;
/** Values of an encoded target: G and H as (ur, ui, vr, vi). */
export const QUBIT_TARGET_VALUES: i32 = 8;
/** Members are padded to a multiple of this (pairs per v128). */
export const QUBIT_MEMBER_MULTIPLE: i32 = 2;

/**
 * Scratch of the gradient sweeps: cos a, S, T per segment for two pairs (12 n f64), or
 * one member's blocks of segments (qubit-blocks.ts), whichever is larger.
 */
export function qubitWorkValues(nDrive: i32): i32 { return max(12 * nDrive, <i32>(blocksWorkBytes(nDrive) >> 3)); }

/**
 * Series settings for the largest angle of a job, packed as terms | halvings << 8:
 * a = pi dt sqrt(scale^2 (I^2 + Q^2) + detuning^2) over every segment and member.
 */
export function seriesSettings(iPtr: usize, qPtr: usize, n: i32, c: f64, scalePtr: usize, detPtr: usize, m: i32): i32 {
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
  const halv = halvings(amax);
  return seriesTerms(amax / <f64>(<i64>1 << halv)) | (halv << 8);
}

/**
 * Infidelity of each member (written to out[m]) and their weighted mean (returned).
 * m must be even (pad with zero-weight members); work holds qubitWorkValues(n) f64. One
 * member (not counting its zero-weight copies, the padding) runs blocks of segments in the
 * lanes (qubit-blocks.ts), as the gradient does.
 */
export function ensembleFigure(
  iPtr: usize, qPtr: usize, n: i32, dt: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize, workPtr: usize, series: i32,
): f64 {
  const c = Math.PI * dt;
  if (distinctMembers(scalePtr, detPtr, wPtr, m) == 1) {
    return blocksFigure(iPtr, qPtr, n, c, scalePtr, detPtr, wPtr, m, targetPtr, mode, outPtr, workPtr, series);
  }
  let mean: f64 = 0.0;
  const quads = m & ~3;
  for (let j = 0; j < quads; j += 4) {
    mean = figureQuad(iPtr, qPtr, n, c, j, scalePtr, detPtr, wPtr, targetPtr, mode, outPtr, series, mean);
  }
  if (quads < m) mean = figurePair(iPtr, qPtr, n, c, quads, scalePtr, detPtr, wPtr, targetPtr, mode, outPtr, series, mean);
  return mean;
}

/**
 * Weighted mean infidelity (returned), each member's infidelity (out[m]) and the exact
 * gradient of the mean with respect to every sample (gradI[n], gradQ[n], per Hz).
 * m must be even; work holds qubitWorkValues(n) f64. One member (not counting zero-weight
 * copies of member 0, the padding) runs blocks of segments in the lanes (qubit-blocks.ts).
 */
export function ensembleGradient(
  iPtr: usize, qPtr: usize, n: i32, dt: f64,
  scalePtr: usize, detPtr: usize, wPtr: usize, m: i32,
  targetPtr: usize, mode: i32, outPtr: usize,
  gradIPtr: usize, gradQPtr: usize, workPtr: usize, series: i32,
): f64 {
  const c = Math.PI * dt;
  // One member: blocks of segments in the lanes (with two or three members, measured no faster).
  if (distinctMembers(scalePtr, detPtr, wPtr, m) == 1) {
    return blocksGradient(iPtr, qPtr, n, c, scalePtr, detPtr, wPtr, m, targetPtr, mode, outPtr, gradIPtr, gradQPtr, workPtr, series);
  }
  memory.fill(gradIPtr, 0, <usize>n << 3);
  memory.fill(gradQPtr, 0, <usize>n << 3);
  let mean: f64 = 0.0;
  const quads = m & ~3;
  for (let j = 0; j < quads; j += 4) {
    mean = gradientQuad(iPtr, qPtr, n, c, j, scalePtr, detPtr, wPtr, targetPtr, mode, outPtr, gradIPtr, gradQPtr, workPtr, series, mean);
  }
  if (quads < m) {
    mean = gradientPair(iPtr, qPtr, n, c, quads, scalePtr, detPtr, wPtr, targetPtr, mode, outPtr, gradIPtr, gradQPtr, workPtr, series, mean);
  }
  return mean;
}

/** The problem's ensemble figure on its drive (system seam: figure). */
export function qubitFigure(p: Problem): f64 {
  const m = p.m;
  const scale = p.members, det = p.members + (<usize>m << 3);
  const c = Math.PI * p.driveDt;
  p.series = seriesSettings(p.driveI, p.driveQ, p.nDrive, c, scale, det, m);
  return ensembleFigure(p.driveI, p.driveQ, p.nDrive, p.driveDt, scale, det, p.weight, m, p.target, p.mode, p.perMember, p.work, p.series);
}

/** The problem's ensemble figure and its gradient with respect to the drive (system seam: gradient). */
export function qubitGradient(p: Problem): f64 {
  const m = p.m;
  const scale = p.members, det = p.members + (<usize>m << 3);
  const c = Math.PI * p.driveDt;
  p.series = seriesSettings(p.driveI, p.driveQ, p.nDrive, c, scale, det, m);
  return ensembleGradient(p.driveI, p.driveQ, p.nDrive, p.driveDt, scale, det, p.weight, m, p.target, p.mode,
    p.perMember, p.gradDriveI, p.gradDriveQ, p.work, p.series);
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
