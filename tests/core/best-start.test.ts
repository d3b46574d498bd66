// The rule that picks a design's winning start, wherever the starts ran: the same winner
// for any split of the starts into shares (threads, workers) as for one loop over them.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { bestStart, mergeDesigns } from '../../src/core/best-start.ts';
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
