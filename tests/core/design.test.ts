// The optimiser end to end through the library API: determinism, stopping, bounds,
// and designs that beat what the published composite pulses give on the same ensemble.
import { describe, expect, it } from 'vitest';
import { design, evaluate, robustnessMap } from '../../src/core/api.ts';
import { designInThreads } from '../../src/core/threads.ts';
import type { Progress } from '../../src/core/types.ts';
import * as oracle from '../reference/oracle.ts';
import { readFileSync } from 'node:fs';
import { buildComposite } from '../../src/core/composites.ts';

const baseSpec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7,
  segments: 100,
  rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 5 }, amplitudeError: { min: -0.1, max: 0.1, points: 5 } },
  optimizer: { starts: 2, seed: 7, maxIterations: 150 },
};

describe('design', () => {
  it('is deterministic: the same seed gives the same pulse, bit for bit', async () => {
    const a = await design(baseSpec);
    const b = await design(baseSpec);
    expect(Array.from(a.pulse.i)).toEqual(Array.from(b.pulse.i));
    expect(Array.from(a.pulse.q)).toEqual(Array.from(b.pulse.q));
    const c = await design({ ...baseSpec, optimizer: { ...baseSpec.optimizer, seed: 8 } });
    expect(Array.from(c.pulse.i)).not.toEqual(Array.from(a.pulse.i));
  });

  it('lowers the infidelity monotonically (each L-BFGS step satisfies sufficient decrease)', async () => {
    const objectives: number[] = [];
    await design({ ...baseSpec, optimizer: { ...baseSpec.optimizer, starts: 1 } }, { onProgress: (p) => objectives.push(p.objective) });
    expect(objectives.length).toBeGreaterThan(10);
    for (let k = 1; k < objectives.length; k++) expect(objectives[k]).toBeLessThanOrEqual(objectives[k - 1]);
    expect(objectives[objectives.length - 1]).toBeLessThan(objectives[0] / 100);
  });

  it('a stop request ends the run within one iteration and keeps the best pulse so far', async () => {
    const controller = new AbortController();
    const seen: Progress[] = [];
    const result = await design({ ...baseSpec, optimizer: { starts: 3, seed: 1, maxIterations: 100000 } }, {
      signal: controller.signal,
      onProgress: (p) => {
        seen.push(p);
        if (p.iteration === 40) controller.abort();
      },
    });
    const abortedAt = seen.findIndex((p) => p.iteration === 40);
    // No iteration runs after the one that saw the request; later starts do not begin.
    expect(seen.length).toBe(abortedAt + 1);
    expect(result.starts.length).toBe(1);
    expect(result.best.stopReason).toBe('stopped');
    expect(result.best.iterations).toBe(40);
    expect(result.evaluation.meanInfidelity).toBeCloseTo(seen[abortedAt].meanInfidelity, 12);
  });

  it('progress can carry the accepted pulse at every iteration; the last one is the pulse a stop returns', async () => {
    // What a front end keeps when it ends a run by terminating its worker.
    const controller = new AbortController();
    const seen: Progress[] = [];
    const result = await design({ ...baseSpec, optimizer: { starts: 1, seed: 1, maxIterations: 1000 } }, {
      signal: controller.signal,
      progressPulseEveryMs: 0,
      onProgress: (p) => {
        seen.push(p);
        if (p.iteration === 30) controller.abort();
      },
    });
    expect(seen.every((p) => p.pulse !== undefined && p.pulse.i.length === 100)).toBe(true);
    const last = seen[seen.length - 1].pulse!;
    expect(Array.from(last.i)).toEqual(Array.from(result.pulse.i));
    expect(Array.from(last.q)).toEqual(Array.from(result.pulse.q));
    // Its figure is the one reported with it.
    expect(evaluate(baseSpec, { ...result.pulse, i: last.i, q: last.q }).meanInfidelity).toBeCloseTo(seen[seen.length - 1].meanInfidelity, 14);
  });

  it('never exceeds the amplitude bound; the box is used only when named', async () => {
    const disc = await design({ ...baseSpec, rabiMax: 4e6 });
    for (let k = 0; k < disc.pulse.i.length; k++) expect(Math.hypot(disc.pulse.i[k], disc.pulse.q[k])).toBeLessThanOrEqual(4e6);
    const box = await design({ ...baseSpec, rabiMax: 4e6, constraints: { amplitudeBound: 'box' } });
    let peak = 0;
    for (let k = 0; k < box.pulse.i.length; k++) {
      expect(Math.abs(box.pulse.i[k])).toBeLessThanOrEqual(4e6);
      expect(Math.abs(box.pulse.q[k])).toBeLessThanOrEqual(4e6);
      peak = Math.max(peak, Math.hypot(box.pulse.i[k], box.pulse.q[k]));
    }
    // At this low limit the X(90) needs the corners: the box peak exceeds rabiMax.
    expect(peak).toBeGreaterThan(4e6);
  });

  it('holds zero edges and reports each start and its stop reason', async () => {
    const r = await design({ ...baseSpec, constraints: { zeroEdges: true, smoothness: 0.01 }, optimizer: { starts: 2, seed: 3, maxIterations: 60 } });
    const n = r.pulse.i.length;
    expect([r.pulse.i[0], r.pulse.q[0], r.pulse.i[n - 1], r.pulse.q[n - 1]]).toEqual([0, 0, 0, 0]);
    expect(r.starts.map((s) => s.start)).toEqual([0, 1]);
    for (const s of r.starts) expect(['max-iterations', 'gradient-tolerance', 'line-search-failed', 'target-reached']).toContain(s.stopReason);
  });

  it('stops on the target infidelity and on the time budget, and says so', async () => {
    const easy = await design({ ...baseSpec, ensemble: { members: [{ detuning: 0, amplitudeError: 0 }] },
      optimizer: { starts: 1, seed: 1, maxIterations: 1000, targetInfidelity: 1e-6 } });
    expect(easy.best.stopReason).toBe('target-reached');
    expect(easy.evaluation.meanInfidelity).toBeLessThanOrEqual(1e-6);
    // A problem far from converging in 50 ms (about 70 gradient evaluations), so the clock
    // decides; starts one after another (no outpacing), so the first one meets the limit.
    const heavy = { ...baseSpec, duration: 8e-7, segments: 400, ensemble: { detuning: { min: -1e6, max: 1e6, points: 11 }, amplitudeError: { min: -0.1, max: 0.1, points: 11 } } };
    const timed = await design({ ...heavy, optimizer: { starts: 4, seed: 1, maxIterations: 1e5, timeLimit: 0.05, outpaceEvery: 0 } });
    expect(timed.best.stopReason).toBe('time-limit');
    expect(timed.starts.length).toBe(1);
  });

  it('runs only the start indices asked for (how a pool of workers splits the starts)', async () => {
    const all = await design(baseSpec);
    const second = await design(baseSpec, { startIndices: [1] });
    expect(Array.from(second.pulse.i)).toEqual(Array.from(all.starts[1].pulse.i));
  });

  it('worker threads give the same starts, bit for bit, as one thread (starts are independent)', async () => {
    const one = await design(baseSpec);
    const seen = new Set<number>();
    const two = await designInThreads(baseSpec, { threads: 2, onProgress: (p) => seen.add(p.start) });
    expect(two.starts.map((s) => s.start)).toEqual([0, 1]);
    expect([...seen].sort()).toEqual([0, 1]);
    for (let k = 0; k < 2; k++) {
      expect(Array.from(two.starts[k].pulse.i)).toEqual(Array.from(one.starts[k].pulse.i));
      expect(two.starts[k].iterations).toBe(one.starts[k].iterations);
    }
    expect(two.evaluation.meanInfidelity).toBe(one.evaluation.meanInfidelity);
  });

  it('maps and evaluations run while a design waits, and two designs at once, change nothing', async () => {
    // Each job and each design start has its own problem block (assembly/problem.ts):
    // short jobs nest above a running start's block and two designs run side by side.
    const alone = await design(baseSpec);
    const probe = { kind: 'gate' as const, axis: [1, 0, 0] as [number, number, number], angleRad: Math.PI / 2 };
    let maps = 0;
    const [busy, second] = await Promise.all([
      design(baseSpec, {
        onProgress: (p) => {
          if (p.iteration % 25 !== 0) return;
          const pulse = { dt: 2e-9, i: new Float64Array(100).fill(1e6), q: new Float64Array(100), metadata: {} };
          robustnessMap(probe, pulse, { min: -1e6, max: 1e6, points: 9 }, { min: -0.1, max: 0.1, points: 9 });
          evaluate(baseSpec, pulse);
          maps++;
        },
      }),
      design(baseSpec),
    ]);
    expect(maps).toBeGreaterThan(5);
    for (const r of [busy, second]) {
      expect(Array.from(r.pulse.i)).toEqual(Array.from(alone.pulse.i));
      expect(r.evaluation.meanInfidelity).toBe(alone.evaluation.meanInfidelity);
    }
  });

  it('designs a state transfer |0> -> |+x> robust to detuning (Bloch-vector figure, docs/physics.md section 2)', async () => {
    const spec = {
      target: { state: { from: [0, 0, 1], to: [1, 0, 0] } },
      duration: 3e-7, segments: 60, rabiMax: 1e7,
      ensemble: { detuning: { min: -2e6, max: 2e6, points: 7 }, amplitudeError: { min: -0.1, max: 0.1, points: 3 } },
      optimizer: { starts: 2, seed: 1, maxIterations: 400 },
    };
    const r = await design(spec);
    expect(r.evaluation.meanInfidelity).toBeLessThan(1e-4);
    // Independent check with the oracle: (1 - r_target . r_final)/2 for each member.
    for (const m of r.evaluation.members) {
      const want = oracle.memberInfidelity({ kind: 'state', from: [0, 0, 1], to: [1, 0, 0] }, r.pulse, m);
      expect(Math.abs(m.infidelity - want)).toBeLessThan(1e-13);
    }
  });

  it('the transmon benchmark problem beats BB1 by a factor of 8 on its own ensemble', async () => {
    // BB1 on this ensemble: 3.4e-3 (issue 2); the bar is below 4e-4.
    const r = await design({ ...baseSpec, optimizer: { starts: 5, seed: 1, maxIterations: 2000 } });
    expect(r.evaluation.meanInfidelity).toBeLessThan(4e-4);
    expect(evaluate(baseSpec, r.pulse).meanInfidelity).toBeCloseTo(r.evaluation.meanInfidelity, 15);
  });

  it('the trapped-ion demo reaches 1e-5 and beats BB1 and SK1 tenfold on its own ensemble', async () => {
    // examples/ion-x180.json: X(180) at 100 kHz, 40 us, zero edges, Gaussian amplitude spread.
    // BB1 (Wimperis 1994) and SK1 (Brown et al. 2004) at the same rabiMax and dt are the baseline.
    const spec = JSON.parse(readFileSync(new URL('../../examples/ion-x180.json', import.meta.url), 'utf8'));
    const r = await design(spec);
    expect(r.evaluation.meanInfidelity).toBeLessThan(1e-5);
    for (const name of ['bb1', 'sk1'] as const) {
      const pulse = buildComposite(name, { angleDeg: 180, axisDeg: 0, rabiMax: spec.rabiMax, dt: spec.duration / spec.segments });
      expect(r.evaluation.meanInfidelity * 10).toBeLessThan(evaluate(spec, pulse).meanInfidelity);
    }
  });
});
