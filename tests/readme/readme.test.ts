// What the README promises, run as written: its command examples on the demo pulse (with the
// compiled command, as `npx gatesmith` runs it), and its loading snippets for every export
// format in Python (numpy 2 and the standard library) and in Node. Each snippet's result is
// compared with the same file read by this package's reader; numpy, Python's wave module,
// npyjs and wavefile are the independent readers.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { cpSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Pulse } from '../../src/core/types.ts';
import { readWaveformFile } from '../../src/io/export/read-file.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const README = readFileSync(join(ROOT, 'README.md'), 'utf8');
const BIN = join(ROOT, 'bin/gatesmith.js');
let dir: string;

/** The text of the README between a heading and the next heading of the same or higher level. */
function section(heading: string): string {
  const start = README.indexOf(`\n${heading}\n`);
  if (start < 0) throw new Error(`README has no heading "${heading}"`);
  const level = heading.split(' ')[0];
  const rest = README.slice(start + heading.length + 2);
  const next = rest.search(new RegExp(`\\n#{1,${level.length}} `));
  return next < 0 ? rest : rest.slice(0, next);
}

/** The fenced code blocks of a section, by language. */
function blocks(text: string, lang: string): string[] {
  return [...text.matchAll(new RegExp('```' + lang + '\\n([\\s\\S]*?)```', 'g'))].map((m) => m[1]);
}

/** Command lines of an indented or fenced example, continuation lines joined. */
function commands(text: string, prefix: RegExp): string[] {
  const joined = text.replace(/\\\n\s*/g, '');
  return joined.split('\n').map((l) => l.trim()).filter((l) => prefix.test(l));
}

/** Splits a command line into words (the README's examples quote nothing). */
const words = (line: string): string[] => line.split(/\s+/).filter((w) => w !== '');

function runCommand(line: string): { status: number | null; stdout: string; stderr: string } {
  const argv = words(line.replace(/^(npx )?gatesmith /, ''));
  const r = spawnSync(process.execPath, [BIN, ...argv], { cwd: dir, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

// numpy 2 changed how int16 arrays meet Python ints (NEP 50): the snippets must hold there.
function pythonWithNumpy2(): string | null {
  const r = spawnSync('python3', ['-c', 'import numpy; print(numpy.__version__)'], { encoding: 'utf8' });
  if (r.status !== 0) return 'python3 with numpy is missing';
  return Number(r.stdout.split('.')[0]) >= 2 ? null : `numpy ${r.stdout.trim()} is older than 2`;
}
const pythonMissing = pythonWithNumpy2();
if (pythonMissing && process.env.CI) throw new Error(`${pythonMissing}: CI needs python3 with numpy 2 (.ci/run installs it)`);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-readme-'));
  cpSync(join(ROOT, 'examples'), join(dir, 'examples'), { recursive: true });
  symlinkSync(join(ROOT, 'node_modules'), join(dir, 'node_modules')); // npyjs and wavefile for the JS snippets
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the command examples, as written, on the demo', () => {
  it('the session on the transmon demo runs: design, evaluate, compare, export, evaluate the export', () => {
    const session = commands(section('## The command line'), /^npx gatesmith /);
    expect(session.length).toBeGreaterThanOrEqual(5);
    for (const line of session) {
      const r = runCommand(line);
      expect(r.status, `${line}\n${r.stderr}`).toBe(0);
    }
    // The exported waveform played back keeps the design's figure to within quantisation
    // (14 bits: one code is 1.5e-4 of full scale, docs/physics.md section 5).
    const design = JSON.parse(runCommand('gatesmith evaluate examples/transmon-x90.json x90.pulse.json --json').stdout);
    const played = JSON.parse(runCommand('gatesmith evaluate examples/transmon-x90.json x90.npy --json').stdout);
    expect(Math.abs(played.meanInfidelity - design.meanInfidelity)).toBeLessThan(1e-5);
  });

  it('the headline export at 2.4 GS/s runs and reports the gate as played', () => {
    const [line] = commands(section('## Export to the instrument'), /^gatesmith export /);
    expect(line).toContain('--sample-rate 2.4e9');
    const r = runCommand(line);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain('resample      average');
    expect(r.stdout).toMatch(/exported, as played/);
  });

  it('the help examples of map, compare and composite run as written', () => {
    for (const command of ['map', 'compare', 'composite']) {
      const help = execFileSync(process.execPath, [BIN, command, '--help'], { encoding: 'utf8' });
      const examples = commands(help.slice(help.indexOf('Example:')), /^gatesmith /);
      expect(examples.length, command).toBe(1);
      const r = runCommand(examples[0]);
      expect(r.status, `${examples[0]}\n${r.stderr}`).toBe(0);
    }
  });
});

describe('the loading snippets of every format', () => {
  const formats: [heading: string, format: string, file: string, pyVar: string, jsVar: string, pyColumn: string][] = [
    ['#### CSV (`--format csv`)', 'csv', 'x90.csv', 'i_hz', 'iCodes', ''],
    ['#### NumPy .npy (`--format npy`)', 'npy', 'x90.npy', 'hz', 'iCodes', '[:, 0]'],
    ['#### Raw int16 (`--format raw`)', 'raw', 'x90.bin', 'codes', 'iCodes', '[:, 0]'],
    ['#### WAV (`--format wav`)', 'wav', 'x90.wav', 'codes', 'iCodes', '[:, 0]'],
    ['#### Pulse JSON (`--format json`)', 'json', 'x90.json', 'i_hz', 'i', ''],
  ];
  // 1 GS/s fits every container (WAV holds up to about 1.07 GS/s with two channels).
  const FULL_SCALE = 1.2e7;
  const CODE_MAX = 8191;
  const played: Record<string, Pulse> = {};

  beforeAll(async () => {
    if (runCommand('gatesmith design examples/transmon-x90.json --out x90.pulse.json').status !== 0) throw new Error('design failed');
    for (const [, format, file] of formats) {
      const r = runCommand(`gatesmith export x90.pulse.json --format ${format} --sample-rate 1e9 --bits 14 --full-scale ${FULL_SCALE} --out ${file}`);
      if (r.status !== 0) throw new Error(r.stderr);
      played[format] = await readWaveformFile(join(dir, file));
    }
  });

  /** Values of I in Hz the snippet's variable stands for (codes or Hz). */
  const inHz = (values: number[], name: string): number[] => (/code/i.test(name) ? values.map((c) => (c * FULL_SCALE) / CODE_MAX) : values);
  /** Equal to rounding (1 uHz; one code is 1465 Hz here), sample by sample. */
  const expectSameSamples = (actual: number[], expected: ArrayLike<number>): void => {
    expect(actual).toHaveLength(expected.length);
    const worst = Math.max(...actual.map((x, n) => Math.abs(x - expected[n])));
    expect(worst).toBeLessThan(1e-6);
  };

  it.each(formats)('%s: the Python snippet', (heading, format, _file, pyVar, _jsVar, column) => {
    if (pythonMissing) return void console.warn(`skipped: ${pythonMissing}`);
    const [code] = blocks(section(heading), 'python');
    const script = `${code}\nimport json as _json, numpy as _np\nprint(_json.dumps(_np.asarray(${pyVar})${column}.astype(float).tolist()))\n`;
    const r = spawnSync('python3', ['-c', script], { cwd: dir, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expectSameSamples(inHz(JSON.parse(r.stdout), pyVar), played[format].i);
  });

  it.each(formats)('%s: the JavaScript snippet', (heading, format, _file, _pyVar, jsVar) => {
    const [code] = blocks(section(heading), 'js');
    const path = join(dir, `snippet-${format}.mjs`);
    writeFileSync(path, `${code}\nconsole.log(JSON.stringify(Array.from(${jsVar})));\n`);
    const r = spawnSync(process.execPath, [path], { cwd: dir, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expectSameSamples(inHz(JSON.parse(r.stdout), jsVar), played[format].i);
  });
});
