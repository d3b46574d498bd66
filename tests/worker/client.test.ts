// The page's client over a pool of services on MessageChannels (no Worker): starts shared
// among designers and merged, maps coarse first and then in bands, Stop reaching every worker.
import { afterAll, describe, expect, it } from 'vitest';
import { design as libraryDesign, robustnessMap } from '../../src/core/api.ts';
import type { Pulse, Target } from '../../src/core/types.ts';
import { demoSpec } from '../../src/app/demo.ts';
import { qubitDrive } from '../../src/core/line.ts';
import { driveSamples } from '../../src/core/line-spec.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { evaluateJudged } from '../../src/core/compare.ts';
import { expose, type Endpoint } from 'comlink';
import { bandRows, coarseAxis, CoreClient, designWorkerCount, mapPartPoints, mapParts, mapPartSize, MAP_PART_NS, shareStarts, StoppedBeforeAnyPulse, type MapUpdate } from '../../src/worker/client.ts';
import { QUBIT_NS, systemCostFactor } from '../../src/core/cost.ts';
import { cuts as libraryCuts } from '../../src/core/robustness.ts';
import { COPY_SLICE, sendable } from '../../src/worker/transfer.ts';
import type { CoreService, ProgressBatch, ProgressSink, TrialSink } from '../../src/worker/protocol.ts';
import { library } from '../../src/worker/library.ts';
import { createCoreService } from '../../src/worker/service.ts';
import { closePorts, inRealmClient, serviceEndpoint } from './in-realm.ts';

const client = inRealmClient();
afterAll(() => {
  client.dispose();
  closePorts();
});

describe('sharing work', () => {
  it('deals starts round-robin and leaves no worker empty', () => {
    expect(shareStarts(5, 2)).toEqual([[0, 2, 4], [1, 3]]);
    expect(shareStarts(1, 4)).toEqual([[0]]);
    expect(shareStarts(3, 3)).toEqual([[0], [1], [2]]);
  });
  it('covers every row exactly once with contiguous bands', () => {
    for (const [rows, bands] of [[201, 3], [5, 8], [1, 2], [100, 1]]) {
      const covered = bandRows(rows, bands).flatMap(([a, b]) => Array.from({ length: b - a + 1 }, (_, k) => a + k));
      expect(covered).toEqual(Array.from({ length: rows }, (_, k) => k));
    }
  });
  it('keeps the range of a coarse axis and about a quarter of its points', () => {
    expect(coarseAxis({ min: -1, max: 1, points: 201 })).toEqual({ min: -1, max: 1, points: 51 });
    expect(coarseAxis({ min: -1, max: 1, points: 2 })).toEqual({ min: -1, max: 1, points: 2 });
  });
  it('starts one design worker per core but one (at least one, at most four)', () => {
    expect(designWorkerCount(2)).toBe(1);
    expect(designWorkerCount(16)).toBe(4);
    expect(designWorkerCount(undefined)).toBe(1);
    expect(designWorkerCount(4)).toBe(3);
  });
});

describe('CoreClient over MessageChannels', () => {
  it('spreads the starts over the designers and keeps the same best pulse as one library call', async () => {
    const spec = demoSpec();
    spec.optimizer = { starts: 4, seed: 5, maxIterations: 80 };
    const seen = new Set<number>();
    const outcome = await client.design(spec, 4, (batch: ProgressBatch) => batch.points.forEach((p) => seen.add(p.start)));
    const direct = await libraryDesign(spec);
    expect(seen).toEqual(new Set([0, 1, 2, 3]));
    expect(outcome.starts.map((s) => s.start)).toEqual([0, 1, 2, 3]);
    expect(outcome.stopped).toBe(false);
    // Each start is deterministic for its seed and index (issue 2), so the pool must agree with one call.
    expect(outcome.best.start).toBe(direct.best.start);
    expect(Array.from(outcome.pulse.i)).toEqual(Array.from(direct.pulse.i));
    expect(outcome.evaluation.meanInfidelity).toBe(direct.evaluation.meanInfidelity);
    for (const start of outcome.starts) expect(start.objective).toBeGreaterThanOrEqual(outcome.best.objective);
  });

  it('compares the starts of both designers with each other: the starts outpaced and the pulse of one library call', async () => {
    const spec = demoSpec();
    spec.optimizer = { starts: 5, seed: 1, maxIterations: 800 };
    const outcome = await client.design(spec, 5);
    const direct = await libraryDesign(spec);
    const shape = (starts: typeof direct.starts) => starts.map((s) => [s.start, s.stopReason, s.iterations, s.evaluations, s.objective]);
    expect(direct.starts.some((s) => s.stopReason === 'outpaced')).toBe(true);
    expect(shape(outcome.starts)).toEqual(shape(direct.starts));
    expect(Array.from(outcome.pulse.i)).toEqual(Array.from(direct.pulse.i));
    expect(Array.from(outcome.pulse.q)).toEqual(Array.from(direct.pulse.q));
  }, 60_000);

  it('stops every worker and returns the best pulse so far', async () => {
    const spec = demoSpec();
    spec.segments = 1000;
    spec.ensemble = { detuning: { min: -1e6, max: 1e6, points: 15 }, amplitudeError: { min: -0.1, max: 0.1, points: 15 } };
    spec.optimizer = { starts: 2, seed: 1, maxIterations: 100000 };
    let asked = false;
    const outcome = await client.design(spec, 2, (batch) => {
      if (!asked && batch.points.some((p) => p.iteration >= 1)) {
        asked = true;
        void client.stop();
      }
    });
    expect(outcome.stopped).toBe(true);
    expect(outcome.starts.map((s) => s.stopReason)).toEqual(['stopped', 'stopped']);
    expect(outcome.pulse.i).toHaveLength(1000);
    expect(client.running).toBe(false);
  });

  it('draws a map coarse first, then fills the full grid to the library\'s values', async () => {
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const pulse: Pulse = { dt: 1e-9, i: new Float64Array(25).fill(1e7), q: new Float64Array(25), metadata: {} };
    const detuning = { min: -2e6, max: 2e6, points: 41 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 33 };
    const updates: MapUpdate[] = [];
    const done = await client.map(target, pulse, detuning, amplitudeError, (u) => updates.push(u));
    expect(updates[0].fine).toBeUndefined();
    expect(updates[0].coarse.detuning.points).toBe(11);
    expect(updates[0].coarse.amplitudeError.points).toBe(9);
    expect(done.complete).toBe(true);
    const direct = robustnessMap(target, pulse, detuning, amplitudeError);
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(direct.infidelity));
    expect(Array.from(done.coarse.infidelity)).toEqual(Array.from(robustnessMap(target, pulse, coarseAxis(detuning), coarseAxis(amplitudeError)).infidelity));
  });

  it('computes a long map in parts of bounded core time, each value the library\'s bit for bit', async () => {
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    // 20 000 samples on the qubit: 292 points a part by the cost model, so the 41 x 33 grid takes 5.
    const n = 20_000;
    const pulse: Pulse = { dt: 1e-10, i: new Float64Array(n).fill(2.5e6 / 2), q: new Float64Array(n).map((_, k) => 1e5 * Math.sin(k / 300)), metadata: {} };
    const detuning = { min: -2e6, max: 2e6, points: 41 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 33 };
    expect(mapPartPoints(n, 1)).toBe(292);
    expect(mapParts(41 * 33, 292).length).toBe(5);
    const updates: MapUpdate[] = [];
    const done = await client.map(target, pulse, detuning, amplitudeError, (u) => updates.push(u));
    expect(updates.filter((u) => u.fine).length).toBeGreaterThanOrEqual(5);
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(robustnessMap(target, pulse, detuning, amplitudeError).infidelity));
  });

  it('sizes a map\'s parts through a line by the drive the core evaluates, and keeps the library\'s values bit for bit', async () => {
    // The demo spec (100 samples of 2 ns) through a 300 MHz Gaussian line on 8 fine steps a sample.
    const problem = parseSpec({ ...demoSpec(), line: { oversample: 8, response: { gaussian: { bandwidth: 3e8 } } } });
    const line = problem.line!;
    const n = problem.segments;
    const pulse: Pulse = { dt: problem.dt, i: new Float64Array(n).map((_, k) => 2.5e6 * Math.sin((Math.PI * (k + 0.5)) / n) ** 2), q: new Float64Array(n), metadata: {} };
    const drive = qubitDrive(pulse, line);
    // The drive the qubit sees: n samples held on 8 fine steps each, and the response's two tails.
    expect(driveSamples(line, n, pulse.dt)).toBe(drive.i.length);
    expect(drive.i.length).toBeGreaterThan(8 * n);
    // Held samples alone (no response): exactly n x oversample fine steps.
    expect(driveSamples({ ...line, response: null }, n, pulse.dt)).toBe(8 * n);
    expect(driveSamples({ ...line, response: null }, n, pulse.dt)).toBe(qubitDrive(pulse, { ...line, response: null }).i.length);
    const size = mapPartSize(pulse, problem.target, line);
    expect(size).toBe(mapPartPoints(drive.i.length, 1));
    // A part's cost by the model (core/cost.ts) over the drive's samples stays within the budget.
    expect(size * drive.i.length * QUBIT_NS).toBeLessThanOrEqual(MAP_PART_NS);
    expect(size).toBeLessThan(mapPartPoints(n, 1) / 8);
    expect(mapPartSize(pulse, problem.target)).toBe(mapPartPoints(n, 1));
    const detuning = { min: -2e6, max: 2e6, points: 21 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 17 };
    const done = await client.map(problem.target, pulse, detuning, amplitudeError, undefined, line);
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(robustnessMap(problem.target, pulse, detuning, amplitudeError, line).infidelity));
  });

  it('computes a ladder\'s map and leakage in parts equal to the library\'s bit for bit', async () => {
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI };
    const system = { levels: 3, anharmonicity: -2e8 };
    const n = 2000;
    const pulse: Pulse = { dt: 1e-11, i: new Float64Array(n).map((_, k) => 2.5e7 * Math.sin((Math.PI * (k + 0.5)) / n) ** 2), q: new Float64Array(n), metadata: {} };
    const detuning = { min: -5e6, max: 5e6, points: 11 };
    const amplitudeError = { min: -0.1, max: 0.1, points: 9 };
    // (270 + 8 d^3) ns a segment-member on d levels (core/cost.ts): 48 points a part, 3 parts.
    const size = mapPartPoints(n, systemCostFactor({ target, system }));
    expect(size).toBe(48);
    const done = await client.map(target, pulse, detuning, amplitudeError, undefined, undefined, system);
    const direct = robustnessMap(target, pulse, detuning, amplitudeError, undefined, system);
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(direct.infidelity));
    expect(Array.from(done.fine!.leakage!)).toEqual(Array.from(direct.leakage!));
  });

  it('computes the cuts in parts, the library\'s cuts bit for bit (qubit and ladder)', async () => {
    const n = 2000;
    const pulse: Pulse = { dt: 1e-11, i: new Float64Array(n).map((_, k) => 2.5e7 * Math.sin((Math.PI * (k + 0.5)) / n) ** 2), q: new Float64Array(n), metadata: {} };
    const detuning = { min: -5e6, max: 5e6, points: 61 };
    const amplitudeError = { min: -0.1, max: 0.1, points: 57 };
    for (const system of [undefined, { levels: 3, anharmonicity: -2e8 }]) {
      const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI };
      const mine = await client.cuts(target, pulse, detuning, amplitudeError, undefined, system);
      const direct = libraryCuts(target, pulse, detuning, amplitudeError, undefined, system);
      for (const key of ['detuning', 'detuningInfidelity', 'amplitudeError', 'amplitudeErrorInfidelity', 'detuningLeakage', 'amplitudeErrorLeakage'] as const) {
        expect(mine[key] === undefined ? undefined : Array.from(mine[key]!)).toEqual(direct[key] === undefined ? undefined : Array.from(direct[key]!));
      }
      if (system) expect(mine.detuningLeakage).toBeDefined();
    }
  });

  it('sizes a part of an 8-level ladder\'s map of 20 000 samples at one point (one point is already past the budget)', () => {
    const factor = systemCostFactor({ target: { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI }, system: { levels: 8, anharmonicity: -2e8 } });
    expect(factor * QUBIT_NS).toBeCloseTo(270 + 8 * 512, 9);
    expect(mapPartPoints(20_000, factor)).toBe(1);
    // On the qubit a part is close to the budget and never past it.
    const points = mapPartPoints(1000, 1);
    expect(points * 1000 * QUBIT_NS).toBeLessThanOrEqual(MAP_PART_NS);
    expect((points + 4) * 1000 * QUBIT_NS).toBeGreaterThan(MAP_PART_NS);
    expect(mapParts(10, 4)).toEqual([[0, 4], [4, 4], [8, 2]]);
  });

  it('answers a spec check sent during a long map before the map ends (it waits for one part, not for the map)', async () => {
    const own = new CoreClient(serviceEndpoint(), []);
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const n = 20_000;
    const pulse: Pulse = { dt: 1e-10, i: new Float64Array(n).fill(1e6), q: new Float64Array(n), metadata: {} };
    const events: string[] = [];
    let asked: Promise<unknown> | null = null;
    await own.map(target, pulse, { min: -2e6, max: 2e6, points: 41 }, { min: -0.2, max: 0.2, points: 33 }, (u) => {
      events.push(u.complete ? 'complete' : u.fine ? 'part' : 'coarse');
      if (u.fine && !asked) asked = own.checkSpec(demoSpec()).then((check) => events.push(check.ok ? 'checked' : 'refused'));
    });
    await asked;
    expect(events.indexOf('checked')).toBeGreaterThan(events.indexOf('part'));
    expect(events.indexOf('checked')).toBeLessThan(events.indexOf('complete'));
    own.dispose();
  });

  it('drops the parts of a map not yet sent when its signal aborts (its settings changed)', async () => {
    const own = new CoreClient(serviceEndpoint(), []);
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const n = 20_000;
    const pulse: Pulse = { dt: 1e-10, i: new Float64Array(n).fill(1e6), q: new Float64Array(n), metadata: {} };
    const dropped = new AbortController();
    let parts = 0;
    const map = own.map(target, pulse, { min: -2e6, max: 2e6, points: 41 }, { min: -0.2, max: 0.2, points: 33 }, (u) => {
      if (u.fine) parts++;
      if (u.fine) dropped.abort();
    }, undefined, undefined, dropped.signal);
    await expect(map).rejects.toMatchObject({ name: 'AbortError' });
    expect(parts).toBe(1);
    own.dispose();
  });
});

/**
 * A designer whose core call never returns (as one evaluation of a big ladder seems to Stop),
 * after doing `first` with the call's callbacks; it counts its calls.
 */
function stuckDesigner(first: { design?: (sink: ProgressSink) => void; shortest?: (sink: TrialSink) => void } = {}): { endpoint: Endpoint; calls: string[] } {
  const calls: string[] = [];
  const channel = new MessageChannel();
  const never = () => new Promise<never>(() => undefined);
  expose(
    {
      ready: async () => ({ composites: [] }),
      design: (_spec: unknown, _starts: number[], sink: ProgressSink) => (calls.push('design'), first.design?.(sink), never()),
      shortest: (_spec: unknown, _request: unknown, sink: TrialSink) => (calls.push('shortest'), first.shortest?.(sink), never()),
      map: () => (calls.push('map'), never()),
      mapPart: () => (calls.push('mapPart'), never()),
      checkSpec: () => never(),
      stop: () => (calls.push('stop'), 0),
    },
    channel.port1,
  );
  stuckPorts.push(channel.port1, channel.port2);
  return { endpoint: channel.port2, calls };
}
const stuckPorts: MessagePort[] = [];
afterAll(() => stuckPorts.forEach((p) => p.close()));

/** Waits until `ready` holds, a message round at a time. */
async function until(ready: () => boolean): Promise<void> {
  while (!ready()) await new Promise((resolve) => setTimeout(resolve, 5));
}

// The designers' core calls cannot be interrupted (one L-BFGS iteration calls the objective from
// inside the core); Stop ends the workers instead, however long the call running in them.
describe('Stop while a designer is inside one long core call', () => {
  const spec = () => ({ ...demoSpec(), segments: 4, duration: 4e-8, optimizer: { starts: 1, seed: 1 } });

  it('ends the design at once, keeping nothing, when no start has reported a pulse', async () => {
    const stuck = stuckDesigner();
    let replaced = 0;
    const own = new CoreClient(serviceEndpoint(), [stuck.endpoint], () => undefined, () => (replaced++, stuckDesigner().endpoint));
    const run = own.design(spec(), 1);
    await until(() => stuck.calls.includes('design'));
    await own.stop();
    await expect(run).rejects.toBeInstanceOf(StoppedBeforeAnyPulse);
    expect(replaced).toBe(1);
    expect(own.running).toBe(false);
    own.dispose();
  });

  it('ends the design at once with the reported pulse and its report\'s mean, the worst member left to ask for', async () => {
    const i = Float64Array.from([1e6, 2e6, 3e6, 4e6]);
    const q = Float64Array.from([0, -1e6, 0, 1e6]);
    const point = { start: 0, iteration: 3, objective: 0.25, meanInfidelity: 0.25, elapsedS: 0.1 };
    const stuck = stuckDesigner({ design: (sink) => void sink({ points: [point] as ProgressBatch['points'], live: [{ start: 0, iteration: 3, i, q }] }) });
    const own = new CoreClient(serviceEndpoint(), [stuck.endpoint], () => undefined, () => stuckDesigner().endpoint);
    let reported = false;
    const run = own.design(spec(), 1, () => (reported = true));
    await until(() => reported);
    await own.stop();
    const outcome = await run;
    expect(outcome.stopped).toBe(true);
    expect(Array.from(outcome.pulse.i)).toEqual(Array.from(i));
    expect(Array.from(outcome.pulse.q)).toEqual(Array.from(q));
    expect(outcome.best.iterations).toBe(3);
    expect(outcome.evaluation.meanInfidelity).toBe(0.25);
    expect(outcome.evaluation.worstInfidelity).toBeNaN();
    own.dispose();
  });

  it('ends a shortest search at once with the shortest duration that met the goal so far', async () => {
    const pulse = { dt: 1e-9, i: Float64Array.from([1, 2, 3]), q: new Float64Array(3), metadata: {} };
    const trial = (segments: number, met: boolean) => ({ durationS: segments * 1e-9, segments, meanInfidelity: met ? 1e-5 : 1e-2, worstInfidelity: met ? 2e-5 : 2e-2, met });
    const stuck = stuckDesigner({
      shortest: (sink) => {
        void sink(trial(6, true), 2.5e-9);
        void sink(trial(3, true), 2.5e-9, pulse);
        void sink(trial(2, false), 2.5e-9);
      },
    });
    const own = new CoreClient(serviceEndpoint(), [stuck.endpoint], () => undefined, () => stuckDesigner().endpoint);
    let seen = 0;
    const search = own.shortest(spec(), { goalMean: 1e-4 }, () => seen++);
    await until(() => seen === 3);
    await own.stop();
    const outcome = await search;
    expect(outcome.stopped).toBe(true);
    expect(outcome.tried.map((t) => t.segments)).toEqual([2, 3, 6]);
    // 6 met too, but its pulse never came: the shortest met with a pulse is kept.
    expect([outcome.segments, outcome.meanInfidelity, outcome.worstInfidelity, outcome.lowerBoundS]).toEqual([3, 1e-5, 2e-5, 2.5e-9]);
    expect(Array.from(outcome.pulse!.i)).toEqual([1, 2, 3]);
    expect(outcome.dt).toBe(1e-8);
    own.dispose();
  });

  it('ends a design and a search at once while the spec\'s check waits on a busy analysis worker, starting no designer', async () => {
    // An analysis worker inside a long map: it answers nothing.
    const busy = stuckDesigner();
    const stuck = stuckDesigner();
    let replaced = 0;
    const own = new CoreClient(busy.endpoint, [stuck.endpoint], () => undefined, () => (replaced++, stuckDesigner().endpoint));
    const run = own.design(spec(), 1);
    await own.stop();
    await expect(run).rejects.toBeInstanceOf(StoppedBeforeAnyPulse);
    const search = own.shortest(spec(), { goalMean: 1e-4 });
    await own.stop();
    const outcome = await search;
    expect([outcome.stopped, outcome.segments, outcome.tried.length]).toEqual([true, null, 0]);
    expect(stuck.calls).toEqual([]);
    expect(replaced).toBe(0);
    own.dispose();
  });

  it('computes a map part again on the analysis worker when Stop ends the designer it was on', async () => {
    const stuck = stuckDesigner();
    const own = new CoreClient(serviceEndpoint(), [stuck.endpoint], () => undefined, () => stuckDesigner().endpoint);
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    // 20 000 samples: 292 points a part, so the 25 x 16 grid takes two, the second on the designer.
    const n = 20_000;
    const pulse: Pulse = { dt: 1e-10, i: new Float64Array(n).fill(1e6), q: new Float64Array(n), metadata: {} };
    const detuning = { min: -2e6, max: 2e6, points: 25 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 16 };
    const map = own.map(target, pulse, detuning, amplitudeError);
    await until(() => stuck.calls.includes('mapPart'));
    const run = own.design(spec(), 1);
    await until(() => stuck.calls.includes('design'));
    await own.stop();
    await expect(run).rejects.toBeInstanceOf(StoppedBeforeAnyPulse);
    const done = await map;
    const direct = robustnessMap(target, pulse, detuning, amplitudeError);
    // The part computed again on the analysis worker: the library's values bit for bit.
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(direct.infidelity));
    own.dispose();
  });
});

/**
 * An analysis worker whose compare holds until released (as a compare with DRAG calibration on
 * a big ladder takes seconds); every other call is the real service's. It counts its map parts.
 */
function holdingAnalysis(): { endpoint: Endpoint; release: () => void; parts: () => number } {
  const channel = new MessageChannel();
  const real = createCoreService(library);
  let release = () => undefined as void;
  const held = new Promise<void>((resolve) => (release = resolve));
  let parts = 0;
  let comparing = false;
  // A worker does one call at a time: a part sent during the compare waits for it.
  const service: CoreService = {
    ...real,
    compare: async (request) => ((comparing = true), await held, real.compare(request)),
    mapPart: async (...args) => (parts++, comparing && (await held), real.mapPart(...args)),
  };
  expose(service, channel.port1);
  stuckPorts.push(channel.port1, channel.port2);
  return { endpoint: channel.port2, release: () => release(), parts: () => parts };
}

describe('a map while the analysis worker is busy', () => {
  it('computes its parts on the idle designer, not behind a long compare, with the library\'s values', async () => {
    const analysis = holdingAnalysis();
    const own = new CoreClient(analysis.endpoint, [serviceEndpoint()]);
    // As on two cores: one worker at a time computes map parts, leaving a core to the page.
    own.mapWorkers = 1;
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const pulse: Pulse = { dt: 1e-9, i: new Float64Array(25).fill(1e7), q: new Float64Array(25), metadata: {} };
    const detuning = { min: -2e6, max: 2e6, points: 41 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 33 };
    let compared = false;
    const comparing = own.compare({ spec: demoSpec(), pulses: [], composites: ['bb1'], detuning, amplitudeError, threshold: 1e-4 }).then((rows) => ((compared = true), rows));
    const done = await own.map(target, pulse, detuning, amplitudeError);
    expect(compared).toBe(false);
    expect(analysis.parts()).toBe(0);
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(robustnessMap(target, pulse, detuning, amplitudeError).infidelity));
    analysis.release();
    expect((await comparing).length).toBe(1);
    // With the analysis worker free again, a map goes there first.
    await own.map(target, pulse, detuning, amplitudeError);
    expect(analysis.parts()).toBeGreaterThan(0);
    own.dispose();
  });

  it('checks the form\'s and a Run\'s spec on the designer instead of behind a long compare, and designs', async () => {
    const analysis = holdingAnalysis();
    const own = new CoreClient(analysis.endpoint, [serviceEndpoint()]);
    const detuning = { min: -2e6, max: 2e6, points: 5 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 5 };
    let compared = false;
    const comparing = own.compare({ spec: demoSpec(), pulses: [], composites: [], detuning, amplitudeError, threshold: 1e-4 }).then(() => (compared = true));
    // The form's check too.
    expect((await own.checkSpec({ ...demoSpec(), duration: -1 })).ok).toBe(false);
    const outcome = await own.design({ ...demoSpec(), optimizer: { starts: 1, seed: 2, maxIterations: 20 } }, 1);
    expect(compared).toBe(false);
    expect(outcome.pulse.i.length).toBe(100);
    analysis.release();
    await comparing;
    own.dispose();
  });

  it('waits for the analysis worker when the designers are designing', async () => {
    const analysis = holdingAnalysis();
    const stuck = stuckDesigner();
    const own = new CoreClient(analysis.endpoint, [stuck.endpoint], () => undefined, () => stuckDesigner().endpoint);
    own.mapWorkers = 1;
    const target: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };
    const pulse: Pulse = { dt: 1e-9, i: new Float64Array(25).fill(1e7), q: new Float64Array(25), metadata: {} };
    const detuning = { min: -2e6, max: 2e6, points: 11 };
    const amplitudeError = { min: -0.2, max: 0.2, points: 9 };
    const run = own.design({ ...demoSpec(), segments: 4, duration: 4e-8, optimizer: { starts: 1, seed: 1 } }, 1);
    await until(() => stuck.calls.includes('design'));
    const comparing = own.compare({ spec: demoSpec(), pulses: [], composites: [], detuning, amplitudeError, threshold: 1e-4 });
    let mapped = false;
    const map = own.map(target, pulse, detuning, amplitudeError).then((m) => ((mapped = true), m));
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect(mapped).toBe(false);
    expect(stuck.calls).not.toContain('mapPart');
    analysis.release();
    await comparing;
    const done = await map;
    expect(Array.from(done.fine!.infidelity)).toEqual(Array.from(robustnessMap(target, pulse, detuning, amplitudeError).infidelity));
    await own.stop();
    await expect(run).rejects.toBeInstanceOf(StoppedBeforeAnyPulse);
    own.dispose();
  });
});

describe('sending samples to a worker', () => {
  it('transfers a copy of the samples (made in slices) instead of cloning them, and keeps the page\'s arrays whole', async () => {
    const port = serviceEndpoint();
    /** Byte lengths of the buffers each message transferred, taken as it was sent (transferred buffers are detached after). */
    const transfers: number[][] = [];
    const post = port.postMessage.bind(port) as (message: unknown, transfer?: Transferable[]) => void;
    port.postMessage = ((message: unknown, transfer?: Transferable[]) => {
      transfers.push((transfer ?? []).flatMap((t) => (t instanceof ArrayBuffer ? [t.byteLength] : [])));
      post(message, transfer);
    }) as typeof port.postMessage;
    const own = new CoreClient(port, []);
    const n = 100_000;
    const spec = { ...demoSpec(), segments: n, duration: n * 1e-9 };
    const pulse: Pulse = {
      dt: 1e-9,
      i: new Float64Array(n).map((_, k) => 5e6 * Math.sin(k / 1e4)),
      q: new Float64Array(n).map((_, k) => 5e6 * Math.cos(k / 3e4)),
      metadata: {},
    };
    const before = [pulse.i[n - 1], pulse.q[0]];
    const evaluation = await own.evaluate(spec, pulse);
    // The call's message carries the two sample buffers in its transfer list.
    expect(transfers.flat()).toEqual([8 * n, 8 * n]);
    // The page's own arrays are neither detached nor changed.
    expect(pulse.i.length).toBe(n);
    expect([pulse.i[n - 1], pulse.q[0]]).toEqual(before);
    // Same figures as the library called directly (the copy is exact).
    expect(evaluation.meanInfidelity).toBe(evaluateJudged(spec, pulse).meanInfidelity);
    own.dispose();
  }, 60_000);

  it('copies arrays longer than a slice exactly, and lists each copy\'s buffer once', async () => {
    const n = 2 * COPY_SLICE + 7;
    const i = new Float64Array(n).map((_, k) => k * 0.5 - 3);
    const value = { pulse: { dt: 1e-9, i, q: i, metadata: { name: 'x' } } };
    const copy = await sendable(value);
    expect(copy.pulse.i).not.toBe(i);
    expect(copy.pulse.i.buffer).not.toBe(i.buffer);
    expect(copy.pulse.i.length).toBe(n);
    expect(copy.pulse.i.every((x, k) => x === i[k])).toBe(true);
    // One array referred to twice is copied once (as a clone would keep it shared).
    expect(copy.pulse.q).toBe(copy.pulse.i);
    expect(copy.pulse.metadata).toEqual({ name: 'x' });
  });
});
