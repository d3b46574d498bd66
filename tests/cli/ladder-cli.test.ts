// The command line on a spec with a system section: design reports leakage and the
// truncation check (its numbers equal the library's evaluation on two more levels),
// evaluate prints leakage, compare and composite --list carry the DRAG family, export's
// report gives the leakage. Sources: the library's evaluate (src/core/api.ts), itself
// checked against the ladder oracle in tests/core/ladder-seam.test.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { evaluate } from '../../src/core/api.ts';
import { readPulse } from '../../src/io/pulse.ts';
import { run } from './run.ts';

const SPEC = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } }, duration: 6.25e-9, segments: 15, rabiMax: 2.5e8,
  system: { levels: 5, anharmonicity: -2.12e8 },
  ensemble: { amplitudeError: { min: -0.01, max: 0.01, points: 3 } },
  optimizer: { starts: 2, seed: 1, maxIterations: 300 },
};

let dir: string, spec: string, pulse: string;
let design: { code: number; stdout: string; stderr: string };
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-ladder-'));
  spec = join(dir, 'spec.json');
  writeFileSync(spec, JSON.stringify(SPEC));
  pulse = join(dir, 'pulse.json');
  design = await run(['design', spec, '--out', pulse, '--json']);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the command line on a ladder spec', () => {
  it('design --json keeps the infidelities and adds leakage, per member and the truncation check on levels + 2', () => {
    expect(design.code).toBe(0);
    const out = JSON.parse(design.stdout);
    const written = readPulse(readFileSync(pulse, 'utf8'));
    const on5 = evaluate(SPEC, written);
    const on7 = evaluate({ ...SPEC, system: { levels: 7, anharmonicity: -2.12e8 } }, written);
    expect(out.meanInfidelity).toBe(on5.meanInfidelity);
    expect(out.worstInfidelity).toBe(on5.worstInfidelity);
    expect(out.meanLeakage).toBe(on5.meanLeakage);
    expect(out.worstLeakage).toBe(on5.worstLeakage);
    expect(out.members.map((m: { leakage: number }) => m.leakage)).toEqual(on5.members.map((m) => m.leakage));
    expect(out.truncationCheck).toEqual({ levels: 7, meanInfidelity: on7.meanInfidelity, meanLeakage: on7.meanLeakage });
  });

  it('design with freePhaseAfter reports each member\'s phase after the pulse, as the library evaluates it', async () => {
    const freeSpec = { ...SPEC, target: { gate: { axis: [1, 0, 0], angleDeg: 90, freePhaseAfter: true } }, optimizer: { starts: 1, seed: 2, maxIterations: 200 } };
    const file = join(dir, 'free.json'), out = join(dir, 'free-pulse.json');
    writeFileSync(file, JSON.stringify(freeSpec));
    const result = await run(['design', file, '--out', out, '--json']);
    expect(result.code).toBe(0);
    const json = JSON.parse(result.stdout);
    const ev = evaluate(freeSpec, readPulse(readFileSync(out, 'utf8')));
    expect(json.members.map((m: { phaseAfter: number }) => m.phaseAfter)).toEqual(ev.members.map((m) => m.phaseAfter));
    expect(ev.members.every((m) => Number.isFinite(m.phaseAfter))).toBe(true);
    const table = await run(['evaluate', file, out]);
    expect(table.stdout).toMatch(/phase after[\s\S]*-?\d+\.\d{3} deg/);
  });

  it('evaluate prints the leakage in its table and its JSON', async () => {
    const table = await run(['evaluate', spec, pulse]);
    expect(table.code).toBe(0);
    expect(table.stdout).toMatch(/mean leakage +\d\.\d\de-\d+ \(population that left levels 0 and 1, on 5 levels/);
    const json = JSON.parse((await run(['evaluate', spec, pulse, '--json'])).stdout);
    expect(json.meanLeakage).toBe(evaluate(SPEC, readPulse(readFileSync(pulse, 'utf8'))).meanLeakage);
  });

  // Source: the library's evaluate names the worst member; with an anharmonicity-error axis
  // (docs/transmon.md) the text must say which anharmonicity error it has.
  it('names the worst member with its anharmonicity error when the ensemble varies it', async () => {
    const varied = { ...SPEC, ensemble: { anharmonicityError: { values: [-2e7, 0, 2e7] } } };
    const file = join(dir, 'varied.json');
    writeFileSync(file, JSON.stringify(varied));
    const ev = evaluate(varied, readPulse(readFileSync(pulse, 'utf8')));
    const worst = ev.members[ev.worstIndex];
    expect(worst.anharmonicityError).not.toBe(0); // the check has content
    const text = `anharmonicity error ${worst.anharmonicityError! > 0 ? '' : '-'}20 MHz`;
    const table = await run(['evaluate', file, pulse]);
    expect(table.stdout).toMatch(new RegExp(`worst infidelity +\\S+ at detuning 0 Hz, amplitude error 0 %, ${text}`));
    expect((await run(['map', file, pulse])).stdout).toContain(`(worst member of the ensemble: detuning 0 Hz, amplitude error 0 %, ${text})`);
  });

  // Source: the truncation check (docs/transmon.md): a fast X(180) made on 3 levels misses the
  // shift of |2> by |3>; shortest's answer gets the same check and warning as design's.
  it('shortest warns when its answer, designed on too few levels, reads otherwise on two more', async () => {
    const three = { ...SPEC, system: { levels: 3, anharmonicity: -2.12e8 }, ensemble: undefined, optimizer: { starts: 1, seed: 1, maxIterations: 150 } };
    const file = join(dir, 'three.json');
    writeFileSync(file, JSON.stringify(three));
    const r = await run(['shortest', file, '--goal-mean', '1e-3', '--min', '4e-9']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/warning: the shortest pulse found: on 5 levels the mean infidelity is \S+ and the mean leakage \S+, more than a factor two from .* on 3 levels/);
  });

  it('compare builds the DRAG family under the spec limits, calibrated, with the values in the name', async () => {
    const out = await run(['compare', spec, pulse, '--composites', 'drag-gaussian,drag-cosine', '--json']);
    expect(out.code).toBe(0);
    const rows = JSON.parse(out.stdout).rows as { name: string; figures: { meanInfidelity: number; meanLeakage: number; durationS: number; peakRabiHz: number } }[];
    const drag = rows.filter((r) => r.name.startsWith('DRAG'));
    expect(drag.length).toBe(2);
    for (const row of drag) {
      expect(row.name).toMatch(/calibrated: amplitude x[\d.]+, beta -?[\d.]+, drive detuning -?[\d.]+ MHz/);
      expect(row.figures.durationS).toBeCloseTo(6.25e-9, 20);
      expect(row.figures.peakRabiHz).toBeLessThanOrEqual(2.5e8);
      expect(row.figures.meanLeakage).toBeGreaterThanOrEqual(0);
    }
  });

  it('map takes a DRAG name for PULSE: the pulse compare builds, with leakage in the figures and a leakage column', async () => {
    const csv = join(dir, 'drag.csv');
    const out = await run(['map', spec, 'drag-cosine', '--json', '--out', csv]);
    expect(out.code).toBe(0);
    const summary = JSON.parse(out.stdout);
    const compared = JSON.parse((await run(['compare', spec, '--composites', 'drag-cosine', '--json'])).stdout).rows[0];
    expect(summary.meanInfidelity).toBe(compared.figures.meanInfidelity);
    expect(summary.meanLeakage).toBe(compared.figures.meanLeakage);
    expect(readFileSync(csv, 'utf8')).toMatch(/^detuning_hz,amplitude_error,infidelity,leakage$/m);
  });

  it('composite --list names the DRAG family; building one alone is refused with the way to get it', async () => {
    expect((await run(['composite', '--list'])).stdout).toMatch(/drag-gaussian {2}\(DRAG Gaussian\)[\s\S]*Motzoi/);
    const alone = await run(['composite', 'drag-cosine', '--angle-deg', '90', '--rabi-max', '1e8', '--dt', '1e-9']);
    expect(alone.code).toBe(1);
    expect(alone.stderr).toMatch(/compare SPEC --composites drag-cosine/);
  });

  it("export's report gives the leakage of the design and of the waveform as played", async () => {
    const out = await run(['export', pulse, '--format', 'csv', '--sample-rate', '2.4e9', '--bits', '14', '--full-scale', '3e8',
      '--spec', spec, '--out', join(dir, 'x.csv'), '--json']);
    expect(out.code).toBe(0);
    const report = JSON.parse(out.stdout);
    expect(report.gate.design.meanLeakage).toBe(evaluate(SPEC, readPulse(readFileSync(pulse, 'utf8'))).meanLeakage);
    expect(report.gate.exported.meanLeakage).toBeGreaterThanOrEqual(0);
  });
});
