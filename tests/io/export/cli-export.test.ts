// Tests of src/cli/export.ts and src/io/export/read-file.ts: the command writes each format,
// readWaveformFile reads every one back (finding the description beside npy and raw), and the
// gate figures it prints agree with the reference propagator (tests/reference/oracle.ts) run
// on the file read back, and with the closed form sin^2(theta e / 2) of a rectangular pulse.
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { exportCommand } from '../../../src/cli/export.ts';
import type { CliIO } from '../../../src/cli/command.ts';
import { ArgumentError, ExportError } from '../../../src/core/errors.ts';
import { parseSpec } from '../../../src/core/spec.ts';
import { writePulse } from '../../../src/io/pulse.ts';
import { readWaveformFile } from '../../../src/io/export/read-file.ts';
import { expectClose } from '../../reference/tolerance.ts';
import { oracleEvaluator, rectangular } from './helpers.ts';

const dir = mkdtempSync(join(tmpdir(), 'gatesmith-export-'));
const theta = Math.PI / 2;
const duration = 100e-9;
const spec = {
  name: 'cli-export-test',
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration,
  segments: 10,
  rabiMax: 1e7,
  ensemble: { amplitudeError: { min: -0.05, max: 0.05, points: 3 } },
};
const specPath = join(dir, 'spec.json');
writeFileSync(specPath, JSON.stringify(spec));
const design = rectangular(theta / (2 * Math.PI * duration), 10, duration / 10); // X(90): 2.5 MHz for 100 ns
const pulsePath = join(dir, 'pulse.json');
writeFileSync(pulsePath, writePulse(design));

function collector(): CliIO & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { out, err, stdout: (t) => void out.push(t), stderr: (t) => void err.push(t), isTTY: false };
}

const common = ['--sample-rate', '1e9', '--bits', '14', '--full-scale', '1.2e7', '--spec', specPath];

describe('gatesmith export', () => {
  for (const [format, file, extra] of [
    ['csv', 'x.csv', ['--marker', '--granularity', '64']],
    ['csv', 'xh.csv', ['--units', 'hz']],
    ['npy', 'x.npy', ['--pad', 'split', '--granularity', '48']],
    ['raw', 'x.bin', ['--marker']],
    ['wav', 'x.wav', ['--if', '1.25e8', '--sideband', 'lower']],
    ['json', 'x.json', ['--min-length', '128', '--pad', 'before']],
    ['csv', 'xm.csv', ['--upconversion', 'minus']],
  ] as const) {
    it(`--format ${format} ${extra.join(' ')}: the file reads back, and the printed figures are those of the file`, async () => {
      const io = collector();
      const out = join(dir, file);
      const code = await exportCommand.run([pulsePath, '--format', format, ...extra, ...common, '--out', out, '--json'], io);
      expect(code).toBe(0);
      const report = JSON.parse(io.out.join('')) as {
        files: { waveform: string; description: string | null };
        gate: { design: { meanInfidelity: number }; exported: { meanInfidelity: number; worstInfidelity: number } };
        samples: { total: number };
      };
      expect(report.files.waveform).toBe(out);
      expect(report.files.description !== null).toBe(format === 'npy' || format === 'raw');
      if (report.files.description) expect(existsSync(report.files.description)).toBe(true);
      const played = await readWaveformFile(out);
      expect(played.i.length).toBe(report.samples.total);
      const problem = parseSpec(spec);
      const reference = await oracleEvaluator(problem.target, problem.members)(played);
      expectClose(report.gate.exported.meanInfidelity, reference.meanInfidelity, { rel: 1e-9 }, 'mean infidelity of the file');
      expectClose(report.gate.exported.worstInfidelity, reference.worstInfidelity, { rel: 1e-9 }, 'worst infidelity of the file');
    });
  }

  it('prints the closed form of the quantisation effect for the ideal member (16 bits, two channels)', async () => {
    // 2.5 MHz of 12 MHz full scale at 16 bits is 6826.4583 codes -> 6826: e = 6826 / 6826.4583 - 1.
    const io = collector();
    const out = join(dir, 'closed.csv');
    const oneMember = join(dir, 'one-member.json');
    writeFileSync(oneMember, JSON.stringify({ ...spec, ensemble: { detuning: { values: [0] } } }));
    const code = await exportCommand.run([pulsePath, '--format', 'csv', '--sample-rate', '1e9', '--bits', '16', '--full-scale', '1.2e7', '--spec', oneMember, '--out', out, '--json'], io);
    expect(code).toBe(0);
    const report = JSON.parse(io.out.join('')) as { gate: { exported: { meanInfidelity: number } }; peak: { code: number } };
    const exact = (2.5e6 / 1.2e7) * 32767;
    expect(report.peak.code).toBe(Math.round(exact));
    const e = Math.round(exact) / exact - 1;
    expectClose(report.gate.exported.meanInfidelity, Math.sin((theta * e) / 2) ** 2, { rel: 1e-6 }, 'sin^2(theta e / 2)');
  });

  it('prints a readable report with the safety reminder', async () => {
    const io = collector();
    const code = await exportCommand.run([pulsePath, '--format', 'csv', ...common, '--granularity', '64', '--out', join(dir, 'text.csv')], io);
    expect(code).toBe(0);
    const text = io.out.join('');
    expect(text).toMatch(/samples +128 at 1 GHz/);
    expect(text).toMatch(/padding 0 before, 28 after/);
    expect(text).toMatch(/exported, as played/);
    expect(text).toMatch(/check peak power, duty cycle and the ratings of amplifiers and lines/);
  });

  it('refuses a peak above full scale and writes nothing', async () => {
    const out = join(dir, 'refused.csv');
    const run = exportCommand.run([pulsePath, '--format', 'csv', '--sample-rate', '1e9', '--bits', '14', '--full-scale', '2e6', '--out', out], collector());
    await expect(run).rejects.toThrow(ExportError);
    await expect(exportCommand.run([pulsePath, '--format', 'csv', '--sample-rate', '1e9', '--bits', '14', '--full-scale', '2e6', '--out', out], collector())).rejects.toThrow(
      /reaches 2500000 Hz .* above the full scale of 2000000 Hz/,
    );
    expect(existsSync(out)).toBe(false);
  });

  it('names the flag of a bad setting, and a missing required flag', async () => {
    const out = join(dir, 'bad.csv');
    await expect(exportCommand.run([pulsePath, '--format', 'csv', '--sample-rate', '1e9', '--bits', '10', '--full-scale', '1e7', '--out', out], collector())).rejects.toThrow(
      /--bits: 10 is not allowed; one of 12, 14, 16/,
    );
    await expect(exportCommand.run([pulsePath, '--format', 'csv', '--bits', '16', '--full-scale', '1e7', '--out', out], collector())).rejects.toThrow(ArgumentError);
    await expect(exportCommand.run([pulsePath, '--format', 'mat', ...common, '--out', out], collector())).rejects.toThrow(/--format mat is not allowed/);
    await expect(exportCommand.run([pulsePath, '--format', 'csv', ...common, '--upconversion', 'inverted', '--out', out], collector())).rejects.toThrow(
      /--upconversion: "inverted" is not allowed; one of "plus", "minus"/,
    );
    await expect(exportCommand.run([pulsePath, '--format', 'csv', ...common, '--if', '1e8', '--upconversion', 'minus', '--out', out], collector())).rejects.toThrow(
      /--upconversion goes with two channels I and Q/,
    );
  });

  it('states the drive at the qubit: upconversion minus writes Q negated and says so', async () => {
    const io = collector();
    const out = join(dir, 'minus.csv');
    const shifted = join(dir, 'phase.json');
    // X(90) about the axis at 60 degrees: Q = sqrt(3)/2 of the amplitude.
    writeFileSync(shifted, writePulse(rectangular(2.5e6, 10, 1e-8, Math.PI / 3)));
    expect(await exportCommand.run([shifted, '--format', 'csv', ...common, '--upconversion', 'minus', '--out', out], io)).toBe(0);
    const text = io.out.join('');
    expect(text).toMatch(/channels +i, q; upconversion minus \(Q written negated\)/);
    expect(text).toMatch(/drive +I cos\(2 pi f_d t\) - Q_channel sin\(2 pi f_d t\)/);
    const csv = readFileSync(out, 'utf8').split('\n');
    const row = csv.find((l) => /^\d/.test(l))!.split(',');
    // 2.5 MHz at 60 degrees of 12 MHz full scale: Q = 2.165 MHz is 1477.7 codes, written as -1478.
    expect(Number(row[2])).toBe(-Math.round(((2.5e6 * Math.sin(Math.PI / 3)) / 1.2e7) * 8191));
    const played = await readWaveformFile(out);
    expect(played.q[0]).toBeCloseTo(2.5e6 * Math.sin(Math.PI / 3), -3);
  });

  it('readWaveformFile also takes the description file of a raw export, and bytes with a name', async () => {
    const out = join(dir, 'desc.bin');
    await exportCommand.run([pulsePath, '--format', 'raw', ...common, '--out', out], collector());
    const viaDescription = await readWaveformFile(`${out}.json`);
    const viaData = await readWaveformFile(out);
    expect(Array.from(viaDescription.i)).toEqual(Array.from(viaData.i));
    const csv = join(dir, 'x.csv');
    const fromBytes = await readWaveformFile({ bytes: new Uint8Array(readFileSync(csv)), name: 'x.csv' }, { unpad: true });
    expect(fromBytes.i.length).toBe(100);
  });
});
