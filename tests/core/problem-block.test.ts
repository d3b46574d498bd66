// Problem blocks (assembly/problem.ts): every job's state behind one pointer, so that
// designs, maps and evaluations interleave in one core and give what they give alone.
// The invariant checked: a computation's result does not depend on what else runs in
// the same core (bit for bit), and the arena returns to where it was.
import { describe, expect, it } from 'vitest';
import { design, evaluate, robustnessMap, toProblem } from '../../src/core/api.ts';
import { StartRun } from '../../src/core/run.ts';
import type { Problem, Pulse, Target } from '../../src/core/types.ts';
import { getCore } from '../../src/core/wasm.ts';

const gateSpec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 5 }, amplitudeError: { min: -0.1, max: 0.1, points: 5 } },
  optimizer: { starts: 2, seed: 7, maxIterations: 120 },
};
// A different design: state transfer, box bound, zero edges, smoothness, other sizes.
const stateSpec = {
  target: { state: { from: [0, 0, 1], to: [0, 1, 0] } },
  duration: 3e-7, segments: 61, rabiMax: 6e6,
  ensemble: { detuning: { min: -2e6, max: 2e6, points: 3 }, amplitudeError: { values: [-0.05, 0.05] } },
  constraints: { amplitudeBound: 'box', zeroEdges: true, smoothness: 0.02 },
  optimizer: { starts: 1, seed: 3, maxIterations: 90, memory: 5 },
};

/** Run one start to its end alone; the samples and iteration count. */
function alone(problem: Problem, start: number): { i: Float64Array; q: Float64Array; iterations: number } {
  const run = new StartRun(problem, start);
  try {
    while (run.iterations < problem.optimizer.maxIterations && run.step() === null) { /* iterate */ }
    return { ...run.samples(), iterations: run.iterations };
  } finally {
    run.dispose();
  }
}

describe('problem blocks', () => {
  it('two different designs stepped in turn in one core give, bit for bit, the pulses of two separate runs', () => {
    const a = toProblem(gateSpec), b = toProblem(stateSpec);
    const wantA = alone(a, 1), wantB = alone(b, 0);
    const core = getCore();
    const used = core.exports.arenaUsed();
    const runA = new StartRun(a, 1), runB = new StartRun(b, 0);
    const probe: Pulse = { dt: 2e-9, i: new Float64Array(50).fill(2e6), q: new Float64Array(50), metadata: {} };
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: 1 };
    let doneA = false, doneB = false, maps = 0;
    while (!doneA || !doneB) {
      if (!doneA) doneA = runA.iterations >= a.optimizer.maxIterations || runA.step() !== null;
      if (!doneB) doneB = runB.iterations >= b.optimizer.maxIterations || runB.step() !== null;
      if ((runA.iterations + runB.iterations) % 17 === 0) {
        robustnessMap(target, probe, { min: -1e6, max: 1e6, points: 5 }, { min: -0.1, max: 0.1, points: 3 });
        maps++;
      }
    }
    const gotA = runA.samples(), gotB = runB.samples();
    expect(runA.iterations).toBe(wantA.iterations);
    expect(runB.iterations).toBe(wantB.iterations);
    expect(Array.from(gotA.i)).toEqual(Array.from(wantA.i));
    expect(Array.from(gotA.q)).toEqual(Array.from(wantA.q));
    expect(Array.from(gotB.i)).toEqual(Array.from(wantB.i));
    expect(Array.from(gotB.q)).toEqual(Array.from(wantB.q));
    expect(maps).toBeGreaterThan(3);
    // Blocks freed in the order they were made (A under B) still give the arena back.
    runA.dispose();
    expect(core.exports.arenaUsed()).toBeGreaterThan(used);
    runB.dispose();
    expect(core.exports.arenaUsed()).toBe(used);
  });

  it('design() runs side by side without a queue: two designs started together match two run alone', async () => {
    const gateAlone = await design(gateSpec);
    const stateAlone = await design(stateSpec);
    let interleaved = 0;
    let last = -1;
    const [g, s] = await Promise.all([
      design(gateSpec, { onProgress: (p) => { if (last === 1) interleaved++; last = 0; void p; } }),
      design(stateSpec, { onProgress: () => { if (last === 0) interleaved++; last = 1; } }),
      // A map and an evaluation while both wait between iterations.
      Promise.resolve().then(() => evaluate(gateSpec, gateAlone.pulse)),
    ]);
    expect(Array.from(g.pulse.i)).toEqual(Array.from(gateAlone.pulse.i));
    expect(Array.from(s.pulse.q)).toEqual(Array.from(stateAlone.pulse.q));
    expect(g.evaluation.meanInfidelity).toBe(gateAlone.evaluation.meanInfidelity);
    expect(s.evaluation.meanInfidelity).toBe(stateAlone.evaluation.meanInfidelity);
    // Both ran before either finished (they yield to the event loop every 15 ms).
    expect(interleaved).toBeGreaterThan(0);
  });
});

describe('L-BFGS memory of correction pairs', () => {
  it('a rejected pair (no curvature) leaves the ring as it was: the next step is the same as without it', () => {
    // The curvature condition s'y > 0 (Nocedal & Wright, eq. 6.7) is tested before the
    // pair is written: a move of length zero (s = 0) must neither count nor overwrite the
    // oldest pair of a full ring.
    const problem = toProblem({ ...gateSpec, optimizer: { ...gateSpec.optimizer, memory: 3 } });
    const core = getCore();
    const plain = new StartRun(problem, 0), offered = new StartRun(problem, 0);
    try {
      for (let k = 0; k < 6; k++) { plain.step(); offered.step(); }
      const ptr = (run: StartRun): number => run.block;
      expect(core.exports.optStoredPairs(ptr(offered))).toBe(3);
      const nVar = core.exports.problemVariables(ptr(offered));
      const before = core.exports.optObjective(ptr(offered));
      core.job(() => {
        const here = core.put(core.read(core.exports.optVariables(ptr(offered)), nVar));
        expect(core.exports.optMoveTo(ptr(offered), here, 0)).toBe(before);
      });
      expect(core.exports.optStoredPairs(ptr(offered))).toBe(3);
      for (let k = 0; k < 5; k++) { plain.step(); offered.step(); }
      expect(Array.from(offered.samples().i)).toEqual(Array.from(plain.samples().i));
      expect(offered.objective).toBe(plain.objective);
    } finally {
      plain.dispose();
      offered.dispose();
    }
  });
});
