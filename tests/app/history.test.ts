// Work is never lost without a way back (src/app/state/session.svelte.ts): the spec's undo
// and redo history, a removed pulse brought back, a failed run's notice cleared by a run
// that succeeds, and Stop ending a design at once on replaceable designers, keeping the best
// reported pulse (src/worker/client.ts). Services run on MessageChannels in this realm.
import { afterAll, describe, expect, it } from 'vitest';
import { expose } from 'comlink';
import { DesignRun } from '../../src/app/state/design-run.svelte.ts';
import { Session } from '../../src/app/state/session.svelte.ts';
import { CoreClient, heldToBound, ReportedPulses } from '../../src/worker/client.ts';
import { library } from '../../src/worker/library.ts';
import { createCoreService } from '../../src/worker/service.ts';
import { closePorts, inRealmClient, serviceEndpoint } from '../worker/in-realm.ts';

const client = inRealmClient();
afterAll(() => {
  client.dispose();
  closePorts();
});

describe('the spec history', () => {
  it('undoes and redoes field edits, merging keystrokes of one field into one step', async () => {
    const session = new Session(client);
    await session.start();
    const original = session.spec;
    session.setField('rabiMax', 1e6);
    session.setField('rabiMax', 1.2e7); // the same field within a second: one step
    session.setField('segments', 120);
    expect(session.canUndo).toBe(true);
    session.undo();
    expect(session.spec.segments).toBe(100);
    expect(session.spec.rabiMax).toBe(1.2e7);
    session.undo();
    expect(session.spec).toBe(original);
    expect(session.canUndo).toBe(false);
    session.redo();
    expect(session.spec.rabiMax).toBe(1.2e7);
    // A new edit after an undo drops what was undone.
    session.setField('duration', 4e-7);
    expect(session.canRedo).toBe(false);
  });

  it('makes a replaced spec and a removed pulse one step back', async () => {
    const session = new Session(client);
    await session.start();
    const edited = session.spec;
    session.replaceSpec({ duration: 1 });
    session.undo();
    expect(session.spec).toBe(edited);
    const pulse = { dt: 1e-9, i: new Float64Array([1, 2]), q: new Float64Array(2), metadata: {} };
    session.addPulse({ id: 'a', label: 'a', pulse });
    session.addPulse({ id: 'b', label: 'b', pulse });
    session.select('a');
    session.removePulse('a');
    expect(session.pulses.map((p) => p.id)).toEqual(['b']);
    expect(session.notice?.action?.label).toBe('Undo');
    session.notice!.action!.run();
    expect(session.pulses.map((p) => p.id)).toEqual(['a', 'b']);
    expect(session.selectedId).toBe('a');
  });
});

describe('a run after a failed one', () => {
  it('clears the failure\'s notice when it succeeds', async () => {
    const session = new Session(client);
    await session.start();
    const run = new DesignRun(session);
    session.setField('optimizer', { starts: 1, maxIterations: 5 });
    await session.validate();
    const design = client.design.bind(client);
    client.design = () => Promise.reject(new Error('the core is gone'));
    expect(await run.run()).toBeNull();
    expect(session.notice?.text).toBe('The design failed: the core is gone');
    client.design = design;
    expect(await run.run()).not.toBeNull();
    expect(session.notice).toBeNull();
  });
});

describe('Stop on replaceable designers', () => {
  it('ends the design at once with the best pulse reported, and a fresh designer runs the next one', async () => {
    // In one realm a service cannot be ended as a worker is: the replaced one is told to stop
    // (its core is this realm's only one) and its port closed.
    const ports: MessagePort[] = [];
    const services = new Map<MessagePort, ReturnType<typeof createCoreService>>();
    const fresh = (): MessagePort => {
      const channel = new MessageChannel();
      const service = createCoreService(library);
      expose(service, channel.port1);
      ports.push(channel.port1, channel.port2);
      services.set(channel.port2, service);
      return channel.port2;
    };
    const pool = new CoreClient(serviceEndpoint(), [fresh()], () => undefined, (old) => {
      services.get(old as MessagePort)?.stop();
      (old as MessagePort).close();
      return fresh();
    });
    // The demo's ensemble at 400 samples: hundreds of iterations before it could end by itself.
    const spec = {
      target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: 2e-7, segments: 400, rabiMax: 1e7,
      ensemble: { detuning: { min: -1e6, max: 1e6, points: 5 }, amplitudeError: { min: -0.1, max: 0.1, points: 5 } },
      optimizer: { starts: 1, maxIterations: 100000, targetInfidelity: 0, gradientTolerance: 0 },
    };
    let reports = 0;
    let asked = false;
    const running = pool.design(spec, 1, (batch) => {
      reports += batch.points.length;
      if (reports > 10 && !asked) {
        asked = true;
        void pool.stop();
      }
    }, 0);
    const outcome = await running;
    expect(outcome.stopped).toBe(true);
    expect(outcome.best.stopReason).toBe('stopped');
    // The kept pulse is a reported one: its figures are its own (the library's evaluation of it).
    const check = library.evaluate(spec, outcome.pulse);
    expect(outcome.evaluation.meanInfidelity === check.meanInfidelity || Number.isNaN(outcome.evaluation.worstInfidelity)).toBe(true);
    expect(outcome.pulse.i.length).toBe(400);
    const next = await pool.design({ ...spec, optimizer: { starts: 1, maxIterations: 3 } }, 1);
    expect(next.stopped).toBe(false);
    expect(next.best.iterations).toBe(3);
    ports.forEach((p) => p.close());
  });

  it('keeps a live pulse only with its own report, and the lowest objective wins', () => {
    const r = new ReportedPulses();
    const live = (start: number, iteration: number) => ({ start, iteration, i: new Float64Array([start]), q: new Float64Array(1) });
    const point = (start: number, iteration: number, objective: number) => ({ start, iteration, objective, meanInfidelity: objective, gradientNorm: 1, elapsedS: 0 });
    r.add({ points: [point(0, 0, 0.5), point(1, 0, 0.4)], live: [live(0, 0), live(1, 0)] });
    expect(r.best()?.live.start).toBe(1);
    // A live pulse without its report in the batch is not kept.
    r.add({ points: [point(0, 5, 0.1)], live: [live(0, 4)] });
    expect(r.best()?.live.start).toBe(1);
    r.add({ points: [point(0, 6, 0.05)], live: [live(0, 6)] });
    expect(r.best()?.point.iteration).toBe(6);
  });

  it('holds samples to the disc and the box as the library does', () => {
    const i = new Float64Array([3, 0.5]);
    const q = new Float64Array([4, 0.5]);
    heldToBound(i, q, 1, 'disc');
    expect(Math.hypot(i[0], q[0])).toBeLessThanOrEqual(1);
    expect(i[1]).toBe(0.5);
    const bi = new Float64Array([3, -3]);
    const bq = new Float64Array([0.2, -0.2]);
    heldToBound(bi, bq, 1, 'box');
    expect([...bi, ...bq]).toEqual([1, -1, 0.2, -0.2]);
  });
});
