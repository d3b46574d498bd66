// One answer to one question: `gatesmith compare --json` (in-process through main) and the
// worker's compare (over a MessageChannel, as the app calls it) give the same rows, in the
// same order, with the same numbers to the last bit, for the same spec and pulses. Both
// must equal the library's compare (src/core/compare.ts), and its "mean" the weighted mean
// over the spec's ensemble that evaluate gives (README "Conventions").
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { wrap } from 'comlink';
import { design, evaluate } from '../../src/core/api.ts';
import { buildComposite } from '../../src/core/composites.ts';
import { readPulse, writePulse } from '../../src/io/pulse.ts';
import type { CoreService } from '../../src/worker/protocol.ts';
import { run } from '../cli/run.ts';
import { closePorts, serviceEndpoint } from './in-realm.ts';
import { targetJson } from '../../src/io/target-json.ts';

const SPEC = JSON.parse(readFileSync(new URL('../../examples/transmon-x90.json', import.meta.url), 'utf8'));
const REGION = { detuning: { min: -1.5e6, max: 1.5e6, points: 15 }, amplitudeError: { min: -0.12, max: 0.12, points: 13 } };
const THRESHOLD = 3e-4;

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-paths-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
  closePorts();
});

describe('compare from the command line and from the worker', () => {
  it('gives identical rows and numbers for the same spec and pulses', async () => {
    const specPath = join(dir, 'spec.json');
    writeFileSync(specPath, JSON.stringify(SPEC));
    const designed = (await design({ ...SPEC, optimizer: { starts: 1, seed: 2, maxIterations: 60 } })).pulse;
    designed.metadata.name = 'designed';
    // A sequence built for another gate, so that a note and a ranking against the spec's target are covered.
    const other = buildComposite('bb1', { angleDeg: 180, axisDeg: 45, rabiMax: SPEC.rabiMax, dt: 2e-9 });
    const files = [['designed.json', designed], ['other.json', other]] as const;
    for (const [name, pulse] of files) writeFileSync(join(dir, name), writePulse(pulse));
    const composites = ['bb1', 'corpse', 'knill', 'rectangular'];

    const cli = await run([
      'compare', specPath, ...files.map(([name]) => join(dir, name)), '--composites', composites.join(','), '--json',
      '--detuning', '-1.5e6:1.5e6:15', '--amplitude', '-0.12:0.12:13', '--threshold', String(THRESHOLD),
    ]);
    expect(cli.code).toBe(0);
    const printed = JSON.parse(cli.stdout);

    const worker = wrap<CoreService>(serviceEndpoint());
    // The page sends the pulses it holds: read back from the same files, as opening them does.
    const pulses = files.map(([name]) => {
      const pulse = readPulse(readFileSync(join(dir, name), 'utf8'));
      return { name: typeof pulse.metadata.name === 'string' ? pulse.metadata.name : name, pulse };
    });
    const rows = await worker.compare({ spec: SPEC, pulses, composites, ...REGION, threshold: THRESHOLD });

    expect(rows.map((r) => r.name)).toEqual(printed.rows.map((r: { name: string }) => r.name));
    rows.forEach((row, k) => {
      const line = printed.rows[k];
      expect(line.origin, row.name).toBe(row.origin);
      // The command prints the target in the spec's form, its angle in degrees.
      expect(line.target ?? null, row.name).toEqual(row.target ? targetJson(row.target) : null);
      expect(line.note ?? null, row.name).toBe(row.note ?? null);
      expect(line.error ?? null, row.name).toEqual(row.error ?? null);
      // Every figure to the last bit (JSON writes doubles exactly).
      expect(line.figures ?? null, row.name).toEqual(row.figures ? JSON.parse(JSON.stringify(row.figures)) : null);
    });
    // Knill cannot be built for X(90): both paths say so in a row rather than failing.
    expect(rows.find((r) => r.name === 'Knill')?.error?.message).toContain('knill takes 180 degrees only');
    // "mean" is the weighted ensemble mean, exactly as evaluate gives it for the spec.
    const designedRow = rows.find((r) => r.name === 'designed')!;
    expect(designedRow.figures!.meanInfidelity).toBe(evaluate(SPEC, designed).meanInfidelity);
    // The sequence built for another gate ranks last among the built rows, judged against X(90).
    const built = rows.filter((r) => r.figures);
    expect(built[built.length - 1].pulse!.metadata.name).toBe(other.metadata.name);
    expect(built[built.length - 1].note).toContain("does not meet the spec's target");
  });
});
