// A large design's members in shares (src/core/member-split.ts) and on helper threads
// (share-threads.ts): the shares are the problem's alone, their sum runs in share order,
// and a design gives the same bits on one thread and on two. The split objective is
// checked against the whole one and against the plain-TypeScript oracle.
import { describe, expect, it } from 'vitest';
import { design } from '../../src/core/api.ts';
import { BUFFER, readBuffer } from '../../src/core/block.ts';
import { evaluationSeconds, memberShares, MIN_SHARE_SECONDS, ShareRoute, sumShares, threadShares, type ShareResult } from '../../src/core/member-split.ts';
import { startSharePool } from '../../src/core/share-threads.ts';
import { StartRun } from '../../src/core/run.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { designInThreads, memberThreads } from '../../src/core/threads.ts';
import type { Pulse } from '../../src/core/types.ts';
import { getCore } from '../../src/core/wasm.ts';
import * as oracle from '../reference/oracle.ts';
import { normwiseRelativeError, relativeError } from '../reference/tolerance.ts';

/** 400 segments x 121 members: about 0.4 ms per evaluation, so the library splits it in 4. */
const LARGE = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 1e-6,
  segments: 400,
  rabiMax: 2e6,
  ensemble: { detuning: { min: -2e5, max: 2e5, points: 11 }, amplitudeError: { min: -0.1, max: 0.1, points: 11 } },
  optimizer: { starts: 1, seed: 5, maxIterations: 25 },
};

describe('memberShares', () => {
  it('leaves small problems whole and cuts large ones in 2 or 4 contiguous shares at multiples of 4 members', () => {
    const small = parseSpec({ ...LARGE, segments: 40 });
    expect(evaluationSeconds(small)).toBeLessThan(2 * MIN_SHARE_SECONDS);
    expect(memberShares(small)).toEqual([{ start: 0, end: 121 }]);
    const large = parseSpec(LARGE);
    const shares = memberShares(large);
    expect(shares.length).toBe(4);
    expect(shares[0].start).toBe(0);
    expect(shares[shares.length - 1].end).toBe(121);
    for (let s = 1; s < shares.length; s++) {
      expect(shares[s].start).toBe(shares[s - 1].end);
      expect(shares[s].start % 4).toBe(0);
    }
    // The halves of the 4 shares are as even as cuts at multiples of 4 allow: 60 + 61.
    expect(shares).toEqual([{ start: 0, end: 32 }, { start: 32, end: 60 }, { start: 60, end: 92 }, { start: 92, end: 121 }]);
    // 25 members: 12 + 13 in the halves, no share empty at 13 members.
    expect(memberShares(parseSpec({ ...LARGE, segments: 4000, ensemble: { detuning: { min: -1e5, max: 1e5, points: 25 } } }))).toEqual(
      [{ start: 0, end: 8 }, { start: 8, end: 12 }, { start: 12, end: 20 }, { start: 20, end: 25 }]);
    expect(memberShares(parseSpec({ ...LARGE, segments: 4000, ensemble: { detuning: { min: -1e5, max: 1e5, points: 13 } } }))).toEqual(
      [{ start: 0, end: 4 }, { start: 4, end: 8 }, { start: 8, end: 12 }, { start: 12, end: 13 }]);
    // Never more shares than groups of 4 members.
    expect(memberShares(parseSpec({ ...LARGE, segments: 100000, ensemble: { detuning: { min: -1e5, max: 1e5, points: 5 } } })).length).toBe(2);
  });

  it('cuts a transmon ladder at single members (it takes them one at a time), so that two threads get near-equal parts', () => {
    // 3 levels x 5 members x 200 samples: about 0.47 ms per evaluation (cost.ts), so 4 shares.
    const ladder = parseSpec({ ...LARGE, segments: 200, duration: 4e-8, rabiMax: 5e7, system: { levels: 3, anharmonicity: -2e8 },
      ensemble: { amplitudeError: { min: -0.05, max: 0.05, points: 5 } } });
    expect(memberShares(ladder)).toEqual([{ start: 0, end: 1 }, { start: 1, end: 3 }, { start: 3, end: 4 }, { start: 4, end: 5 }]);
    // Two shares: 3 + 2 members, not 4 + 1.
    expect(memberShares(ladder, evaluationSeconds(ladder) / 3)).toEqual([{ start: 0, end: 3 }, { start: 3, end: 5 }]);
  });

  it('sums the shares pairwise, (s0 + s1) + (s2 + s3), and a thread\'s block first gives the same bits', () => {
    // 2^-53 + 1 rounds to 1, 2^-53 + 2^-53 does not: pairwise the sum is 1 + 2^-52, left to right it is 1.
    const tiny = 2 ** -53;
    const r = (mean: number): ShareResult => ({ mean, gradI: new Float64Array([mean]), gradQ: new Float64Array([-mean]) });
    const parts = [r(tiny), r(1), r(tiny), r(tiny)];
    const gI = new Float64Array(1), gQ = new Float64Array(1);
    const mean = sumShares(parts, gI, gQ);
    expect(mean).toBe((tiny + 1) + (tiny + tiny));
    expect(mean).toBe(1 + 2 ** -52);
    expect(mean).not.toBe(((tiny + 1) + tiny) + tiny);
    expect([gI[0], gQ[0]]).toEqual([mean, -mean]);
    // Two threads: each block of two summed first, then the blocks' sums (the first in place).
    const hI = new Float64Array(1), hQ = new Float64Array(1), pI = new Float64Array(1), pQ = new Float64Array(1);
    const own = sumShares(parts.slice(0, 2), hI, hQ);
    const helper = sumShares(parts.slice(2), pI, pQ);
    expect(sumShares([{ mean: own, gradI: hI, gradQ: hQ }, { mean: helper, gradI: pI, gradQ: pQ }], hI, hQ)).toBe(mean);
    expect([hI[0], hQ[0]]).toEqual([mean, -mean]);
    expect(() => sumShares(parts.slice(0, 3), gI, gQ)).toThrow(/3 parts/);
    expect(threadShares(4, 2, 1)).toEqual([2, 3]);
    expect(() => threadShares(4, 3, 0)).toThrow(/4 shares do not divide among 3 threads/);
  });

  it('threads per start: starts over threads while there are enough starts, member shares for a start alone', () => {
    const large = parseSpec(LARGE), small = parseSpec({ ...LARGE, segments: 40 });
    expect(memberThreads(large, 4, 2)).toBe(1);
    expect(memberThreads(large, 1, 2)).toBe(2);
    expect(memberThreads(large, 1, 8)).toBe(4);
    // Three threads for 4 shares: 2 (each takes a whole block of them).
    expect(memberThreads(large, 1, 3)).toBe(2);
    expect(memberThreads(small, 1, 2)).toBe(1);
  });
});

describe('ShareRoute: the route of each evaluation, from the times each route took', () => {
  /**
   * The routes of `count` evaluations, each route taking the time `ms` gives for its
   * evaluation index and the number of evaluations in a row on the pool before it.
   */
  const routes = (count: number, ms: (pooled: boolean, k: number, run: number) => number): boolean[] => {
    const route = new ShareRoute();
    let run = 0;
    return Array.from({ length: count }, (_, k) => {
      const pooled = route.next();
      run = pooled ? run + 1 : 0;
      route.took(pooled, ms(pooled, k, run - 1));
      return pooled;
    });
  };
  /** A pool as measured in a 1000 x 121 design: 1.5 ms for the first evaluation after idling, 0.9 for the next two, 0.7 in a long run. */
  const idling = (run: number): number => (run === 0 ? 1.5 : run < 3 ? 0.9 : 0.7);
  const { WARM_UP, WINDOW, EXPLORE_EVERY } = ShareRoute;

  it('warms up with a run on the pool, then a run on this thread', () => {
    const taken = routes(WARM_UP, () => 1);
    expect(taken).toEqual(Array.from({ length: WARM_UP }, (_, k) => k < WINDOW));
  });

  it('takes the pool once it is faster, although its first evaluations were slow (a cold thread) and it is slow after idling', () => {
    // The pool's first five evaluations 3.3 to 1.7 ms (a cold engine), then as `idling`; one thread 0.93 ms.
    const taken = routes(300, (pooled, k, run) => (pooled ? (k < WINDOW ? 3.3 - k * 0.4 : idling(run)) : 0.93));
    // The warm-up's median says one thread; the first burst on the pool soon after says otherwise.
    const firstPool = taken.findIndex((p, k) => p && k >= WARM_UP);
    expect(firstPool).toBe(WARM_UP + WINDOW);
    expect(taken.slice(firstPool, firstPool + EXPLORE_EVERY).every((p) => p)).toBe(true);
    // From there on the pool, but for single tries of this thread, which lose: spaced ever wider.
    const alone = taken.map((p, k) => (p ? -1 : k)).filter((k) => k > firstPool);
    expect(alone.length).toBeGreaterThan(0);
    expect(alone.length).toBeLessThanOrEqual(4);
    for (let j = 1; j < alone.length; j++) expect(alone[j] - alone[j - 1]).toBeGreaterThanOrEqual(2 * EXPLORE_EVERY);
  });

  it('stays on one thread while the pool is slower, and moves to the pool at its next burst', () => {
    // The pool 2 ms (a helper waiting for a core) for the first 100 evaluations, then as `idling`.
    const taken = routes(400, (pooled, k, run) => (pooled ? (k < 100 ? 2 : idling(run)) : 0.93));
    // Bursts of the pool before the change: few, and spaced ever wider.
    const tries = taken.map((p, k) => (p ? k : -1)).filter((k) => k >= WARM_UP && k < 100);
    expect(tries.length).toBeLessThanOrEqual(3 * WINDOW);
    const first = taken.findIndex((p, k) => p && k >= 100);
    expect(first).toBeLessThanOrEqual(100 + 8 * EXPLORE_EVERY);
    const later = taken.slice(first);
    expect(later.slice(0, 2 * WINDOW).every((p) => p)).toBe(true);
    expect(later.filter((p) => !p).length).toBeLessThanOrEqual(Math.ceil(later.length / (2 * EXPLORE_EVERY)) + 1);
  });

  it('leaves the pool within a few evaluations when it turns slower, and tries it again in bursts', () => {
    // The pool as `idling` for 100 evaluations, then 2 ms; one thread 0.93 ms.
    const taken = routes(400, (pooled, k, run) => (pooled ? (k < 100 ? idling(run) : 2) : 0.93));
    expect(taken.slice(WARM_UP + WINDOW, 100).filter((p) => p).length).toBeGreaterThan(70);
    const back = taken.findIndex((p, k) => !p && k >= 100);
    expect(back).toBeLessThanOrEqual(100 + WINDOW);
    expect(taken.slice(back + WINDOW).filter((p) => p).length).toBeLessThanOrEqual(4 * WINDOW);
  });
});

/** The objective and gradient of a start's block at its current variables, and the drive's gradient. */
function objectiveAt(run: StartRun, segments: number): { f: number; g: Float64Array; gI: Float64Array; gQ: Float64Array } {
  const core = getCore(), ex = core.exports;
  const nVar = ex.problemVariables(run.block);
  const x = core.read(ex.optVariables(run.block), nVar);
  return core.job(() => {
    const xp = core.put(x), gp = core.alloc(nVar);
    const f = ex.objective(run.block, xp, gp);
    return { f, g: core.read(gp, nVar), gI: readBuffer(core, run.block, BUFFER.gradI, segments), gQ: readBuffer(core, run.block, BUFFER.gradQ, segments) };
  });
}

describe('the split objective', () => {
  it('gives the whole objective and gradient to rounding, and the oracle figure and gradient', () => {
    const problem = parseSpec(LARGE);
    const run = new StartRun(problem, 0);
    const ex = getCore().exports;
    try {
      const at = () => objectiveAt(run, problem.segments);
      const split = at();
      ex.problemSetShares(run.block, 0);
      const whole = at();
      ex.problemSetShares(run.block, 1);
      expect(relativeError(split.f, whole.f)).toBeLessThan(1e-15);
      expect(normwiseRelativeError(split.g, whole.g)).toBeLessThan(1e-14);
      // The oracle (plain TypeScript, Math.sin/cos) at the same samples.
      const samples = run.samples();
      const pulse: Pulse = { dt: problem.dt, i: samples.i, q: samples.q, metadata: {} };
      const want = oracle.ensembleGradient(problem.target, pulse, problem.members);
      expect(relativeError(split.f, want.mean)).toBeLessThan(1e-13);
      expect(normwiseRelativeError(split.gI, want.gradI)).toBeLessThan(1e-12);
      expect(normwiseRelativeError(split.gQ, want.gradQ)).toBeLessThan(1e-12);
    } finally {
      run.dispose();
    }
  });

  it('splits a transmon ladder the same way: the shares sum to the whole objective and gradient', () => {
    // 3 levels cost about 60 times a qubit per sample-member: 40 samples x 9 members are enough.
    const problem = parseSpec({ ...LARGE, segments: 40, duration: 4e-8, rabiMax: 5e7, system: { levels: 3, anharmonicity: -2e8 },
      ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 }, amplitudeError: { min: -0.05, max: 0.05, points: 3 } } });
    expect(memberShares(problem).length).toBe(2);
    const run = new StartRun(problem, 0);
    const ex = getCore().exports;
    try {
      const at = () => objectiveAt(run, problem.segments);
      const split = at();
      ex.problemSetShares(run.block, 0);
      const whole = at();
      expect(relativeError(split.f, whole.f)).toBeLessThan(1e-15);
      expect(normwiseRelativeError(split.g, whole.g)).toBeLessThan(1e-14);
    } finally {
      run.dispose();
    }
  });

  it('a design gives the same pulse, bit for bit, in one loop, on one thread and with its shares on two threads', async () => {
    const inProcess = await design(LARGE);
    const one = await designInThreads(LARGE, { threads: 1 });
    const two = await designInThreads(LARGE, { threads: 2 });
    for (const r of [one, two]) {
      expect(Array.from(r.pulse.i)).toEqual(Array.from(inProcess.pulse.i));
      expect(Array.from(r.pulse.q)).toEqual(Array.from(inProcess.pulse.q));
      expect(r.best.evaluations).toBe(inProcess.best.evaluations);
    }
  });

  it('every evaluation on helper threads gives the pulse of one thread, bit for bit', async () => {
    const problem = parseSpec(LARGE);
    const alone = await design(LARGE);
    const pool = await startSharePool(problem, memberShares(problem), 2, { always: true });
    try {
      const pooled = await design(LARGE, { sharePool: pool });
      expect(pool.posted).toBe(pooled.best.evaluations);
      expect(Array.from(pooled.pulse.i)).toEqual(Array.from(alone.pulse.i));
      expect(Array.from(pooled.pulse.q)).toEqual(Array.from(alone.pulse.q));
      expect(pooled.best.evaluations).toBe(alone.best.evaluations);
    } finally {
      pool.close();
    }
    // The same with the helpers sleeping between evaluations (no polling), and with one share per thread on four.
    for (const [threads, spinMs] of [[2, { helper: 0, collect: 0 }], [4, undefined]] as const) {
      const other = await startSharePool(problem, memberShares(problem), threads, { always: true, ...(spinMs ? { spinMs } : {}) });
      try {
        const pooled = await design(LARGE, { sharePool: other });
        expect(Array.from(pooled.pulse.i)).toEqual(Array.from(alone.pulse.i));
        expect(Array.from(pooled.pulse.q)).toEqual(Array.from(alone.pulse.q));
      } finally {
        other.close();
      }
    }
  });

  it('a stop ends a design whose shares run on two threads, keeping the best pulse so far', async () => {
    const controller = new AbortController();
    let iterations = 0;
    const run = designInThreads({ ...LARGE, optimizer: { ...LARGE.optimizer, maxIterations: 100000, stallIterations: 0 } }, {
      threads: 2, signal: controller.signal, progressPulseEveryMs: 0,
      onProgress: (p) => {
        iterations = p.iteration;
        if (p.iteration >= 3) controller.abort();
      },
    });
    const r = await run;
    expect(r.best.stopReason).toBe('stopped');
    expect(iterations).toBeGreaterThanOrEqual(3);
    expect(r.pulse.i.length).toBe(LARGE.segments);
  });
});
