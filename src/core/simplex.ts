// Nelder-Mead downhill simplex minimisation of a function of a few variables, for tuning
// the handful of parameters of an analytic pulse (Nelder & Mead, Comput. J. 7, 308, 1965;
// the standard coefficients 1, 2, 1/2, 1/2 and the inside/outside contractions of
// Lagarias, Reeds, Wright, Wright, SIAM J. Optim. 9, 112, 1998).

/** Options of a simplex minimisation. */
export interface SimplexOptions {
  /** Initial step of each variable (the simplex's edges). */
  steps: number[];
  /** Most function evaluations. */
  maxEvaluations: number;
  /** Stop when the spread of values over the simplex falls below this. */
  valueTolerance: number;
}

/** The best point found, its value and the evaluations spent. */
export interface SimplexResult {
  x: number[];
  value: number;
  evaluations: number;
}

/** Minimise f from x0 by Nelder-Mead. */
export function nelderMead(f: (x: number[]) => number, x0: number[], options: SimplexOptions): SimplexResult {
  const n = x0.length;
  let evaluations = 0;
  const value = (x: number[]): number => {
    evaluations++;
    const v = f(x);
    return Number.isNaN(v) ? Infinity : v;
  };
  const points: number[][] = [x0.slice()];
  for (let k = 0; k < n; k++) {
    const p = x0.slice();
    p[k] += options.steps[k];
    points.push(p);
  }
  const values = points.map(value);
  const along = (from: number[], to: number[], t: number): number[] => from.map((c, k) => c + t * (to[k] - c));
  while (evaluations < options.maxEvaluations) {
    const order = values.map((_, k) => k).sort((a, b) => values[a] - values[b]);
    const sortedPoints = order.map((k) => points[k]);
    const sortedValues = order.map((k) => values[k]);
    points.splice(0, points.length, ...sortedPoints);
    values.splice(0, values.length, ...sortedValues);
    if (values[n] - values[0] <= options.valueTolerance) break;
    const centroid = new Array(n).fill(0).map((_, k) => points.slice(0, n).reduce((s, p) => s + p[k], 0) / n);
    const worst = points[n];
    const reflected = along(centroid, worst, -1);
    const fr = value(reflected);
    if (fr < values[0]) {
      const expanded = along(centroid, worst, -2);
      const fe = value(expanded);
      if (fe < fr) { points[n] = expanded; values[n] = fe; } else { points[n] = reflected; values[n] = fr; }
      continue;
    }
    if (fr < values[n - 1]) { points[n] = reflected; values[n] = fr; continue; }
    // Contract outside (towards the reflection) or inside (towards the worst point).
    const outside = fr < values[n];
    const contracted = along(centroid, worst, outside ? -0.5 : 0.5);
    const fc = value(contracted);
    if (fc < (outside ? fr : values[n])) { points[n] = contracted; values[n] = fc; continue; }
    // Shrink towards the best point.
    for (let k = 1; k <= n; k++) {
      points[k] = along(points[0], points[k], 0.5);
      values[k] = value(points[k]);
    }
  }
  let best = 0;
  for (let k = 1; k < values.length; k++) if (values[k] < values[best]) best = k;
  return { x: points[best], value: values[best], evaluations };
}
