// The analysis commands end to end, in-process through main(argv, io): `composite`
// (elements, rounding note, pulse file, --list), `map` (CSV that parses back, JSON, the
// summary) and `compare` (one grid and target, best first, Knill against its own ideal).
// Written files are checked against the library computed independently here
// (buildComposite, robustnessMap) and the published element values of docs/physics.md section 4.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { evaluate, robustnessMap } from '../../src/core/api.ts';
import { buildComposite, compositeNames } from '../../src/core/composites.ts';
import { dragFamily } from '../../src/core/drag-family.ts';
import { SORT_FIGURES, type CompareRow } from '../../src/core/compare.ts';
import type { Target } from '../../src/core/types.ts';
import { targetJson } from '../../src/io/target-json.ts';
import { run } from './run.ts';
import { expectClose } from '../reference/tolerance.ts';
import { readPulse } from '../../src/io/pulse.ts';
import { MAP_COLUMNS } from '../../src/io/map-file.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const TRANSMON = join(ROOT, 'examples/transmon-x90.json');
const TRANSMON_SPEC = JSON.parse(readFileSync(TRANSMON, 'utf8'));
const X90: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 };

let dir: string;
let x180Spec: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-analysis-'));
  x180Spec = join(dir, 'x180.json');
  writeFileSync(x180Spec, JSON.stringify({ ...TRANSMON_SPEC, name: 'x180', target: { gate: { axis: [1, 0, 0], angleDeg: 180 } } }));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const BB1_ARGS = ['--angle-deg', '90', '--rabi-max', '1e7', '--dt', '2e-9'];

describe('gatesmith composite', () => {
  it('writes the pulse buildComposite makes and prints its elements and rounding', async () => {
    const out = join(dir, 'bb1.json');
    const r = await run(['composite', 'bb1', ...BB1_ARGS, '--out', out]);
    expect(r.code).toBe(0);
    const expected = buildComposite('bb1', { angleDeg: 90, rabiMax: 1e7, dt: 2e-9 });
    const written = readPulse(readFileSync(out, 'utf8'));
    expect(Array.from(written.i)).toEqual(Array.from(expected.i));
    expect(Array.from(written.q)).toEqual(Array.from(expected.q));
    expect(written.metadata.ideal).toEqual(targetJson(X90)); // in degrees, as people read the file
    // Wimperis 1994 at theta = pi/2: p1 = 97.18, 3 p1 = 291.54 degrees (docs/physics.md, recomputed from the formula).
    expect(r.stdout).toMatch(/\b97\.18\d*\b/);
    expect(r.stdout).toMatch(/\b291\.54\d*\b/);
    expect(r.stdout).toContain('rounded up to a whole number of samples');
    expect(r.stdout).toContain('element Rabi spread: 3.85 %');
  });

  it('--json gives the metadata; CORPSE mentions the detuning residue of unequal rates', async () => {
    const j = await run(['composite', 'corpse', ...BB1_ARGS, '--json']);
    expect(j.code).toBe(0);
    const json = JSON.parse(j.stdout);
    expect(Object.keys(json).sort()).toEqual(['dt', 'durationS', 'metadata', 'out', 'samples', 'warnings']);
    expect(json.metadata.composite).toBe('corpse');
    expect(json.metadata.elements).toHaveLength(3);
    expect(json.metadata.elementRabiSpread).toBeGreaterThan(0);
    const t = await run(['composite', 'corpse', ...BB1_ARGS]);
    expect(t.stdout).toContain('first-order residue');
  });

  it('--list names every sequence with what it corrects and its source', async () => {
    const r = await run(['composite', '--list']);
    expect(r.code).toBe(0);
    for (const c of compositeNames) {
      expect(r.stdout).toContain(c.name);
      expect(r.stdout).toContain(c.source);
    }
    expect(r.stdout).toContain('Wimperis, J. Magn. Reson. A 109, 221 (1994)');
    const j = await run(['composite', '--list', '--json']);
    // The composite sequences, then the DRAG family (compare builds it calibrated on a spec).
    expect(JSON.parse(j.stdout)).toHaveLength(compositeNames.length + dragFamily.length);
  });

  it.each([
    [['composite', 'knill', ...BB1_ARGS], '--angle-deg: 90 is not allowed; knill takes 180 degrees only'],
    [['composite', 'bb1', '--angle-deg', '90', '--rabi-max', '1e7'], '--dt is required'],
    [['composite', 'bb2', ...BB1_ARGS], '"bb2" is not a known sequence'],
    [['composite', 'bb1', '--angle-deg', 'ninety', '--rabi-max', '1e7', '--dt', '2e-9'], '--angle-deg: "ninety" is not allowed'],
    [['composite', 'bb1', ...BB1_ARGS.slice(0, 4), '--dt', '-1'], '--dt: "-1" is not allowed'],
    [['composite', 'sk1', ...BB1_ARGS, '--placement', 'middle'], '--placement'],
    [['composite'], 'give one NAME'],
  ])('bad input %j exits 1 naming it', async (argv, fragment) => {
    const r = await run(argv);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(fragment);
  });
});

describe('gatesmith map', () => {
  let pulsePath: string;
  beforeAll(async () => {
    pulsePath = join(dir, 'map-bb1.json');
    expect((await run(['composite', 'bb1', ...BB1_ARGS, '--out', pulsePath])).code).toBe(0);
  });

  it('CSV: a # header, the column row, one row per point, values equal to robustnessMap', async () => {
    const out = join(dir, 'map.csv');
    const r = await run(['map', TRANSMON, pulsePath, '--detuning', '-1e6:1e6:11', '--amplitude', '-0.1:0.1:9', '--out', out]);
    expect(r.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trimEnd().split('\n');
    const comments = lines.filter((l) => l.startsWith('#'));
    expect(comments[0]).toBe('# gatesmith robustness map, CSV');
    const body = lines.slice(comments.length);
    expect(body[0]).toBe(MAP_COLUMNS.join(','));
    const rows = body.slice(1).map((l) => l.split(',').map(Number));
    expect(rows).toHaveLength(99);
    const pulse = readPulse(readFileSync(pulsePath, 'utf8'));
    const map = robustnessMap(X90, pulse, { min: -1e6, max: 1e6, points: 11 }, { min: -0.1, max: 0.1, points: 9 });
    rows.forEach(([d, a, f], j) => {
      expect(d).toBeCloseTo(-1e6 + 2e5 * (j % 11), 6);
      expect(a).toBeCloseTo(-0.1 + 0.025 * Math.floor(j / 11), 12);
      // Doubles are written with String(x), which reads back exactly.
      expect(f).toBe(map.infidelity[j]);
    });
    expect(r.stdout).toContain('region mean');
    expect(r.stdout).toContain(`map written to ${out}`);
  });

  it('JSON file and --json: the grid, the values, the summary; default region is the ensemble range, 101 x 101', async () => {
    const out = join(dir, 'map.json');
    const r = await run(['map', TRANSMON, pulsePath, '--out', out, '--json', '--threshold', '1e-3']);
    expect(r.code).toBe(0);
    const printed = JSON.parse(r.stdout);
    expect(printed.detuning).toEqual({ min: -1e6, max: 1e6, points: 101 });
    expect(printed.amplitudeError).toEqual({ min: -0.1, max: 0.1, points: 101 });
    expect(printed.threshold).toBe(1e-3);
    for (const key of ['meanInfidelity', 'worstInfidelity', 'regionMeanInfidelity', 'regionWorstInfidelity', 'areaFraction', 'detuningHalfWidth', 'amplitudeHalfWidth', 'durationS', 'peakRabiHz', 'pulseAreaTurns', 'energyHz2S']) {
      expect(typeof printed[key], key).toBe('number');
    }
    // Targets in the spec's form, angles in degrees (what a person reads).
    expect(printed.targetUsed).toEqual({ gate: { axis: [1, 0, 0], angleDeg: 90 } });
    expect(printed.targetNote).toBeNull();
    const file = JSON.parse(readFileSync(out, 'utf8'));
    expect(file.format).toBe('gatesmith.robustness-map');
    expect(file.infidelity).toHaveLength(101 * 101);
    expect(file.summary.regionMeanInfidelity).toBe(printed.regionMeanInfidelity);
    expect(file.infidelity.reduce((s: number, x: number) => s + x, 0) / (101 * 101)).toBeCloseTo(printed.regionMeanInfidelity, 15);
    // "mean" is the weighted mean over the spec's ensemble, as evaluate gives it.
    expect(printed.meanInfidelity).toBe(evaluate(TRANSMON_SPEC, readPulse(readFileSync(pulsePath, 'utf8'))).meanInfidelity);
    // BB1 (Wimperis 1994): 4 elements, 90 + 180 + 360 + 180 degrees = 2.25 turns.
    expect(printed.pulseAreaTurns).toBeCloseTo(2.25, 12);
  });

  it.each([
    [['--detuning', '1e6:-1e6:11'], '--detuning: "1e6:-1e6:11" is not allowed'],
    [['--amplitude', '-1:0.1:5'], 'MIN must be above -1'],
    [['--detuning', '0:1:0'], 'N a whole number from 1 to 2001'],
    [['--threshold', '2'], '--threshold: "2" is not allowed'],
    [['--out', 'map.txt'], 'must end in .csv or .json'],
  ])('bad input %j exits 1 naming it', async (extra, fragment) => {
    const r = await run(['map', TRANSMON, pulsePath, ...extra]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(fragment);
  });
});

describe('gatesmith compare', () => {
  let rectPath: string;
  beforeAll(async () => {
    rectPath = join(dir, 'rect.json');
    expect((await run(['composite', 'rectangular', ...BB1_ARGS, '--out', rectPath])).code).toBe(0);
  });

  /** A row of `compare --json` as read back. */
  type JsonRow = Omit<CompareRow, 'pulse' | 'cuts'> & { file?: string };
  /** The rows of a --json comparison by name. */
  const byName = (json: { rows: JsonRow[] }): Record<string, JsonRow> => Object.fromEntries(json.rows.map((row) => [row.name, row]));

  it('--json: one row per pulse on one grid and target, sorted best first by the chosen figure', async () => {
    const r = await run(['compare', TRANSMON, rectPath, '--composites', 'bb1,sk1,corpse', '--json', '--detuning', '-1e6:1e6:21', '--amplitude', '-0.1:0.1:21']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(Object.keys(json).sort()).toEqual(['amplitudeError', 'detuning', 'rows', 'sortBy', 'target', 'threshold', 'warnings']);
    expect(json.detuning).toEqual({ min: -1e6, max: 1e6, points: 21 });
    expect(json.rows.map((row: { name: string }) => row.name).sort()).toEqual(['BB1', 'CORPSE', 'Rectangular, 90 deg about the axis at 0 deg', 'SK1'].sort());
    const means = json.rows.map((row: { figures: { meanInfidelity: number } }) => row.figures.meanInfidelity);
    expect(means).toEqual([...means].sort((a, b) => a - b));
    // "mean" is the weighted mean over the spec's ensemble: what evaluate gives for the same pulse.
    const rows = byName(json);
    const bb1Pulse = buildComposite('bb1', { angleDeg: 90, rabiMax: 1e7, dt: TRANSMON_SPEC.duration / TRANSMON_SPEC.segments });
    expect(rows.BB1.figures!.meanInfidelity).toBe(evaluate(TRANSMON_SPEC, bb1Pulse).meanInfidelity);
    expect(rows['Rectangular, 90 deg about the axis at 0 deg'].file).toBe(rectPath);
    // Built as `gatesmith composite` builds them at dt = 2 ns: BB1 at 90 degrees is 13 + 25 + 50 + 25 samples.
    expect(rows.BB1.figures!.durationS).toBeCloseTo(113 * 2e-9, 20);
    expect(rows.BB1.figures!.peakRabiHz).toBe(1e7);
    const byArea = JSON.parse((await run(['compare', TRANSMON, rectPath, '--composites', 'bb1,corpse', '--json', '--sort', 'area'])).stdout);
    const areas = byArea.rows.map((row: { figures: { areaFraction: number } }) => row.figures.areaFraction);
    expect(areas).toEqual([...areas].sort((a, b) => b - a));
    // CORPSE corrects detuning (Cummins et al. 2003): its detuning half-width beats the plain pulse's.
    const byWidth = JSON.parse((await run(['compare', TRANSMON, rectPath, '--composites', 'corpse', '--json', '--sort', 'detuning-width'])).stdout);
    expect(byWidth.rows[0].name).toBe('CORPSE');
    // The table labels the map region's figures "region mean" and "region worst".
    const table = await run(['compare', TRANSMON, rectPath, '--composites', 'bb1', '--detuning', '-1e6:1e6:11', '--amplitude', '-0.1:0.1:11']);
    expect(table.stdout).toMatch(/pulse\s+mean\s+worst\s+region mean\s+region worst/);
    expect(table.stdout).toContain("mean, worst: over the spec's ensemble (25 members, weighted mean)");
  });

  it('ranks a sequence built for another gate by its figure against the spec\'s target, with a note', async () => {
    // BB1 for 180 deg about 45 deg on the X(90) demo: against its own ideal it would rank first
    // (a few 1e-3); against X(90) its infidelity is 1 - (sin 45 cos 45)^2 = 0.75 at zero error
    // (phase-insensitive fidelity, docs/physics.md section 2).
    const other = join(dir, 'bb1-180-45.json');
    expect((await run(['composite', 'bb1', '--angle-deg', '180', '--axis-deg', '45', '--rabi-max', '1e7', '--dt', '2e-9', '--out', other])).code).toBe(0);
    const json = JSON.parse((await run(['compare', TRANSMON, other, rectPath, '--composites', 'bb1', '--json'])).stdout);
    const last = json.rows[json.rows.length - 1];
    expect(last.file).toBe(other);
    expect(last.target).toEqual(targetJson(X90));
    expect(last.note).toContain("does not meet the spec's target");
    const zero = JSON.parse((await run(['compare', TRANSMON, other, '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1'])).stdout);
    expectClose(zero.rows[0].figures.regionMeanInfidelity, 0.75, { rel: 1e-12 }, 'infidelity against X(90) at zero error');
    expect(json.rows[0].name).toBe('BB1');
    const table = (await run(['compare', TRANSMON, other, '--composites', 'bb1'])).stdout;
    expect(table).toMatch(/^2\s+BB1 \(correction after\), 180 deg about the axis at 45 deg \[1\]/m);
    expect(table).toContain("[1] BB1 (correction after), 180 deg about the axis at 45 deg: built for a 180 degree rotation about [0.7071, 0.7071, 0], which does not meet the spec's target");
  });

  it('Knill meets X(180) up to a z rotation after it: judged against its own ideal, and the row says so', async () => {
    const r = await run(['compare', x180Spec, '--composites', 'knill,bb1', '--detuning', '-1e6:1e6:11', '--amplitude', '-0.1:0.1:11']);
    expect(r.code).toBe(0);
    const knillLine = r.stdout.split('\n').find((l) => /\bKnill \[1\]/.test(l));
    expect(knillLine).toBeDefined();
    expect(r.stdout).toContain('[1] Knill, 180 deg about the axis at 0 deg: meets the spec\'s target up to a z rotation of -60 degrees after it');
    const json = JSON.parse((await run(['compare', x180Spec, '--composites', 'knill,bb1', '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1'])).stdout);
    const rows = byName(json);
    const ideal = buildComposite('knill', { angleDeg: 180, rabiMax: 1e7, dt: 2e-9 }).metadata.ideal;
    expect(rows.Knill.target).toEqual(targetJson(ideal));
    expect(json.target).toEqual({ gate: { axis: [1, 0, 0], angleDeg: 180 } });
    // Without error it meets its ideal (Ryan, Hodges, Cory 2010); BB1 meets the given X(180).
    expect(rows.Knill.figures!.regionMeanInfidelity).toBeLessThan(1e-12);
    expect(rows.BB1.note).toBeNull();
    expect(rows.BB1.figures!.regionMeanInfidelity).toBeLessThan(1e-12);
    // evaluate answers the same: the same target, note and weighted mean as compare's row.
    const knillPath = join(dir, 'knill.json');
    expect((await run(['composite', 'knill', '--angle-deg', '180', '--rabi-max', '1e7', '--dt', '2e-9', '--out', knillPath])).code).toBe(0);
    const ev = JSON.parse((await run(['evaluate', x180Spec, knillPath, '--json'])).stdout);
    const row = byName(JSON.parse((await run(['compare', x180Spec, knillPath, '--json'])).stdout))['Knill, 180 deg about the axis at 0 deg'];
    expect(ev.target).toEqual(row.target);
    expect(ev.note).toBe(row.note);
    expect(ev.meanInfidelity).toBe(row.figures!.meanInfidelity);
    expect((await run(['evaluate', x180Spec, knillPath])).stdout).toContain('note: Knill, 180 deg about the axis at 0 deg: meets the spec');
  });

  it('builds the inversion sequences for an inversion spec, and the equatorial rotation for another transfer', async () => {
    const inversion = join(dir, 'inversion.json');
    writeFileSync(inversion, JSON.stringify({ ...TRANSMON_SPEC, target: { state: { from: [0, 0, 1], to: [0, 0, -1] } } }));
    const r = await run(['compare', inversion, '--composites', '90-180-90,bb1,knill', '--json', '--detuning', '0:0:1', '--amplitude', '-0.05:0.05:5']);
    expect(r.code).toBe(0);
    const rows = byName(JSON.parse(r.stdout));
    for (const row of Object.values(rows)) {
      expect(row.target).toEqual({ state: { from: [0, 0, 1], to: [0, 0, -1] } });
      expect(row.note).toContain("meets the spec's state transfer");
    }
    // Levitt & Freeman 1979: 90-180-90 compensates amplitude error for the inversion.
    expect(rows['90-180-90'].figures!.regionMeanInfidelity).toBeLessThan(1e-4);
    // +z -> +y: X(-90), built as 90 degrees about -x (docs/analysis.md); Knill and 90-180-90 say why not.
    const sideways = join(dir, 'sideways.json');
    writeFileSync(sideways, JSON.stringify({ ...TRANSMON_SPEC, target: { state: { from: [0, 0, 1], to: [0, 1, 0] } } }));
    const s = await run(['compare', sideways, '--composites', 'bb1,knill,90-180-90', '--json']);
    expect(s.code).toBe(0);
    const built = byName(JSON.parse(s.stdout));
    expect(built.BB1.target).toEqual({ state: { from: [0, 0, 1], to: [0, 1, 0] } });
    expect(built.BB1.note).toContain('a 90 degree rotation about [-1, 0, 0], meets the spec\'s state transfer');
    expect(built.BB1.figures!.meanInfidelity).toBeLessThan(1e-2);
    expect(built.Knill.error!.message).toContain('knill takes 180 degrees only');
    expect(built['90-180-90'].error!.message).toContain('offered for an inversion target only');
    const table = (await run(['compare', sideways, '--composites', 'bb1,knill'])).stdout;
    expect(table).toContain('not built: Knill: knill takes 180 degrees only');
  });

  it('--sort takes every figure the library sorts by', async () => {
    const h = await run(['compare', '--help']);
    expect(h.code).toBe(0);
    expect(h.stdout).toContain(Object.keys(SORT_FIGURES).join('|'));
  });

  it.each([
    [['compare', TRANSMON], 'give at least one PULSE file or --composites LIST'],
    [['compare'], 'missing SPEC'],
    [['compare', TRANSMON, '--composites', 'bb9'], '--composites: "bb9" is not a known sequence'],
    [['compare', TRANSMON, '--composites', 'knill'], "--composites: no sequence can be built for the spec's target (gate: 90° about [1, 0, 0]): Knill: knill takes 180 degrees only"],
    [['compare', TRANSMON, '--composites', 'bb1', '--sort', 'fastest'], '--sort: "fastest" is not allowed'],
  ])('bad input %j exits 1 naming it', async (argv, fragment) => {
    const r = await run(argv);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(fragment);
  });
});
