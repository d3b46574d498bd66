// Design workers started late: the page's client loads the analysis worker first and a
// design worker only with its first call, so that on two cores the design worker's start
// does not compete with the page drawing its restored session.
import { afterAll, describe, expect, it } from 'vitest';
import { CoreClient, LateWorker } from '../../src/worker/client.ts';
import { demoSpec } from '../../src/app/demo.ts';
import { closePorts, serviceEndpoint } from './in-realm.ts';

afterAll(closePorts);

/** A late endpoint over an in-realm service, counting how often its "worker" was created. */
function lateService(): { endpoint: LateWorker; created: () => number } {
  let created = 0;
  const endpoint = new LateWorker(() => {
    created++;
    const port = serviceEndpoint();
    port.start();
    return port as unknown as Worker;
  });
  return { endpoint, created: () => created };
}

describe('LateWorker', () => {
  it('creates its worker with the first message, and passes listeners added before and after', async () => {
    const late = lateService();
    const client = new CoreClient(serviceEndpoint(), [late.endpoint]);
    expect(late.created()).toBe(0);
    // The analysis worker alone answers ready().
    await client.ready();
    expect(late.created()).toBe(0);
    expect(late.endpoint.started).toBe(false);
    await client.designersReady();
    expect(late.created()).toBe(1);
    expect(late.endpoint.started).toBe(true);
    // A design runs on it, with the listener comlink added before the worker existed.
    const spec = demoSpec();
    spec.optimizer = { starts: 1, seed: 3, maxIterations: 5 };
    const outcome = await client.design(spec, 1);
    expect(outcome.pulse.i.length).toBeGreaterThan(0);
    expect(late.created()).toBe(1);
  });

  it('starts a design worker for a Run that comes before the page asked for it', async () => {
    const late = lateService();
    const client = new CoreClient(serviceEndpoint(), [late.endpoint]);
    await client.ready();
    const spec = demoSpec();
    spec.optimizer = { starts: 1, seed: 3, maxIterations: 3 };
    const outcome = await client.design(spec, 1);
    expect(late.created()).toBe(1);
    expect(Number.isFinite(outcome.evaluation.meanInfidelity)).toBe(true);
  });

  it('never creates a worker once ended, and forgets removed listeners', () => {
    const late = lateService();
    const heard: unknown[] = [];
    const listener = (e: Event) => heard.push((e as MessageEvent).data);
    late.endpoint.addEventListener('message', listener);
    late.endpoint.removeEventListener('message', listener);
    late.endpoint.terminate();
    late.endpoint.postMessage({ id: 'x' });
    expect(late.created()).toBe(0);
    expect(heard).toEqual([]);
  });
});
