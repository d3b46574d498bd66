// `gatesmith export PULSE --format F --sample-rate HZ --bits B --full-scale HZ --out FILE`:
// the waveform as the instrument plays it, written in an open format, and what that
// does to the gate on the design's ensemble.
import { ArgumentError, SpecError } from '../core/errors.ts';
import { parseSpec } from '../core/spec.ts';
import { chooseTarget } from '../core/target-choice.ts';
import type { Problem, Pulse } from '../core/types.ts';
import { encodeWaveform, WAVEFORM_FORMATS, type WaveformFormat } from '../io/export/formats.ts';
import type { SampleUnits } from '../io/export/playback.ts';
import { exportReport, type ExportReport, type GateFigures } from '../io/export/report.ts';
import { parseExportSettings, type ExportSettings } from '../io/export/settings.ts';
import { exportWaveform } from '../io/export/waveform.ts';
import { flagValue, optionsHelp, requiredFlag, usageLine, type ArgSpec } from './args.ts';
import { defineCommand } from './command.ts';
import type { CliIO, Command } from './command.ts';
import { checkOutputName, checkWritable, loadSpec, loadWaveform, printWarnings, writeFilesTogether, type FileToWrite } from './files.ts';
import { frequencyWarning } from './unit-warnings.ts';
import { formatFrequency, formatInfidelity, formatMemberAt, formatTime } from './format.ts';

/** The file-name extensions that fit each format (an output named otherwise with a known extension is refused). */
const FORMAT_EXTENSIONS: Record<WaveformFormat, string[]> = {
  csv: ['.csv'],
  npy: ['.npy'],
  raw: ['.bin', '.raw', '.i16', '.dat'],
  wav: ['.wav'],
  json: ['.json'],
};

/** Flag of each settings field, so that a bad value is reported under the name the user typed. */
const FLAG_OF: Record<string, string> = {
  sampleRate: '--sample-rate',
  bits: '--bits',
  fullScale: '--full-scale',
  granularity: '--granularity',
  minLength: '--min-length',
  maxLength: '--max-length',
  pad: '--pad',
  intermediateFrequency: '--if',
  sideband: '--sideband',
  mixerSign: '--mixer-sign',
  upconversion: '--upconversion',
  resample: '--resample',
  peakLimit: '--peak-limit',
};

const ARGS: ArgSpec = {
  command: 'export',
  positionals: ['PULSE'],
  flags: [
    { name: 'format', value: WAVEFORM_FORMATS.join('|'), help: 'file format (required)' },
    { name: 'sample-rate', value: 'HZ', help: 'instrument sample rate in Hz (required)' },
    { name: 'bits', value: '12|14|16', help: 'signed DAC resolution (required)' },
    { name: 'full-scale', value: 'HZ', help: 'calibration: Rabi frequency of the full-scale code, Hz (required)' },
    { name: 'out', value: 'FILE', help: 'output file (required); npy and raw also write FILE.json, the description' },
    { name: 'resample', value: 'hold|hold-nearest|linear|average', help: 'when dt is not a whole number of sample periods (default hold)' },
    { name: 'granularity', value: 'N', help: 'pad the length to a multiple of N samples (default 1)' },
    { name: 'min-length', value: 'N', help: 'pad to at least N samples (default 0)' },
    { name: 'max-length', value: 'N', help: "refuse a waveform longer than N samples (the instrument's memory)" },
    { name: 'pad', value: 'before|after|split', help: 'where the zero padding goes (default after)' },
    { name: 'if', value: 'HZ', help: 'single-sideband modulation onto one real channel at this intermediate frequency' },
    { name: 'sideband', value: 'upper|lower', help: 'sideband that carries the pulse with --if (default upper)' },
    { name: 'mixer-sign', value: '1|-1', help: "sign of the Q term, to match the mixer's wiring (default 1)" },
    { name: 'upconversion', value: 'plus|minus', help: 'I and Q channels: the drive at the qubit is I cos + Q sin (plus, default) or I cos - Q sin (minus: Q written negated)' },
    { name: 'marker', help: 'add a marker channel, 1 while the pulse plays' },
    { name: 'peak-limit', value: 'amplitude|per-channel', help: 'what full scale limits (default amplitude sqrt(I^2+Q^2))' },
    { name: 'units', value: 'codes|hz', help: 'csv and npy: DAC codes (default) or quantised values in Hz' },
    { name: 'spec', value: 'SPEC', help: "design spec whose ensemble judges the gate (default: the pulse's metadata.spec)" },
    { name: 'json', help: 'print the report as JSON' },
  ],
};

const HELP = `Export a pulse as the instrument plays it: resampled to its sample rate, zero padded,
optionally single-sideband modulated, quantised to DAC codes, written in an open format.

Usage: ${usageLine(ARGS)}

PULSE is a pulse file (JSON) or any waveform this command wrote. Codes are
round(x / full-scale * (2^(bits-1) - 1)). A pulse whose peak exceeds full scale is refused,
never clipped; with the amplitude limit, rounding I and Q separately may lift the amplitude
by up to sqrt(2)/2 code above full scale (the report says so when it does). The output
never replaces PULSE or SPEC, and an existing output (with its description) is replaced
whole or not at all. The report gives the peak in codes,
the largest quantisation error, the length and padding, and the mean and worst infidelity of
the exported waveform beside the design's on the spec's ensemble.

The qubit sees the designed drive when the signal reaching it is
I cos(2 pi f_d t) + Q sin(2 pi f_d t) at the drive frequency f_d (docs/physics.md section 5).
With two channels, --upconversion says how your mixer combines them: plus (default) writes
Q as designed; minus, for a drive I cos - Q sin, writes Q negated. With --if the single real
channel is s = I cos(2 pi f t) + Q sin(2 pi f t) for the upper sideband and mixer sign 1
(the Q term flips for the lower sideband or mixer sign -1), with t = n / sample-rate from
the file's first sample.

Before playing a waveform, check its peak power, duty cycle and the ratings of amplifiers
and lines against your hardware; your lab's own rules come first.

Options:
${optionsHelp(ARGS)}
`;

/** The `export` subcommand. */
export const exportCommand: Command = defineCommand({
  name: 'export',
  summary: 'write the quantised, padded waveform for an AWG (csv, npy, raw, wav, json)',
  args: ARGS,
  help: HELP,
  async body([pulsePath], flags, io: CliIO): Promise<number> {
    const flag = (name: string): string | undefined => flagValue(flags, name);
    const required = (name: string): string => requiredFlag(flags, name, ARGS);
    const format = required('format') as WaveformFormat;
    if (!WAVEFORM_FORMATS.includes(format)) {
      throw new ArgumentError(`export: --format ${format} is not allowed; one of ${WAVEFORM_FORMATS.join(', ')}`);
    }
    const settings = settingsFromFlags(flag, required, flags.marker === true);
    const out = required('out');
    const units = flag('units') as SampleUnits | undefined;
    if (units !== undefined && units !== 'codes' && units !== 'hz') {
      throw new ArgumentError(`export: --units ${units} is not allowed; codes or hz`);
    }
    checkOutputName(out, '--out', FORMAT_EXTENSIONS[format], `${format} (--format ${format})`);
    const specPath = flag('spec');
    // The input, its description and the spec are never written over (npy and raw also write FILE.json).
    const inputs = [pulsePath, `${pulsePath}.json`, ...(specPath !== undefined ? [specPath] : [])];
    checkWritable(out, '--out', inputs);
    if (format === 'npy' || format === 'raw') checkWritable(`${out}.json`, '--out (its description)', inputs);
    const pulse = await loadWaveform(pulsePath);
    const { problem, note, warnings: specWarnings } = judgingProblem(specPath, pulse);
    const unitWarnings = [
      frequencyWarning('--sample-rate', settings.sampleRate, 1e9, 'GS/s'),
      frequencyWarning('--full-scale', settings.fullScale),
      settings.intermediateFrequency !== undefined ? frequencyWarning('--if', settings.intermediateFrequency) : null,
    ].filter((w): w is string => w !== null);
    const inputWarnings = [...specWarnings, ...unitWarnings];
    printWarnings(io, inputWarnings);

    const waveform = exportWaveform(pulse, settings);
    const encoded = await encodeWaveform(waveform, format, {
      units,
      metadata: pulse.metadata.name !== undefined ? { name: pulse.metadata.name } : {},
    });
    const report = await exportReport(problem, pulse, waveform);
    const sidecar = encoded.sidecar ? `${out}.json` : null;
    const files: FileToWrite[] = [{ path: out, data: encoded.bytes }];
    if (encoded.sidecar && sidecar) files.push({ path: sidecar, data: encoded.sidecar });
    writeFilesTogether(files, '--out');

    if (flags.json) {
      const json = { files: { waveform: out, description: sidecar }, format, units: encoded.units, ...report, warnings: [...inputWarnings, ...report.warnings] };
      io.stdout(JSON.stringify(json, null, 2) + '\n');
    } else {
      io.stdout(reportText(report, { out, sidecar, format, units: encoded.units, problem, note }));
    }
    return 0;
  },
});

/** Export settings from the flags; a bad value is reported under its flag's name. */
function settingsFromFlags(
  flag: (name: string) => string | undefined,
  required: (name: string) => string,
  marker: boolean,
): ExportSettings {
  const num = (name: string, text: string | undefined): number | undefined => {
    if (text === undefined) return undefined;
    const v = Number(text);
    if (text.trim() === '' || !Number.isFinite(v)) throw new ArgumentError(`export: --${name} ${text} is not a number`);
    return v;
  };
  const intermediateFrequency = num('if', flag('if'));
  const input: Record<string, unknown> = {
    sampleRate: num('sample-rate', required('sample-rate')),
    bits: num('bits', required('bits')),
    fullScale: num('full-scale', required('full-scale')),
    granularity: num('granularity', flag('granularity')),
    minLength: num('min-length', flag('min-length')),
    maxLength: num('max-length', flag('max-length')),
    pad: flag('pad'),
    resample: flag('resample'),
    peakLimit: flag('peak-limit'),
    channels: intermediateFrequency === undefined ? 'iq' : 'ssb',
    intermediateFrequency,
    sideband: flag('sideband'),
    mixerSign: num('mixer-sign', flag('mixer-sign')),
    upconversion: flag('upconversion'),
    marker,
  };
  if (intermediateFrequency !== undefined && flag('upconversion') !== undefined) {
    throw new ArgumentError('export: --upconversion goes with two channels I and Q; with --if, --sideband and --mixer-sign set the sign of Q');
  }
  if (intermediateFrequency === undefined && (flag('sideband') !== undefined || flag('mixer-sign') !== undefined)) {
    throw new ArgumentError('export: --sideband and --mixer-sign go with --if (single-sideband modulation)');
  }
  for (const key of Object.keys(input)) if (input[key] === undefined) delete input[key];
  try {
    return parseExportSettings(input);
  } catch (error) {
    if (error instanceof SpecError && FLAG_OF[error.field]) {
      throw new ArgumentError(`export: ${FLAG_OF[error.field]}${error.message.slice(error.field.length)}`);
    }
    throw error;
  }
}

/**
 * The problem whose ensemble judges the gate: --spec, else the pulse's own spec, else none
 * (with a note why); its target is the one the app judges the pulse against (target-choice.ts).
 */
function judgingProblem(specPath: string | undefined, pulse: Pulse): { problem: Problem | null; note: string; warnings: string[] } {
  const judged = (problem: Problem, note: string, warnings: string[] = []) => {
    const choice = chooseTarget(problem.target, pulse);
    return { problem: { ...problem, target: choice.targetUsed }, note: choice.targetNote ? `${note} (${choice.targetNote})` : note, warnings };
  };
  if (specPath !== undefined) {
    const spec = loadSpec(specPath);
    return judged(spec.problem, `the ensemble of ${specPath}`, spec.warnings);
  }
  if (pulse.metadata.spec !== undefined) {
    let problem: Problem;
    try {
      problem = parseSpec(pulse.metadata.spec);
    } catch (error) {
      const reason = error instanceof Error ? error.message : String(error);
      return { problem: null, note: `the pulse's metadata.spec is not a valid spec (${reason}); give --spec SPEC to evaluate the gate`, warnings: [] };
    }
    return judged(problem, "the ensemble of the pulse's metadata.spec");
  }
  return { problem: null, note: 'the pulse carries no spec; give --spec SPEC to evaluate the gate', warnings: [] };
}

interface TextContext {
  out: string;
  sidecar: string | null;
  format: WaveformFormat;
  units: SampleUnits;
  problem: Problem | null;
  note: string;
}

/** The human-readable report. */
export function reportText(r: ExportReport, c: TextContext): string {
  const d = r.description;
  const percent = (x: number) => `${Number((100 * x).toPrecision(4))} %`;
  const lines = [
    `wrote ${c.out} (${c.format}, ${c.units === 'codes' ? 'DAC codes' : 'values in Hz'})${c.sidecar ? ` and its description ${c.sidecar}` : ''}`,
    `samples       ${d.length} at ${formatFrequency(d.sampleRateHz)} (${formatTime(r.durationS.total)}): pulse ${r.samples.pulse} ` +
      `(${formatTime(r.durationS.pulse)}; design ${formatTime(r.durationS.design)}), padding ${d.padBefore} before, ${d.padAfter} after ` +
      `(granularity ${d.granularity}, min length ${d.minLength})`,
    `resample      ${d.resample}${r.holdSamples !== null ? ` (${r.holdSamples} samples per design sample of ${formatTime(d.designDtS)})` : ` (design dt ${formatTime(d.designDtS)} is ${Number((d.designDtS * d.sampleRateHz).toPrecision(6))} samples)`}`,
    `channels      ${d.channels.join(', ')}` +
      (d.layout === 'ssb'
        ? `; single sideband at ${formatFrequency(d.intermediateFrequencyHz)}, ${d.sideband} sideband, mixer sign ${d.mixerSign > 0 ? '+1' : '-1'}`
        : `; upconversion ${d.upconversion}${d.upconversion === 'minus' ? ' (Q written negated)' : ''}`),
    `drive         ${d.driveAtQubit}`,
    `DAC           ${d.bits} bits, full-scale code ${d.codeMax} = ${formatFrequency(d.fullScaleHz)} (limit on ${d.peakLimit})`,
    `peak          code ${r.peak.code} (${percent(r.peak.code / r.peak.codeMax)} of full scale); amplitude ${formatFrequency(r.peak.hz)} ` +
      `(design ${formatFrequency(r.peak.designHz)})`,
    `quantisation  step ${formatFrequency(r.quantisation.stepHz)}; largest error ${formatFrequency(r.quantisation.maxErrorHz)} ` +
      `(${Number(r.quantisation.maxErrorCodes.toPrecision(3))} code)`,
  ];
  if (r.gate && c.problem) {
    const row = (label: string, g: GateFigures) =>
      `  ${label.padEnd(22)}${formatInfidelity(g.meanInfidelity).padStart(10)}${formatInfidelity(g.worstInfidelity).padStart(12)}` +
      `   at ${formatMemberAt(g.worstMember)}`;
    lines.push(
      `gate (1 - F) on ${c.note}, ${c.problem.members.length} members:`,
      `  ${''.padEnd(22)}${'mean'.padStart(10)}${'worst'.padStart(12)}`,
      row('design', r.gate.design),
      row('exported, as played', r.gate.exported),
      row('exported, pulse only', r.gate.exportedPulseOnly),
    );
    if (r.gate.withoutLine) {
      lines.push(
        `  the figures above are through the spec's line; without it (what ignoring the line would show):`,
        row('design, no line', r.gate.withoutLine.design),
        row('exported, no line', r.gate.withoutLine.exported),
      );
    }
  } else {
    lines.push(`gate          not evaluated: ${c.note}`);
  }
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  lines.push(
    "Before playing it: check peak power, duty cycle and the ratings of amplifiers and lines; your lab's own rules come first.",
    '',
  );
  return lines.join('\n');
}
