// The export panel's settings as the page keeps them: every field of the library's
// ExportSettings plus the file's format and units, in Hz and samples. The library's own
// validator (parseExportSettings) judges them; this module only shapes them for it, names
// the files, writes the equivalent command line, and turns an export into a session pulse.
import type { Pulse, PulseMetadata } from '../core/types.ts';
import {
  EXPORT_DEFAULTS,
  FORMAT_FILES,
  FORMAT_UNITS,
  parseExportSettings,
  type ExportSettings,
  type ExportSettingsInput,
  type SampleUnits,
  type WaveformFormat,
} from '../io/export/index.ts';
import { samplesPerSegment } from '../io/export/resample.ts';
import type { ExportPreview } from '../worker/protocol.ts';
import type { PulseEntry } from './state/session.svelte.ts';
import { inFormWords, type FieldWords } from './spec-limits.ts';
import { formatQuantity, roundUpTwoDigits } from './units.ts';

/**
 * What the export form holds: the library's settings (Hz, samples) with `maxLength` null for
 * no limit, and the file's format and units. The SSB settings are kept while channels is
 * 'iq' (so that switching back restores them), but only sent for 'ssb'.
 */
export type ExportForm = Omit<ExportSettings, 'maxLength'> & {
  maxLength: number | null;
  format: WaveformFormat;
  units: SampleUnits;
  /** True once the user typed a sample rate; until then it follows the spec's sample period (defaultSampleRate). */
  sampleRateByHand: boolean;
};

/** A common AWG sample rate (1 GS/s), used first when the design's dt is a whole number of its periods. */
export const DEFAULT_SAMPLE_RATE = 1e9;

/** The largest drive amplitude sqrt(I^2 + Q^2) of a pulse (Hz). */
export function peakAmplitude(pulse: Pick<Pulse, 'i' | 'q'>): number {
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  return peak;
}

/**
 * The instrument a sample period describes: 1 GS/s when the period is a whole number of
 * nanoseconds, else one instrument sample per design sample (416.67 ps: 2.4 GS/s).
 */
export function defaultSampleRate(dt: number): number {
  return samplesPerSegment(dt, DEFAULT_SAMPLE_RATE).whole !== null ? DEFAULT_SAMPLE_RATE : 1 / dt;
}

/**
 * A first form for a pulse: the sample rate of the instrument the spec's sample period
 * describes (`dt`; the pulse's own without a spec), 14 bits, full scale at the spec's peak
 * Rabi frequency (or the pulse's peak, rounded up, when that is higher), the library's
 * defaults for the rest, CSV codes.
 */
export function defaultExportForm(pulse: Pick<Pulse, 'dt' | 'i' | 'q'> | null, rabiMax: number | null, dt = pulse?.dt ?? 1e-9): ExportForm {
  const peak = pulse ? peakAmplitude(pulse) : 0;
  const limit = rabiMax !== null && rabiMax > 0 ? rabiMax : 0;
  const fullScale = peak > limit ? roundUpTwoDigits(peak) : limit || 1e7;
  return {
    sampleRate: defaultSampleRate(dt),
    sampleRateByHand: false,
    resample: EXPORT_DEFAULTS.resample,
    bits: 14,
    fullScale,
    peakLimit: EXPORT_DEFAULTS.peakLimit,
    granularity: EXPORT_DEFAULTS.granularity,
    minLength: EXPORT_DEFAULTS.minLength,
    maxLength: null,
    pad: EXPORT_DEFAULTS.pad,
    channels: EXPORT_DEFAULTS.channels,
    intermediateFrequency: 1e8,
    sideband: EXPORT_DEFAULTS.sideband,
    mixerSign: EXPORT_DEFAULTS.mixerSign,
    upconversion: EXPORT_DEFAULTS.upconversion,
    marker: EXPORT_DEFAULTS.marker,
    format: 'csv',
    units: 'codes',
  };
}

/**
 * The form the export uses: the one kept (once edited) or the first form, its sample rate
 * following the spec's sample period `dt` until the user types one.
 */
export function currentExportForm(kept: ExportForm | undefined, first: () => ExportForm, dt: number | null): ExportForm {
  if (!kept) return first();
  return kept.sampleRateByHand || dt === null ? kept : { ...kept, sampleRate: defaultSampleRate(dt) };
}

/** The export's sample rate the spec form judges its sample period by: the user's, else the spec's own instrument. */
export function exportSampleRate(kept: ExportForm | undefined, dt: number): number {
  return kept?.sampleRateByHand ? kept.sampleRate : defaultSampleRate(dt);
}

/** The settings object the library takes (the SSB settings only for SSB, no maxLength for no limit). */
export function exportSettingsInput(form: ExportForm): ExportSettingsInput {
  const input: ExportSettingsInput = {
    sampleRate: form.sampleRate,
    resample: form.resample,
    bits: form.bits,
    fullScale: form.fullScale,
    peakLimit: form.peakLimit,
    granularity: form.granularity,
    minLength: form.minLength,
    pad: form.pad,
    channels: form.channels,
    marker: form.marker,
  };
  if (form.maxLength !== null) input.maxLength = form.maxLength;
  // The SSB settings are recorded in every file's description: for I/Q they stay at the
  // library's defaults, as the command line (which takes them only with --if) leaves them.
  if (form.channels === 'ssb') Object.assign(input, { intermediateFrequency: form.intermediateFrequency, sideband: form.sideband, mixerSign: form.mixerSign });
  else input.upconversion = form.upconversion;
  return input;
}

/** The library's verdict on a form: the settings, or its first complaint with the field it names. */
export type ExportFormCheck = { ok: true; settings: ExportSettings } | { ok: false; field: string; message: string };

/** The export form's fields as the page labels them. */
export const EXPORT_WORDS: Record<string, FieldWords> = {
  sampleRate: { label: 'Sample rate', quantity: 'frequency' },
  resample: { label: 'Resample', quantity: null },
  bits: { label: 'DAC', quantity: null },
  fullScale: { label: 'Full scale', quantity: 'frequency' },
  peakLimit: { label: 'Limit on', quantity: null },
  granularity: { label: 'Granularity', quantity: 'count' },
  minLength: { label: 'Min length', quantity: 'count' },
  maxLength: { label: 'Max length', quantity: 'count' },
  pad: { label: 'Zero padding', quantity: null },
  channels: { label: 'Channels', quantity: null },
  intermediateFrequency: { label: 'IF', quantity: 'frequency' },
  sideband: { label: 'Sideband', quantity: null },
  mixerSign: { label: 'Mixer sign', quantity: null },
  marker: { label: 'Marker channel', quantity: null },
  upconversion: { label: 'Upconversion', quantity: null },
};

/** A message of the export library told with the form's labels and engineering units. */
export function exportWords(message: string, field?: string): string {
  const named = field ?? /^(\w+):/.exec(message)?.[1];
  return inFormWords({ name: 'ExportError', message, ...(named ? { field: named } : {}) }, EXPORT_WORDS);
}

/** Validates a form with the library's own rules, its messages told with the form's labels. */
export function checkExportForm(form: ExportForm): ExportFormCheck {
  try {
    return { ok: true, settings: parseExportSettings(exportSettingsInput(form)) };
  } catch (error) {
    const e = error as { name?: string; field?: unknown; message?: string };
    if (e?.name !== 'SpecError') throw error;
    const field = typeof e.field === 'string' ? e.field : '';
    return { ok: false, field, message: exportWords(e.message ?? String(error), field || undefined) };
  }
}

/** Most samples a channel the page exports: beyond it a file would not fit in the browser's memory. */
export const MAX_EXPORT_SAMPLES = 2 ** 24;

/** A sample rate that would make the export of `pulse` longer than MAX_EXPORT_SAMPLES, refused in the form's words; else null. */
export function exportLengthRefusal(form: Pick<ExportForm, 'sampleRate'>, pulse: Pick<Pulse, 'dt' | 'i'> | null): { field: 'sampleRate'; message: string } | null {
  if (!pulse || !(form.sampleRate > 0)) return null;
  const samples = pulse.i.length * pulse.dt * form.sampleRate;
  if (samples <= MAX_EXPORT_SAMPLES) return null;
  const rate = formatQuantity(Number(form.sampleRate.toPrecision(4)), 'frequency').replace(/Hz$/, 'S/s');
  const duration = formatQuantity(Number((pulse.i.length * pulse.dt).toPrecision(4)), 'time');
  return {
    field: 'sampleRate',
    message: `Sample rate: ${rate} would give ${samples.toExponential(2)} samples for this ${duration} pulse; the page exports at most ${MAX_EXPORT_SAMPLES} samples a channel (${formatQuantity(Number((MAX_EXPORT_SAMPLES / (pulse.i.length * pulse.dt)).toPrecision(3)), 'frequency').replace(/Hz$/, 'S/s')} at most for this pulse)`,
  };
}

/** The units the file will hold: the form's choice where the format offers it, else the format's only one. */
export function unitsFor(form: Pick<ExportForm, 'format' | 'units'>): SampleUnits {
  const allowed = FORMAT_UNITS[form.format];
  return allowed.includes(form.units) ? form.units : allowed[0];
}

/**
 * The form field a refusal of the export names (its messages begin "field: ..."):
 * the peak -> fullScale, the length -> maxLength; null when it names none of the form's.
 */
export function refusalField(message: string): keyof ExportForm | null {
  const head = /^(\w+):/.exec(message)?.[1];
  const fields: Record<string, keyof ExportForm> = {
    fullScale: 'fullScale',
    resample: 'resample',
    length: 'maxLength',
    channels: 'channels',
    format: 'format',
    units: 'units',
    sampleRate: 'sampleRate',
    intermediateFrequency: 'intermediateFrequency',
  };
  return head !== undefined && head in fields ? fields[head] : null;
}

/** A label as a file name stem (letters, digits, '.', '-', '_'; a pulse file's own ".json" dropped). */
export function fileStem(label: string): string {
  return (
    label
      .replace(/(\.pulse)?\.json$/i, '')
      .replace(/[^\w.-]+/g, '_')
      .replace(/^_+|_+$/g, '') || 'pulse'
  );
}

/** The names of the downloads: the pulse JSON, the waveform file and (npy, raw) its description FILE.json. */
export function exportFileNames(label: string, format: WaveformFormat): { pulse: string; file: string; sidecar: string | null } {
  const stem = fileStem(label);
  const file = `${stem}${FORMAT_FILES[format].extension}`;
  return { pulse: `${stem}.pulse.json`, file, sidecar: format === 'npy' || format === 'raw' ? `${file}.json` : null };
}

/** Metadata the pulse JSON format carries beside metadata.export: the pulse's name, as the command line passes it. */
export function fileMetadata(pulse: Pick<Pulse, 'metadata'>): PulseMetadata {
  return pulse.metadata.name !== undefined ? { name: pulse.metadata.name } : {};
}

/** The `gatesmith export` arguments that write the same file from the pulse JSON (non-default settings only). */
export function commandArgs(form: ExportForm, pulseFile: string, outFile: string): string[] {
  const args = ['export', pulseFile, '--format', form.format, '--sample-rate', String(form.sampleRate), '--bits', String(form.bits)];
  args.push('--full-scale', String(form.fullScale));
  if (form.resample !== EXPORT_DEFAULTS.resample) args.push('--resample', form.resample);
  if (form.peakLimit !== EXPORT_DEFAULTS.peakLimit) args.push('--peak-limit', form.peakLimit);
  if (form.granularity !== EXPORT_DEFAULTS.granularity) args.push('--granularity', String(form.granularity));
  if (form.minLength !== EXPORT_DEFAULTS.minLength) args.push('--min-length', String(form.minLength));
  if (form.maxLength !== null) args.push('--max-length', String(form.maxLength));
  if (form.pad !== EXPORT_DEFAULTS.pad) args.push('--pad', form.pad);
  if (form.channels === 'ssb') {
    args.push('--if', String(form.intermediateFrequency));
    if (form.sideband !== EXPORT_DEFAULTS.sideband) args.push('--sideband', form.sideband);
    if (form.mixerSign !== EXPORT_DEFAULTS.mixerSign) args.push('--mixer-sign', String(form.mixerSign));
  } else if (form.upconversion !== EXPORT_DEFAULTS.upconversion) {
    args.push('--upconversion', form.upconversion);
  }
  if (form.marker) args.push('--marker');
  const units = unitsFor(form);
  if (units !== FORMAT_UNITS[form.format][0]) args.push('--units', units);
  args.push('--out', outFile);
  return args;
}

/**
 * The exported waveform as a pulse of the session (as played: padding kept, SSB demodulated),
 * so that the other views can show it; it is judged against the same target as its source.
 */
export function exportedEntry(source: PulseEntry, preview: ExportPreview, id: string, key: string): PulseEntry {
  const d = preview.report.description;
  const rate = d.sampleRateHz >= 1e9 ? `${Number((d.sampleRateHz / 1e9).toPrecision(6))} GS/s` : `${Number((d.sampleRateHz / 1e6).toPrecision(6))} MS/s`;
  const how = `${rate}, ${d.bits} bit${d.layout === 'ssb' ? ', SSB' : ''}`;
  const metadata: PulseMetadata = {
    ...preview.played.metadata,
    name: `${source.pulse.metadata.name ?? source.label} as exported (${how})`,
    exportKey: key,
  };
  if (source.pulse.metadata.ideal !== undefined) metadata.ideal = source.pulse.metadata.ideal;
  const gate = preview.report.gate;
  return {
    id,
    label: `${source.label} · exported ${how}`,
    pulse: { ...preview.played, metadata },
    ...(gate ? { evaluation: { meanInfidelity: gate.exported.meanInfidelity, worstInfidelity: gate.exported.worstInfidelity } } : {}),
  };
}

/** Identifies an export of one pulse with one set of settings (the same export is added to the session once). */
export function exportKey(sourceId: string, settings: ExportSettings): string {
  return JSON.stringify({ source: sourceId, settings: { ...settings, maxLength: Number.isFinite(settings.maxLength) ? settings.maxLength : null } });
}
