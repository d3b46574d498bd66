// The convergence record of a run: mean infidelity against iteration, one series per
// start, kept short enough to redraw quickly: evenly thinned over the iterations (every
// stride-th iteration, the stride doubling as the run goes on) with the newest point kept.
import type { ProgressPoint } from '../worker/protocol.ts';

/** One start's curve: iterations and mean infidelities, in order. */
export interface Series {
  start: number;
  iteration: number[];
  meanInfidelity: number[];
  /** The newest report of this start. */
  latest: ProgressPoint;
  /** Iterations kept are multiples of this (the newest point excepted). */
  stride: number;
  /** True when the last point kept is the newest one, off the stride (replaced by the next). */
  tail: boolean;
}

/** Most points a series keeps before thinning. */
export const MAX_SERIES_POINTS = 600;

/** The curves of every start of a run. */
export class Convergence {
  private readonly byStart = new Map<number, Series>();
  /** Reports taken in (counts every point, thinned or not). */
  received = 0;

  /** A record rebuilt from kept curves (a restored run), each curve's last point as its newest report. */
  static fromCurves(curves: readonly { start: number; iteration: number[]; meanInfidelity: number[] }[]): Convergence {
    const record = new Convergence();
    for (const c of curves) {
      if (c.iteration.length === 0) continue;
      const last = c.iteration.length - 1;
      const latest: ProgressPoint = { start: c.start, iteration: c.iteration[last], meanInfidelity: c.meanInfidelity[last], objective: c.meanInfidelity[last], gradientNorm: NaN, elapsedS: NaN };
      record.byStart.set(c.start, { start: c.start, iteration: [...c.iteration], meanInfidelity: [...c.meanInfidelity], latest, stride: 1, tail: false });
      record.received += c.iteration.length;
    }
    return record;
  }

  /** Adds reports from any workers, in the order they arrived. */
  add(points: readonly ProgressPoint[]): void {
    for (const point of points) {
      this.received++;
      let series = this.byStart.get(point.start);
      if (!series) {
        series = { start: point.start, iteration: [], meanInfidelity: [], latest: point, stride: 1, tail: false };
        this.byStart.set(point.start, series);
      }
      if (series.tail) {
        series.iteration.pop();
        series.meanInfidelity.pop();
      }
      series.iteration.push(point.iteration);
      series.meanInfidelity.push(point.meanInfidelity);
      series.tail = point.iteration % series.stride !== 0;
      series.latest = point;
      if (series.iteration.length > MAX_SERIES_POINTS) thin(series);
    }
  }

  /** The curves, by start index. */
  series(): Series[] {
    return [...this.byStart.values()].sort((a, b) => a.start - b.start);
  }

  /** The newest report of the start that is best now (lowest mean infidelity), or null before any report. */
  leader(): ProgressPoint | null {
    let best: ProgressPoint | null = null;
    for (const s of this.byStart.values()) if (!best || s.latest.meanInfidelity < best.meanInfidelity) best = s.latest;
    return best;
  }

  /** Iterations done over all starts. */
  totalIterations(): number {
    let total = 0;
    for (const s of this.byStart.values()) total += s.latest.iteration;
    return total;
  }

  /** Lowest mean infidelity seen in any start. */
  bestSeen(): number {
    let best = Infinity;
    for (const s of this.byStart.values()) for (const x of s.meanInfidelity) best = Math.min(best, x);
    return best;
  }
}

// Doubles the stride and keeps the iterations on it, and the newest: the points stay evenly
// spread over the iterations, so no stretch of the curve is drawn as a straight line
// (thinning only the older half again and again left iteration 0 joined to iteration 500).
function thin(series: Series): void {
  series.stride *= 2;
  const last = series.iteration.length - 1;
  const keep = (_: number, k: number) => k === last || series.iteration[k] % series.stride === 0;
  series.meanInfidelity = series.meanInfidelity.filter(keep);
  series.iteration = series.iteration.filter(keep);
  series.tail = series.iteration[series.iteration.length - 1] % series.stride !== 0;
}
