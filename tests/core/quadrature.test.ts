// Gauss quadrature rules against handbook tables, closed forms, exact integrals of
// polynomials and an independent eigenvalue solver (mathjs eigs).
import { describe, expect, it } from 'vitest';
import { eigs } from 'mathjs';
import { gaussHermite, gaussLegendre, MAX_RULE_POINTS } from '../../src/core/quadrature.ts';
import { expectClose, normwiseRelativeError, ulps } from '../reference/tolerance.ts';

const SQRT_2PI = Math.sqrt(2 * Math.PI);

// Abramowitz & Stegun, Handbook of Mathematical Functions, Table 25.4 (Gauss-Legendre,
// abscissae +-x_i and weights w_i on [-1, 1]); the 15-digit values are recalled from memory.
const AS_25_4: Record<number, [number, number][]> = {
  2: [[0.577350269189626, 1.0]],
  3: [[0.0, 0.888888888888889], [0.774596669241483, 0.555555555555556]],
  4: [[0.339981043584856, 0.652145154862546], [0.861136311594053, 0.347854845137454]],
  5: [[0.0, 0.568888888888889], [0.538469310105683, 0.478628670499366], [0.906179845938664, 0.236926885056189]],
  10: [
    [0.148874338981631, 0.295524224714753],
    [0.433395394129247, 0.269266719309996],
    [0.679409568299024, 0.219086362515982],
    [0.865063366688985, 0.149451349150581],
    [0.973906528517172, 0.066671344308688],
  ],
};

// Abramowitz & Stegun Table 25.10 (Gauss-Hermite for the physicists' weight exp(-x^2)),
// values recalled from memory. Our rule uses exp(-x^2/2): substituting x = sqrt(2) y maps
// its nodes to sqrt(2) x_i and its weights to sqrt(2) w_i.
const AS_25_10: Record<number, [number, number][]> = {
  2: [[0.707106781186548, 0.886226925452758]],
  3: [[0.0, 1.181635900603677], [1.224744871391589, 0.295408975150919]],
  4: [[0.52464762327529, 0.804914090005513], [1.650680123885785, 0.081312835447245]],
  5: [[0.0, 0.945308720482942], [0.958572464613819, 0.393619323152241], [2.020182870456086, 0.019953242059046]],
  10: [
    [0.342901327223705, 0.610862633735326],
    [1.036610829789514, 0.240138611082315],
    [1.756683649299882, 0.033874394455481],
    [2.53273167423279, 0.001343645746781],
    [3.436159118837738, 0.000007640432855],
  ],
};

// The upper half (nodes >= 0) of a symmetric rule, ascending.
function upperHalf(rule: { nodes: Float64Array; weights: Float64Array }): [number, number][] {
  const out: [number, number][] = [];
  rule.nodes.forEach((x, k) => {
    if (x >= 0) out.push([x, rule.weights[k]]);
  });
  return out;
}

// (2k - 1)!! = 1 * 3 * ... * (2k - 1), with (-1)!! = 1.
function doubleFactorialOdd(k: number): number {
  let p = 1;
  for (let j = 1; j <= 2 * k - 1; j += 2) p *= j;
  return p;
}

function moment(rule: { nodes: Float64Array; weights: Float64Array }, power: number): number {
  let s = 0;
  rule.nodes.forEach((x, k) => (s += rule.weights[k] * x ** power));
  return s;
}

// Odd moments vanish when the rule is symmetric: node k mirrors node n-1-k exactly.
function expectSymmetric(rule: { nodes: Float64Array; weights: Float64Array }, n: number): void {
  for (let k = 0; k < n; k++) {
    expect(rule.nodes[k], `n=${n}, node ${k} mirrors node ${n - 1 - k}`).toBe(-rule.nodes[n - 1 - k] || 0);
    expect(rule.weights[k]).toBe(rule.weights[n - 1 - k]);
  }
}

describe('Gauss-Legendre', () => {
  it.each(Object.keys(AS_25_4).map(Number))('matches Abramowitz & Stegun Table 25.4 for n = %i', (n) => {
    const got = upperHalf(gaussLegendre(n));
    const table = AS_25_4[n];
    expect(got.length).toBe(table.length);
    table.forEach(([x, w], k) => {
      // The table prints 15 decimals: agreement to 1e-15 plus rounding of the last digit.
      expectClose(got[k][0], x, { abs: 1e-15 }, `node ${k} of n=${n}`);
      expectClose(got[k][1], w, { abs: 1e-15 }, `weight ${k} of n=${n}`);
    });
  });

  it('matches the closed forms for n = 1, 2, 3', () => {
    // P_1 = x, P_2 = (3x^2 - 1)/2, P_3 = (5x^3 - 3x)/2; weights 2/((1 - x^2) P_n'(x)^2).
    expect(Array.from(gaussLegendre(1).nodes)).toEqual([0]);
    expectClose(gaussLegendre(1).weights[0], 2, { rel: ulps(2) });
    const r2 = gaussLegendre(2);
    expectClose(r2.nodes[1], 1 / Math.sqrt(3), { rel: ulps(2) }, 'n=2 node');
    expectClose(r2.weights[1], 1, { rel: ulps(4) }, 'n=2 weight');
    const r3 = gaussLegendre(3);
    expectClose(r3.nodes[2], Math.sqrt(3 / 5), { rel: ulps(2) }, 'n=3 node');
    expectClose(r3.weights[1], 8 / 9, { rel: ulps(8) }, 'n=3 middle weight');
    expectClose(r3.weights[2], 5 / 9, { rel: ulps(8) }, 'n=3 outer weight');
  });

  it('integrates x^(2k) exactly up to degree 2n - 1 (integral 2/(2k+1)), n = 1..40', () => {
    for (let n = 1; n <= 40; n++) {
      const rule = gaussLegendre(n);
      for (let k = 0; 2 * k <= 2 * n - 1; k++) {
        expectClose(moment(rule, 2 * k), 2 / (2 * k + 1), { rel: 1e-13 }, `n=${n}, x^${2 * k}`);
      }
      expectSymmetric(rule, n);
    }
  });

  it('stays exact at the largest size (n = 401): low moments and nodes inside (-1, 1)', () => {
    const rule = gaussLegendre(MAX_RULE_POINTS);
    for (let k = 0; k <= 10; k++) expectClose(moment(rule, 2 * k), 2 / (2 * k + 1), { rel: 1e-12 }, `x^${2 * k}`);
    for (let k = 1; k < rule.nodes.length; k++) expect(rule.nodes[k]).toBeGreaterThan(rule.nodes[k - 1]);
    expect(rule.nodes[0]).toBeGreaterThan(-1);
    expect(rule.nodes[MAX_RULE_POINTS - 1]).toBeLessThan(1);
  });
});

describe('Gauss-Hermite (probabilists, weight exp(-x^2/2))', () => {
  it.each(Object.keys(AS_25_10).map(Number))('matches Abramowitz & Stegun Table 25.10 for n = %i', (n) => {
    const got = upperHalf(gaussHermite(n));
    const table = AS_25_10[n];
    expect(got.length).toBe(table.length);
    table.forEach(([x, w], k) => {
      expectClose(got[k][0] / Math.SQRT2, x, { abs: 1e-15 }, `node ${k} of n=${n}`);
      expectClose(got[k][1] / Math.SQRT2, w, { abs: 1e-15, rel: 1e-13 }, `weight ${k} of n=${n}`);
    });
  });

  it('matches the closed forms for n = 2 and 3', () => {
    // He_2 = x^2 - 1, He_3 = x^3 - 3x; weights sqrt(2 pi) n! / (n He_{n-1}(x))^2.
    const r2 = gaussHermite(2);
    expectClose(r2.nodes[1], 1, { rel: ulps(2) }, 'n=2 node');
    expectClose(r2.weights[1], SQRT_2PI / 2, { rel: ulps(4) }, 'n=2 weight');
    const r3 = gaussHermite(3);
    expect(r3.nodes[1]).toBe(0);
    expectClose(r3.nodes[2], Math.sqrt(3), { rel: ulps(2) }, 'n=3 node');
    expectClose(r3.weights[1], (2 / 3) * SQRT_2PI, { rel: ulps(8) }, 'n=3 middle weight');
    expectClose(r3.weights[2], SQRT_2PI / 6, { rel: ulps(8) }, 'n=3 outer weight');
  });

  it('integrates x^(2k) exp(-x^2/2) exactly up to degree 2n - 1 (integral sqrt(2 pi) (2k-1)!!), n = 1..30', () => {
    for (let n = 1; n <= 30; n++) {
      const rule = gaussHermite(n);
      for (let k = 0; 2 * k <= 2 * n - 1; k++) {
        expectClose(moment(rule, 2 * k), SQRT_2PI * doubleFactorialOdd(k), { rel: 1e-12 }, `n=${n}, x^${2 * k}`);
      }
      expectSymmetric(rule, n);
    }
  });

  it('stays exact at the largest size (n = 401), where the outer weights underflow', () => {
    const rule = gaussHermite(MAX_RULE_POINTS);
    for (let k = 0; k <= 10; k++) {
      expectClose(moment(rule, 2 * k), SQRT_2PI * doubleFactorialOdd(k), { rel: 1e-12 }, `x^${2 * k}`);
    }
    for (let k = 0; k < rule.weights.length; k++) {
      expect(Number.isFinite(rule.weights[k]) && rule.weights[k] >= 0, `weight ${k} = ${rule.weights[k]}`).toBe(true);
    }
    for (let k = 1; k < rule.nodes.length; k++) expect(rule.nodes[k]).toBeGreaterThan(rule.nodes[k - 1]);
  });
});

describe('nodes against an independent eigen-solver (Golub & Welsch, Math. Comp. 23, 221, 1969)', () => {
  // The n nodes are the eigenvalues of the Jacobi matrix of the orthonormal recurrence;
  // mathjs computes them by its own symmetric eigen-solver.
  function jacobiEigenvalues(n: number, offDiagonal: (k: number) => number): number[] {
    const m = Array.from({ length: n }, (_, r) => Array.from({ length: n }, (_, c) => (Math.abs(r - c) === 1 ? offDiagonal(Math.max(r, c)) : 0)));
    return (eigs(m).values as number[]).slice().sort((a, b) => a - b);
  }

  it.each([7, 20, 33])('Hermite and Legendre, n = %i', (n) => {
    const hermite = jacobiEigenvalues(n, (k) => Math.sqrt(k));
    expect(normwiseRelativeError(gaussHermite(n).nodes, hermite)).toBeLessThan(1e-13);
    const legendre = jacobiEigenvalues(n, (k) => k / Math.sqrt(4 * k * k - 1));
    expect(normwiseRelativeError(gaussLegendre(n).nodes, legendre)).toBeLessThan(1e-13);
  });
});

describe('rule sizes', () => {
  it.each([0, -1, 1.5, MAX_RULE_POINTS + 1, NaN])('rejects n = %s with a RangeError naming the limit', (n) => {
    expect(() => gaussHermite(n)).toThrow(/quadrature points: .* an integer from 1 to 401/);
    expect(() => gaussLegendre(n)).toThrow(RangeError);
  });

  it('hands out copies, so that a caller scaling a rule in place cannot change the next one', () => {
    const first = gaussLegendre(4);
    first.nodes.fill(7);
    expect(gaussLegendre(4).nodes[0]).toBeCloseTo(-0.861136311594053, 14);
  });
});
