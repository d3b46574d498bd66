// The project file (and the autosaved session): the spec, the pulses with their figures,
// and the view settings. Read strictly, whole or not at all, so that a malformed file
// changes nothing; pulses are checked again by the library's pulse reader on opening.
import { MAX_AXIS_POINTS } from '../core/grid.ts';
import type { Evaluation, StopReason } from '../core/types.ts';
import { RESAMPLE_METHODS, UPCONVERSIONS, WAVEFORM_FORMATS } from '../io/export/index.ts';
import type { ExportForm } from './export-form.ts';
import type { RunHistory } from './run-history.ts';

/** The `format` name of a project file. */
export const PROJECT_FORMAT = 'gatesmith.project';
/** The project file version written and read. */
export const PROJECT_VERSION = 1;

/** A project file cannot be read (the message says where and why). */
export class ProjectFormatError extends Error {
  override name = 'ProjectFormatError';
}

/** A pulse as stored in a project: the pulse file's fields, plus how the page labels it. */
export interface StoredPulse {
  id: string;
  label: string;
  dt: number;
  /** Plain arrays in a file; typed arrays in the browser's store, which copies them in one piece. */
  i: number[] | Float64Array;
  q: number[] | Float64Array;
  metadata: Record<string, unknown>;
  evaluation?: Pick<Evaluation, 'meanInfidelity' | 'worstInfidelity'>;
  /** The design run that made it (starts table and convergence curves). */
  history?: RunHistory;
}

/** Settings of the analysis views, kept with the project. */
export interface ViewSettings {
  view: string;
  selectedPulse: string | null;
  /** The robustness and comparison region; it follows the spec's ensemble unless `byHand` (set from the map's fields). */
  map: { detuning: { min: number; max: number; points: number }; amplitudeError: { min: number; max: number; points: number }; threshold: number; byHand?: boolean };
  compare: { composites: string[] };
  /** Which members the Bloch view draws: one (`member`, -1 for no error), all, or a chosen few (`chosen`). */
  bloch: { from: string; member: number; show?: 'one' | 'all' | 'chosen'; chosen?: number[] };
  /** The export panel's form, once edited (until then it follows the spec and the pulse). */
  export?: ExportForm;
}

/** The spec's undo history: earlier specs and undone ones, newest last each. */
export interface SpecHistory {
  past: Record<string, unknown>[];
  future: Record<string, unknown>[];
}

/** Everything a project file holds. */
export interface Project {
  format: typeof PROJECT_FORMAT;
  version: typeof PROJECT_VERSION;
  savedAt: string;
  spec: Record<string, unknown>;
  pulses: StoredPulse[];
  settings: ViewSettings;
  /** The spec's undo history (kept by the autosave, so that Ctrl+Z still works after a reload). */
  specHistory?: SpecHistory;
}

/** View settings of a new session. */
export function defaultSettings(): ViewSettings {
  return {
    view: 'design',
    selectedPulse: null,
    map: { detuning: { min: -2e6, max: 2e6, points: 101 }, amplitudeError: { min: -0.2, max: 0.2, points: 101 }, threshold: 1e-4 },
    compare: { composites: ['rectangular', 'bb1', 'sk1', 'corpse'] },
    bloch: { from: '+z', member: -1 },
  };
}

function fail(where: string, value: unknown, allowed: string): never {
  let shown: string;
  try {
    shown = value === undefined ? 'missing' : JSON.stringify(value).slice(0, 40);
  } catch {
    shown = String(value);
  }
  throw new ProjectFormatError(`project file: "${where}" is ${shown}; ${allowed}`);
}

function record(value: unknown, where: string): Record<string, unknown> {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) fail(where, value, 'expected a JSON object');
  return value as Record<string, unknown>;
}

function finite(value: unknown, where: string, check: (x: number) => boolean = () => true, allowed = 'a finite number'): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !check(value)) fail(where, value, `expected ${allowed}`);
  return value;
}

function samples(value: unknown, where: string): number[] | Float64Array {
  if (value instanceof Float64Array && value.length > 0) {
    for (let k = 0; k < value.length; k++) if (!Number.isFinite(value[k])) fail(`${where}[${k}]`, value[k], 'expected a finite number');
    return value;
  }
  if (!Array.isArray(value) || value.length === 0) fail(where, value, 'expected a non-empty array of numbers (Hz)');
  value.forEach((x, k) => finite(x, `${where}[${k}]`));
  return value as number[];
}

function axis(value: unknown, where: string): { min: number; max: number; points: number } {
  const obj = record(value, where);
  const min = finite(obj.min, `${where}.min`);
  const max = finite(obj.max, `${where}.max`, (x) => x >= min, 'a number >= min');
  const points = finite(obj.points, `${where}.points`, (x) => Number.isInteger(x) && x >= 1 && x <= MAX_AXIS_POINTS, `a whole number from 1 to ${MAX_AXIS_POINTS}`);
  return { min, max, points };
}

function readPulseEntry(value: unknown, k: number): StoredPulse {
  const where = `pulses[${k}]`;
  const obj = record(value, where);
  if (typeof obj.id !== 'string' || obj.id === '') fail(`${where}.id`, obj.id, 'expected a non-empty string');
  if (typeof obj.label !== 'string') fail(`${where}.label`, obj.label, 'expected a string');
  const dt = finite(obj.dt, `${where}.dt`, (x) => x > 0, 'a sample time > 0 (s)');
  const i = samples(obj.i, `${where}.i`);
  const q = samples(obj.q, `${where}.q`);
  if (i.length !== q.length) fail(`${where}.q`, `${q.length} samples`, `expected as many samples as i (${i.length})`);
  const metadata = obj.metadata === undefined ? {} : record(obj.metadata, `${where}.metadata`);
  let evaluation: StoredPulse['evaluation'];
  if (obj.evaluation !== undefined) {
    const e = record(obj.evaluation, `${where}.evaluation`);
    evaluation = { meanInfidelity: finite(e.meanInfidelity, `${where}.evaluation.meanInfidelity`), worstInfidelity: finite(e.worstInfidelity, `${where}.evaluation.worstInfidelity`) };
  }
  const history = obj.history === undefined ? undefined : readHistory(obj.history, `${where}.history`);
  return { id: obj.id, label: obj.label, dt, i, q, metadata, ...(evaluation ? { evaluation } : {}), ...(history ? { history } : {}) };
}

/** Every reason a start can end with (StopReason of src/core/types.ts; the check below keeps the two lists equal). */
const STOP_REASONS = ['target-reached', 'gradient-tolerance', 'max-iterations', 'time-limit', 'stopped', 'line-search-failed', 'stalled', 'pruned', 'outpaced'] as const satisfies readonly StopReason[];
// A reason added to StopReason and not here fails to compile.
type MissingStopReason = Exclude<StopReason, (typeof STOP_REASONS)[number]>;
const noMissingStopReason: [MissingStopReason] extends [never] ? true : never = true;
void noMissingStopReason;

function numbers(value: unknown, where: string): number[] {
  if (!Array.isArray(value)) fail(where, value, 'expected a list of numbers');
  value.forEach((x, k) => finite(x, `${where}[${k}]`));
  return value as number[];
}

function readHistory(value: unknown, where: string): RunHistory {
  const obj = record(value, where);
  if (!Array.isArray(obj.starts)) fail(`${where}.starts`, obj.starts, 'expected a list of starts');
  if (!Array.isArray(obj.curves)) fail(`${where}.curves`, obj.curves, 'expected a list of curves');
  const whole = (x: unknown, at: string) => finite(x, at, (v) => Number.isInteger(v) && v >= 0, 'a whole number');
  const starts = obj.starts.map((row, k) => {
    const r = record(row, `${where}.starts[${k}]`);
    const at = `${where}.starts[${k}]`;
    return {
      start: whole(r.start, `${at}.start`),
      meanInfidelity: finite(r.meanInfidelity, `${at}.meanInfidelity`),
      iterations: whole(r.iterations, `${at}.iterations`),
      stopReason: oneOf(r.stopReason, `${at}.stopReason`, STOP_REASONS),
      elapsedS: finite(r.elapsedS, `${at}.elapsedS`),
    };
  });
  const curves = obj.curves.map((curve, k) => {
    const c = record(curve, `${where}.curves[${k}]`);
    const at = `${where}.curves[${k}]`;
    const iteration = numbers(c.iteration, `${at}.iteration`);
    const meanInfidelity = numbers(c.meanInfidelity, `${at}.meanInfidelity`);
    if (iteration.length !== meanInfidelity.length) fail(`${at}.meanInfidelity`, `${meanInfidelity.length} values`, `expected one per iteration (${iteration.length})`);
    return { start: whole(c.start, `${at}.start`), iteration, meanInfidelity };
  });
  if (typeof obj.stopped !== 'boolean') fail(`${where}.stopped`, obj.stopped, 'expected true or false');
  return { starts, best: whole(obj.best, `${where}.best`), stopped: obj.stopped, elapsedS: finite(obj.elapsedS, `${where}.elapsedS`), curves };
}

function oneOf<T>(value: unknown, where: string, allowed: readonly T[]): T {
  if (!allowed.includes(value as T)) fail(where, value, `expected one of ${allowed.map((a) => JSON.stringify(a)).join(', ')}`);
  return value as T;
}

// Types only: whether the library accepts the values is for the form to show, as when typed.
function readExportForm(value: unknown): ExportForm {
  const where = 'settings.export';
  const obj = record(value, where);
  const count = (key: string) => finite(obj[key], `${where}.${key}`, (x) => Number.isSafeInteger(x), 'a whole number of samples');
  const positive = (key: string) => finite(obj[key], `${where}.${key}`, (x) => x > 0, 'a number > 0 (Hz)');
  const maxLength = obj.maxLength === null ? null : count('maxLength');
  if (typeof obj.marker !== 'boolean') fail(`${where}.marker`, obj.marker, 'expected true or false');
  return {
    sampleRate: positive('sampleRate'),
    resample: oneOf(obj.resample, `${where}.resample`, RESAMPLE_METHODS),
    bits: oneOf(obj.bits, `${where}.bits`, [12, 14, 16] as const),
    fullScale: positive('fullScale'),
    peakLimit: oneOf(obj.peakLimit, `${where}.peakLimit`, ['amplitude', 'per-channel'] as const),
    granularity: count('granularity'),
    minLength: count('minLength'),
    maxLength,
    pad: oneOf(obj.pad, `${where}.pad`, ['before', 'after', 'split'] as const),
    channels: oneOf(obj.channels, `${where}.channels`, ['iq', 'ssb'] as const),
    intermediateFrequency: finite(obj.intermediateFrequency, `${where}.intermediateFrequency`),
    sideband: oneOf(obj.sideband, `${where}.sideband`, ['upper', 'lower'] as const),
    mixerSign: oneOf(obj.mixerSign, `${where}.mixerSign`, [1, -1] as const),
    // Projects saved before the setting existed exported Q as designed.
    upconversion: obj.upconversion === undefined ? 'plus' : oneOf(obj.upconversion, `${where}.upconversion`, UPCONVERSIONS),
    marker: obj.marker as boolean,
    format: oneOf(obj.format, `${where}.format`, WAVEFORM_FORMATS),
    units: oneOf(obj.units, `${where}.units`, ['codes', 'hz'] as const),
    // Projects saved before the setting existed kept the rate they were saved with.
    sampleRateByHand: obj.sampleRateByHand === undefined ? true : oneOf(obj.sampleRateByHand, `${where}.sampleRateByHand`, [true, false] as const),
  };
}

function readSettings(value: unknown): ViewSettings {
  const defaults = defaultSettings();
  if (value === undefined) return defaults;
  const obj = record(value, 'settings');
  const map = obj.map === undefined ? defaults.map : record(obj.map, 'settings.map');
  const compare = obj.compare === undefined ? defaults.compare : record(obj.compare, 'settings.compare');
  const bloch = obj.bloch === undefined ? defaults.bloch : record(obj.bloch, 'settings.bloch');
  const composites = compare.composites;
  if (!Array.isArray(composites) || !composites.every((c) => typeof c === 'string')) {
    fail('settings.compare.composites', composites, 'expected a list of sequence names');
  }
  if (obj.view !== undefined && typeof obj.view !== 'string') fail('settings.view', obj.view, 'expected a view name');
  if (obj.selectedPulse !== undefined && obj.selectedPulse !== null && typeof obj.selectedPulse !== 'string') {
    fail('settings.selectedPulse', obj.selectedPulse, 'expected a pulse id or null');
  }
  if (typeof bloch.from !== 'string') fail('settings.bloch.from', bloch.from, 'expected a Bloch vector such as "+z"');
  return {
    view: (obj.view as string | undefined) ?? defaults.view,
    selectedPulse: (obj.selectedPulse as string | null | undefined) ?? null,
    map: {
      detuning: axis(map.detuning, 'settings.map.detuning'),
      amplitudeError: axis(map.amplitudeError, 'settings.map.amplitudeError'),
      threshold: finite(map.threshold, 'settings.map.threshold', (x) => x > 0 && x < 1, 'a threshold between 0 and 1'),
      ...(map.byHand === true ? { byHand: true } : {}),
    },
    compare: { composites: composites as string[] },
    bloch: {
      from: bloch.from as string,
      member: finite(bloch.member, 'settings.bloch.member', Number.isInteger, 'a member index (-1: no error)'),
      ...(bloch.show !== undefined ? { show: oneOf(bloch.show, 'settings.bloch.show', ['one', 'all', 'chosen'] as const) } : {}),
      ...(bloch.chosen !== undefined
        ? { chosen: numbers(bloch.chosen, 'settings.bloch.chosen').map((x, k) => finite(x, `settings.bloch.chosen[${k}]`, (v) => Number.isInteger(v) && v >= 0, 'a member index')) }
        : {}),
    },
    ...(obj.export !== undefined ? { export: readExportForm(obj.export) } : {}),
  };
}

/** Reads a project from file text or a stored object; throws ProjectFormatError naming the first fault. */
export function parseProject(input: string | unknown): Project {
  let doc = input;
  if (typeof input === 'string') {
    try {
      doc = JSON.parse(input);
    } catch (error) {
      throw new ProjectFormatError(`project file: not valid JSON (${error instanceof Error ? error.message : String(error)})`);
    }
  }
  const obj = record(doc, '(document)');
  if (obj.format !== PROJECT_FORMAT) fail('format', obj.format, `expected "${PROJECT_FORMAT}" (is this a gatesmith project file?)`);
  if (obj.version !== PROJECT_VERSION) fail('version', obj.version, `expected ${PROJECT_VERSION}`);
  const spec = record(obj.spec, 'spec');
  if (!Array.isArray(obj.pulses)) fail('pulses', obj.pulses, 'expected a list of pulses');
  const pulses = obj.pulses.map(readPulseEntry);
  const ids = new Set<string>();
  for (const p of pulses) {
    if (ids.has(p.id)) fail('pulses', p.id, 'expected each pulse id once');
    ids.add(p.id);
  }
  const settings = readSettings(obj.settings);
  if (settings.selectedPulse !== null && !ids.has(settings.selectedPulse)) settings.selectedPulse = pulses[0]?.id ?? null;
  const specHistory = obj.specHistory === undefined ? undefined : readSpecHistory(obj.specHistory);
  return {
    format: PROJECT_FORMAT,
    version: PROJECT_VERSION,
    savedAt: typeof obj.savedAt === 'string' ? obj.savedAt : '',
    spec,
    pulses,
    settings,
    ...(specHistory ? { specHistory } : {}),
  };
}

function readSpecHistory(value: unknown): SpecHistory {
  const obj = record(value, 'specHistory');
  const specs = (list: unknown, where: string) => {
    if (!Array.isArray(list)) fail(where, list, 'expected a list of specs');
    return list.map((spec, k) => record(spec, `${where}[${k}]`));
  };
  return { past: specs(obj.past, 'specHistory.past'), future: specs(obj.future, 'specHistory.future') };
}

/** A project as written to a file (pretty JSON; numbers print as the shortest exact text). */
export function projectText(project: Project): string {
  return JSON.stringify(project, null, 1) + '\n';
}

/** The location hash that carries a spec ("#spec=..."), readable enough to edit by hand. */
export function specHash(spec: unknown): string {
  return `#spec=${encodeURIComponent(JSON.stringify(spec))}`;
}

/** The spec carried by a location hash, null when there is none; throws ProjectFormatError when malformed. */
export function specFromHash(hash: string): Record<string, unknown> | null {
  const match = /^#?spec=(.*)$/s.exec(hash);
  if (!match) return null;
  let text: string;
  try {
    text = decodeURIComponent(match[1]);
  } catch {
    throw new ProjectFormatError('link: the spec in the address is not valid percent-encoding');
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    throw new ProjectFormatError(`link: the spec in the address is not valid JSON (${error instanceof Error ? error.message : String(error)})`);
  }
  return record(value, 'link spec');
}
