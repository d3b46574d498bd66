// Exact propagation of one piecewise-constant segment of a driven d-level ladder
// (a transmon; specs allow d = 2..8, the truncation check two more), in the frame of the
// drive with |0> the ground state:
//
//   H = 2 pi [ Delta n + (alpha/2) n(n-1) + (1+eps)/2 ( conj(W) a + W a^dag ) ],
//   W = I + i Q,  a = sum_k sqrt(k) |k-1><k|                     (rad/s; Delta, alpha, I, Q in Hz)
//
// On levels 0, 1 this is the qubit model of docs/physics.md section 1 up to the energy
// offset Delta/2 (n = (1 - sz)/2), a global phase that no figure sees.
//
// Method: the eigendecomposition of the generator, exp(-i H dt) = Vf exp(-i lam dt) Vf^dag.
// H is tridiagonal; the diagonal phase gauge D = diag(e^{i k phi}), phi = arg W, makes it
// real: H = D S D^dag with S real symmetric tridiagonal (off-diagonal pi (1+eps) |W| sqrt(k)).
// S is diagonalised by the implicit QL algorithm with shifts (tql2), which yields
// orthonormal eigenvectors to rounding for any spectrum, so every segment propagator is
// unitary to rounding and exact to rounding with no step-size or series-length choice; the
// same eigenbasis gives the exact
// derivative by divided differences (ladder-sweep.ts), which a series or Pade
// exponential would need a second, doubled-size exponential for (Van Loan 1978).
//
// Complex blocks are interleaved (re, im) f64 pairs; a d x 2 block ("columns") stores
// element (r, c) at f64 offset 2 (2 r + c).

const TWO_PI: f64 = 2.0 * Math.PI;

@inline export function getf(ptr: usize, k: i32): f64 { return load<f64>(ptr + (<usize>k << 3)); }
@inline export function setf(ptr: usize, k: i32, v: f64): void { store<f64>(ptr + (<usize>k << 3), v); }

/**
 * f64 slots of one segment record:
 *   V[d*d]   V[r*d + j] = component r of eigenvector j of S
 *   lam[d]   eigenvalues of H (rad/s)
 *   hc[d] hs[d]   e^{-i lam_j dt/2} = hc_j + i hs_j
 *   cphi, sphi    the drive phase (cos, sin of arg W; 1, 0 for W = 0)
 */
export function recordSize(d: i32): i32 { return d * d + 3 * d + 2; }

/** Offsets within a record (f64 slots). */
@inline export function recLam(d: i32): i32 { return d * d; }
@inline export function recHc(d: i32): i32 { return d * d + d; }
@inline export function recHs(d: i32): i32 { return d * d + 2 * d; }
@inline export function recPhi(d: i32): i32 { return d * d + 3 * d; }

/**
 * Diagonalise the symmetric tridiagonal matrix with diagonal diag[d] and off-diagonal
 * off[d] (off[k] couples k and k+1; off[d-1] is scratch) by the implicit QL algorithm with
 * shifts (EISPACK tql2; Press et al., Numerical Recipes, 3rd ed., section 11.4, routine
 * tqli): diag ends as the eigenvalues, and the rotations accumulate into V (set to the
 * identity first), so V's columns are orthonormal eigenvectors to rounding.
 */
export function tridiagonalEigen(d: i32, diagPtr: usize, offPtr: usize, vPtr: usize): void {
  for (let r = 0; r < d; r++) for (let c = 0; c < d; c++) setf(vPtr, r * d + c, r == c ? 1.0 : 0.0);
  setf(offPtr, d - 1, 0.0);
  for (let l = 0; l < d; l++) {
    for (let iteration = 0; iteration < 60; iteration++) {
      // The first negligible off-diagonal element at or after l splits the matrix there.
      let m = l;
      for (; m < d - 1; m++) {
        const dd = Math.abs(getf(diagPtr, m)) + Math.abs(getf(diagPtr, m + 1));
        if (Math.abs(getf(offPtr, m)) <= 1.1102230246251565e-16 * dd) break;
      }
      if (m == l) break;
      // Shift from the leading 2 x 2 block (Wilkinson's choice).
      let g = (getf(diagPtr, l + 1) - getf(diagPtr, l)) / (2.0 * getf(offPtr, l));
      let r = Math.sqrt(g * g + 1.0);
      g = getf(diagPtr, m) - getf(diagPtr, l) + getf(offPtr, l) / (g + (g >= 0.0 ? r : -r));
      let s: f64 = 1.0, c: f64 = 1.0, p: f64 = 0.0;
      let underflow = false;
      for (let i = m - 1; i >= l; i--) {
        let f = s * getf(offPtr, i);
        const b = c * getf(offPtr, i);
        r = Math.sqrt(f * f + g * g);
        setf(offPtr, i + 1, r);
        if (r == 0.0) {
          setf(diagPtr, i + 1, getf(diagPtr, i + 1) - p);
          setf(offPtr, m, 0.0);
          underflow = true;
          break;
        }
        s = f / r;
        c = g / r;
        g = getf(diagPtr, i + 1) - p;
        r = (getf(diagPtr, i) - g) * s + 2.0 * c * b;
        p = s * r;
        setf(diagPtr, i + 1, g + p);
        g = c * r - b;
        for (let k = 0; k < d; k++) {
          f = getf(vPtr, k * d + i + 1);
          const z = getf(vPtr, k * d + i);
          setf(vPtr, k * d + i + 1, s * z + c * f);
          setf(vPtr, k * d + i, c * z - s * f);
        }
      }
      if (underflow) continue;
      setf(diagPtr, l, getf(diagPtr, l) - p);
      setf(offPtr, l, g);
      setf(offPtr, m, 0.0);
    }
  }
}

/**
 * Fill a segment record (see recordSize) for drive (iHz, qHz), detuning, scale = 1 + eps
 * and anharmonicity alpha (Hz), segment length dt; sPtr is 2 d f64 of scratch.
 */
export function segmentEigen(
  d: i32, dt: f64, iHz: f64, qHz: f64, detuning: f64, scale: f64, alpha: f64,
  recPtr: usize, sPtr: usize,
): void {
  const r = Math.sqrt(iHz * iHz + qHz * qHz);
  const cphi = r > 0.0 ? iHz / r : 1.0;
  const sphi = r > 0.0 ? qHz / r : 0.0;
  const diagPtr = sPtr, offPtr = sPtr + (<usize>d << 3);
  for (let k = 0; k < d; k++) {
    const fk = <f64>k;
    setf(diagPtr, k, TWO_PI * (detuning * fk + 0.5 * alpha * fk * (fk - 1.0)));
  }
  const drive = Math.PI * scale * r;
  for (let k = 1; k < d; k++) setf(offPtr, k - 1, drive * Math.sqrt(<f64>k));
  tridiagonalEigen(d, diagPtr, offPtr, recPtr);
  const lam = recLam(d), hc = recHc(d), hs = recHs(d);
  for (let j = 0; j < d; j++) {
    const l = getf(diagPtr, j);
    setf(recPtr, lam + j, l);
    // One range reduction for both (musl's sincos).
    NativeMath.sincos(0.5 * l * dt);
    setf(recPtr, hc + j, NativeMath.sincos_cos);
    setf(recPtr, hs + j, -NativeMath.sincos_sin);
  }
  setf(recPtr, recPhi(d), cphi);
  setf(recPtr, recPhi(d) + 1, sphi);
}

/**
 * out (d x 2 complex) = V^T D^dag x: the columns x in the eigenbasis of the record's H.
 * yPtr holds 4 d f64 of scratch; out must alias neither x nor y.
 */
export function toEigenbasis(d: i32, recPtr: usize, xPtr: usize, outPtr: usize, yPtr: usize): void {
  const cphi = getf(recPtr, recPhi(d)), sphi = getf(recPtr, recPhi(d) + 1);
  // y = D^dag x, with e^{-i k phi} by repeated multiplication (d <= 10: a few ulps).
  let ck: f64 = 1.0, sk: f64 = 0.0;
  for (let k = 0; k < d; k++) {
    for (let col = 0; col < 2; col++) {
      const o = 2 * (2 * k + col);
      const xr = getf(xPtr, o), xi = getf(xPtr, o + 1);
      setf(yPtr, o, ck * xr + sk * xi);
      setf(yPtr, o + 1, ck * xi - sk * xr);
    }
    const nc = ck * cphi - sk * sphi;
    sk = sk * cphi + ck * sphi;
    ck = nc;
  }
  // out_j = sum_k V_kj y_k, both columns at once, summed in locals.
  for (let j = 0; j < d; j++) {
    let ar: f64 = 0.0, ai: f64 = 0.0, br: f64 = 0.0, bi: f64 = 0.0;
    for (let k = 0; k < d; k++) {
      const v = getf(recPtr, k * d + j);
      ar += v * getf(yPtr, 4 * k); ai += v * getf(yPtr, 4 * k + 1);
      br += v * getf(yPtr, 4 * k + 2); bi += v * getf(yPtr, 4 * k + 3);
    }
    setf(outPtr, 4 * j, ar); setf(outPtr, 4 * j + 1, ai);
    setf(outPtr, 4 * j + 2, br); setf(outPtr, 4 * j + 3, bi);
  }
}

/**
 * x (d x 2 complex) <- exp(-i H dt) x, or exp(+i H dt) x when `inverse`, from a record;
 * tmpPtr holds 8 d f64.
 */
export function applySegment(d: i32, recPtr: usize, xPtr: usize, inverse: bool, tmpPtr: usize): void {
  toEigenbasis(d, recPtr, xPtr, tmpPtr, tmpPtr + (<usize>(4 * d) << 3));
  const hc = recHc(d), hs = recHs(d);
  for (let j = 0; j < d; j++) {
    const c = getf(recPtr, hc + j), s = getf(recPtr, hs + j);
    const pr = c * c - s * s;
    const pi = inverse ? -2.0 * c * s : 2.0 * c * s;
    for (let col = 0; col < 2; col++) {
      const o = 2 * (2 * j + col);
      const zr = getf(tmpPtr, o), zi = getf(tmpPtr, o + 1);
      setf(tmpPtr, o, pr * zr - pi * zi);
      setf(tmpPtr, o + 1, pr * zi + pi * zr);
    }
  }
  const cphi = getf(recPtr, recPhi(d)), sphi = getf(recPtr, recPhi(d) + 1);
  let ck: f64 = 1.0, sk: f64 = 0.0;
  for (let k = 0; k < d; k++) {
    for (let col = 0; col < 2; col++) {
      let yr: f64 = 0.0, yi: f64 = 0.0;
      for (let j = 0; j < d; j++) {
        const v = getf(recPtr, k * d + j);
        const p = 2 * (2 * j + col);
        yr += v * getf(tmpPtr, p);
        yi += v * getf(tmpPtr, p + 1);
      }
      const o = 2 * (2 * k + col);
      setf(xPtr, o, ck * yr - sk * yi);
      setf(xPtr, o + 1, ck * yi + sk * yr);
    }
    const nc = ck * cphi - sk * sphi;
    sk = sk * cphi + ck * sphi;
    ck = nc;
  }
}

/**
 * The full propagator exp(-i H dt) of one segment, d x d complex, row-major, interleaved
 * (re, im) at outPtr (2 d^2 f64); workPtr holds recordSize(d) + d*d f64.
 */
export function ladderPropagator(
  d: i32, dt: f64, iHz: f64, qHz: f64, detuning: f64, scale: f64, alpha: f64,
  outPtr: usize, workPtr: usize,
): void {
  const rec = workPtr;
  segmentEigen(d, dt, iHz, qHz, detuning, scale, alpha, rec, workPtr + (<usize>recordSize(d) << 3));
  const cphi = getf(rec, recPhi(d)), sphi = getf(rec, recPhi(d) + 1);
  const hc = recHc(d), hs = recHs(d);
  for (let r = 0; r < d; r++) {
    for (let c = 0; c < d; c++) {
      let ur: f64 = 0.0, ui: f64 = 0.0;
      for (let j = 0; j < d; j++) {
        const h = getf(rec, hc + j), s = getf(rec, hs + j);
        const vv = getf(rec, r * d + j) * getf(rec, c * d + j);
        ur += vv * (h * h - s * s);
        ui += vv * (2.0 * h * s);
      }
      // D_r conj(D_c) = e^{i (r - c) phi}
      const ang = <f64>(r - c);
      let pc: f64 = 1.0, ps: f64 = 0.0;
      const steps = r > c ? r - c : c - r;
      for (let k = 0; k < steps; k++) {
        const nc = pc * cphi - ps * sphi;
        ps = ps * cphi + pc * sphi;
        pc = nc;
      }
      if (ang < 0.0) ps = -ps;
      const o = 2 * (r * d + c);
      setf(outPtr, o, pc * ur - ps * ui);
      setf(outPtr, o + 1, pc * ui + ps * ur);
    }
  }
}
