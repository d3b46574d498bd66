// Which start wins a design, wherever its starts ran: one loop in one core, Node threads
// (threads.ts) or the page's workers (src/worker/client.ts). Plain data, no core, so the
// page can merge its workers' results with the same rule.
import type { DesignResult, StartResult } from './types.ts';

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
