// Files are never half-written or overwritten by surprise: writes go to a temporary name and
// are renamed into place; a data file and its description are replaced together or not at
// all; export never writes over its own input; an output name whose extension says another
// format is refused; and map, compare and export read every format evaluate reads, with the
// same figures (an invariant: every format holds the same DAC codes, and exporting a
// waveform read back at its own settings gives the same codes again).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeFilesTogether } from '../../src/cli/files.ts';
import { readWaveformFile } from '../../src/io/export/read-file.ts';
import { run } from './run.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const TRANSMON = join(ROOT, 'examples/transmon-x90.json');
let dir: string;
let pulsePath: string;
// 1 GS/s holds each 2 ns design sample for 2 samples; a WAV holds up to about 1.07 GS/s.
const SETTINGS = ['--sample-rate', '1e9', '--bits', '14', '--full-scale', '1e7'];
const FILES: Record<string, string> = { csv: 'w.csv', npy: 'w.npy', raw: 'w.bin', wav: 'w.wav', json: 'w.json' };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-files-'));
  pulsePath = join(dir, 'x90.pulse.json');
  const d = await run(['design', TRANSMON, '--out', pulsePath]);
  expect(d.code, d.stderr).toBe(0);
  for (const [format, name] of Object.entries(FILES)) {
    const e = await run(['export', pulsePath, '--format', format, ...SETTINGS, '--out', join(dir, name)]);
    expect(e.code, e.stderr).toBe(0);
  }
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writing', () => {
  it('a pair is replaced together: a failure on the second file leaves both old files as they were', () => {
    const data = join(dir, 'pair.npy');
    writeFileSync(data, 'old data');
    writeFileSync(`${data}.json`, 'old description');
    // The second file's folder does not exist, so it cannot be written.
    expect(() => writeFilesTogether([{ path: data, data: 'new data' }, { path: join(dir, 'missing', 'd.json'), data: 'new' }], '--out')).toThrow(/cannot write \(no such file\)/);
    expect(readFileSync(data, 'utf8')).toBe('old data');
    writeFilesTogether([{ path: data, data: 'new data' }, { path: `${data}.json`, data: 'new description' }], '--out');
    expect(readFileSync(data, 'utf8')).toBe('new data');
    expect(readFileSync(`${data}.json`, 'utf8')).toBe('new description');
    expect(readdirSync(dir).filter((f) => /\.(tmp|old)$/.test(f))).toEqual([]);
  });

  it('export refuses to write over its own input pulse, its description or the spec; the input stays', async () => {
    const before = readFileSync(pulsePath);
    const r = await run(['export', pulsePath, '--format', 'json', ...SETTINGS, '--out', pulsePath]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`--out ${pulsePath}: is the input ${pulsePath}; refusing to write over it`);
    expect(readFileSync(pulsePath)).toEqual(before);
    const npy = join(dir, FILES.npy);
    const npyBefore = readFileSync(npy);
    const again = await run(['export', npy, '--format', 'npy', ...SETTINGS, '--out', npy]);
    expect(again.code).toBe(1);
    expect(readFileSync(npy)).toEqual(npyBefore);
    const spec = await run(['export', pulsePath, '--format', 'json', ...SETTINGS, '--spec', TRANSMON, '--out', TRANSMON]);
    expect(spec.code).toBe(1);
    expect(spec.stderr).toContain('refusing to write over it');
  });

  it.each([
    ['export --out x.csv --format npy', ['export', '<pulse>', '--format', 'npy', ...SETTINGS, '--out', '<dir>/x.csv'], 'the extension .csv says CSV, but this writes npy'],
    ['export --out x.wav --format raw', ['export', '<pulse>', '--format', 'raw', ...SETTINGS, '--out', '<dir>/x.wav'], 'the extension .wav says WAV, but this writes raw'],
    ['design --out p.npy', ['design', TRANSMON, '--out', '<dir>/p.npy'], 'the extension .npy says NumPy .npy, but this writes a pulse file (JSON)'],
    ['map --out m.npy', ['map', TRANSMON, '<pulse>', '--out', '<dir>/m.npy'], 'the extension .npy says NumPy .npy, but this writes a map'],
  ])('%s is refused and writes nothing', async (_what, argv, message) => {
    const before = readdirSync(dir).sort();
    const r = await run(argv.map((a) => a.replace('<pulse>', pulsePath).replace('<dir>', dir)));
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(message);
    expect(readdirSync(dir).sort()).toEqual(before);
  });
});

describe('map, compare and export read every format evaluate reads', () => {
  it.each(Object.entries(FILES))('%s', async (_format, name) => {
    const path = join(dir, name);
    const reference = JSON.parse((await run(['evaluate', TRANSMON, join(dir, FILES.json), '--json'])).stdout);
    const ev = JSON.parse((await run(['evaluate', TRANSMON, path, '--json'])).stdout);
    // Every format holds the same codes: the same figures to rounding of the Hz values.
    expect(Math.abs(ev.meanInfidelity - reference.meanInfidelity)).toBeLessThan(1e-12);
    const map = await run(['map', TRANSMON, path, '--json', '--detuning', '-1e6:1e6:3', '--amplitude', '0:0:1']);
    expect(map.code, map.stderr).toBe(0);
    const compare = await run(['compare', TRANSMON, path, '--json', '--detuning', '-1e6:1e6:3', '--amplitude', '0:0:1']);
    expect(compare.code, compare.stderr).toBe(0);
    expect(JSON.parse(compare.stdout).rows[0].figures.regionMeanInfidelity).toBe(JSON.parse(map.stdout).regionMeanInfidelity);
    expect(JSON.parse(map.stdout).meanInfidelity).toBe(ev.meanInfidelity);
    // Exported again at the same settings, the waveform keeps its codes. Its amplitude may
    // sit a fraction of a code above full scale (I and Q rounded apart), so the per-channel
    // limit, which each code meets, is named.
    const out = join(dir, `again-${name}.csv`);
    const e = await run(['export', path, '--format', 'csv', ...SETTINGS, '--peak-limit', 'per-channel', '--out', out]);
    expect(e.code, e.stderr).toBe(0);
    const first = await readWaveformFile(join(dir, FILES.csv));
    const second = await readWaveformFile(out);
    expect(Array.from(second.i)).toEqual(Array.from(first.i));
    expect(Array.from(second.q)).toEqual(Array.from(first.q));
    expect(existsSync(out)).toBe(true);
  });
});
