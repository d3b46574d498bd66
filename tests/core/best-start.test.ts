// The rule that picks a design's winning start, wherever the starts ran: the same winner
// for any split of the starts into shares (threads, workers) as for one loop over them.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { bestStart, mergeDesigns, mergePruned, startsToContinue } from '../../src/core/best-start.ts';
import type { DesignResult, StartResult } from '../../src/core/types.ts';

const start = (index: number, objective: number): StartResult => ({
  start: index,
  objective,
  meanInfidelity: objective,
  iterations: 1,
  evaluations: 1,
  stopReason: 'max-iterations',
  elapsedS: 0,
  pulse: { dt: 1e-9, i: Float64Array.of(index), q: Float64Array.of(0), metadata: {} },
});

/** A share as one worker returns it: its own best start and its starts. */
const share = (starts: StartResult[]): DesignResult => {
  const best = bestStart(starts);
  return { pulse: best.pulse, best, starts, elapsedS: 0, evaluation: { members: [], meanInfidelity: best.objective, worstInfidelity: best.objective, worstIndex: 0 } };
};

describe('the winning start', () => {
  it('is the lowest objective; a tie goes to the lower start index whatever the order', () => {
    expect(bestStart([start(3, 1e-3), start(1, 2e-4), start(2, 5e-4)]).start).toBe(1);
    expect(bestStart([start(4, 1e-4), start(0, 1e-4)]).start).toBe(0);
    expect(() => bestStart([])).toThrow(/no start finished/);
  });

  it('is the same for every split of the starts into shares (invariant)', () => {
    // Objectives drawn from few values, so that ties occur often.
    const objectives = fc.array(fc.constantFrom(1e-3, 2e-4, 2e-4, 5e-6), { minLength: 1, maxLength: 12 });
    fc.assert(
      fc.property(objectives, fc.integer({ min: 1, max: 5 }), (values, workers) => {
        const starts = values.map((v, k) => start(k, v));
        const whole = bestStart(starts);
        // Round-robin, as the page and the threads deal them out.
        const groups = Array.from({ length: Math.min(workers, starts.length) }, (_, w) => starts.filter((_, k) => k % workers === w));
        const merged = mergeDesigns(groups.reverse().map(share), 0.5);
        expect(merged.best.start).toBe(whole.start);
        expect(merged.pulse.i[0]).toBe(whole.start);
        expect(merged.starts.map((s) => s.start)).toEqual(starts.map((s) => s.start));
        expect(merged.elapsedS).toBe(0.5);
      }),
    );
  });
});

describe('pruning over shares', () => {
  it('continues the keepStarts lowest at the pruning point, only those still running, ties to the lower index', () => {
    const at = (index: number, objective: number, reason: StartResult['stopReason']): StartResult => ({ ...start(index, objective), stopReason: reason });
    // Start 2 ended before the point (a stall) and ranks first: it takes one of the places.
    const probes = [at(0, 3e-3, 'pruned'), at(1, 2e-4, 'pruned'), at(2, 1e-4, 'stalled'), at(3, 2e-4, 'pruned'), at(4, 9e-3, 'pruned')];
    expect(startsToContinue(probes, 2)).toEqual([1]);
    expect(startsToContinue(probes, 3)).toEqual([1, 3]);
    expect(startsToContinue([...probes].reverse(), 3)).toEqual([1, 3]);
  });

  it('gives the winner and start list of one loop for every split of the probe and finish stages (invariant)', () => {
    const objectives = fc.array(fc.constantFrom(1e-3, 2e-4, 5e-5), { minLength: 2, maxLength: 10 });
    fc.assert(
      fc.property(objectives, fc.integer({ min: 1, max: 4 }), fc.integer({ min: 1, max: 3 }), (values, workers, keep) => {
        const probes = values.map((v, k) => ({ ...start(k, v), stopReason: 'pruned' as const }));
        const going = startsToContinue(probes, keep);
        // A continued start ends lower than at its probe (here: a hundredth of it).
        const finals = probes.map((r) => (going.includes(r.start) ? { ...start(r.start, r.objective / 100), stopReason: 'max-iterations' as const } : r));
        const whole = bestStart(finals);
        const deal = (list: StartResult[]) => Array.from({ length: Math.min(workers, list.length) }, (_, w) => list.filter((_, k) => k % workers === w));
        const merged = mergePruned(deal(probes).map(share), deal(finals.filter((r) => going.includes(r.start))).map(share), 0.25);
        expect(merged.best.start).toBe(whole.start);
        expect(merged.best.objective).toBe(whole.objective);
        expect(merged.starts.map((r) => [r.start, r.stopReason])).toEqual(finals.map((r) => [r.start, r.stopReason]));
      }),
    );
  });
});
