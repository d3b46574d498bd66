// A large design's members in shares (src/core/member-split.ts) and on helper threads
// (share-threads.ts): the shares are the problem's alone, their sum runs in share order,
// and a design gives the same bits on one thread and on two. The split objective is
// checked against the whole one and against the plain-TypeScript oracle.
import { describe, expect, it } from 'vitest';
import { design } from '../../src/core/api.ts';
import { BUFFER, readBuffer } from '../../src/core/block.ts';
import { evaluationSeconds, memberShares, MIN_SHARE_SECONDS, sumShares, type ShareResult } from '../../src/core/member-split.ts';
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
    // Never more shares than groups of 4 members.
    expect(memberShares(parseSpec({ ...LARGE, segments: 100000, ensemble: { detuning: { min: -1e5, max: 1e5, points: 5 } } })).length).toBe(2);
  });

  it('sums the shares in share order, whatever order they arrive in', () => {
    // 1 + 2^-53 + 2^-53: left to right it stays 1, the other way it does not.
    const tiny = 2 ** -53;
    const r = (mean: number): ShareResult => ({ mean, gradI: new Float64Array([mean]), gradQ: new Float64Array([0]) });
    const gI = new Float64Array(1), gQ = new Float64Array(1);
    const mean = sumShares(new Map([[2, r(tiny)], [0, r(1)], [1, r(tiny)]]), 3, gI, gQ);
    expect(mean).toBe((1 + tiny) + tiny);
    expect(mean).toBe(1);
    expect(gI[0]).toBe(1);
    expect(() => sumShares(new Map([[0, r(1)]]), 2, gI, gQ)).toThrow(/share 1 of 2/);
  });

  it('threads per start: starts over threads while there are enough starts, member shares for a start alone', () => {
    const large = parseSpec(LARGE), small = parseSpec({ ...LARGE, segments: 40 });
    expect(memberThreads(large, 4, 2)).toBe(1);
    expect(memberThreads(large, 1, 2)).toBe(2);
    expect(memberThreads(large, 1, 8)).toBe(4);
    expect(memberThreads(small, 1, 2)).toBe(1);
  });
});

describe('the split objective', () => {
  it('gives the whole objective and gradient to rounding, and the oracle figure and gradient', () => {
    const problem = parseSpec(LARGE);
    const run = new StartRun(problem, 0);
    const core = getCore(), ex = core.exports;
    try {
      const nVar = ex.problemVariables(run.block);
      const x = core.read(ex.optVariables(run.block), nVar);
      const at = () => core.job(() => {
        const xp = core.put(x), gp = core.alloc(nVar);
        const f = ex.objective(run.block, xp, gp);
        return { f, g: core.read(gp, nVar), gI: readBuffer(core, run.block, BUFFER.gradI, problem.segments), gQ: readBuffer(core, run.block, BUFFER.gradQ, problem.segments) };
      });
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
    const core = getCore(), ex = core.exports;
    try {
      const nVar = ex.problemVariables(run.block);
      const x = core.read(ex.optVariables(run.block), nVar);
      const at = () => core.job(() => {
        const xp = core.put(x), gp = core.alloc(nVar);
        return { f: ex.objective(run.block, xp, gp), g: core.read(gp, nVar) };
      });
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
