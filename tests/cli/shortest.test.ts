// `gatesmith shortest` end to end: the answer of a rectangular pulse (theta / (2 pi rabiMax),
// docs/physics.md section 1) with the lower bound beside it, the JSON shape, the pulse file
// evaluated again, no answer within --max, and bad flags.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run } from './run.ts';

// X(180), no ensemble, 10 MHz peak, 1 ns samples: the rectangular time is 50 ns, exactly 50 samples.
const spec = {
  target: { gate: { axis: [0, 1, 0], angleDeg: 180 } },
  duration: 1e-7, segments: 100, rabiMax: 1e7,
  optimizer: { starts: 2, seed: 1, maxIterations: 300 },
};

let dir: string;
let specPath: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-shortest-'));
  specPath = join(dir, 'y180.json');
  writeFileSync(specPath, JSON.stringify(spec));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('gatesmith shortest', () => {
  it('finds theta / (2 pi rabiMax) in whole samples, prints the curve in the JSON shape of the format, and writes the pulse', async () => {
    const out = join(dir, 'short.json');
    const r = await run(['shortest', specPath, '--goal-mean', '1e-8', '--out', out, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(Object.keys(j)).toEqual(['durationS', 'segments', 'meanInfidelity', 'worstInfidelity', 'tried']);
    // pi / (2 pi 1e7) = 50 ns = 50 samples of 1 ns (docs/physics.md section 1).
    expect(j.segments).toBe(50);
    expect(j.durationS).toBeCloseTo(5e-8, 20);
    expect(j.meanInfidelity).toBeLessThanOrEqual(1e-8);
    for (const t of j.tried) expect(Object.keys(t)).toEqual(['durationS', 'segments', 'meanInfidelity', 'worstInfidelity', 'met']);
    // 49 samples reach at most 0.98 pi: infidelity sin^2(0.01 pi) (docs/physics.md section 2).
    const shorter = j.tried.find((t: { segments: number }) => t.segments === 49);
    expect(shorter.met).toBe(false);
    expect(shorter.meanInfidelity).toBeGreaterThan(Math.sin(0.01 * Math.PI) ** 2 * (1 - 1e-6));
    expect(r.stderr).toContain('lower bound (rectangular pulse at rabiMax): 50 ns');
    expect(r.stderr).toMatch(/^shortest: 49 samples \(49 ns\): mean \S+, worst \S+: does not meet the goal$/m);

    // The pulse file is at the answer's length, and evaluate agrees with the reported figure.
    const pulse = JSON.parse(readFileSync(out, 'utf8'));
    expect(pulse.i).toHaveLength(50);
    expect(pulse.metadata.spec.segments).toBe(50);
    writeFileSync(join(dir, 'spec50.json'), JSON.stringify(pulse.metadata.spec));
    const again = await run(['evaluate', join(dir, 'spec50.json'), out, '--json']);
    expect(JSON.parse(again.stdout).meanInfidelity).toBe(j.meanInfidelity);
  });

  it('the table shows the lower bound beside the answer', async () => {
    const r = await run(['shortest', specPath, '--goal-mean', '1e-8', '--min', '4.5e-8']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^shortest duration {2}50 ns \(50 samples of 1 ns\)$/m);
    expect(r.stdout).toMatch(/^lower bound {8}50 ns: a rectangular pulse of the same angle at rabiMax \(the answer is 1\.00 times it\)$/m);
    expect(r.stdout).toMatch(/^49 ns\s+49\s+\S+\s+\S+\s+not met$/m);
    // --min 45 ns: nothing shorter than 45 samples was tried.
    expect(Math.min(...[...r.stdout.matchAll(/^\S+ ns\s+(\d+)\s/gm)].map((m) => Number(m[1])))).toBeGreaterThanOrEqual(45);
  });

  it('exits 1 with the curve when nothing up to --max meets the goal', async () => {
    const r = await run(['shortest', specPath, '--goal-mean', '1e-8', '--max', '4.9e-8', '--json']);
    expect(r.code).toBe(1);
    const j = JSON.parse(r.stdout);
    expect(j.durationS).toBeNull();
    expect(j.tried.every((t: { met: boolean; segments: number }) => !t.met && t.segments <= 49)).toBe(true);
    expect(r.stderr).toContain('shortest: no duration tried met the goal (mean <= 1e-8)');
  });

  it('names a bad flag, its value and what is allowed', async () => {
    expect((await run(['shortest', specPath])).stderr).toContain('shortest: --goal-mean is required');
    expect((await run(['shortest', specPath, '--goal-mean', '2'])).stderr).toContain('--goal-mean: "2" is not allowed; an infidelity > 0 and <= 1');
    expect((await run(['shortest', specPath, '--goal-mean', '1e-4', '--max', '1e-10'])).stderr).toContain(
      '--max: "1e-10" s is shorter than one sample of the spec (1 ns)',
    );
    expect((await run(['shortest', specPath, '--goal-mean', '1e-4', '--min', '5e-8', '--max', '3e-8'])).stderr).toContain('--min: 5e-8 s is longer than --max 3e-8 s');
  });
});
