// Summary figures of a pulse over a region of detuning x amplitude error, one-dimensional
// cuts, and the ordering of pulses by a chosen figure: what `gatesmith map` and
// `gatesmith compare` print and what the app shows beside its maps. A pulse that names
// its own ideal operation (the Knill sequence, 90-180-90) is compared with that ideal,
// and every result says which target it used.
import { axisValues, robustnessMap, type RobustnessMap } from './api.ts';
import { qubitDrive } from './line.ts';
import { ArgumentError, PulseFormatError, describeValue } from './errors.ts';
import { thresholdInterval, type ErrorAxis, type ThresholdInterval } from './threshold-width.ts';
import type { GridAxis, Line, Pulse, Target, Vec3 } from './types.ts';

export type { ErrorAxis, ThresholdInterval } from './threshold-width.ts';

/** The threshold of the area and width figures unless one is given. */
export const DEFAULT_THRESHOLD = 1e-4;

/** Figures of the samples alone, independent of any error. */
export interface PulseFigures {
  /** n dt (s). */
  durationS: number;
  /** Largest sqrt(I^2 + Q^2) (Hz). */
  peakRabiHz: number;
  /** Integral of |Omega| dt in turns (1 turn = a 360 degree rotation on resonance). */
  pulseAreaTurns: number;
  /** Integral of |Omega|^2 dt in Hz^2 s (proportional to the drive energy delivered). */
  energyHz2S: number;
}

/** Which target a figure was taken against, and why when it is not the one given. */
export interface TargetChoice {
  targetGiven: Target;
  targetUsed: Target;
  /** Null when the given target was used; otherwise says whose ideal was used and why. */
  targetNote: string | null;
}

/** Summary figures of a pulse over a region, with the target and threshold they refer to. */
export interface RobustnessSummary extends PulseFigures, TargetChoice {
  detuning: GridAxis;
  amplitudeError: GridAxis;
  threshold: number;
  /** Unweighted mean of the infidelity over the grid points. */
  meanInfidelity: number;
  worstInfidelity: number;
  worstAt: { detuning: number; amplitudeError: number };
  /** Fraction of grid points whose infidelity is below the threshold. */
  areaFraction: number;
  /** Half-width (Hz) around zero detuning, at zero amplitude error, below the threshold. */
  detuningHalfWidth: number;
  /** Half-width (relative) around zero amplitude error, at zero detuning, below the threshold. */
  amplitudeHalfWidth: number;
  detuningInterval: ThresholdInterval;
  amplitudeInterval: ThresholdInterval;
}

/** Options of the summary figures. */
export interface SummaryOptions {
  /** Infidelity threshold of the area and width figures (default 1e-4). */
  threshold?: number;
  /** The line the pulse is played through: every figure is of the drive the qubit sees. */
  line?: Line;
}

/** The infidelity along one error axis with the other error at zero. */
export interface Cut extends TargetChoice {
  axis: ErrorAxis;
  values: Float64Array;
  infidelity: Float64Array;
}

/** Duration, peak amplitude, pulse area (turns) and energy (Hz^2 s) of a pulse. */
export function pulseFigures(pulse: Pulse): PulseFigures {
  let peak = 0;
  let area = 0;
  let energy = 0;
  for (let k = 0; k < pulse.i.length; k++) {
    const a = Math.hypot(pulse.i[k], pulse.q[k]);
    peak = Math.max(peak, a);
    area += a * pulse.dt;
    energy += a * a * pulse.dt;
  }
  return { durationS: pulse.i.length * pulse.dt, peakRabiHz: peak, pulseAreaTurns: area, energyHz2S: energy };
}

/**
 * The target to compare a pulse with: the one given, unless the pulse's metadata names an
 * ideal operation (composites do) that differs from it and does not perform it; then that
 * ideal, with a note.
 */
export function chooseTarget(target: Target, pulse: Pulse): TargetChoice {
  const ideal = pulse.metadata?.ideal;
  if (ideal === undefined) return { targetGiven: target, targetUsed: target, targetNote: null };
  const own = readIdeal(ideal);
  // An ideal gate that performs the given state transfer meets it: the given target stays.
  if (sameOperation(own, target) || performsTransfer(own, target)) return { targetGiven: target, targetUsed: target, targetNote: null };
  const who = typeof pulse.metadata.name === 'string' ? pulse.metadata.name : 'the pulse';
  return {
    targetGiven: target,
    targetUsed: own,
    targetNote: `${who}: compared with its own ideal (${describeTarget(own)}), not with the given target (${describeTarget(target)})`,
  };
}

/** Summary figures of a map computed against `choice.targetUsed` (through `options.line`), plus the figures of the drive the qubit sees. */
export function summariseMap(map: RobustnessMap, pulse: Pulse, choice: TargetChoice, options: SummaryOptions = {}): RobustnessSummary {
  const threshold = checkThreshold(options.threshold ?? DEFAULT_THRESHOLD);
  const values = map.infidelity;
  const count = map.detuning.points * map.amplitudeError.points;
  if (values.length !== count) {
    throw new ArgumentError(`map.infidelity: ${values.length} values is not allowed; the grid has ${map.detuning.points} x ${map.amplitudeError.points} = ${count}`);
  }
  let sum = 0;
  let worst = 0;
  let below = 0;
  for (let j = 0; j < count; j++) {
    sum += values[j];
    if (values[j] > values[worst]) worst = j;
    if (values[j] < threshold) below++;
  }
  const dv = axisValues(map.detuning)[worst % map.detuning.points];
  const av = axisValues(map.amplitudeError)[Math.floor(worst / map.detuning.points)];
  const drive = qubitDrive(pulse, options.line);
  const detuningInterval = thresholdInterval(choice.targetUsed, drive, 'detuning', threshold);
  const amplitudeInterval = thresholdInterval(choice.targetUsed, drive, 'amplitudeError', threshold);
  return {
    ...choice,
    detuning: { ...map.detuning },
    amplitudeError: { ...map.amplitudeError },
    threshold,
    meanInfidelity: sum / count,
    worstInfidelity: values[worst],
    worstAt: { detuning: dv, amplitudeError: av },
    areaFraction: below / count,
    detuningHalfWidth: detuningInterval.halfWidth,
    amplitudeHalfWidth: amplitudeInterval.halfWidth,
    detuningInterval,
    amplitudeInterval,
    ...pulseFigures(drive),
  };
}

/** The map and summary figures of a pulse over a region, against the target chooseTarget picks. */
export function summarise(
  target: Target,
  pulse: Pulse,
  detuning: GridAxis,
  amplitudeError: GridAxis,
  options: SummaryOptions = {},
): { summary: RobustnessSummary; map: RobustnessMap } {
  const choice = chooseTarget(target, pulse);
  const map = robustnessMap(choice.targetUsed, pulse, detuning, amplitudeError, options.line);
  return { summary: summariseMap(map, pulse, choice, options), map };
}

/** Infidelity along one error axis on a uniform grid, the other error held at zero, through `line` when given. */
export function cut(target: Target, pulse: Pulse, axis: ErrorAxis, grid: GridAxis, line?: Line): Cut {
  if (axis !== 'detuning' && axis !== 'amplitudeError') {
    throw new ArgumentError(`axis: ${describeValue(axis)} is not allowed; "detuning" or "amplitudeError"`);
  }
  const choice = chooseTarget(target, pulse);
  const zero: GridAxis = { min: 0, max: 0, points: 1 };
  const map = axis === 'detuning'
    ? robustnessMap(choice.targetUsed, pulse, grid, zero, line)
    : robustnessMap(choice.targetUsed, pulse, zero, grid, line);
  return { ...choice, axis, values: axisValues(grid), infidelity: map.infidelity };
}

/** The figures `compareSummaries` can sort by, with the direction that is better. */
export const SORT_FIGURES = {
  mean: { key: 'meanInfidelity', better: 'lower', label: 'mean infidelity over the grid' },
  worst: { key: 'worstInfidelity', better: 'lower', label: 'worst infidelity over the grid' },
  area: { key: 'areaFraction', better: 'higher', label: 'fraction of the grid below the threshold' },
  'detuning-width': { key: 'detuningHalfWidth', better: 'higher', label: 'detuning half-width below the threshold' },
  'amplitude-width': { key: 'amplitudeHalfWidth', better: 'higher', label: 'amplitude-error half-width below the threshold' },
  duration: { key: 'durationS', better: 'lower', label: 'duration' },
  peak: { key: 'peakRabiHz', better: 'lower', label: 'peak Rabi frequency' },
  'pulse-area': { key: 'pulseAreaTurns', better: 'lower', label: 'pulse area' },
  energy: { key: 'energyHz2S', better: 'lower', label: 'energy' },
} as const satisfies Record<string, { key: keyof RobustnessSummary; better: 'lower' | 'higher'; label: string }>;

/** A figure to sort by: a key of SORT_FIGURES. */
export type SortFigure = keyof typeof SORT_FIGURES;

/** The rows sorted best first by a figure (ties broken by mean infidelity, then kept in order). */
export function compareSummaries<T extends RobustnessSummary>(rows: readonly T[], sortBy: SortFigure = 'mean'): T[] {
  const figure = SORT_FIGURES[sortBy];
  if (!figure) {
    throw new ArgumentError(`sortBy: ${describeValue(sortBy)} is not allowed; one of ${Object.keys(SORT_FIGURES).join(', ')}`);
  }
  const sign = figure.better === 'lower' ? 1 : -1;
  return rows
    .map((row, index) => ({ row, index }))
    .sort((x, y) =>
      sign * (x.row[figure.key] - y.row[figure.key]) || x.row.meanInfidelity - y.row.meanInfidelity || x.index - y.index,
    )
    .map(({ row }) => row);
}

function checkThreshold(threshold: number): number {
  if (typeof threshold !== 'number' || !(threshold > 0 && threshold < 1)) {
    throw new ArgumentError(`threshold: ${describeValue(threshold)} is not allowed; an infidelity between 0 and 1 (exclusive)`);
  }
  return threshold;
}

function isVec3(v: unknown): v is Vec3 {
  return Array.isArray(v) && v.length === 3 && v.every((x) => typeof x === 'number' && Number.isFinite(x)) && v.some((x) => x !== 0);
}

/** metadata.ideal as a Target, or a PulseFormatError naming the field. */
function readIdeal(ideal: unknown): Target {
  const t = ideal as Record<string, unknown>;
  if (t && t.kind === 'gate' && isVec3(t.axis) && typeof t.angleRad === 'number' && Number.isFinite(t.angleRad)) {
    return { kind: 'gate', axis: t.axis, angleRad: t.angleRad };
  }
  if (t && t.kind === 'state' && isVec3(t.from) && isVec3(t.to)) return { kind: 'state', from: t.from, to: t.to };
  throw new PulseFormatError(
    `metadata.ideal: ${describeValue(ideal)} is not allowed; {"kind": "gate", "axis": [x, y, z], "angleRad": a} or {"kind": "state", "from": [x, y, z], "to": [x, y, z]}`,
  );
}

const unit = (v: Vec3): Vec3 => {
  const n = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / n, v[1] / n, v[2] / n];
};

/** Whether two targets ask for the same operation (gates up to a global phase). */
function sameOperation(a: Target, b: Target): boolean {
  const close = 1e-9;
  if (a.kind === 'gate' && b.kind === 'gate') {
    // R_n(t) as the unit quaternion (cos t/2, sin t/2 n): equal up to sign means the same gate.
    const qa = [Math.cos(a.angleRad / 2), ...unit(a.axis).map((x) => x * Math.sin(a.angleRad / 2))];
    const qb = [Math.cos(b.angleRad / 2), ...unit(b.axis).map((x) => x * Math.sin(b.angleRad / 2))];
    return 1 - Math.abs(qa.reduce((s, x, k) => s + x * qb[k], 0)) < close;
  }
  if (a.kind === 'state' && b.kind === 'state') {
    const dot = (u: Vec3, v: Vec3) => unit(u).reduce((s, x, k) => s + x * unit(v)[k], 0);
    return 1 - dot(a.from, b.from) < close && 1 - dot(a.to, b.to) < close;
  }
  return false;
}

/** Whether the gate `a` takes the Bloch vector `b.from` to `b.to` (a state target). */
function performsTransfer(a: Target, b: Target): boolean {
  if (a.kind !== 'gate' || b.kind !== 'state') return false;
  // Rodrigues' rotation formula: r' = r cos t + (n x r) sin t + n (n . r)(1 - cos t).
  const n = unit(a.axis);
  const r = unit(b.from);
  const c = Math.cos(a.angleRad);
  const s = Math.sin(a.angleRad);
  const dot = n[0] * r[0] + n[1] * r[1] + n[2] * r[2];
  const cross = [n[1] * r[2] - n[2] * r[1], n[2] * r[0] - n[0] * r[2], n[0] * r[1] - n[1] * r[0]];
  const to = unit(b.to);
  const image = [0, 1, 2].map((k) => r[k] * c + cross[k] * s + n[k] * dot * (1 - c));
  return 1 - image.reduce((sum, x, k) => sum + x * to[k], 0) < 1e-9;
}

function describeTarget(t: Target): string {
  const vec = (v: Vec3) => `[${unit(v).map((x) => Number(x.toFixed(4)) || 0).join(', ')}]`;
  if (t.kind === 'gate') return `a ${Number(((t.angleRad * 180) / Math.PI).toFixed(4))} degree rotation about ${vec(t.axis)}`;
  return `the state transfer ${vec(t.from)} -> ${vec(t.to)}`;
}
