// The stopping rules of a design: a start that stalls ends, and pruning continues the best
// starts. Checked against the rules' own definitions on the recorded objective history
// (the invariant), against an unpruned run of the same seed (a pruned start is the same
// start cut short, so its figures are that run's at the pruning point), and across one
// loop and two threads (the same bits: the split of the starts never matters).
import { describe, expect, it } from 'vitest';
import { design } from '../../src/core/api.ts';
import { designInThreads } from '../../src/core/threads.ts';
import type { Progress } from '../../src/core/types.ts';

const spec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7,
  segments: 60,
  rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 }, amplitudeError: { min: -0.1, max: 0.1, points: 3 } },
  optimizer: { starts: 4, seed: 3, maxIterations: 600, stallIterations: 0, outpaceEvery: 0 },
};
const withOptimizer = (extra: object) => ({ ...spec, optimizer: { ...spec.optimizer, ...extra } });

describe('stopping on a stall', () => {
  it('ends a start at the first iteration k where objective(k - K) - objective(k) <= tau objective(k - K)', async () => {
    const K = 40, tau = 0.05;
    const full: Progress[] = [];
    await design(withOptimizer({ starts: 1 }), { onProgress: (p) => full.push(p) });
    const objective = full.map((p) => p.objective);
    // The rule applied by hand to the unstopped run's history.
    let expected = objective.length - 1;
    for (let k = K; k < objective.length; k++) {
      if (objective[k - K] - objective[k] <= tau * objective[k - K]) { expected = k; break; }
    }
    expect(expected).toBeLessThan(objective.length - 1);
    const stopped = await design(withOptimizer({ starts: 1, stallIterations: K, stallTolerance: tau }));
    expect(stopped.best.stopReason).toBe('stalled');
    expect(stopped.best.iterations).toBe(expected);
    expect(stopped.best.objective).toBe(objective[expected]);
  });
});

describe('pruning starts', () => {
  it('runs every start to pruneAfter, continues the keepStarts lowest there, and gives the pulse of those starts run alone', async () => {
    const pruneAfter = 60, keepStarts = 2;
    const alone = await design(spec);
    const atPoint: number[] = [];
    await design(withOptimizer({ maxIterations: pruneAfter }), { onProgress: (p) => { if (p.iteration === pruneAfter) atPoint[p.start] = p.objective; } });
    const order = [0, 1, 2, 3].sort((a, b) => atPoint[a] - atPoint[b] || a - b);
    const pruned = await design(withOptimizer({ pruneAfter, keepStarts }));
    for (const r of pruned.starts) {
      if (order.indexOf(r.start) < keepStarts) {
        // A continued start is the unpruned start, bit for bit.
        expect(r.objective).toBe(alone.starts[r.start].objective);
        expect(r.iterations).toBe(alone.starts[r.start].iterations);
      } else {
        expect(r.stopReason).toBe('pruned');
        expect(r.iterations).toBe(pruneAfter);
        expect(r.objective).toBe(atPoint[r.start]);
      }
    }
    const spent = pruned.starts.reduce((a, r) => a + r.evaluations, 0);
    expect(spent).toBeLessThan(alone.starts.reduce((a, r) => a + r.evaluations, 0));
  });

  it('gives the same pulse in one loop and on two threads', async () => {
    const s = withOptimizer({ pruneAfter: 50, keepStarts: 2, stallIterations: 50, stallTolerance: 1e-3 });
    const one = await design(s);
    const two = await designInThreads(s, { threads: 2 });
    expect(Array.from(two.pulse.i)).toEqual(Array.from(one.pulse.i));
    expect(Array.from(two.pulse.q)).toEqual(Array.from(one.pulse.q));
    expect(two.starts.map((r) => [r.start, r.stopReason, r.iterations])).toEqual(one.starts.map((r) => [r.start, r.stopReason, r.iterations]));
  }, 60_000);
});
