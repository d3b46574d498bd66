// Elementary functions that give the same bits on every JavaScript engine.
//
// Math.sin, Math.cos, Math.exp, Math.log and their kin are not specified to the last bit, and
// engines differ: Node 20 and Chromium disagree in the last bit on a few percent of arguments
// (measured: 678 of 20 000 sines, 1901 of 20 000 exponentials). A design amplifies a last-bit
// difference in its start or its target into another local optimum, so everything on the way
// from a spec to the wasm core that is not plain arithmetic goes through these functions, built
// from +, -, *, / and sqrt alone (correctly rounded by IEEE 754 on every engine). They are
// accurate to a few units in the last place (tested against Math.* to 4e-16 relative), which is
// all a start or a target needs; bit-for-bit agreement between engines is what they are for.

const view = new DataView(new ArrayBuffer(8));

/** 2^k for an integer k in [-1074, 1023], built from its bits (exact). */
function powerOfTwo(k: number): number {
  if (k < -1022) return powerOfTwo(k + 52) / 4503599627370496; // subnormal: 2^(k+52) / 2^52
  view.setUint32(0, (k + 1023) << 20);
  view.setUint32(4, 0);
  return view.getFloat64(0);
}

/** x with the low `bits` (< 32) bits of its significand cleared (exact). */
function truncated(x: number, bits: number): number {
  view.setFloat64(0, x);
  view.setUint32(4, (view.getUint32(4) >>> bits) << bits);
  return view.getFloat64(0);
}

// pi/2 = PIO2_1 + PIO2_2 + PIO2_3: PIO2_1 keeps 32 significant bits, so k PIO2_1 is exact for
// |k| < 2^20; PIO2_3 is pi/2 - double(pi/2), 6.123233995736766e-17 (recalled from memory; the
// sine of Math.PI is 1.2246467991473532e-16, twice it, checked in the tests).
const PIO2_1 = truncated(Math.PI / 2, 21);
const PIO2_2 = Math.PI / 2 - PIO2_1;
const PIO2_3 = 6.123233995736766e-17;

// ln 2 = LN2_1 + LN2_2 + LN2_3 the same way; LN2_3 = ln 2 - double(ln 2) = 2.3190468138462996e-17
// (recalled from memory; checked in the tests through exp(ln 2) = 2).
const LN2_1 = truncated(Math.LN2, 21);
const LN2_2 = Math.LN2 - LN2_1;
const LN2_3 = 2.3190468138462996e-17;

// The series' coefficients (-1)^n / (2n+1)! and (-1)^n / (2n)!, computed once by division
// chains (the same bits everywhere: division is correctly rounded).
const SIN_C: number[] = [];
const COS_C: number[] = [];
{
  let f = 1;
  for (let n = 1; n <= 22; n++) {
    f *= n;
    if (n % 2 === 1) SIN_C.push((((n - 1) / 2) % 2 === 0 ? 1 : -1) / f);
    else COS_C.push(((n / 2) % 2 === 0 ? 1 : -1) / f);
  }
}

/** sin r for |r| <= pi/4 + a little, by its Taylor series to r^21 (Horner in r^2). */
function sinKernel(r: number): number {
  const z = r * r;
  let p = SIN_C[SIN_C.length - 1];
  for (let k = SIN_C.length - 2; k >= 0; k--) p = p * z + SIN_C[k];
  return r * p;
}

/** cos r for |r| <= pi/4 + a little, by its Taylor series to r^22. */
function cosKernel(r: number): number {
  const z = r * r;
  let p = COS_C[COS_C.length - 1];
  for (let k = COS_C.length - 2; k >= 0; k--) p = p * z + COS_C[k];
  return 1 + z * p;
}

/** x - k pi/2 and the quadrant k mod 4, for |x| up to about 1e6 (beyond it, NaN is never returned but accuracy falls). */
function reduced(x: number): { r: number; quadrant: number } {
  const k = Math.round(x / (Math.PI / 2));
  const r = x - k * PIO2_1 - k * PIO2_2 - k * PIO2_3;
  return { r, quadrant: ((k % 4) + 4) % 4 };
}

/** sin x, the same bits on every engine. */
export function sin(x: number): number {
  if (!Number.isFinite(x)) return NaN;
  if (x === 0) return x;
  const { r, quadrant } = reduced(x);
  switch (quadrant) {
    case 0: return sinKernel(r);
    case 1: return cosKernel(r);
    case 2: return -sinKernel(r);
    default: return -cosKernel(r);
  }
}

/** cos x, the same bits on every engine. */
export function cos(x: number): number {
  if (!Number.isFinite(x)) return NaN;
  const { r, quadrant } = reduced(x);
  switch (quadrant) {
    case 0: return cosKernel(r);
    case 1: return -sinKernel(r);
    case 2: return -cosKernel(r);
    default: return sinKernel(r);
  }
}

// 1/n! for n = 1..18 (n! is exact in a double up to 18!, the division correctly rounded).
const INVERSE_FACTORIALS: number[] = [];
{
  let f = 1;
  for (let n = 1; n <= 18; n++) INVERSE_FACTORIALS.push(1 / (f *= n));
}

/** e^r - 1 for |r| <= ln2/2, by its Taylor series to r^18 (Horner). */
function expm1Kernel(r: number): number {
  let p = INVERSE_FACTORIALS[17];
  for (let n = 16; n >= 0; n--) p = p * r + INVERSE_FACTORIALS[n];
  return p * r;
}

/** e^x, the same bits on every engine. */
export function exp(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x > 709.782712893384) return Infinity;
  if (x < -745.1332191019412) return 0;
  const k = Math.round(x / Math.LN2);
  const r = x - k * LN2_1 - k * LN2_2 - k * LN2_3;
  const e = 1 + expm1Kernel(r);
  // Scale in two steps so neither factor overflows or underflows before the product does.
  const half = Math.trunc(k / 2);
  return e * powerOfTwo(half) * powerOfTwo(k - half);
}

/** 2 atanh(f) = log((1+f)/(1-f)) for |f| <= 0.18, by its series 2 (f + f^3/3 + f^5/5 + ...). */
function logRatioKernel(f: number): number {
  const z = f * f;
  let p = 1 / 27;
  for (let n = 25; n >= 3; n -= 2) p = p * z + 1 / n;
  return 2 * f + 2 * f * z * p;
}

/** ln x, the same bits on every engine. */
export function log(x: number): number {
  if (Number.isNaN(x) || x < 0) return NaN;
  if (x === 0) return -Infinity;
  if (x === Infinity) return Infinity;
  let scale = 0;
  if (x < 2.2250738585072014e-308) {
    x *= 4503599627370496; // 2^52: subnormals made normal
    scale = -52;
  }
  view.setFloat64(0, x);
  const hi = view.getUint32(0);
  let e = ((hi >>> 20) & 0x7ff) - 1023 + scale;
  view.setUint32(0, (hi & 0x000fffff) | 0x3ff00000);
  let m = view.getFloat64(0); // in [1, 2)
  if (m > Math.SQRT2) {
    m /= 2; // exact
    e += 1;
  }
  const f = (m - 1) / (m + 1);
  return e * LN2_1 + (e * LN2_2 + (e * LN2_3 + logRatioKernel(f)));
}

/** ln(1 + u) for u > -1, accurate for small u. */
function log1p(u: number): number {
  if (Math.abs(u) < 0.4) return logRatioKernel(u / (2 + u));
  return log(1 + u);
}

/** atanh a for |a| < 1, the same bits on every engine. */
export function atanh(a: number): number {
  if (a < 0) return -atanh(-a);
  return 0.5 * log1p((2 * a) / (1 - a));
}

/** tanh x, the same bits on every engine. */
export function tanh(x: number): number {
  if (x < 0) return -tanh(-x);
  if (x > 20) return 1;
  // tanh x = (1 - e^-2x) / (1 + e^-2x) = -m / (2 + m), m = e^-2x - 1, accurate for small x.
  const m = x < 0.17 ? expm1Kernel(-2 * x) : exp(-2 * x) - 1;
  return -m / (2 + m);
}
