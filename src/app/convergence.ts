// The convergence record of a run: mean infidelity against iteration, one series per
// start, kept short enough to redraw quickly (older points are thinned, the newest kept).
import type { ProgressPoint } from '../worker/protocol.ts';

/** One start's curve: iterations and mean infidelities, in order. */
export interface Series {
  start: number;
  iteration: number[];
  meanInfidelity: number[];
  /** The newest report of this start. */
  latest: ProgressPoint;
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
      record.byStart.set(c.start, { start: c.start, iteration: [...c.iteration], meanInfidelity: [...c.meanInfidelity], latest });
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
        series = { start: point.start, iteration: [], meanInfidelity: [], latest: point };
        this.byStart.set(point.start, series);
      }
      series.iteration.push(point.iteration);
      series.meanInfidelity.push(point.meanInfidelity);
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

// Drops every other point of the older half: the curve keeps its shape on a log axis, the
// newest points stay dense where the eye is.
function thin(series: Series): void {
  const half = Math.floor(series.iteration.length / 2);
  const keep = (_: number, k: number) => k >= half || k % 2 === 0;
  series.iteration = series.iteration.filter(keep);
  series.meanInfidelity = series.meanInfidelity.filter(keep);
}
