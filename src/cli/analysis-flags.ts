// What `map` and `compare` share: the region flags (--detuning, --amplitude as MIN:MAX:N),
// the default region (the spec's ensemble range), --threshold, and the summary figures in
// words and as JSON.
import { basename } from 'node:path';
import { ArgumentError } from '../core/errors.ts';
import { DEFAULT_REGION_POINTS, MAX_AXIS_POINTS, checkAxis, ensembleRegion, type Region } from '../core/grid.ts';
import type { PulseJudgement } from '../core/compare.ts';
import type { GridAxis, Problem, Pulse } from '../core/types.ts';
import { flagValue, type FlagSpec, type ParsedArgs } from './args.ts';
import { formatFrequency, formatInfidelity, formatMemberAt, formatRelative, formatTarget, formatTime } from './format.ts';

/** Points per axis of the default region. */
export const DEFAULT_POINTS = DEFAULT_REGION_POINTS;

/** The region and threshold flags, in help order. */
export const REGION_FLAGS: FlagSpec[] = [
  { name: 'detuning', value: 'MIN:MAX:N', help: `detuning grid in Hz (default: the spec's ensemble range, ${DEFAULT_POINTS} points)` },
  { name: 'amplitude', value: 'MIN:MAX:N', help: `relative amplitude-error grid, e.g. -0.1:0.1:101 (default: the spec's range, ${DEFAULT_POINTS} points)` },
  { name: 'threshold', value: 'X', help: 'infidelity threshold of the area and half-width figures (default 1e-4)' },
];

/** A finite number from a flag's text, or an ArgumentError naming the flag. */
export function numberFlag(text: string, flag: string, allowed: string, ok: (x: number) => boolean = Number.isFinite): number {
  const x = text.trim() === '' ? NaN : Number(text);
  if (!Number.isFinite(x) || !ok(x)) throw new ArgumentError(`${flag}: "${text}" is not allowed; ${allowed}`);
  return x;
}

/** A grid axis from "MIN:MAX:N", checked as the library checks a map's axes. */
export function parseGrid(text: string, flag: string, lowest = -Infinity): GridAxis {
  const parts = text.split(':');
  const form = `MIN:MAX:N with MIN <= MAX and N a whole number from 1 to ${MAX_AXIS_POINTS}`;
  if (parts.length !== 3) throw new ArgumentError(`${flag}: "${text}" is not allowed; ${form}`);
  const axis = { min: numberFlag(parts[0], flag, form), max: numberFlag(parts[1], flag, form), points: numberFlag(parts[2], flag, form) };
  try {
    checkAxis(axis, flag, lowest);
  } catch {
    // The library names the axis's fields; the user typed one text.
    const why = axis.min <= lowest && axis.min <= axis.max ? `MIN must be above ${lowest} (the drive would vanish)` : form;
    throw new ArgumentError(`${flag}: "${text}" is not allowed; ${why}`);
  }
  return axis;
}

/** The region of a map: the flags' grids, or the ensemble's range on each axis (one point where it has none). */
export function regionOf(flags: ParsedArgs['flags'], problem: Problem): Region {
  const d = flagValue(flags, 'detuning');
  const a = flagValue(flags, 'amplitude');
  const range = ensembleRegion(problem);
  return {
    detuning: d !== undefined ? parseGrid(d, '--detuning') : range.detuning,
    amplitudeError: a !== undefined ? parseGrid(a, '--amplitude', -1) : range.amplitudeError,
  };
}

/** --threshold, or undefined for the default. */
export function thresholdOf(flags: ParsedArgs['flags']): number | undefined {
  const t = flagValue(flags, 'threshold');
  if (t === undefined) return undefined;
  return numberFlag(t, '--threshold', 'an infidelity between 0 and 1 (exclusive), e.g. 1e-4', (x) => x > 0 && x < 1);
}

/** A grid axis in words, e.g. "-1 MHz .. 1 MHz, 101 points". */
export function formatGrid(axis: GridAxis, kind: 'detuning' | 'amplitudeError'): string {
  const f = kind === 'detuning' ? formatFrequency : formatRelative;
  if (axis.points === 1) return `${f((axis.min + axis.max) / 2)} only`;
  return `${f(axis.min)} .. ${f(axis.max)}, ${axis.points} points`;
}

/** A half-width in words, with "at least" where the search reached its limit. */
export function formatWidth(value: number, reachedLimit: boolean, kind: 'detuning' | 'amplitudeError'): string {
  const text = kind === 'detuning' ? formatFrequency(value) : formatRelative(value).replace('+', '');
  return reachedLimit ? `>= ${text}` : text;
}

/** The figures of one pulse as aligned "label  value" lines (`gatesmith map`). */
export function summaryText(j: PulseJudgement, members: number): string {
  const f = j.figures;
  const { choice, region } = j;
  const rows: [string, string][] = [
    ['target', formatTarget(choice.targetUsed)],
    ...(choice.targetNote ? [['note', choice.targetNote] as [string, string]] : []),
    ['mean infidelity', `${formatInfidelity(f.meanInfidelity)} (weighted mean over the spec's ensemble, ${members} member${members === 1 ? '' : 's'})`],
    ['worst infidelity', `${formatInfidelity(f.worstInfidelity)} (worst member of the ensemble: ${formatMemberAt(f.worstMember)})`],
    ...leakageRows(j),
    ['region', `detuning ${formatGrid(region.detuning, 'detuning')}; amplitude error ${formatGrid(region.amplitudeError, 'amplitudeError')}`],
    ['region mean', `${formatInfidelity(f.regionMeanInfidelity)} (unweighted mean over the grid)`],
    ['region worst', `${formatInfidelity(f.regionWorstInfidelity)} at ${formatMemberAt(f.regionWorstAt)}`],
    ['area below threshold', `${percent(f.areaFraction)} of the grid below ${formatInfidelity(j.threshold)}`],
    ['detuning half-width', `${formatWidth(f.detuningHalfWidth, f.detuningInterval.reachedLimit, 'detuning')} (below threshold from ${formatFrequency(f.detuningInterval.lower)} to ${formatFrequency(f.detuningInterval.upper)} at zero amplitude error)`],
    ['amplitude half-width', `${formatWidth(f.amplitudeHalfWidth, f.amplitudeInterval.reachedLimit, 'amplitudeError')} (below threshold from ${formatRelative(f.amplitudeInterval.lower)} to ${formatRelative(f.amplitudeInterval.upper)} at zero detuning)`],
    ['duration', formatTime(f.durationS)],
    ['peak amplitude', formatFrequency(f.peakRabiHz)],
    ['pulse area', `${Number(f.pulseAreaTurns.toPrecision(5))} turns (integral of |Omega| dt; 1 turn = 360 degrees)`],
    ['energy', `${Number(f.energyHz2S.toPrecision(5))} Hz^2 s (integral of |Omega|^2 dt)`],
  ];
  const width = Math.max(...rows.map(([k]) => k.length));
  return rows.map(([k, v]) => `${k.padEnd(width)}  ${v}`).join('\n') + '\n';
}

/** Leakage rows of a judgement on a ladder (none on the qubit). */
function leakageRows(j: PulseJudgement): [string, string][] {
  const f = j.figures;
  if (f.meanLeakage === undefined) return [];
  let regionWorst = 0;
  for (const value of j.map.leakage ?? []) regionWorst = Math.max(regionWorst, value);
  return [
    ['mean leakage', `${formatInfidelity(f.meanLeakage)} (population that left levels 0 and 1, weighted mean over the ensemble)`],
    ['worst leakage', `${formatInfidelity(f.worstLeakage ?? 0)} (worst member of the ensemble); region worst ${formatInfidelity(regionWorst)}`],
  ];
}

/** A percentage with up to four significant digits. */
export function percent(fraction: number): string {
  return `${Number((100 * fraction).toPrecision(4))} %`;
}

/** The name a pulse goes by in outputs: its metadata name, else its file name. */
export function pulseName(pulse: Pulse, path: string): string {
  return typeof pulse.metadata.name === 'string' && pulse.metadata.name !== '' ? pulse.metadata.name : basename(path);
}
