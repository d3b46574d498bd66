// Gauss quadrature rules used to sample error distributions of an ensemble.
//
// Method (Golub & Welsch, Math. Comp. 23, 221, 1969): the nodes of an n-point Gauss rule
// are the eigenvalues of the symmetric tridiagonal Jacobi matrix of the orthonormal
// polynomials' three-term recurrence. We find them by Sturm-sequence bisection (robust,
// no eigenvector work), polish each with one Newton step on the recurrence, and take the
// weights from the Christoffel numbers w_i = mu0 / sum_k p_k(x_i)^2 (p_k orthonormal up to
// mu0, p_0 = 1), which keeps tiny outer weights accurate to a few ulps relatively rather
// than absolutely. Rules are memoised: they are pure functions of n.

/** Nodes and weights of a quadrature rule, nodes ascending. */
export interface QuadratureRule {
  nodes: Float64Array;
  weights: Float64Array;
}

/** Largest rule size accepted (a spec's `points` limit). */
export const MAX_RULE_POINTS = 401;

// Sums of squares of the recurrence are rescaled past this size so that large n cannot
// overflow (Hermite orthonormal polynomials reach about exp(x^2/4) at the outer nodes).
const RESCALE_AT = 1e100;

/**
 * A symmetric weight function's recurrence: x p_k = b(k+1) p_{k+1} + b(k) p_{k-1}, with zero
 * diagonal, and mu0 = the integral of the weight function.
 */
interface SymmetricRecurrence {
  offDiagonal: (k: number) => number;
  mu0: number;
}

// Probabilists' Hermite, weight exp(-x^2/2) on the real line: He_{k+1} = x He_k - k He_{k-1},
// orthonormal p_k = He_k / sqrt(k!), hence b(k) = sqrt(k); mu0 = sqrt(2 pi).
const HERMITE_PROBABILISTS: SymmetricRecurrence = {
  offDiagonal: (k) => Math.sqrt(k),
  mu0: Math.sqrt(2 * Math.PI),
};

// Legendre, weight 1 on [-1, 1]: (k+1) P_{k+1} = (2k+1) x P_k - k P_{k-1}, orthonormal
// recurrence b(k) = k / sqrt(4k^2 - 1); mu0 = 2.
const LEGENDRE: SymmetricRecurrence = {
  offDiagonal: (k) => k / Math.sqrt(4 * k * k - 1),
  mu0: 2,
};

const hermiteCache = new Map<number, QuadratureRule>();
const legendreCache = new Map<number, QuadratureRule>();

/** Gauss-Hermite rule for the weight exp(-x^2/2) (probabilists'); weights sum to sqrt(2 pi). */
export function gaussHermite(n: number): QuadratureRule {
  return cached(hermiteCache, n, HERMITE_PROBABILISTS);
}

/** Gauss-Legendre rule on [-1, 1] with weight 1; weights sum to 2. */
export function gaussLegendre(n: number): QuadratureRule {
  return cached(legendreCache, n, LEGENDRE);
}

function cached(cache: Map<number, QuadratureRule>, n: number, rec: SymmetricRecurrence): QuadratureRule {
  if (!Number.isInteger(n) || n < 1 || n > MAX_RULE_POINTS) {
    throw new RangeError(`quadrature points: ${n} is not allowed; an integer from 1 to ${MAX_RULE_POINTS}`);
  }
  let rule = cache.get(n);
  if (!rule) {
    rule = symmetricGaussRule(n, rec);
    cache.set(n, rule);
  }
  // Copies, so that a caller that scales the arrays in place cannot spoil the cache.
  return { nodes: rule.nodes.slice(), weights: rule.weights.slice() };
}

function symmetricGaussRule(n: number, rec: SymmetricRecurrence): QuadratureRule {
  const b = new Float64Array(n); // b[k] couples rows k-1 and k; b[0] unused
  for (let k = 1; k < n; k++) b[k] = rec.offDiagonal(k);
  // Gershgorin: every eigenvalue lies within max row sum of |b|.
  let radius = 0;
  for (let k = 0; k < n; k++) radius = Math.max(radius, (k > 0 ? b[k] : 0) + (k + 1 < n ? b[k + 1] : 0));
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  // The rule is symmetric: compute the upper half (index m..n-1) and mirror it.
  const half = Math.floor(n / 2);
  for (let j = n - 1; j >= half; j--) {
    let x = n % 2 === 1 && j === half ? 0 : bisectEigenvalue(b, j, radius);
    x = newtonPolish(b, x);
    const w = christoffelWeight(b, x, rec.mu0);
    nodes[j] = x;
    weights[j] = w;
    nodes[n - 1 - j] = -x;
    weights[n - 1 - j] = w;
  }
  if (n % 2 === 1) nodes[half] = 0;
  return { nodes, weights };
}

// Number of eigenvalues of the Jacobi matrix (zero diagonal, off-diagonal b) below x,
// from the signs of the LDL^T pivots (Sturm sequence).
function countBelow(b: Float64Array, x: number): number {
  let count = 0;
  let q = -x;
  if (q < 0) count++;
  for (let k = 1; k < b.length; k++) {
    // A zero pivot is replaced by a tiny one of the same side: the count stays exact
    // for all x but a set of measure zero.
    const prev = q === 0 ? Number.MIN_VALUE : q;
    q = -x - (b[k] * b[k]) / prev;
    if (q < 0) count++;
  }
  return count;
}

// The j-th smallest eigenvalue (0-based), bisected down to adjacent doubles.
function bisectEigenvalue(b: Float64Array, j: number, radius: number): number {
  let lo = -radius - 1;
  let hi = radius + 1;
  for (;;) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) return 0.5 * (lo + hi);
    if (countBelow(b, mid) > j) hi = mid;
    else lo = mid;
  }
}

// One Newton step on p_n(x) = 0 using the recurrence and its derivative; bisection has
// already put x within a few ulps of the root's absolute scale, this fixes the relative
// error of small roots. The step is kept only if it is tiny (it cannot jump roots).
function newtonPolish(b: Float64Array, x: number): number {
  const n = b.length;
  let pPrev = 0;
  let p = 1;
  let dPrev = 0;
  let d = 0;
  for (let k = 0; k < n; k++) {
    // The last step's divisor b(n) lies outside the n x n matrix; it scales p_n and p_n'
    // alike, so it drops out of the Newton step: use 1.
    const bNext = k + 1 < n ? b[k + 1] : 1;
    const bk = k > 0 ? b[k] : 0;
    const pNext = (x * p - bk * pPrev) / bNext;
    const dNext = (p + x * d - bk * dPrev) / bNext;
    pPrev = p;
    p = pNext;
    dPrev = d;
    d = dNext;
    if (Math.abs(p) > RESCALE_AT || Math.abs(d) > RESCALE_AT) {
      // The ratio p/d is all we need: rescale all four together.
      pPrev /= RESCALE_AT;
      p /= RESCALE_AT;
      dPrev /= RESCALE_AT;
      d /= RESCALE_AT;
    }
  }
  if (d === 0 || !Number.isFinite(p / d)) return x;
  const step = p / d;
  return Math.abs(step) <= 1e-8 * (1 + Math.abs(x)) ? x - step : x;
}

// w = mu0 / sum_{k<n} p_k(x)^2 with p_0 = 1 and the orthonormal recurrence.
function christoffelWeight(b: Float64Array, x: number, mu0: number): number {
  const n = b.length;
  let pPrev = 0;
  let p = 1;
  let sum = 1;
  let scaleExponent = 0; // the true sum is sum * RESCALE_AT^(2 scaleExponent)
  for (let k = 0; k + 1 < n; k++) {
    const pNext = (x * p - (k > 0 ? b[k] : 0) * pPrev) / b[k + 1];
    pPrev = p;
    p = pNext;
    sum += p * p;
    if (Math.abs(p) > RESCALE_AT) {
      pPrev /= RESCALE_AT;
      p /= RESCALE_AT;
      sum /= RESCALE_AT * RESCALE_AT;
      scaleExponent++;
    }
  }
  let w = mu0 / sum;
  for (let s = 0; s < scaleExponent; s++) w /= RESCALE_AT * RESCALE_AT;
  return w;
}
