// The line from the command line: a measured impulse response read from CSV and .npy
// files beside the spec (docs/spec.md, "line"), every command taking the spec's line,
// `evaluate --no-line`, the export report's figures without the line, and the pulse file
// recording its line.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse as parseNpy } from 'npyjs';
import { evaluateMembers } from '../../src/core/api.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { writeNpy } from '../../src/io/export/npy.ts';
import { readImpulseBytes } from '../../src/io/line-file.ts';
import { readPulse } from '../../src/io/pulse.ts';
import { run } from './run.ts';

// An invented measured response of a line: a rise, an overshoot and a ring, per fine step.
const measured = [0, 0.02, 0.11, 0.27, 0.31, 0.2, 0.08, -0.01, -0.03, -0.012, 0.004, 0.002];

let dir: string;
const base = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: 2e-8, segments: 48, rabiMax: 3e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 }, amplitudeError: { min: -0.02, max: 0.02, points: 3 } },
  optimizer: { starts: 1, seed: 1, maxIterations: 150 },
};
const specWith = (response: unknown) => ({ ...base, line: { oversample: 4, response } });

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-line-'));
  writeFileSync(join(dir, 'k.csv'), '# measured impulse response, one value per fine step\nvalue\n' + measured.join('\n') + '\n');
  writeFileSync(join(dir, 'k.npy'), writeNpy({ descr: '<f8', shape: [measured.length], data: Float64Array.from(measured) }));
  writeFileSync(join(dir, 'inline.json'), JSON.stringify(specWith({ impulse: { values: measured } })));
  writeFileSync(join(dir, 'csv.json'), JSON.stringify(specWith({ impulse: { file: 'k.csv' } })));
  writeFileSync(join(dir, 'npy.json'), JSON.stringify(specWith({ impulse: { file: 'k.npy' } })));
  writeFileSync(join(dir, 'missing.json'), JSON.stringify(specWith({ impulse: { file: 'nothere.csv' } })));
  writeFileSync(join(dir, 'bad.csv'), '0.1\n0.5,0.2\n');
  writeFileSync(join(dir, 'bad.json'), JSON.stringify(specWith({ impulse: { file: 'bad.csv' } })));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('a measured impulse response from a file', () => {
  it('round-trips from CSV and .npy: the values read equal those written, and npyjs reads the same', () => {
    // Source: npyjs, an independent reader of NumPy's format; the CSV is plain text.
    const npy = readFileSync(join(dir, 'k.npy'));
    expect(readImpulseBytes(npy, 'k.npy')).toEqual(measured);
    expect(Array.from(parseNpy(npy.buffer.slice(npy.byteOffset, npy.byteOffset + npy.byteLength)).data as Float64Array)).toEqual(measured);
    expect(readImpulseBytes(readFileSync(join(dir, 'k.csv')), 'k.csv')).toEqual(measured);
  });

  it('evaluate through the file gives the figures of the inline values, bit for bit, and --no-line the naive figure', async () => {
    const designed = await run(['design', join(dir, 'inline.json'), '--out', join(dir, 'p.json')]);
    expect(designed.code, designed.stderr).toBe(0);
    const pulse = readPulse(readFileSync(join(dir, 'p.json'), 'utf8'));
    // The pulse file records the line it was designed for.
    expect((pulse.metadata.line as { response: unknown }).response).toEqual({ impulse: { values: measured } });
    const figures = await Promise.all(['inline', 'csv', 'npy'].map(async (name) => {
      const r = await run(['evaluate', join(dir, `${name}.json`), join(dir, 'p.json'), '--json']);
      expect(r.code, r.stderr).toBe(0);
      return JSON.parse(r.stdout).meanInfidelity as number;
    }));
    expect(figures[1]).toBe(figures[0]);
    expect(figures[2]).toBe(figures[0]);
    const naive = await run(['evaluate', join(dir, 'csv.json'), join(dir, 'p.json'), '--no-line', '--json']);
    const json = JSON.parse(naive.stdout);
    expect(json.line).toBeNull();
    // Source: the library without a line (the held samples) gives the naive figure.
    const problem = parseSpec(specWith({ impulse: { values: measured } }));
    expect(json.meanInfidelity).toBe(evaluateMembers(problem.target, pulse, problem.members).meanInfidelity);
    expect(json.meanInfidelity).not.toBe(figures[0]);
    const text = await run(['evaluate', join(dir, 'csv.json'), join(dir, 'p.json')]);
    expect(text.stdout).toMatch(/through the line: measured impulse response of 12 fine steps \(k\.csv\), oversample 4/);
  });

  it('export reports the figures through the line and, beside them, without it', async () => {
    const r = await run(['export', join(dir, 'p.json'), '--format', 'csv', '--sample-rate', '2.4e9', '--bits', '16',
      '--full-scale', '3e7', '--spec', join(dir, 'npy.json'), '--out', join(dir, 'p.csv'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout);
    expect(report.gate.withoutLine.design.meanInfidelity).toBeGreaterThan(0);
    const through = await run(['evaluate', join(dir, 'npy.json'), join(dir, 'p.json'), '--json']);
    expect(report.gate.design.meanInfidelity).toBe(JSON.parse(through.stdout).meanInfidelity);
  });

  it('a missing or malformed file is refused naming the spec field, the file and what is allowed (exit 1)', async () => {
    const missing = await run(['evaluate', join(dir, 'missing.json'), join(dir, 'p.json')]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/line\.response\.impulse\.file: "nothere\.csv" is not allowed; a readable \.csv or \.npy file.*no such file/);
    const bad = await run(['evaluate', join(dir, 'bad.json'), join(dir, 'p.json')]);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/line\.response\.impulse\.file: "bad\.csv".*row 2 "0\.5,0\.2" has more than one column; give one value per row/);
  });
});
