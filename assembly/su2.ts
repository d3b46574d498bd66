// SU(2) arithmetic on pairs of ensemble members: every v128 holds one real
// component for two members (lanes 0 and 1). An element of SU(2) (and any real
// linear combination, such as a derivative) is [[u, -conj v], [v, conj u]], kept as
// the four reals (ur, ui, vr, vi).
//
// Segment propagator (docs/physics.md section 1), with b = pi dt ((1+eps) I, (1+eps) Q, -Delta)
// and a = |b|:   U = cos(a) 1 - i (sin(a)/a) (b . sigma)
//   ur = cos a,  ui = -S bz,  vr = S by,  vi = -S bx,      S = sin(a)/a.
// Its exact derivative, with T = (cos a - S)/a^2 = (dS/da)/a:
//   dU/dbx: du = -S bx - i T bx bz,  dv = T bx by - i (T bx^2 + S)
//   dU/dby: du = -S by - i T by bz,  dv = (T by^2 + S) - i T bx by
// cos a, S and T are power series in x = a^2, summed by Horner with as many terms as
// the largest angle of the job needs (chosen once per job, see seriesTerms); when an
// angle exceeds 1 the argument is halved k times and recovered by the double-angle
// formulas S(2a) = S(a) cos a and cos 2a = 1 - 2 a^2 S(a)^2, which do not cancel.

@inline export function vadd(a: v128, b: v128): v128 { return f64x2.add(a, b); }
@inline export function vsub(a: v128, b: v128): v128 { return f64x2.sub(a, b); }
@inline export function vmul(a: v128, b: v128): v128 { return f64x2.mul(a, b); }
@inline export function vneg(a: v128): v128 { return f64x2.neg(a); }
@inline export function vsplat(a: f64): v128 { return f64x2.splat(a); }
/**
 * a * b + c. The portable build rounds twice, so results do not depend on the CPU; the
 * fused build (compiled with relaxed SIMD, scripts/build.js) lets the engine fuse it into
 * one rounding where the CPU can, which is faster and changes the last bits.
 */
@inline export function vmad(a: v128, b: v128, c: v128): v128 {
  if (ASC_FEATURE_RELAXED_SIMD) return f64x2.relaxed_madd(a, b, c);
  return f64x2.add(f64x2.mul(a, b), c);
}
/** c - a * b (fused in the fused build, like vmad). */
@inline export function vnmad(a: v128, b: v128, c: v128): v128 {
  if (ASC_FEATURE_RELAXED_SIMD) return f64x2.relaxed_nmadd(a, b, c);
  return f64x2.sub(c, f64x2.mul(a, b));
}
/** Sum of both lanes. */
@inline export function vsum(a: v128): f64 { return f64x2.extract_lane(a, 0) + f64x2.extract_lane(a, 1); }

// Taylor coefficients in x = a^2 (cos: (-1)^n/(2n)!, S: (-1)^n/(2n+1)!, T: (-1)^n 2n/(2n+1)!).
const C1: f64 = -1.0 / 2.0;
const C2: f64 = 1.0 / 24.0;
const C3: f64 = -1.0 / 720.0;
const C4: f64 = 1.0 / 40320.0;
const C5: f64 = -1.0 / 3628800.0;
const C6: f64 = 1.0 / 479001600.0;
const C7: f64 = -1.0 / 87178291200.0;
const C8: f64 = 1.0 / 20922789888000.0;
const C9: f64 = -1.0 / 6402373705728000.0;
const C10: f64 = 1.0 / 2432902008176640000.0;

const S1: f64 = -1.0 / 6.0;
const S2: f64 = 1.0 / 120.0;
const S3: f64 = -1.0 / 5040.0;
const S4: f64 = 1.0 / 362880.0;
const S5: f64 = -1.0 / 39916800.0;
const S6: f64 = 1.0 / 6227020800.0;
const S7: f64 = -1.0 / 1307674368000.0;
const S8: f64 = 1.0 / 355687428096000.0;
const S9: f64 = -1.0 / 121645100408832000.0;
const S10: f64 = 1.0 / 51090942171709440000.0;

const T0: f64 = -2.0 / 6.0;
const T1: f64 = 4.0 / 120.0;
const T2: f64 = -6.0 / 5040.0;
const T3: f64 = 8.0 / 362880.0;
const T4: f64 = -10.0 / 39916800.0;
const T5: f64 = 12.0 / 6227020800.0;
const T6: f64 = -14.0 / 1307674368000.0;
const T7: f64 = 16.0 / 355687428096000.0;
const T8: f64 = -18.0 / 121645100408832000.0;
const T9: f64 = 20.0 / 51090942171709440000.0;


// The coefficients again as v128 pairs in a static table: V8 builds a v128 constant
// from three scalar moves each time, while a load from memory is one instruction.
const ONE: f64 = 1.0;
const TABLE: usize = memory.data<f64>([
  C1, C1,
  C2, C2,
  C3, C3,
  C4, C4,
  C5, C5,
  C6, C6,
  C7, C7,
  C8, C8,
  C9, C9,
  C10, C10,
  S1, S1,
  S2, S2,
  S3, S3,
  S4, S4,
  S5, S5,
  S6, S6,
  S7, S7,
  S8, S8,
  S9, S9,
  S10, S10,
  T0, T0,
  T1, T1,
  T2, T2,
  T3, T3,
  T4, T4,
  T5, T5,
  T6, T6,
  T7, T7,
  T8, T8,
  T9, T9,
  ONE, ONE,
]);
const K_C1: usize = 0;
const K_C2: usize = 16;
const K_C3: usize = 32;
const K_C4: usize = 48;
const K_C5: usize = 64;
const K_C6: usize = 80;
const K_C7: usize = 96;
const K_C8: usize = 112;
const K_C9: usize = 128;
const K_C10: usize = 144;
const K_S1: usize = 160;
const K_S2: usize = 176;
const K_S3: usize = 192;
const K_S4: usize = 208;
const K_S5: usize = 224;
const K_S6: usize = 240;
const K_S7: usize = 256;
const K_S8: usize = 272;
const K_S9: usize = 288;
const K_S10: usize = 304;
const K_T0: usize = 320;
const K_T1: usize = 336;
const K_T2: usize = 352;
const K_T3: usize = 368;
const K_T4: usize = 384;
const K_T5: usize = 400;
const K_T6: usize = 416;
const K_T7: usize = 432;
const K_T8: usize = 448;
const K_T9: usize = 464;
const K_ONE: usize = 480;

@inline function k(offset: usize): v128 { return v128.load(TABLE + offset); }

/** Largest reduced angle the series are used for. */
export const SERIES_MAX_ANGLE: f64 = 1.0;

/**
 * Number of terms (beyond the constant) that sum cos a, S and T to rounding for every
 * reduced angle up to `amax` (<= 1): the first omitted term of cos, a^(2n+2)/(2n+2)!,
 * stays below 2^-60.
 */
export function seriesTerms(amax: f64): i32 {
  const x = amax * amax;
  let term: f64 = 1.0;
  for (let n = 1; n <= 10; n++) {
    term *= x / <f64>((2 * n - 1) * (2 * n));
    const next = term * x / <f64>((2 * n + 1) * (2 * n + 2));
    if (next < 8.67e-19) return n < 2 ? 2 : n;
  }
  return 10;
}

/** Halvings that bring `amax` to at most SERIES_MAX_ANGLE. */
export function halvings(amax: f64): i32 {
  let k = 0;
  let a = amax;
  while (a > SERIES_MAX_ANGLE && k < 60) { a *= 0.5; k++; }
  return k;
}

/** cos a from x = a^2 with `terms` terms (2..10), by Horner from the top coefficient. */
@inline export function seriesCos(x: v128, terms: i32): v128 {
  let p = v128.load(TABLE + K_C1 + (<usize>(terms - 1) << 4));
  switch (terms) {
    case 10: p = vmad(p, x, k(K_C9));
    case 9: p = vmad(p, x, k(K_C8));
    case 8: p = vmad(p, x, k(K_C7));
    case 7: p = vmad(p, x, k(K_C6));
    case 6: p = vmad(p, x, k(K_C5));
    case 5: p = vmad(p, x, k(K_C4));
    case 4: p = vmad(p, x, k(K_C3));
    case 3: p = vmad(p, x, k(K_C2));
    default: p = vmad(p, x, k(K_C1));
  }
  return vmad(p, x, k(K_ONE));
}

/** S = sin(a)/a from x = a^2. */
@inline export function seriesSinc(x: v128, terms: i32): v128 {
  let p = v128.load(TABLE + K_S1 + (<usize>(terms - 1) << 4));
  switch (terms) {
    case 10: p = vmad(p, x, k(K_S9));
    case 9: p = vmad(p, x, k(K_S8));
    case 8: p = vmad(p, x, k(K_S7));
    case 7: p = vmad(p, x, k(K_S6));
    case 6: p = vmad(p, x, k(K_S5));
    case 5: p = vmad(p, x, k(K_S4));
    case 4: p = vmad(p, x, k(K_S3));
    case 3: p = vmad(p, x, k(K_S2));
    default: p = vmad(p, x, k(K_S1));
  }
  return vmad(p, x, k(K_ONE));
}

/** T = (cos a - S)/a^2 from x = a^2 (its series converges like that of cos). */
@inline export function seriesT(x: v128, terms: i32): v128 {
  let p = v128.load(TABLE + K_T0 + (<usize>(terms - 1) << 4));
  switch (terms) {
    case 10: p = vmad(p, x, k(K_T8));
    case 9: p = vmad(p, x, k(K_T7));
    case 8: p = vmad(p, x, k(K_T6));
    case 7: p = vmad(p, x, k(K_T5));
    case 6: p = vmad(p, x, k(K_T4));
    case 5: p = vmad(p, x, k(K_T3));
    case 4: p = vmad(p, x, k(K_T2));
    case 3: p = vmad(p, x, k(K_T1));
    default: p = vmad(p, x, k(K_T0));
  }
  return p;
}

// Products of two SU(2) elements, a * b, one component each (read all inputs first).
// Written with vmad and vnmad so that the fused build fuses half the multiplies; in the
// portable build each is the same two roundings as (x y -+ z w), addition commuting.
@inline export function qmulUr(aur: v128, aui: v128, avr: v128, avi: v128, bur: v128, bui: v128, bvr: v128, bvi: v128): v128 {
  return vsub(vnmad(aui, bui, vmul(aur, bur)), vmad(avi, bvi, vmul(avr, bvr)));
}
@inline export function qmulUi(aur: v128, aui: v128, avr: v128, avi: v128, bur: v128, bui: v128, bvr: v128, bvi: v128): v128 {
  return vsub(vmad(aui, bur, vmul(aur, bui)), vnmad(avi, bvr, vmul(avr, bvi)));
}
@inline export function qmulVr(aur: v128, aui: v128, avr: v128, avi: v128, bur: v128, bui: v128, bvr: v128, bvi: v128): v128 {
  return vadd(vnmad(avi, bui, vmul(avr, bur)), vmad(aui, bvi, vmul(aur, bvr)));
}
@inline export function qmulVi(aur: v128, aui: v128, avr: v128, avi: v128, bur: v128, bui: v128, bvr: v128, bvi: v128): v128 {
  return vadd(vmad(avi, bur, vmul(avr, bui)), vnmad(aui, bvr, vmul(aur, bvi)));
}

/** Tr(X Y) of two such elements (real): 2 (xur yur - xui yui - xvr yvr - xvi yvi). */
@inline export function qtrace(xur: v128, xui: v128, xvr: v128, xvi: v128, yur: v128, yui: v128, yvr: v128, yvi: v128): v128 {
  const t = vsub(vsub(vmul(xur, yur), vmul(xui, yui)), vadd(vmul(xvr, yvr), vmul(xvi, yvi)));
  return vadd(t, t);
}
