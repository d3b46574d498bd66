// Which start wins a design, wherever its starts ran: one loop in one core, Node threads
// (threads.ts) or the page's workers (src/worker/client.ts). Plain data, no core, so the
// page can merge its workers' results with the same rule.
import type { DesignResult, StartResult } from './types.ts';
import * as pm from './portable-math.ts';

/** The winning start: the lowest objective, ties to the lower start index (so the split over threads never matters). */
export function bestStart<T extends Pick<StartResult, 'objective' | 'start'>>(starts: readonly T[]): T {
  if (starts.length === 0) throw new RangeError('starts: no start finished; there is nothing to choose from');
  let best = starts[0];
  for (const r of starts) {
    if (r.objective < best.objective || (r.objective === best.objective && r.start < best.start)) best = r;
  }
  return best;
}

/** One design from the results of several shares of its starts: the best share's pulse and evaluation, every start in index order. */
export function mergeDesigns(shares: readonly DesignResult[], elapsedS: number): DesignResult {
  if (shares.length === 0) throw new RangeError('shares: no design share returned a result');
  const winner = bestStart(shares.map((share) => share.best));
  const share = shares.find((s) => s.best === winner)!;
  const starts = shares.flatMap((s) => s.starts).sort((a, b) => a.start - b.start);
  const merged: DesignResult = { pulse: share.pulse, evaluation: share.evaluation, best: share.best, starts, elapsedS };
  if (share.truncationCheck) merged.truncationCheck = share.truncationCheck;
  return merged;
}

/** True when a design of `starts` starts prunes: every start runs pruneAfter iterations, then only the keepStarts best go on. */
export function prunes(optimizer: { pruneAfter: number; keepStarts: number }, starts: number): boolean {
  return optimizer.pruneAfter > 0 && optimizer.keepStarts < starts;
}

/**
 * The starts that go on after the pruning point: of every start's objective there (or at
 * its end, if it ended before), the keepStarts lowest, ties to the lower index; only
 * those still running ('pruned' at the point) are returned, in index order. Plain data, so
 * one loop, threads and the page's workers continue the same starts.
 */
export function startsToContinue(probes: readonly Pick<StartResult, 'objective' | 'start' | 'stopReason'>[], keepStarts: number): number[] {
  const ranked = [...probes].sort((a, b) => a.objective - b.objective || a.start - b.start);
  return ranked.slice(0, keepStarts).filter((r) => r.stopReason === 'pruned').map((r) => r.start).sort((a, b) => a - b);
}

/** One design from a pruned run's probe shares and the shares that finished the continued starts (startsToContinue). */
export function mergePruned(probeShares: readonly DesignResult[], finishShares: readonly DesignResult[], elapsedS: number): DesignResult {
  const going = new Set(finishShares.flatMap((s) => s.starts.map((r) => r.start)));
  // A probe share whose best went on holds it at its probe point; the finished copy stands for it.
  const candidates = [...probeShares.filter((s) => !going.has(s.best.start)), ...finishShares];
  const merged = mergeDesigns(candidates, elapsedS);
  const starts = [...probeShares.flatMap((s) => s.starts).filter((r) => !going.has(r.start)), ...finishShares.flatMap((s) => s.starts)];
  return { ...merged, starts: starts.sort((a, b) => a.start - b.start) };
}

/** A start's standing at a comparison of the starts (outpacedStarts). */
export interface Standing {
  start: number;
  /** Its objective now (at the comparison's iteration), or where it ended. */
  objective: number;
  /** Its objective outpaceEvery iterations before now; absent when the start has ended. */
  before?: number;
}

/** The starts of one share (a thread's or a worker's) at a comparison after `iteration` iterations. */
export interface Checkpoint {
  iteration: number;
  standings: Standing[];
}

/**
 * The running starts that stop as outpaced after `iteration` iterations: the leader is the
 * lowest objective of every start (ended ones by where they ended; ties to the lower
 * index); a running start other than the leader stops when, descending from now to
 * maxIterations at `factor` times its rate over the last `window` iterations (in
 * log(objective), the rate of a linearly converging start), it would still end above
 * the leader's objective now. The leader only descends further, so the rule is
 * optimistic for the stopped start twice over. Plain data, so one loop, threads and the
 * page's workers stop the same starts. Returned in index order.
 */
export function outpacedStarts(standings: readonly Standing[], iteration: number, optimizer: { outpaceEvery: number; outpaceFactor: number; maxIterations: number }): number[] {
  if (standings.length < 2) return [];
  const leader = bestStart(standings);
  const window = optimizer.outpaceEvery;
  const left = optimizer.maxIterations - iteration;
  const out: number[] = [];
  for (const s of standings) {
    if (s === leader || s.before === undefined || !(s.objective > 0)) continue;
    const rate = s.before > s.objective ? pm.log(s.before / s.objective) / window : 0;
    const reachable = s.objective * pm.exp(-optimizer.outpaceFactor * rate * left);
    if (reachable > leader.objective) out.push(s.start);
  }
  return out.sort((a, b) => a - b);
}

/**
 * Compares the starts of a design split into shares (threads or workers) at each
 * checkpoint: every share that still runs reports its starts there and waits; when every
 * share has reported or ended, each gets the outpaced starts (outpacedStarts over all of
 * them). A share that has ended counts by its starts' final objectives.
 */
export class Referee {
  private readonly optimizer: { outpaceEvery: number; outpaceFactor: number; maxIterations: number };
  private readonly ended = new Map<number, Standing[]>();
  private readonly waiting = new Map<number, { checkpoint: Checkpoint; resolve: (stop: number[]) => void }>();
  private readonly shares: number;

  constructor(shares: number, optimizer: { outpaceEvery: number; outpaceFactor: number; maxIterations: number }) {
    this.shares = shares;
    this.optimizer = optimizer;
  }

  /** Share `share` is at a checkpoint; resolves with the starts (of every share) that stop there. */
  report(share: number, checkpoint: Checkpoint): Promise<number[]> {
    return new Promise((resolve) => {
      this.waiting.set(share, { checkpoint, resolve });
      this.settle();
    });
  }

  /** Share `share` has ended (or failed): its starts' final objectives. */
  end(share: number, starts: readonly { start: number; objective: number }[]): void {
    this.ended.set(share, starts.map((s) => ({ start: s.start, objective: s.objective })));
    this.waiting.delete(share);
    this.settle();
  }

  private settle(): void {
    if (this.waiting.size === 0 || this.waiting.size + this.ended.size < this.shares) return;
    const reports = [...this.waiting.values()];
    const iteration = reports[0].checkpoint.iteration;
    if (reports.some((r) => r.checkpoint.iteration !== iteration)) {
      throw new RangeError(`checkpoints: shares reported at different iterations (${reports.map((r) => r.checkpoint.iteration).join(', ')})`);
    }
    const standings = [...reports.flatMap((r) => r.checkpoint.standings), ...[...this.ended.values()].flat()];
    const stop = outpacedStarts(standings, iteration, this.optimizer);
    this.waiting.clear();
    for (const r of reports) r.resolve(stop);
  }
}
