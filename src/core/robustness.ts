// Summary figures of a pulse over a region of detuning x amplitude error and one-dimensional
// cuts through zero error: what `gatesmith map` prints, what compare.ts adds to each row and
// what the app shows beside its maps. The target is the one target-choice.ts picks, and
// every result says which it used.
import { robustnessMap, type RobustnessMap } from './api.ts';
import { qubitDrive } from './line.ts';
import { axisValues } from './grid.ts';
import { ArgumentError, describeValue } from './errors.ts';
import { thresholdInterval, type ErrorAxis, type ThresholdInterval } from './threshold-width.ts';
import { chooseTarget, type TargetChoice } from './target-choice.ts';
import type { GridAxis, LadderSystem, Line, Pulse, Target } from './types.ts';

export type { ErrorAxis, ThresholdInterval } from './threshold-width.ts';
export type { TargetChoice } from './target-choice.ts';

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

/** Summary figures of a pulse over a region, with the target and threshold they refer to. */
export interface RobustnessSummary extends PulseFigures, TargetChoice {
  detuning: GridAxis;
  amplitudeError: GridAxis;
  threshold: number;
  /** The region mean: the unweighted mean of the infidelity over the grid points. */
  regionMeanInfidelity: number;
  /** The largest infidelity on the grid, and where. */
  regionWorstInfidelity: number;
  regionWorstAt: { detuning: number; amplitudeError: number };
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
  /** A ladder of more than two levels (the spec's system); absent: the qubit. */
  system?: LadderSystem;
}

/** The infidelity along one error axis with the other error at zero (on a ladder, with the leakage). */
export interface Cut extends TargetChoice {
  axis: ErrorAxis;
  values: Float64Array;
  infidelity: Float64Array;
  /** On a ladder: the leakage at the same points. */
  leakage?: Float64Array;
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

/** Summary figures of a map computed against `choice.targetUsed`, plus the pulse's own figures. */
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
  const detuningInterval = thresholdInterval(choice.targetUsed, drive, 'detuning', threshold, options.system);
  const amplitudeInterval = thresholdInterval(choice.targetUsed, drive, 'amplitudeError', threshold, options.system);
  return {
    ...choice,
    detuning: { ...map.detuning },
    amplitudeError: { ...map.amplitudeError },
    threshold,
    regionMeanInfidelity: sum / count,
    regionWorstInfidelity: values[worst],
    regionWorstAt: { detuning: dv, amplitudeError: av },
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
  const map = robustnessMap(choice.targetUsed, pulse, detuning, amplitudeError, options.line, options.system);
  return { summary: summariseMap(map, pulse, choice, options), map };
}

/** Infidelity along one error axis on a uniform grid, the other error held at zero. */
export function cut(target: Target, pulse: Pulse, axis: ErrorAxis, grid: GridAxis, line?: Line, system?: LadderSystem): Cut {
  if (axis !== 'detuning' && axis !== 'amplitudeError') {
    throw new ArgumentError(`axis: ${describeValue(axis)} is not allowed; "detuning" or "amplitudeError"`);
  }
  const choice = chooseTarget(target, pulse);
  const zero: GridAxis = { min: 0, max: 0, points: 1 };
  const map = axis === 'detuning'
    ? robustnessMap(choice.targetUsed, pulse, grid, zero, line, system)
    : robustnessMap(choice.targetUsed, pulse, zero, grid, line, system);
  const result: Cut = { ...choice, axis, values: axisValues(grid), infidelity: map.infidelity };
  if (map.leakage) result.leakage = map.leakage;
  return result;
}

/** Both cuts through zero error over a region's ranges and point counts (on a ladder, with the leakage along each). */
export interface Cuts {
  detuning: Float64Array;
  detuningInfidelity: Float64Array;
  amplitudeError: Float64Array;
  amplitudeErrorInfidelity: Float64Array;
  /** On a ladder: the leakage along detuning. */
  detuningLeakage?: Float64Array;
  /** On a ladder: the leakage along amplitude error. */
  amplitudeErrorLeakage?: Float64Array;
}

/** The cut along detuning (no amplitude error) and along amplitude error (no detuning). */
export function cuts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): Cuts {
  const alongDetuning = cut(target, pulse, 'detuning', detuning, line, system);
  const alongAmplitude = cut(target, pulse, 'amplitudeError', amplitudeError, line, system);
  const result: Cuts = {
    detuning: alongDetuning.values,
    detuningInfidelity: alongDetuning.infidelity,
    amplitudeError: alongAmplitude.values,
    amplitudeErrorInfidelity: alongAmplitude.infidelity,
  };
  if (alongDetuning.leakage && alongAmplitude.leakage) {
    result.detuningLeakage = alongDetuning.leakage;
    result.amplitudeErrorLeakage = alongAmplitude.leakage;
  }
  return result;
}

/** The threshold if it is an infidelity strictly between 0 and 1, else an ArgumentError naming it. */
export function checkThreshold(threshold: number): number {
  if (typeof threshold !== 'number' || !(threshold > 0 && threshold < 1)) {
    throw new ArgumentError(`threshold: ${describeValue(threshold)} is not allowed; an infidelity between 0 and 1 (exclusive)`);
  }
  return threshold;
}
