// The line between the instrument and the system, as a drive map (drive.ts): the
// programmed samples (n of dt) are held on a fine grid of delta = dt / oversample and
// convolved with the line's discrete kernel h (docs/physics.md section 5, "The line").
// Holding is itself a convolution, so the two are one kernel c = h * box(oversample) of
// length Lc = L + oversample - 1 applied to the samples placed every oversample fine steps:
//
//   drive[j] = sum_s c[j - s oversample] u[s],        j < nDrive = (n - 1) oversample + Lc
//   grad_u[s] = sum_t c[t] grad_drive[s oversample + t]          (the transpose)
//
// I and Q go through the same real kernel. Two methods give the same numbers to rounding:
// the direct (polyphase) sum, n Lc products per channel, and the FFT of a power-of-two
// size N >= nDrive with I + iQ as one complex signal (circular convolution with zero
// padding is the linear one there; the transpose multiplies by the conjugate spectrum,
// the correlation of a real kernel). The TypeScript side picks the method by the measured
// crossover (src/core/line-kernel.ts) and sizes the parameters:
//
//   driveData:  [0] oversample  [1] Lc  [2] method (0 direct, 1 FFT)  [3] N
//               [4] spectrum ready (set here on first use)  [5] drive-bound weight
//               [6, 7] unused
//               c[Lc]
//               FFT only: twiddles[N] (N/2 pairs), spectrum[2N], buffer[2N]

import { Problem } from './problem';
import { fft, fftTwiddles } from './fft';

/** Values before the kernel in driveData. */
export const LINE_HEADER: i32 = 8;

@inline function at(ptr: usize, k: i32): usize { return ptr + (<usize>k << 3); }
@inline function param(p: Problem, k: i32): f64 { return load<f64>(at(p.driveData, k)); }

function kernelPtr(p: Problem): usize { return at(p.driveData, LINE_HEADER); }
function twiddlePtr(p: Problem): usize { return at(p.driveData, LINE_HEADER + <i32>param(p, 1)); }
function spectrumPtr(p: Problem): usize { return at(p.driveData, LINE_HEADER + <i32>param(p, 1) + <i32>param(p, 3)); }
function bufferPtr(p: Problem): usize { return at(p.driveData, LINE_HEADER + <i32>param(p, 1) + 3 * <i32>param(p, 3)); }

/** The kernel's spectrum and the twiddles, once per block. */
function prepareSpectrum(p: Problem): void {
  if (param(p, 4) != 0.0) return;
  const size = <i32>param(p, 3), lc = <i32>param(p, 1);
  fftTwiddles(twiddlePtr(p), size);
  const spec = spectrumPtr(p), c = kernelPtr(p);
  memory.fill(spec, 0, <usize>(2 * size) << 3);
  for (let t = 0; t < lc; t++) store<f64>(at(spec, 2 * t), load<f64>(at(c, t)));
  fft(spec, size, twiddlePtr(p), false);
  store<f64>(at(p.driveData, 4), 1.0);
}

/** Multiply the buffer by the spectrum (or its conjugate) and scale by 1/N. */
function applySpectrum(buf: usize, spec: usize, size: i32, conjugate: bool): void {
  const sign: f64 = conjugate ? -1.0 : 1.0;
  const scale = 1.0 / <f64>size;
  for (let k = 0; k < size; k++) {
    const xr = load<f64>(at(buf, 2 * k)), xi = load<f64>(at(buf, 2 * k + 1));
    const hr = load<f64>(at(spec, 2 * k)) * scale, hi = sign * load<f64>(at(spec, 2 * k + 1)) * scale;
    store<f64>(at(buf, 2 * k), xr * hr - xi * hi);
    store<f64>(at(buf, 2 * k + 1), xr * hi + xi * hr);
  }
}

/** Samples -> drive through the line. */
export function lineForward(p: Problem): void {
  const os = <i32>param(p, 0), lc = <i32>param(p, 1), n = p.n, nd = p.nDrive;
  const uI = p.samplesI, uQ = p.samplesQ, dI = p.driveI, dQ = p.driveQ;
  if (param(p, 2) == 0.0) {
    const c = kernelPtr(p);
    for (let j = 0; j < nd; j++) {
      // s with 0 <= j - s os < lc
      const sHi = min(n - 1, j / os);
      const lo = j - lc + 1;
      const sLo = lo <= 0 ? 0 : (lo + os - 1) / os;
      let accI: f64 = 0.0, accQ: f64 = 0.0;
      for (let s = sLo; s <= sHi; s++) {
        const w = load<f64>(at(c, j - s * os));
        accI += w * load<f64>(at(uI, s));
        accQ += w * load<f64>(at(uQ, s));
      }
      store<f64>(at(dI, j), accI);
      store<f64>(at(dQ, j), accQ);
    }
    return;
  }
  prepareSpectrum(p);
  const size = <i32>param(p, 3), buf = bufferPtr(p);
  memory.fill(buf, 0, <usize>(2 * size) << 3);
  for (let s = 0; s < n; s++) {
    store<f64>(at(buf, 2 * s * os), load<f64>(at(uI, s)));
    store<f64>(at(buf, 2 * s * os + 1), load<f64>(at(uQ, s)));
  }
  fft(buf, size, twiddlePtr(p), false);
  applySpectrum(buf, spectrumPtr(p), size, false);
  fft(buf, size, twiddlePtr(p), true);
  for (let j = 0; j < nd; j++) {
    store<f64>(at(dI, j), load<f64>(at(buf, 2 * j)));
    store<f64>(at(dQ, j), load<f64>(at(buf, 2 * j + 1)));
  }
}

/** Gradient with respect to the drive -> with respect to the samples (overwrites p.gradI/Q). */
export function lineTranspose(p: Problem): void {
  const os = <i32>param(p, 0), lc = <i32>param(p, 1), n = p.n, nd = p.nDrive;
  const gI = p.gradI, gQ = p.gradQ, hI = p.gradDriveI, hQ = p.gradDriveQ;
  if (param(p, 2) == 0.0) {
    const c = kernelPtr(p);
    for (let s = 0; s < n; s++) {
      const base = s * os;
      let accI: f64 = 0.0, accQ: f64 = 0.0;
      for (let t = 0; t < lc; t++) {
        const w = load<f64>(at(c, t));
        accI += w * load<f64>(at(hI, base + t));
        accQ += w * load<f64>(at(hQ, base + t));
      }
      store<f64>(at(gI, s), accI);
      store<f64>(at(gQ, s), accQ);
    }
    return;
  }
  prepareSpectrum(p);
  const size = <i32>param(p, 3), buf = bufferPtr(p);
  memory.fill(buf, 0, <usize>(2 * size) << 3);
  for (let j = 0; j < nd; j++) {
    store<f64>(at(buf, 2 * j), load<f64>(at(hI, j)));
    store<f64>(at(buf, 2 * j + 1), load<f64>(at(hQ, j)));
  }
  fft(buf, size, twiddlePtr(p), false);
  applySpectrum(buf, spectrumPtr(p), size, true);
  fft(buf, size, twiddlePtr(p), true);
  for (let s = 0; s < n; s++) {
    store<f64>(at(gI, s), load<f64>(at(buf, 2 * s * os)));
    store<f64>(at(gQ, s), load<f64>(at(buf, 2 * s * os + 1)));
  }
}

/**
 * The bound on the drive the system sees ("boundOn": "both"): the exterior penalty
 * weight * sum_j max(0, |drive_j| / rabiMax - 1)^2, its gradient added to p.gradDriveI/Q.
 * Zero weight (the default, and every line whose kernel is non-negative, where the drive
 * cannot exceed the samples' bound) costs one load.
 */
export function lineBoundPenalty(p: Problem): f64 {
  const weight = param(p, 5);
  if (weight == 0.0) return 0.0;
  const r = p.rabiMax, nd = p.nDrive;
  const dI = p.driveI, dQ = p.driveQ, gI = p.gradDriveI, gQ = p.gradDriveQ;
  let sum: f64 = 0.0;
  for (let j = 0; j < nd; j++) {
    const i = load<f64>(at(dI, j)), q = load<f64>(at(dQ, j));
    const a = Math.sqrt(i * i + q * q);
    if (a <= r) continue;
    const v = a / r - 1.0;
    sum += v * v;
    const f = weight * 2.0 * v / (a * r);
    store<f64>(at(gI, j), load<f64>(at(gI, j)) + f * i);
    store<f64>(at(gQ, j), load<f64>(at(gQ, j)) + f * q);
  }
  return weight * sum;
}
