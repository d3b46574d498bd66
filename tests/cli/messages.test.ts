// The command line's words: a file named once per message, "a folder" for directories, JSON
// syntax errors placed by line and column, a UTF-8 byte-order mark accepted, binary input
// described and never echoed, angles in degrees, starts numbered from 1 in text and JSON,
// one key name per quantity across commands, warnings carried by --json, and warnings on
// numbers that are probably in the wrong unit (the command still runs). Figures compared
// here are invariants (the same pulse read with and without a byte-order mark gives the
// same figure to the bit); positions are counted in the test's own text.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readPulse } from '../../src/io/pulse.ts';
import { run } from './run.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const TRANSMON = join(ROOT, 'examples/transmon-x90.json');
const SPEC = JSON.parse(readFileSync(TRANSMON, 'utf8'));
const QUICK = { ...SPEC, optimizer: { ...SPEC.optimizer, maxIterations: 30 } };

let dir: string;
let specPath: string;
let pulsePath: string;
let npyPath: string;
let designOut: { code: number; stdout: string; stderr: string };
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-messages-'));
  specPath = join(dir, 'quick.json');
  writeFileSync(specPath, JSON.stringify(QUICK));
  pulsePath = join(dir, 'quick.pulse.json');
  designOut = await run(['design', specPath, '--out', pulsePath, '--json']);
  npyPath = join(dir, 'quick.npy');
  const e = await run(['export', pulsePath, '--format', 'npy', '--sample-rate', '2e9', '--bits', '14', '--full-scale', '1e7', '--out', npyPath]);
  expect(e.code, e.stderr).toBe(0);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const write = (name: string, content: string | Uint8Array): string => {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
};
const count = (text: string, part: string): number => text.split(part).length - 1;

describe('file names and folders', () => {
  it.each([
    ['a bad spec field', () => ['design', write('seg0.json', JSON.stringify({ ...SPEC, segments: 0 }))], 'seg0.json'],
    ['a malformed pulse', () => ['evaluate', TRANSMON, write('neg.json', JSON.stringify({ dt: -1, i: [0], q: [0] }))], 'neg.json'],
    ['a pulse that is not JSON', () => ['evaluate', TRANSMON, write('cut.json', '{"dt": 1e-9, "i": [0')], 'cut.json'],
    ['a pulse for map', () => ['map', TRANSMON, write('neg2.json', JSON.stringify({ dt: 0, i: [0], q: [0] }))], 'neg2.json'],
    ['a pulse for export', () => ['export', write('neg3.json', JSON.stringify({ dt: 0, i: [0], q: [0] })), '--format', 'csv', '--sample-rate', '1e9', '--bits', '14', '--full-scale', '1e7', '--out', join(dir, 'o.csv')], 'neg3.json'],
  ])('%s: the file is named once', async (_what, argv, name) => {
    const r = await run(argv());
    expect(r.code).toBe(1);
    expect(count(r.stderr, name), r.stderr).toBe(1);
  });

  it('a description that is not JSON names the description once, by line and column', async () => {
    const data = readFileSync(npyPath);
    const copy = write('broken.npy', data);
    write('broken.npy.json', '{\n  "kind": oops\n}');
    const r = await run(['evaluate', TRANSMON, copy]);
    expect(r.code).toBe(1);
    expect(count(r.stderr, 'broken.npy.json'), r.stderr).toBe(1);
    expect(r.stderr).toContain('line 2, column 11');
  });

  it.each([
    ['a folder as spec', () => ['design', dir]],
    ['a folder as pulse', () => ['evaluate', TRANSMON, dir]],
    ['a folder as --out', () => ['design', TRANSMON, '--out', dir]],
    ['--out in a missing folder', () => ['design', TRANSMON, '--out', join(dir, 'none', 'p.json')]],
    ['a folder as waveform', () => ['export', dir, '--format', 'csv', '--sample-rate', '1e9', '--bits', '14', '--full-scale', '1e7', '--out', join(dir, 'o.csv')]],
  ])('%s is "a folder", never a directory', async (_what, argv) => {
    const r = await run(argv());
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/folder/);
    expect(r.stderr).not.toMatch(/director|EISDIR|ENOTDIR/i);
  });
});

describe('JSON text', () => {
  it('a syntax error gives line and column (here the "2" on line 3, column 7)', async () => {
    const text = '{\n  "target": 1,\n  "b" 2\n}';
    // Counted in the text itself: on line 3, '  "b" 2', the 2 is the 7th character.
    const line3 = text.split('\n')[2];
    expect(line3.indexOf('2') + 1).toBe(7);
    const r = await run(['design', write('syntax.json', text)]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('at line 3, column 7');
    expect(r.stderr).toContain('where ":" belongs');
  });

  it('a pulse file with a syntax error also says where', async () => {
    const r = await run(['evaluate', TRANSMON, write('p-syntax.json', '{"dt": 2e-9,\n"i": [1, 2,],\n"q": [0, 0]}')]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('line 2, column 12');
  });

  it('a UTF-8 byte-order mark is accepted on the spec and the pulse, with the same figures to the bit', async () => {
    const bom = '\ufeff';
    const spec2 = write('bom-spec.json', bom + JSON.stringify(QUICK));
    const pulse2 = write('bom-pulse.json', bom + readFileSync(pulsePath, 'utf8'));
    const plain = JSON.parse((await run(['evaluate', specPath, pulsePath, '--json'])).stdout);
    const r = await run(['evaluate', spec2, pulse2, '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).meanInfidelity).toBe(plain.meanInfidelity);
  });

  it('binary input is described (size, kind), not echoed', async () => {
    const r = await run(['design', npyPath]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/is binary data \(\d+ bytes, a NumPy \.npy file\)/);
    expect(r.stderr).not.toContain('NUMPY');
    const junk = write('junk.json', Uint8Array.from([0x00, 0xff, 0x13, 0x37, 0x80, 0x81, 0x7b]));
    const p = await run(['evaluate', TRANSMON, junk]);
    expect(p.code).toBe(1);
    expect(p.stderr).toContain('is binary data (7 bytes)');
    expect(p.stderr).not.toContain('\u0000');
    expect(p.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('numbers as people read them', () => {
  it('starts are numbered from 1 in the JSON, the table and the pulse file alike', async () => {
    expect(designOut.code, designOut.stderr).toBe(0);
    const json = JSON.parse(designOut.stdout);
    expect(json.starts.map((s: { start: number }) => s.start)).toEqual([1, 2, 3, 4, 5]);
    expect(json.best.start).toBeGreaterThanOrEqual(1);
    const pulse = readPulse(readFileSync(pulsePath, 'utf8'));
    expect(pulse.metadata.figures?.start).toBe(json.best.start);
    const table = await run(['design', specPath]);
    expect(table.stdout).toContain(`best start        ${json.best.start} of 5`);
    expect(table.stderr).toContain('start 1/5');
    expect(table.stderr).not.toContain('start 0/');
  });

  it('angles are in degrees in every JSON output and map file (no radians)', async () => {
    const outputs = [
      (await run(['compare', specPath, pulsePath, '--composites', 'bb1', '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1'])).stdout,
      (await run(['map', specPath, pulsePath, '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1', '--out', join(dir, 'm.json')])).stdout,
      readFileSync(join(dir, 'm.json'), 'utf8'),
      (await run(['map', specPath, pulsePath, '--detuning', '0:0:1', '--amplitude', '0:0:1', '--out', join(dir, 'm.csv')])).stdout,
      readFileSync(join(dir, 'm.csv'), 'utf8'),
      (await run(['composite', 'knill', '--angle-deg', '180', '--rabi-max', '1e7', '--dt', '2e-9', '--json'])).stdout,
    ];
    for (const text of outputs) expect(text).not.toMatch(/angleRad|radian/);
    expect(JSON.parse(outputs[0]).target).toEqual({ gate: { axis: [1, 0, 0], angleDeg: 90 } });
    expect(outputs[4]).toContain('"angleDeg":90');
    // Knill's ideal: 180 degrees about the axis at -30 degrees (Ryan, Hodges, Cory 2010).
    const ideal = JSON.parse(outputs[5]).metadata.ideal.gate;
    expect(ideal.angleDeg).toBe(180);
    expect((Math.atan2(ideal.axis[1], ideal.axis[0]) * 180) / Math.PI).toBeCloseTo(-30, 9);
  });

  it('a composite pulse file gives its ideal in degrees, and map and compare still use that ideal', async () => {
    const file = join(dir, 'knill.json');
    const c = await run(['composite', 'knill', '--angle-deg', '180', '--rabi-max', '1e7', '--dt', '2e-9', '--out', file]);
    expect(c.code, c.stderr).toBe(0);
    const text = readFileSync(file, 'utf8');
    expect(text).not.toContain('angleRad');
    expect(JSON.parse(text).metadata.ideal.gate.angleDeg).toBe(180);
    const x180 = write('x180.json', JSON.stringify({ ...QUICK, target: { gate: { axis: [1, 0, 0], angleDeg: 180 } } }));
    const r = await run(['compare', x180, file, '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1']);
    expect(r.code, r.stderr).toBe(0);
    const row = JSON.parse(r.stdout).rows[0];
    expect(row.note).toContain('its own ideal is a 180 degree rotation');
    // Without error Knill performs its ideal exactly (Ryan, Hodges, Cory 2010).
    expect(row.figures.regionMeanInfidelity).toBeLessThan(1e-12);
  });

  it('one key name per quantity across commands: the peak drive is peakRabiHz in design, map and compare', async () => {
    const leafKeys = (v: unknown, into = new Set<string>()): Set<string> => {
      if (Array.isArray(v)) v.forEach((x) => leafKeys(x, into));
      else if (v && typeof v === 'object') {
        for (const [k, x] of Object.entries(v)) {
          if (typeof x === 'number') into.add(k);
          leafKeys(x, into);
        }
      }
      return into;
    };
    const outputs = [
      JSON.parse(designOut.stdout),
      JSON.parse((await run(['map', specPath, pulsePath, '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1'])).stdout),
      JSON.parse((await run(['compare', specPath, pulsePath, '--json', '--detuning', '0:0:1', '--amplitude', '0:0:1'])).stdout).rows[0].figures,
    ];
    for (const out of outputs) {
      const keys = leafKeys(out);
      expect(keys.has('peakRabiHz')).toBe(true);
      expect(keys.has('peakRabi')).toBe(false);
    }
    // The same pulse, the same peak under the same name.
    expect(outputs[1].peakRabiHz).toBe(outputs[0].peakRabiHz);
    expect(outputs[2].peakRabiHz).toBe(outputs[0].peakRabiHz);
  });
});

describe('warnings', () => {
  it('a segment too long for its detuning is bad input (exit 1, one line), after the unit warning', async () => {
    const wrong = write('units-detuning.json', JSON.stringify({ ...QUICK, duration: 200 }));
    const r = await run(['design', wrong]);
    expect(r.code).toBe(1);
    const lines = r.stderr.trim().split('\n');
    expect(lines[0]).toContain('did you mean 200 ns, duration 2e-7?');
    expect(lines[1]).toMatch(/^gatesmith: .*a segment of 2 s may turn the qubit by at most/);
    expect(lines).toHaveLength(2);
  });

  it('evaluate --json carries its warnings (a pulse of another length than the spec)', async () => {
    const long = readPulse(readFileSync(pulsePath, 'utf8'));
    const path = write('long.json', JSON.stringify({ dt: long.dt, i: [...long.i, 0, 0], q: [...long.q, 0, 0] }));
    const r = await run(['evaluate', specPath, path, '--json']);
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.warnings).toHaveLength(1);
    expect(json.warnings[0]).toContain("the pulse lasts 204 ns, the spec's duration is 200 ns");
    expect(r.stderr).toContain(`warning: ${json.warnings[0]}`);
  });

  it('a duration of 200 with 100 segments and a rabiMax of 10 warn, naming the field and the likely value; it still runs', async () => {
    // Without detuning members: a 2 s segment under 1 MHz of detuning would turn the qubit by
    // millions of radians, which the core refuses (a bad input of its own).
    const ensemble = { amplitudeError: { min: -0.1, max: 0.1, points: 3 } };
    const wrong = write('units.json', JSON.stringify({ ...QUICK, duration: 200, rabiMax: 10, ensemble, optimizer: { ...QUICK.optimizer, starts: 1, maxIterations: 2 } }));
    const r = await run(['design', wrong, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const warnings: string[] = JSON.parse(r.stdout).warnings;
    expect(warnings).toHaveLength(2);
    expect(warnings[0]).toContain('duration 200 is 200 s');
    expect(warnings[0]).toContain('did you mean 200 ns, duration 2e-7?');
    expect(warnings[1]).toContain('rabiMax 10 is 10 Hz');
    expect(warnings[1]).toContain('did you mean 10 MHz, rabiMax 1e7?');
    for (const w of warnings) expect(r.stderr).toContain(w);
  });

  it('an export at a sample rate of 1 warns "did you mean 1 GS/s" and still runs', async () => {
    // Judged on amplitude errors only: a 1 s sample under 1 MHz of detuning is refused by the core.
    const judge = write('amplitude-only.json', JSON.stringify({ ...QUICK, ensemble: { amplitudeError: { min: -0.1, max: 0.1, points: 3 } } }));
    const r = await run(['export', pulsePath, '--format', 'csv', '--sample-rate', '1', '--resample', 'average', '--bits', '14', '--full-scale', '1e7', '--spec', judge, '--out', join(dir, 'slow.csv'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.warnings[0]).toContain('--sample-rate 1 is 1 Hz');
    expect(json.warnings[0]).toContain('did you mean 1 GS/s, --sample-rate 1e9?');
    expect(json.description.length).toBe(1); // ceil(200 ns x 1 Hz) samples, as asked
  });
});

it('no temporary file is left beside the outputs', () => {
  expect(readdirSync(dir).filter((f) => /\.(tmp|old)$/.test(f))).toEqual([]);
});
