// The export panel's form logic (src/app/export-form.ts): its defaults, the settings it hands
// the library, the library's own messages passed through, the file names of the README's
// conventions, and the command line it shows: run here in-process (src/cli/main.ts), that
// command writes the very bytes the panel downloads (issue 5: the app's file equals the
// command line's byte for byte).
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { demoSpec } from '../../src/app/demo.ts';
import {
  checkExportForm,
  commandArgs,
  currentExportForm,
  defaultExportForm,
  defaultSampleRate,
  exportedEntry,
  exportFileNames,
  exportKey,
  exportSampleRate,
  exportSettingsInput,
  fileMetadata,
  fileStem,
  refusalField,
  unitsFor,
  type ExportForm,
} from '../../src/app/export-form.ts';
import { specLimits } from '../../src/app/spec-limits.ts';
import { defaultSettings, parseProject, PROJECT_FORMAT, PROJECT_VERSION, projectText } from '../../src/app/project.ts';
import type { CliIO } from '../../src/cli/command.ts';
import { main } from '../../src/cli/main.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Pulse } from '../../src/core/types.ts';
import { encodeWaveform, exportReport, exportWaveform, parseExportSettings, samplesToPulse, waveformSamples } from '../../src/io/export/index.ts';
import { writePulse } from '../../src/io/pulse.ts';

const problem = parseSpec(demoSpec());
const dir = mkdtempSync(join(tmpdir(), 'gatesmith-export-form-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A pulse of the demo's shape (100 samples of 2 ns) using both quadratures, peak 9.2 MHz. */
function lobe(): Pulse {
  const i = new Float64Array(100).map((_, k) => 9e6 * Math.sin((Math.PI * (k + 0.5)) / 100));
  const q = new Float64Array(100).map((_, k) => 2e6 * Math.cos((2 * Math.PI * (k + 0.5)) / 100));
  return { dt: problem.dt, i, q, metadata: { name: 'lobe', origin: 'import' } };
}

const form = (patch: Partial<ExportForm> = {}): ExportForm => ({ ...defaultExportForm(lobe(), problem.rabiMax), ...patch });

function silent(): CliIO & { err: string[] } {
  const err: string[] = [];
  return { err, stdout: () => undefined, stderr: (t) => void err.push(t), isTTY: false };
}

describe('the first form for a pulse', () => {
  it('holds the demo 2 ns samples for 2 samples at 1 GS/s, full scale at the peak Rabi frequency', () => {
    const f = defaultExportForm(lobe(), problem.rabiMax);
    expect(f).toMatchObject({ sampleRate: 1e9, bits: 14, fullScale: 1e7, resample: 'hold', format: 'csv', units: 'codes', maxLength: null });
    const check = checkExportForm(f);
    expect(check.ok).toBe(true);
    // 200 ns at 1 GS/s is 200 samples (no padding with the library's defaults).
    expect(exportWaveform(lobe(), exportSettingsInput(f)).description.length).toBe(200);
  });
  it('takes one sample per design sample when dt is not whole nanoseconds, and full scale above a pulse that peaks over the limit', () => {
    const pulse = { ...lobe(), dt: 0.7e-9 };
    const f = defaultExportForm(pulse, 5e6);
    expect(f.sampleRate).toBe(1 / 0.7e-9);
    // The pulse peaks at 9.2182 MHz: rounded up to two significant digits, 9.3 MHz.
    expect(f.fullScale).toBe(9.3e6);
    expect(exportWaveform(pulse, exportSettingsInput(f)).holdSamples).toBe(1);
  });
});

describe('the sample rate of the instrument the spec describes', () => {
  // examples/transmon-x180-fast.json: 48 samples in 20 ns, "at the 2.4 GS/s of the lab's waveform generator".
  const fast = parseSpec(JSON.parse(readFileSync(new URL('../../examples/transmon-x180-fast.json', import.meta.url), 'utf8')));
  const periodWarnings = (rate: number) => specLimits(fast, rate).warnings.filter((w) => w.field === 'dt');

  it('is 2.4 GS/s for the fast example (one instrument sample per 416.67 ps sample) and 1 GS/s for whole nanoseconds', () => {
    expect(fast.dt).toBeCloseTo(20e-9 / 48, 22);
    expect(defaultSampleRate(fast.dt)).toBeCloseTo(2.4e9, 3);
    expect(defaultSampleRate(problem.dt)).toBe(1e9);
    expect(defaultExportForm(lobe(), problem.rabiMax, fast.dt).sampleRate).toBe(defaultSampleRate(fast.dt));
  });

  it('follows the spec until the user types a rate; the form warns only about a rate the user chose', () => {
    // Nothing chosen: no warning about the period (the export holds every sample once).
    expect(periodWarnings(exportSampleRate(undefined, fast.dt))).toEqual([]);
    // Another field edited: the rate still follows the spec's period.
    const edited = { ...form({ bits: 16 }), sampleRate: 1e9 };
    expect(currentExportForm(edited, () => form(), fast.dt).sampleRate).toBe(defaultSampleRate(fast.dt));
    expect(exportSampleRate(edited, fast.dt)).toBe(defaultSampleRate(fast.dt));
    // 1 GS/s typed: 416.67 ps is 0.41667 of its periods, which the instrument cannot hold.
    const typed = { ...edited, sampleRateByHand: true };
    expect(currentExportForm(typed, () => form(), fast.dt).sampleRate).toBe(1e9);
    const warned = periodWarnings(exportSampleRate(typed, fast.dt));
    expect(warned.map((w) => w.message)).toEqual([expect.stringContaining('0.41667 periods of the export')]);
    // A rate the user typed that holds the period (4.8 GS/s: two instrument samples each) is not warned about.
    expect(periodWarnings(exportSampleRate({ ...typed, sampleRate: 4.8e9 }, fast.dt))).toEqual([]);
  });

  it('keeps the rate of a project saved before the choice was recorded', () => {
    const { sampleRateByHand: _dropped, ...older } = { ...defaultExportForm(null, 1e7), sampleRate: 1e9 };
    const text = JSON.stringify({ format: PROJECT_FORMAT, version: PROJECT_VERSION, spec: demoSpec(), pulses: [], settings: { ...defaultSettings(), export: older } });
    expect(parseProject(text).settings.export).toMatchObject({ sampleRate: 1e9, sampleRateByHand: true });
  });
});

describe('the settings handed to the library', () => {
  it('sends the SSB settings only for a single-sideband channel, and no maxLength for no limit', () => {
    const iq = exportSettingsInput(form({ sideband: 'lower', mixerSign: -1, intermediateFrequency: 2e8 }));
    expect(iq).not.toHaveProperty('intermediateFrequency');
    expect(iq).not.toHaveProperty('sideband');
    expect(iq).not.toHaveProperty('mixerSign');
    expect(iq).not.toHaveProperty('maxLength');
    const ssb = exportSettingsInput(form({ channels: 'ssb', sideband: 'lower', mixerSign: -1, intermediateFrequency: 2e8, maxLength: 4096 }));
    expect(ssb).toMatchObject({ channels: 'ssb', sideband: 'lower', mixerSign: -1, intermediateFrequency: 2e8, maxLength: 4096 });
    // The upconversion convention belongs to the two I/Q channels (docs/physics.md section 5).
    expect(exportSettingsInput(form({ upconversion: 'minus' }))).toMatchObject({ upconversion: 'minus' });
    expect(exportSettingsInput(form({ channels: 'ssb', upconversion: 'minus' }))).not.toHaveProperty('upconversion');
  });
  it("passes on the library's SpecError field, its message told with the form's labels and units", () => {
    // The messages of src/io/export/settings.ts: field, value, what is allowed.
    expect(checkExportForm(form({ granularity: 0 }))).toEqual({
      ok: false,
      field: 'granularity',
      message: 'Granularity: 0 is not allowed; a whole number of samples >= 1 (the block size)',
    });
    const nyquist = checkExportForm(form({ channels: 'ssb', intermediateFrequency: 6e8 }));
    expect(nyquist.ok === false && nyquist.field).toBe('intermediateFrequency');
    expect(nyquist.ok === false && nyquist.message).toMatch(/^IF: 600 MHz is not allowed; .*0 < f < Sample rate\/2 = 500 MHz \(Nyquist\)/);
    expect(checkExportForm(form({ maxLength: 8, granularity: 16 }))).toMatchObject({ ok: false, field: 'maxLength' });
  });
  it('offers only the units a format can hold (README: raw and WAV hold codes, the pulse JSON Hz)', () => {
    expect(unitsFor({ format: 'csv', units: 'hz' })).toBe('hz');
    expect(unitsFor({ format: 'npy', units: 'hz' })).toBe('hz');
    expect(unitsFor({ format: 'raw', units: 'hz' })).toBe('codes');
    expect(unitsFor({ format: 'wav', units: 'hz' })).toBe('codes');
    expect(unitsFor({ format: 'json', units: 'codes' })).toBe('hz');
  });
  it('places each refusal of the library at the form field it names', () => {
    const refusal = (settings: Partial<ExportForm>) => {
      try {
        exportWaveform(lobe(), exportSettingsInput(form(settings)));
      } catch (error) {
        return refusalField((error as Error).message);
      }
      throw new Error('expected a refusal');
    };
    expect(refusal({ fullScale: 8e6 })).toBe('fullScale');
    expect(refusal({ sampleRate: 2.4e9 })).toBe('resample');
    expect(refusal({ maxLength: 100 })).toBe('maxLength');
    expect(refusal({ channels: 'ssb', sampleRate: 5e8, intermediateFrequency: 1e8 })).toBe('channels');
    expect(refusalField('pulse.dt: 0 is not allowed')).toBeNull();
  });
});

describe('file names (README "Formats": the description of npy and raw is FILE.json)', () => {
  it('makes a plain stem of a label and drops a pulse file\'s own extension', () => {
    expect(fileStem('transmon-x90 #1 (11:13:33 PM)')).toBe('transmon-x90_1_11_13_33_PM');
    expect(fileStem('lobe.json')).toBe('lobe');
    expect(fileStem('x90.pulse.json')).toBe('x90');
    expect(fileStem('···')).toBe('pulse');
  });
  it('names the file, its description and the pulse JSON', () => {
    expect(exportFileNames('x90', 'npy')).toEqual({ pulse: 'x90.pulse.json', file: 'x90.npy', sidecar: 'x90.npy.json' });
    expect(exportFileNames('x90', 'raw')).toEqual({ pulse: 'x90.pulse.json', file: 'x90.bin', sidecar: 'x90.bin.json' });
    expect(exportFileNames('x90', 'wav').sidecar).toBeNull();
    expect(exportFileNames('x90', 'csv').file).toBe('x90.csv');
  });
});

describe('the command line the panel shows', () => {
  const pulse = lobe();
  const pulsePath = join(dir, 'lobe.pulse.json');
  writeFileSync(pulsePath, writePulse(pulse));
  const forms: Array<[string, Partial<ExportForm>]> = [
    ['csv codes, defaults', {}],
    ['csv, I/Q with SSB settings left over from an earlier choice', { sideband: 'lower', mixerSign: -1, intermediateFrequency: 3e8 }],
    ['csv, I/Q for a mixer whose drive is I cos - Q sin', { upconversion: 'minus' }],
    ['raw, single sideband with an upconversion left over from I/Q', { format: 'raw', channels: 'ssb', intermediateFrequency: 2.5e8, upconversion: 'minus' }],
    ['csv in Hz, padded before to 256, 16 bits', { format: 'csv', units: 'hz', minLength: 256, pad: 'before', bits: 16 }],
    ['npy with a marker, split padding to blocks of 48', { format: 'npy', marker: true, granularity: 48, pad: 'split', fullScale: 1.2e7 }],
    ['raw, lower sideband, mixer sign -1, at 2 GS/s', { format: 'raw', channels: 'ssb', intermediateFrequency: 2.5e8, sideband: 'lower', mixerSign: -1, sampleRate: 2e9 }],
    ['wav, 12 bits, per-channel limit', { format: 'wav', bits: 12, peakLimit: 'per-channel', fullScale: 9.5e6 }],
    ['json resampled by averaging to 2.4 GS/s, at most 1024 samples', { format: 'json', resample: 'average', sampleRate: 2.4e9, maxLength: 1024 }],
  ];
  for (const [name, patch] of forms) {
    it(`writes the panel's bytes: ${name}`, async () => {
      const f = form(patch);
      const names = exportFileNames('lobe', f.format);
      const out = join(dir, names.file);
      const io = silent();
      const args = commandArgs(f, pulsePath, out);
      expect(await main(args, io), io.err.join('')).toBe(0);
      // What the panel downloads: the worker's encodeWaveform of the same settings.
      const panel = await encodeWaveform(exportWaveform(pulse, exportSettingsInput(f)), f.format, { units: unitsFor(f), metadata: fileMetadata(pulse) });
      expect(Buffer.from(panel.bytes).equals(readFileSync(out))).toBe(true);
      if (names.sidecar) expect(Buffer.from(panel.sidecar!).equals(readFileSync(`${out}.json`))).toBe(true);
      else expect(panel.sidecar).toBeNull();
    });
  }
  it('leaves out flags at their defaults', () => {
    expect(commandArgs(form(), 'p.json', 'p.csv')).toEqual(['export', 'p.json', '--format', 'csv', '--sample-rate', '1000000000', '--bits', '14', '--full-scale', '10000000', '--out', 'p.csv']);
  });
});

describe('the exported waveform as a pulse of the session', () => {
  it('is the waveform as played, judged against the source\'s ideal, with the figures of the report', async () => {
    const composite: Pulse = { ...lobe(), metadata: { name: 'BB1', origin: 'composite', ideal: problem.target } };
    const settings = parseExportSettings(exportSettingsInput(form({ granularity: 64 })));
    const waveform = exportWaveform(composite, settings);
    const report = await exportReport(problem, composite, waveform);
    const played = samplesToPulse(waveformSamples(waveform, 'codes'));
    const key = exportKey('composite-1', settings);
    const entry = exportedEntry({ id: 'composite-1', label: 'BB1', pulse: composite }, { report, played }, 'export-1', key);
    expect(entry.label).toBe('BB1 · exported 1 GS/s, 14 bit');
    expect(entry.pulse.i).toHaveLength(256);
    expect(entry.pulse.dt).toBe(1e-9);
    expect(entry.pulse.metadata).toMatchObject({ origin: 'export', ideal: problem.target, exportKey: key, name: 'BB1 as exported (1 GS/s, 14 bit)' });
    expect(entry.evaluation).toEqual({ meanInfidelity: report.gate!.exported.meanInfidelity, worstInfidelity: report.gate!.exported.worstInfidelity });
    expect(exportKey('composite-1', parseExportSettings(exportSettingsInput(form({ granularity: 64 }))))).toBe(key);
    expect(exportKey('composite-1', parseExportSettings(exportSettingsInput(form({ granularity: 32 }))))).not.toBe(key);
  });
});

describe('the form in the project file', () => {
  const withForm = (exportForm: unknown) => ({
    format: PROJECT_FORMAT,
    version: PROJECT_VERSION,
    savedAt: '2025-01-01T00:00:00.000Z',
    spec: demoSpec(),
    pulses: [],
    settings: { ...defaultSettings(), export: exportForm },
  });
  it('reads back what was written, no limit included', () => {
    const f = form({ format: 'npy', maxLength: null, channels: 'ssb', mixerSign: -1 });
    expect(parseProject(projectText(withForm(f) as never)).settings.export).toEqual(f);
  });
  it('refuses a malformed form, naming the field', () => {
    expect(() => parseProject(withForm({ ...form(), bits: 13 }))).toThrow('"settings.export.bits" is 13; expected one of 12, 14, 16');
    expect(() => parseProject(withForm({ ...form(), sampleRate: -1 }))).toThrow('"settings.export.sampleRate" is -1');
    expect(() => parseProject(withForm({ ...form(), marker: 'yes' }))).toThrow('"settings.export.marker"');
  });
});

describe('exportLengthRefusal', () => {
  it('refuses a sample rate that makes the file longer than the page can hold, in engineering units', async () => {
    const { exportLengthRefusal, MAX_EXPORT_SAMPLES } = await import('../../src/app/export-form.ts');
    const pulse = { dt: 2e-9, i: new Float64Array(100) };
    // 200 ns at 1 GS/s: 200 samples.
    expect(exportLengthRefusal({ sampleRate: 1e9 }, pulse)).toBeNull();
    const refused = exportLengthRefusal({ sampleRate: 1e30 }, pulse)!;
    expect(refused.field).toBe('sampleRate');
    // 200 ns x 1e30 /s = 2e23 samples; the largest rate is 2^24 / 200 ns = 8.39e13 S/s.
    expect(refused.message).toBe(`Sample rate: 1e21 GS/s would give 2.00e+23 samples for this 200 ns pulse; the page exports at most ${MAX_EXPORT_SAMPLES} samples a channel (83900 GS/s at most for this pulse)`);
  });
});
