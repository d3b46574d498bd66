// The shortest-duration search through the worker's API over a MessageChannel: the same
// answer as the library's shortestDuration, and every duration tried reported to the page.
import { afterAll, describe, expect, it } from 'vitest';
import { proxy, wrap, type Remote } from 'comlink';
import { shortestDuration } from '../../src/core/shortest.ts';
import type { CoreService, DurationTrial } from '../../src/worker/protocol.ts';
import { closePorts, serviceEndpoint } from './in-realm.ts';

const connect = (): Remote<CoreService> => wrap<CoreService>(serviceEndpoint());
afterAll(closePorts);

// X(90) with no ensemble, 10 MHz peak, 2 ns samples: a rectangular pulse's case.
const rectSpec = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  optimizer: { starts: 2, seed: 3, maxIterations: 300 },
};

describe('the worker\'s shortest search', () => {
  const core = connect();

  it('returns the library\'s result, theta / (2 pi rabiMax) rounded up to whole samples, and streams each trial first', async () => {
    const trials: DurationTrial[] = [];
    const bounds: number[] = [];
    const remote = await core.shortest(rectSpec, { goalMean: 1e-9 }, proxy((t: DurationTrial, bound: number) => {
      trials.push(t);
      bounds.push(bound);
    }));
    const direct = await shortestDuration(rectSpec, { goalMean: 1e-9 });
    // docs/physics.md section 1: a resonant constant drive turns by 2 pi Omega t, so
    // (pi/2) / (2 pi 10 MHz) = 25 ns = 12.5 samples of 2 ns -> 13 samples, 26 ns.
    expect(remote.segments).toBe(13);
    expect(remote.durationS).toBeCloseTo(26e-9, 20);
    expect(remote.lowerBoundS).toBeCloseTo(25e-9, 20);
    // The same search and the same designs (seeded) as the library in this realm.
    expect(remote.segments).toBe(direct.segments);
    expect(remote.meanInfidelity).toBe(direct.meanInfidelity);
    expect(remote.worstInfidelity).toBe(direct.worstInfidelity);
    expect(remote.tried).toEqual(direct.tried);
    expect(Array.from(remote.pulse!.i)).toEqual(Array.from(direct.pulse!.i));
    expect(Array.from(remote.pulse!.q)).toEqual(Array.from(direct.pulse!.q));
    expect(remote.stopped).toBe(false);
    // Every trial reached the page (in the order tried) before the result.
    expect([...trials].sort((a, b) => a.segments - b.segments)).toEqual(remote.tried);
    // ... each with the rectangular pulse's time, the result's lower bound.
    for (const b of bounds) expect(b).toBe(remote.lowerBoundS);
  }, 120_000);

  it('names a bad goal in the library\'s words', async () => {
    await expect(core.shortest(rectSpec, { goalMean: 2 })).rejects.toThrow('goalMean: 2 is not allowed; an infidelity > 0 and <= 1');
  });
});
