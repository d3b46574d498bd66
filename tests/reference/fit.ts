// Least-squares fits used by the scaling tests.

/** The slope of the least-squares line through (log x, log y): the power p of y ~ x^p. */
export function logLogSlope(xs: readonly number[], ys: readonly number[]): number {
  if (xs.length !== ys.length || xs.length < 2) throw new Error('logLogSlope: needs two or more (x, y) pairs of equal count');
  const lx = xs.map(Math.log);
  const ly = ys.map((y) => {
    if (!(y > 0)) throw new Error(`logLogSlope: y = ${y} has no logarithm; every value must be > 0`);
    return Math.log(y);
  });
  const mx = lx.reduce((s, v) => s + v, 0) / lx.length;
  const my = ly.reduce((s, v) => s + v, 0) / ly.length;
  let sxy = 0;
  let sxx = 0;
  lx.forEach((x, k) => {
    sxy += (x - mx) * (ly[k] - my);
    sxx += (x - mx) * (x - mx);
  });
  return sxy / sxx;
}

/** n points spaced evenly in log between lo and hi (inclusive). */
export function logSpace(lo: number, hi: number, n: number): number[] {
  return Array.from({ length: n }, (_, k) => lo * Math.pow(hi / lo, k / (n - 1)));
}
