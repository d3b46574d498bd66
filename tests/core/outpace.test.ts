// The outpacing rule: every outpaceEvery iterations, a running start that could not overtake
// the leading start even descending at outpaceFactor times its recent rate (in log of the
// objective) until maxIterations stops. Checked against the rule's own definition: its
// threshold in closed form on constructed standings, and on the recorded histories of an
// unstopped design (a start stopped by the rule is the same start cut short); and for
// determinism: the same starts stop, with the same bits, in one loop, in any order of the
// starts, on two or three threads and through the referee of split shares.
import { describe, expect, it } from 'vitest';
import { design } from '../../src/core/api.ts';
import { outpacedStarts, Referee, type Standing } from '../../src/core/best-start.ts';
import { StartRun } from '../../src/core/run.ts';
import { toProblem } from '../../src/core/api.ts';
import { designInThreads } from '../../src/core/threads.ts';
import type { DesignResult, Progress } from '../../src/core/types.ts';
import demo from '../../examples/transmon-x90.json';

const rule = { outpaceEvery: 100, outpaceFactor: 2, maxIterations: 1100 };

describe('outpacedStarts on constructed standings', () => {
  // After 100 of 1100 iterations: 1000 left. A start at objective o reaches
  // o exp(-c r 1000) at c times its rate r = ln(before / o) / 100; it stops exactly when
  // that exceeds the leader's objective L, i.e. when before < o (o / L)^(100 / (c 1000)).
  const L = 1e-4, o = 4e-4;
  const threshold = o * (o / L) ** (100 / (2 * 1000));

  it('stops a start just too slow to overtake the leader and keeps one just fast enough', () => {
    const standings: Standing[] = [
      { start: 0, objective: L, before: 2e-4 },
      { start: 1, objective: o, before: threshold * (1 - 1e-9) },
      { start: 2, objective: o, before: threshold * (1 + 1e-9) },
    ];
    expect(outpacedStarts(standings, 100, rule)).toEqual([1]);
  });

  it('never stops the leader (ties to the lower index), an ended start, or a start at objective 0', () => {
    const standings: Standing[] = [
      { start: 3, objective: L, before: 2 * L },
      { start: 1, objective: L, before: L },
      { start: 0, objective: 5e-4 },
      { start: 4, objective: 1.0001 * L, before: 1.0001 * L },
    ];
    // Start 1 leads (the tie goes to the lower index); start 3, level with it, is still
    // descending; start 4, just above it and not descending, cannot overtake it.
    expect(outpacedStarts(standings, 100, rule)).toEqual([4]);
    // A start at 0 is exact: level with a leader at 0, it is not stopped.
    expect(outpacedStarts([{ start: 0, objective: 0 }, { start: 1, objective: 0, before: 1e-3 }], 100, rule)).toEqual([]);
    expect(outpacedStarts([{ start: 0, objective: 1, before: 1 }], 100, rule)).toEqual([]);
  });

  it('judges a start that has stopped descending by where it is: above the leader it stops, whatever the budget left', () => {
    const standings: Standing[] = [{ start: 0, objective: L }, { start: 1, objective: 1.0001 * L, before: 1.0001 * L }];
    expect(outpacedStarts(standings, 100, { ...rule, maxIterations: 100000 })).toEqual([1]);
  });
});

describe('Referee', () => {
  it('answers every share with the rule over all of their starts, once every share has reported or ended', async () => {
    const referee = new Referee(3, rule);
    const a: Standing[] = [{ start: 0, objective: 1e-4, before: 2e-4 }, { start: 3, objective: 9e-4, before: 9.0001e-4 }];
    const b: Standing[] = [{ start: 1, objective: 3e-4, before: 1e-3 }];
    let answered = false;
    const first = referee.report(0, { iteration: 100, standings: a }).then((stop) => {
      answered = true;
      return stop;
    });
    await Promise.resolve();
    expect(answered).toBe(false);
    // Share 2 ended with its only start at 5e-5: it leads, so every running start is judged against it.
    referee.end(2, [{ start: 2, objective: 5e-5 }]);
    await Promise.resolve();
    expect(answered).toBe(false);
    const second = referee.report(1, { iteration: 100, standings: b });
    const expected = outpacedStarts([...a, ...b, { start: 2, objective: 5e-5 }], 100, rule);
    expect(expected).toEqual([3]);
    expect(await first).toEqual(expected);
    expect(await second).toEqual(expected);
  });
});

/** The demo with its own seed and budget, the stall rule off, to see the outpacing rule alone. */
const spec = (extra: object = {}) => ({ ...demo, optimizer: { ...demo.optimizer, stallIterations: 0, ...extra } });
const shape = (r: DesignResult) => r.starts.map((s) => [s.start, s.stopReason, s.iterations, s.evaluations, s.objective]);

describe('outpacing in a design', () => {
  it('stops each start where the rule, applied by hand to the unstopped histories, says', async () => {
    const { starts, maxIterations } = toProblem(spec()).optimizer;
    const every = 100;
    // Every start run to its end with the rule off, its objective after each iteration.
    const history: number[][] = Array.from({ length: starts }, () => []);
    const evaluations: number[][] = Array.from({ length: starts }, () => []);
    const problem = toProblem(spec({ outpaceEvery: 0 }));
    for (let s = 0; s < starts; s++) {
      const run = new StartRun(problem, s);
      history[s].push(run.objective);
      evaluations[s].push(run.evaluations);
      while (run.iterations < maxIterations && run.step() === null) {
        history[s].push(run.objective);
        evaluations[s].push(run.evaluations);
      }
      run.dispose();
    }
    const stops = history.map((h) => h.length - 1);
    for (let k = every; k < maxIterations; k += every) {
      const standings = history.map((h, s) => (stops[s] > k ? { start: s, objective: h[k], before: h[k - every] } : { start: s, objective: h[stops[s]] }));
      for (const s of outpacedStarts(standings, k, { outpaceEvery: every, outpaceFactor: 2, maxIterations })) stops[s] = k;
    }
    const result = await design(spec({ outpaceEvery: every, outpaceFactor: 2 }));
    expect(result.starts.filter((r) => r.stopReason === 'outpaced').length).toBeGreaterThan(0);
    for (const r of result.starts) {
      expect(r.iterations).toBe(stops[r.start]);
      expect(r.objective).toBe(history[r.start][stops[r.start]]);
      expect(r.evaluations).toBe(evaluations[r.start][stops[r.start]]);
      expect(r.stopReason).toBe(stops[r.start] < history[r.start].length - 1 ? 'outpaced' : 'max-iterations');
    }
    // The winner ran to its end: the best figure is the unstopped design's.
    expect(result.best.objective).toBe(Math.min(...history.map((h) => h[h.length - 1])));
  }, 120_000);

  it('gives the same starts and pulse bit for bit in any order of the starts, on two and three threads', async () => {
    const s = spec({ maxIterations: 800 });
    const one = await design(s);
    const reversed = await design(s, { startIndices: [4, 3, 2, 1, 0] });
    const two = await designInThreads(s, { threads: 2 });
    const three = await designInThreads(s, { threads: 3 });
    expect(one.starts.some((r) => r.stopReason === 'outpaced')).toBe(true);
    for (const other of [reversed, two, three]) {
      expect(shape(other)).toEqual(shape(one));
      expect(Array.from(other.pulse.i)).toEqual(Array.from(one.pulse.i));
      expect(Array.from(other.pulse.q)).toEqual(Array.from(one.pulse.q));
    }
  }, 120_000);

  it('with every rule off runs each start to its end: the pulse of the start stepped alone, bit for bit', async () => {
    const off = spec({ maxIterations: 300, outpaceEvery: 0 });
    const result = await design(off);
    const problem = toProblem(off);
    for (const r of result.starts) {
      const run = new StartRun(problem, r.start);
      while (run.iterations < 300 && run.step() === null);
      const alone = run.samples();
      expect(r.iterations).toBe(run.iterations);
      expect(r.evaluations).toBe(run.evaluations);
      expect(Array.from(r.pulse.i)).toEqual(Array.from(alone.i));
      expect(Array.from(r.pulse.q)).toEqual(Array.from(alone.q));
      run.dispose();
    }
  }, 120_000);

  it('reports every iteration of every start in step, each start in its own order', async () => {
    const seen: Progress[] = [];
    await design(spec({ maxIterations: 250 }), { onProgress: (p) => seen.push(p) });
    for (let s = 0; s < 5; s++) {
      const its = seen.filter((p) => p.start === s).map((p) => p.iteration);
      expect(its).toEqual(Array.from({ length: its.length }, (_, k) => k));
    }
  }, 60_000);
});
