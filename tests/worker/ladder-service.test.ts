// The worker on a ladder spec: map, cuts, export preview and populations carry the spec's
// system to the library over a MessageChannel (a structured-clone boundary, as across threads).
import { afterAll, describe, expect, it } from 'vitest';
import { wrap, type Remote } from 'comlink';
import { readFileSync } from 'node:fs';
import { evaluateMembers, robustnessMap } from '../../src/core/api.ts';
import { ladderPopulations } from '../../src/core/ladder.ts';
import { cuts as libraryCuts } from '../../src/core/robustness.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { GridAxis, Pulse, Target } from '../../src/core/types.ts';
import type { CoreService } from '../../src/worker/protocol.ts';
import { closePorts, serviceEndpoint } from './in-realm.ts';

afterAll(closePorts);

const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x180-fast.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const problem = parseSpec(spec);
const system = problem.system!;
const X180: Target = problem.target;

/** A cosine X(180) of the spec's duration and samples, without DRAG: it leaks at 20 ns on a -205 MHz ladder. */
function cosinePulse(): Pulse {
  const n = problem.segments, dt = problem.dt, T = n * dt;
  const i = new Float64Array(n);
  // Area of (A/2)(1 - cos(2 pi t/T)) over T is A T / 2; a pi rotation needs area 1/2 (Hz s).
  const A = 1 / T;
  for (let k = 0; k < n; k++) i[k] = (A / 2) * (1 - Math.cos((2 * Math.PI * (k + 0.5)) / n));
  return { dt, i, q: new Float64Array(n), metadata: { origin: 'test' } };
}

const detuning: GridAxis = { min: -2e7, max: 2e7, points: 9 };
const amplitudeError: GridAxis = { min: -0.1, max: 0.1, points: 7 };

describe('worker service on a ladder spec', () => {
  const core: Remote<CoreService> = wrap<CoreService>(serviceEndpoint());
  const pulse = cosinePulse();

  it('maps infidelity and leakage exactly as the library robustnessMap with the system, unlike the two-level map', async () => {
    const map = await core.map(X180, pulse, detuning, amplitudeError, undefined, system);
    const direct = robustnessMap(X180, pulse, detuning, amplitudeError, undefined, system);
    const twoLevel = robustnessMap(X180, pulse, detuning, amplitudeError);
    // Bit for bit: the worker calls the same library function (src/core/api.ts robustnessMap).
    expect(Array.from(map.infidelity)).toEqual(Array.from(direct.infidelity));
    expect(Array.from(map.leakage!)).toEqual(Array.from(direct.leakage!));
    expect(twoLevel.leakage).toBeUndefined();
    // A 20 ns cosine pulse on a -205 MHz ladder leaks (Motzoi et al., PRL 103, 110501, 2009:
    // leakage of an un-DRAGged pulse at gate times of a few 1/|alpha|), so the figures differ.
    const centre = 3 * detuning.points + 4;
    expect(map.leakage![centre]).toBeGreaterThan(1e-5);
    expect(Math.abs(map.infidelity[centre] - twoLevel.infidelity[centre])).toBeGreaterThan(1e-5);
  });

  it('cuts through zero error on the system, as the library cuts', async () => {
    const cut = await core.cuts(X180, pulse, detuning, amplitudeError, undefined, system);
    const direct = libraryCuts(X180, pulse, detuning, amplitudeError, undefined, system);
    expect(Array.from(cut.detuningInfidelity)).toEqual(Array.from(direct.detuningInfidelity));
    expect(Array.from(cut.amplitudeErrorInfidelity)).toEqual(Array.from(direct.amplitudeErrorInfidelity));
  });

  it('judges the export preview on the system: its leakage is the library evaluateMembers with the system', async () => {
    // The spec's own rate (2.4 GS/s, 48 samples in 20 ns): the played waveform is the design's samples, quantised.
    const preview = await core.exportPreview(pulse, { sampleRate: 2.4e9, bits: 16, fullScale: 1e8 }, { target: X180, members: problem.members, system });
    const direct = evaluateMembers(X180, preview.played, problem.members, undefined, system);
    const twoLevel = evaluateMembers(X180, preview.played, problem.members);
    expect(preview.report.gate?.exported.meanInfidelity).toBe(direct.meanInfidelity);
    expect(preview.report.gate?.exported.meanLeakage).toBe(direct.meanLeakage);
    expect(Math.abs(preview.report.gate!.exported.meanInfidelity - twoLevel.meanInfidelity)).toBeGreaterThan(1e-5);
  });

  it('gives the populations of every level as ladderPopulations, summing to 1 (a unitary keeps the norm)', async () => {
    const member = { detuning: 0, amplitudeError: 0.03, weight: 1 };
    const result = await core.populations(pulse, member, system, [0, 0, 1]);
    const pops = result.values;
    const direct = ladderPopulations(pulse, { ...member, anharmonicityError: 0 }, system, [0, 0, 1]);
    // Without a line the drive is the pulse itself: same period, starting with it.
    expect([result.levels, result.dt, result.startS]).toEqual([system.levels, pulse.dt, 0]);
    expect(Array.from(pops)).toEqual(Array.from(direct));
    const d = system.levels;
    expect(pops.length).toBe((pulse.i.length + 1) * d);
    for (let k = 0; k <= pulse.i.length; k++) {
      let sum = 0;
      for (let l = 0; l < d; l++) sum += pops[k * d + l];
      expect(Math.abs(sum - 1)).toBeLessThan(1e-9);
    }
    // Starts in |0>.
    expect(pops[0]).toBe(1);
  });

  // Source: L = 1 - Tr(M^dag M)/2 = (1/2) sum_{i>=2, c=0,1} |U_ic|^2 (docs/transmon.md): the
  // mean of what leaves from |0> and from |1>, here from the populations kernel, must equal
  // the leakage map's value at that member (the gate figures' kernel), whatever the panel's
  // initial state; the chosen state's own leakage differs from it.
  it("reports the member's subspace-average leakage, equal to the leakage map's value at that member", async () => {
    for (const member of [{ detuning: 0, amplitudeError: 0, weight: 1 }, { detuning: 5e6, amplitudeError: -0.05, weight: 1 }]) {
      const from: [number, number, number] = [0.6, 0, 0.8];
      const result = await core.populations(pulse, member, system, from);
      const point = (x: number): GridAxis => ({ min: x, max: x, points: 1 });
      const map = await core.map(X180, pulse, point(member.detuning), point(member.amplitudeError), undefined, system);
      expect(Math.abs(result.averageLeakage - map.leakage![0])).toBeLessThan(1e-14);
      expect(result.averageLeakage).toBeGreaterThan(1e-5); // the cosine pulse leaks: the check has content
      const d = system.levels;
      const ownLeakage = Array.from(result.values.subarray(result.values.length - d + 2)).reduce((a, b) => a + b, 0);
      expect(Math.abs(ownLeakage - result.averageLeakage)).toBeGreaterThan(1e-3 * result.averageLeakage);
    }
  });
});
