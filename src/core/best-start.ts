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
