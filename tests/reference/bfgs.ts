// A plain dense BFGS minimiser with a backtracking (Armijo) line search, for tests that
// need to drive a figure down with its exact gradient before the product's optimiser takes
// that figure (Nocedal & Wright, Numerical Optimization, 2nd ed., algorithm 6.1 with
// algorithm 3.1 for the step). Readable, not fast; small problems only.

/** f(x) and its gradient. */
export type FigureAndGradient = (x: Float64Array) => { value: number; gradient: Float64Array };

/** Minimise from x0 until the value falls below `target`, the step stalls, or `maxIterations`. */
export function bfgs(fg: FigureAndGradient, x0: Float64Array, maxIterations: number, target: number): { x: Float64Array; value: number; iterations: number } {
  const n = x0.length;
  let x = x0.slice();
  let { value, gradient } = fg(x);
  // Inverse Hessian approximation, dense, starting from the identity.
  let h = Array.from({ length: n }, (_, r) => Float64Array.from({ length: n }, (_, c) => (r === c ? 1 : 0)));
  let iterations = 0;
  for (; iterations < maxIterations && value > target; iterations++) {
    const p = new Float64Array(n);
    for (let r = 0; r < n; r++) for (let c = 0; c < n; c++) p[r] -= h[r][c] * gradient[c];
    let slope = 0;
    for (let k = 0; k < n; k++) slope += p[k] * gradient[k];
    if (!(slope < 0)) {
      // Not a descent direction: restart from steepest descent.
      h = h.map((row, r) => row.map((_, c) => (r === c ? 1 : 0)));
      for (let k = 0; k < n; k++) p[k] = -gradient[k];
      slope = -p.reduce((s, v) => s + v * v, 0);
    }
    let step = 1;
    let next = fg(x.map((v, k) => v + step * p[k]));
    while (next.value > value + 1e-4 * step * slope && step > 1e-12) {
      step /= 2;
      next = fg(x.map((v, k) => v + step * p[k]));
    }
    if (step <= 1e-12) break;
    const s = p.map((v) => v * step);
    const y = next.gradient.map((v, k) => v - gradient[k]);
    const sy = s.reduce((acc, v, k) => acc + v * y[k], 0);
    x = x.map((v, k) => v + s[k]);
    value = next.value;
    gradient = next.gradient;
    if (sy > 0) {
      // H <- (1 - rho s y^T) H (1 - rho y s^T) + rho s s^T
      const rho = 1 / sy;
      const hy = h.map((row) => row.reduce((acc, v, c) => acc + v * y[c], 0));
      const yhy = y.reduce((acc, v, k) => acc + v * hy[k], 0);
      h = h.map((row, r) => row.map((v, c) => v - rho * (hy[r] * s[c] + s[r] * hy[c]) + (rho * rho * yhy + rho) * s[r] * s[c]));
    }
  }
  return { x, value, iterations };
}
