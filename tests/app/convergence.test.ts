// The convergence record: one series per start, the leader, and thinning that keeps the
// first and newest points.
import { describe, expect, it } from 'vitest';
import { Convergence, MAX_SERIES_POINTS } from '../../src/app/convergence.ts';
import type { ProgressPoint } from '../../src/worker/protocol.ts';

const point = (start: number, iteration: number, meanInfidelity: number): ProgressPoint => ({
  start,
  iteration,
  meanInfidelity,
  objective: meanInfidelity,
  gradientNorm: 1,
  elapsedS: iteration / 1000,
});

describe('Convergence', () => {
  it('keeps a series per start, in arrival order, and names the leading start', () => {
    const c = new Convergence();
    c.add([point(1, 0, 0.5), point(0, 0, 0.4), point(1, 1, 0.1)]);
    c.add([point(0, 1, 0.2), point(1, 2, 0.05)]);
    const series = c.series();
    expect(series.map((s) => s.start)).toEqual([0, 1]);
    expect(series[1].iteration).toEqual([0, 1, 2]);
    expect(series[1].meanInfidelity).toEqual([0.5, 0.1, 0.05]);
    expect(c.leader()?.start).toBe(1);
    expect(c.totalIterations()).toBe(3);
    expect(c.bestSeen()).toBe(0.05);
    expect(c.received).toBe(5);
  });

  it('thins old points so a series never exceeds its bound, keeping iteration 0 and the newest', () => {
    const c = new Convergence();
    const n = 5 * MAX_SERIES_POINTS;
    for (let k = 0; k < n; k++) c.add([point(0, k, 1 / (k + 1))]);
    const [s] = c.series();
    expect(s.iteration.length).toBeLessThanOrEqual(MAX_SERIES_POINTS);
    expect(s.iteration[0]).toBe(0);
    expect(s.iteration.at(-1)).toBe(n - 1);
    // Still in order, and the values still belong to their iterations.
    for (let k = 1; k < s.iteration.length; k++) expect(s.iteration[k]).toBeGreaterThan(s.iteration[k - 1]);
    s.iteration.forEach((it, k) => expect(s.meanInfidelity[k]).toBe(1 / (it + 1)));
    expect(c.received).toBe(n);
  });

  it('keeps the points evenly spread over the iterations: no gap wider than four times the mean spacing', () => {
    const c = new Convergence();
    const n = 2000;
    for (let k = 0; k < n; k++) {
      c.add([point(0, k, 1 / (k + 1))]);
      const [s] = c.series();
      // At every moment: the newest report is the last point.
      expect(s.iteration.at(-1)).toBe(k);
    }
    const [s] = c.series();
    const gaps = s.iteration.slice(1).map((it, k) => it - s.iteration[k]);
    expect(Math.max(...gaps)).toBeLessThanOrEqual((4 * n) / s.iteration.length);
    expect(s.iteration.length).toBeGreaterThan(MAX_SERIES_POINTS / 2 - 1);
  });

  it('has no leader before the first report', () => {
    expect(new Convergence().leader()).toBeNull();
  });
});
