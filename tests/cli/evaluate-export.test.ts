// `evaluate` reads back every format `export` writes (issue 5), and its figures equal the
// export report's "as played" figures: the same waveform judged twice by two code paths
// (the report from the in-memory waveform, evaluate from the file read back).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run } from './run.ts';

let dir: string;
let spec: string;
let pulse: string;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-export-eval-'));
  spec = join(dir, 'spec.json');
  writeFileSync(spec, JSON.stringify({
    target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: 2e-7, segments: 50, rabiMax: 1e7,
    ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 }, amplitudeError: { min: -0.1, max: 0.1, points: 3 } },
    optimizer: { starts: 1, seed: 1, maxIterations: 100 },
  }));
  pulse = join(dir, 'pulse.json');
  expect((await run(['design', spec, '--out', pulse])).code).toBe(0);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('evaluate reads every exported format', () => {
  for (const format of ['csv', 'npy', 'raw', 'wav', 'json']) {
    it(`${format}: the figures of the file read back equal the report's figures as played`, async () => {
      const file = join(dir, `x90.${format}`);
      const exported = await run(['export', pulse, '--format', format, '--sample-rate', '1e9', '--bits', '14',
        '--full-scale', '1.2e7', '--granularity', '32', '--spec', spec, '--out', file, '--json']);
      expect(exported.code).toBe(0);
      const report = JSON.parse(exported.stdout);
      const evaluated = await run(['evaluate', spec, file, '--json']);
      expect(evaluated.code).toBe(0);
      const figures = JSON.parse(evaluated.stdout);
      // Same samples, same ensemble: equal to rounding of the accumulation order.
      expect(Math.abs(figures.meanInfidelity - report.gate.exported.meanInfidelity)).toBeLessThan(1e-15);
      // Padding to 32 samples adds idle time, which detuning turns into a z rotation, so the
      // waveform as played is judged apart from the design (the report keeps both).
      expect(report.samples.total % 32).toBe(0);
    });
  }
});
