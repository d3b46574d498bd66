// The design objective: from unconstrained optimiser variables x to bounded samples,
// the ensemble figure and gradient, the smoothness penalty, and the chain rule back.
//
// Bounded parametrisation (the bound holds for every x, so no exported sample can
// exceed it):
//   disc (default): (I, Q) = rabiMax * tanh(rho)/rho * (x, y),  rho = |(x, y)|
//   box (named option): I = rabiMax tanh(x), Q = rabiMax tanh(y)
// tanh is capped one part in 2^50 below 1 so that rounding cannot reach the limit.
// Variables are interleaved (x_k, y_k) over the free samples; with zero edges the first
// and last samples are held at zero and carry no variable.

import { ensembleGradient } from './gradient';

const TANH_CAP: f64 = 1.0 - 8.881784197001252e-16;

// The problem being optimised, set once per design start by problemSet.
let pN: i32 = 0;
let pDt: f64 = 0.0;
let pRabiMax: f64 = 0.0;
let pBox: bool = false;
let pFirst: i32 = 0;
let pFree: i32 = 0;
let pSmooth: f64 = 0.0;
let pMode: i32 = 0;
let pM: i32 = 0;
let pI: usize = 0;
let pQ: usize = 0;
let pScale: usize = 0;
let pDet: usize = 0;
let pW: usize = 0;
let pTarget: usize = 0;
let pOut: usize = 0;
let pGI: usize = 0;
let pGQ: usize = 0;
let pWork: usize = 0;
let lastInfidelity: f64 = 0.0;

/** Fix the problem that `objective` evaluates; buffers are laid out as in memory.ts. */
export function problemSet(
  n: i32, dt: f64, rabiMax: f64, box: bool, zeroEdges: bool, smoothness: f64,
  mode: i32, m: i32, iPtr: usize, qPtr: usize, scalePtr: usize, detPtr: usize, wPtr: usize,
  targetPtr: usize, outPtr: usize, gIPtr: usize, gQPtr: usize, workPtr: usize,
): i32 {
  pN = n; pDt = dt; pRabiMax = rabiMax; pBox = box; pSmooth = smoothness; pMode = mode; pM = m;
  pFirst = zeroEdges && n >= 3 ? 1 : 0;
  pFree = zeroEdges && n >= 3 ? n - 2 : n;
  pI = iPtr; pQ = qPtr; pScale = scalePtr; pDet = detPtr; pW = wPtr;
  pTarget = targetPtr; pOut = outPtr; pGI = gIPtr; pGQ = gQPtr; pWork = workPtr;
  return 2 * pFree;
}

/** Number of optimiser variables of the current problem. */
export function problemVariables(): i32 { return 2 * pFree; }

/** Weighted mean infidelity at the last objective evaluation (penalty excluded). */
export function problemInfidelity(): f64 { return lastInfidelity; }

/** tanh(r)/r, with its series below r = 0.01 (terms to r^8; error below 1e-18). */
@inline function tanhRatio(r: f64, t: f64): f64 {
  if (r < 0.01) {
    const r2 = r * r;
    return 1.0 + r2 * (-1.0 / 3.0 + r2 * (2.0 / 15.0 + r2 * (-17.0 / 315.0 + r2 * (62.0 / 2835.0))));
  }
  return t / r;
}

/** (d/dr (tanh(r)/r)) / r, with its series below r = 0.01. */
@inline function tanhRatioSlope(r: f64, t: f64): f64 {
  if (r < 0.01) {
    const r2 = r * r;
    return -2.0 / 3.0 + r2 * (8.0 / 15.0 + r2 * (-102.0 / 315.0 + r2 * (496.0 / 2835.0)));
  }
  const sech2 = 1.0 - t * t;
  return (r * sech2 - t) / (r * r * r);
}

/** Write the samples I, Q (Hz) that the variables x stand for. */
export function controlsFromVariables(xPtr: usize): void {
  const n = pN;
  memory.fill(pI, 0, <usize>n << 3);
  memory.fill(pQ, 0, <usize>n << 3);
  for (let f = 0; f < pFree; f++) {
    const x = load<f64>(xPtr + (<usize>(2 * f) << 3));
    const y = load<f64>(xPtr + (<usize>(2 * f + 1) << 3));
    const k = f + pFirst;
    let i: f64, q: f64;
    if (pBox) {
      i = pRabiMax * Math.max(-TANH_CAP, Math.min(Math.tanh(x), TANH_CAP));
      q = pRabiMax * Math.max(-TANH_CAP, Math.min(Math.tanh(y), TANH_CAP));
    } else {
      const r = Math.sqrt(x * x + y * y);
      const t = Math.min(Math.tanh(r), TANH_CAP);
      const ratio = tanhRatio(r, t);
      i = pRabiMax * ratio * x;
      q = pRabiMax * ratio * y;
    }
    store<f64>(pI + (<usize>k << 3), i);
    store<f64>(pQ + (<usize>k << 3), q);
  }
}

/** Smoothness penalty lambda/(n-1) sum ((dI)^2 + (dQ)^2)/rabiMax^2; adds its gradient to gI, gQ. */
function smoothnessPenalty(): f64 {
  const n = pN;
  if (pSmooth == 0.0 || n < 2) return 0.0;
  const scale = pSmooth / (<f64>(n - 1) * pRabiMax * pRabiMax);
  let sum: f64 = 0.0;
  for (let k = 0; k < n - 1; k++) {
    const di = load<f64>(pI + (<usize>(k + 1) << 3)) - load<f64>(pI + (<usize>k << 3));
    const dq = load<f64>(pQ + (<usize>(k + 1) << 3)) - load<f64>(pQ + (<usize>k << 3));
    sum += di * di + dq * dq;
    const gi = 2.0 * scale * di, gq = 2.0 * scale * dq;
    store<f64>(pGI + (<usize>(k + 1) << 3), load<f64>(pGI + (<usize>(k + 1) << 3)) + gi);
    store<f64>(pGI + (<usize>k << 3), load<f64>(pGI + (<usize>k << 3)) - gi);
    store<f64>(pGQ + (<usize>(k + 1) << 3), load<f64>(pGQ + (<usize>(k + 1) << 3)) + gq);
    store<f64>(pGQ + (<usize>k << 3), load<f64>(pGQ + (<usize>k << 3)) - gq);
  }
  return scale * sum;
}

/** Objective (mean infidelity + penalty) at x; writes its gradient with respect to x to g. */
export function objective(xPtr: usize, gPtr: usize): f64 {
  controlsFromVariables(xPtr);
  const fig = ensembleGradient(pI, pQ, pN, pDt, pScale, pDet, pW, pM, pTarget, pMode, pOut, pGI, pGQ, pWork);
  lastInfidelity = fig;
  const pen = smoothnessPenalty();
  for (let f = 0; f < pFree; f++) {
    const x = load<f64>(xPtr + (<usize>(2 * f) << 3));
    const y = load<f64>(xPtr + (<usize>(2 * f + 1) << 3));
    const k = f + pFirst;
    const gi = load<f64>(pGI + (<usize>k << 3));
    const gq = load<f64>(pGQ + (<usize>k << 3));
    let gx: f64, gy: f64;
    if (pBox) {
      const tx = Math.tanh(x), ty = Math.tanh(y);
      gx = gi * pRabiMax * (1.0 - tx * tx);
      gy = gq * pRabiMax * (1.0 - ty * ty);
    } else {
      const r = Math.sqrt(x * x + y * y);
      const t = Math.tanh(r);
      const f0 = tanhRatio(r, t);
      const f1 = tanhRatioSlope(r, t);
      // d(Omega f(r) x)/dx = Omega (f + f'(r)/r x^2), cross terms Omega f'(r)/r x y
      const dIdx = pRabiMax * (f0 + f1 * x * x), dIdy = pRabiMax * f1 * x * y;
      const dQdy = pRabiMax * (f0 + f1 * y * y);
      gx = gi * dIdx + gq * dIdy;
      gy = gi * dIdy + gq * dQdy;
    }
    store<f64>(gPtr + (<usize>(2 * f) << 3), gx);
    store<f64>(gPtr + (<usize>(2 * f + 1) << 3), gy);
  }
  return fig + pen;
}
