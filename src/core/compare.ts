// What the tool says about pulses against one spec, for every front end: the figures of one
// pulse (judgePulse: `gatesmith map`) and the comparison of several pulses with composite
// sequences built for the spec's target under its limits (compare: `gatesmith compare` and
// the app's comparison, through the worker). "Mean" and "worst" are over the spec's
// ensemble (weighted, as the design minimises them); the map region's are "region mean"
// and "region worst".
import { evaluateMembers, robustnessMap, toProblem, type RobustnessMap } from './api.ts';
import { compositesFor, isCompositeName } from './composite-targets.ts';
import { compositeNames } from './composites.ts';
import { dragFamily, dragFamilyFor, isDragName } from './drag-family.ts';
import { ArgumentError, describeValue } from './errors.ts';
import { checkRegion, ensembleRegion, type Region } from './grid.ts';
import { DEFAULT_THRESHOLD, checkThreshold, cuts as cutsThroughZero, summariseMap, type Cuts, type RobustnessSummary } from './robustness.ts';
import { chooseTarget, type TargetChoice } from './target-choice.ts';
import type { Evaluation, Member, Problem, Pulse, Target } from './types.ts';

/** Figures of one pulse against a spec: on its ensemble, over a region, and of the samples. */
export interface CompareFigures extends Omit<RobustnessSummary, keyof TargetChoice | 'detuning' | 'amplitudeError' | 'threshold'> {
  /** Weighted mean infidelity over the spec's ensemble. */
  meanInfidelity: number;
  /** Worst member of the spec's ensemble. */
  worstInfidelity: number;
  worstMember: Member;
  /** On a ladder: weighted mean and worst leakage over the spec's ensemble. */
  meanLeakage?: number;
  worstLeakage?: number;
}

/** One pulse's judgement: the target used and the note beside it, its figures, its map over the region. */
export interface PulseJudgement {
  choice: TargetChoice;
  figures: CompareFigures;
  map: RobustnessMap;
  region: Region;
  threshold: number;
}

/** Options of judgePulse and compare. */
export interface JudgeOptions {
  /** The region of the map figures (default: the range of the spec's ensemble, 101 x 101). */
  region?: Region;
  /** Infidelity threshold of the area and half-width figures (default 1e-4). */
  threshold?: number;
}

/** An evaluation on the spec's ensemble with the target it was taken against and the note beside it. */
export interface JudgedEvaluation extends Evaluation {
  target: Target;
  note: string | null;
}

/**
 * The figures of a pulse on a spec's ensemble, against the target chooseTarget picks, through
 * the spec's line (`gatesmith evaluate`, the app's figures of a pulse); `withoutLine` ignores it.
 */
export function evaluateJudged(spec: unknown, pulse: Pulse, withoutLine = false): JudgedEvaluation {
  const problem = toProblem(spec);
  const choice = chooseTarget(problem.target, pulse);
  const line = withoutLine ? undefined : problem.line;
  return { ...evaluateMembers(choice.targetUsed, pulse, problem.members, line, problem.system), target: choice.targetUsed, note: choice.targetNote };
}

/** The figures of a pulse against a spec (or problem): on its ensemble and over a region. */
export function judgePulse(spec: unknown, pulse: Pulse, options: JudgeOptions = {}): PulseJudgement {
  const problem = toProblem(spec);
  const region = options.region ?? ensembleRegion(problem);
  checkRegion(region);
  const choice = chooseTarget(problem.target, pulse);
  const map = robustnessMap(choice.targetUsed, pulse, region.detuning, region.amplitudeError, problem.line, problem.system);
  const summary = summariseMap(map, pulse, choice, { ...options, line: problem.line, system: problem.system });
  const ensemble = evaluateJudged(problem, pulse);
  const worst = ensemble.members[ensemble.worstIndex];
  const figures: CompareFigures = {
    meanInfidelity: ensemble.meanInfidelity,
    worstInfidelity: ensemble.worstInfidelity,
    worstMember: { detuning: worst.detuning, amplitudeError: worst.amplitudeError, weight: worst.weight, ...(worst.anharmonicityError ? { anharmonicityError: worst.anharmonicityError } : {}) },
    regionMeanInfidelity: summary.regionMeanInfidelity,
    regionWorstInfidelity: summary.regionWorstInfidelity,
    regionWorstAt: summary.regionWorstAt,
    areaFraction: summary.areaFraction,
    detuningHalfWidth: summary.detuningHalfWidth,
    amplitudeHalfWidth: summary.amplitudeHalfWidth,
    detuningInterval: summary.detuningInterval,
    amplitudeInterval: summary.amplitudeInterval,
    durationS: summary.durationS,
    peakRabiHz: summary.peakRabiHz,
    pulseAreaTurns: summary.pulseAreaTurns,
    energyHz2S: summary.energyHz2S,
  };
  if (ensemble.meanLeakage !== undefined) {
    figures.meanLeakage = ensemble.meanLeakage;
    figures.worstLeakage = ensemble.worstLeakage;
  }
  return { choice, figures, map, region, threshold: summary.threshold };
}

/** The figures compare can sort by, with the direction that is better. */
export const SORT_FIGURES = {
  mean: { key: 'meanInfidelity', better: 'lower', label: "weighted mean infidelity over the spec's ensemble" },
  worst: { key: 'worstInfidelity', better: 'lower', label: "worst member of the spec's ensemble" },
  'region-mean': { key: 'regionMeanInfidelity', better: 'lower', label: 'region mean: unweighted mean infidelity over the grid' },
  'region-worst': { key: 'regionWorstInfidelity', better: 'lower', label: 'region worst: largest infidelity on the grid' },
  area: { key: 'areaFraction', better: 'higher', label: 'fraction of the grid below the threshold' },
  'detuning-width': { key: 'detuningHalfWidth', better: 'higher', label: 'detuning half-width below the threshold' },
  'amplitude-width': { key: 'amplitudeHalfWidth', better: 'higher', label: 'amplitude-error half-width below the threshold' },
  duration: { key: 'durationS', better: 'lower', label: 'duration' },
  peak: { key: 'peakRabiHz', better: 'lower', label: 'peak Rabi frequency' },
  'pulse-area': { key: 'pulseAreaTurns', better: 'lower', label: 'pulse area' },
  energy: { key: 'energyHz2S', better: 'lower', label: 'energy' },
} as const satisfies Record<string, { key: keyof CompareFigures; better: 'lower' | 'higher'; label: string }>;

/** A figure to sort by: a key of SORT_FIGURES. */
export type SortFigure = keyof typeof SORT_FIGURES;

/** Rows with figures, best first by a figure (ties by mean infidelity, then input order); rows without figures last, in order. */
export function sortRows<T extends { figures?: CompareFigures }>(rows: readonly T[], sortBy: SortFigure = 'mean'): T[] {
  const figure = SORT_FIGURES[checkSortFigure(sortBy)];
  const sign = figure.better === 'lower' ? 1 : -1;
  const judged = rows.map((row, index) => ({ row, index })).filter(({ row }) => row.figures);
  judged.sort(
    (x, y) =>
      sign * (x.row.figures![figure.key] - y.row.figures![figure.key]) ||
      x.row.figures!.meanInfidelity - y.row.figures!.meanInfidelity ||
      x.index - y.index,
  );
  return [...judged.map(({ row }) => row), ...rows.filter((row) => !row.figures)];
}

/** The figure if compare can sort by it, else an ArgumentError naming the allowed ones. */
function checkSortFigure(sortBy: unknown): SortFigure {
  if (typeof sortBy !== 'string' || !Object.hasOwn(SORT_FIGURES, sortBy)) {
    throw new ArgumentError(`sortBy: ${describeValue(sortBy)} is not allowed; one of ${Object.keys(SORT_FIGURES).join(', ')}`);
  }
  return sortBy as SortFigure;
}

/** A pulse to compare and the name it goes by. */
export interface NamedPulse {
  name: string;
  pulse: Pulse;
}

/** One row of a comparison: a pulse, the target it is judged against, the note beside it, its figures; or why it is missing. */
export interface CompareRow {
  name: string;
  /** How the pulse was made: its metadata's origin ("design", "composite", ...), "pulse" when it says none. */
  origin: string;
  /** Absent when a sequence cannot be built for the spec's target (`error` says why). */
  pulse?: Pulse;
  /** The target the figures are taken against (the spec's, or its own ideal where that meets it up to a frame change). */
  target?: Target;
  /** What the pulse's own ideal has to do with the spec's target, or null. */
  note?: string | null;
  figures?: CompareFigures;
  /** Present when asked for (`cuts: true`). */
  cuts?: Cuts;
  /** Mean and worst over the spec's ensemble without the spec's line (asked for by `withoutLine`, only with a line). */
  noLine?: { meanInfidelity: number; worstInfidelity: number };
  error?: { name: string; message: string };
}

/** Options of compare. */
export interface CompareOptions extends JudgeOptions {
  /**
   * Composite sequences to build for the spec's target under its rabiMax and dt (names as in
   * compositeNames), and members of the DRAG family (dragFamily) calibrated on the spec.
   */
  composites?: readonly string[];
  /** The figure that orders the rows, best first (default "mean"). */
  sortBy?: SortFigure;
  /** Attach the cuts through zero error over the region to each row. */
  cuts?: boolean;
  /** Add each row's mean and worst without the spec's line (what ignoring it would show). */
  withoutLine?: boolean;
}

/** The comparison: the spec's target, the region and threshold shared by every row, the rows best first. */
export interface Comparison extends Region {
  target: Target;
  threshold: number;
  sortBy: SortFigure;
  rows: CompareRow[];
}

/** Pulses and composite sequences judged on one spec's target, ensemble and region, best first. */
export function compare(spec: unknown, pulses: readonly NamedPulse[], options: CompareOptions = {}): Comparison {
  const problem: Problem = toProblem(spec);
  // Checked before any work, so that a bad figure fails at once.
  const sortBy = checkSortFigure(options.sortBy ?? 'mean');
  const region = options.region ?? ensembleRegion(problem);
  checkRegion(region);
  const threshold = checkThreshold(options.threshold ?? DEFAULT_THRESHOLD);
  const names = options.composites ?? [];
  for (const name of names) {
    if (!isCompositeName(name) && !isDragName(name)) {
      throw new ArgumentError(`composites: "${name}" is not a known sequence; one of ${[...compositeNames, ...dragFamily].map((c) => c.name).join(', ')}`);
    }
  }
  const built = compositesFor(problem.target, names.filter((n) => !isDragName(n)), problem);
  const drags = dragFamilyFor(problem, names.filter(isDragName));
  const judge = (name: string, pulse: Pulse): CompareRow => {
    const { choice, figures } = judgePulse(problem, pulse, { region, threshold });
    const naive = options.withoutLine && problem.line ? evaluateJudged(problem, pulse, true) : null;
    return {
      name,
      origin: typeof pulse.metadata.origin === 'string' ? pulse.metadata.origin : 'pulse',
      pulse,
      target: choice.targetUsed,
      note: choice.targetNote,
      figures,
      ...(options.cuts ? { cuts: cutsThroughZero(choice.targetUsed, pulse, region.detuning, region.amplitudeError, problem.line, problem.system) } : {}),
      ...(naive ? { noLine: { meanInfidelity: naive.meanInfidelity, worstInfidelity: naive.worstInfidelity } } : {}),
    };
  };
  const rows: CompareRow[] = [
    ...pulses.map((p) => judge(p.name, p.pulse)),
    ...built.map((b) => (b.pulse ? judge(b.title, b.pulse) : { name: b.title, origin: 'composite', error: b.error })),
    ...drags.map((d) => (d.pulse ? judge(d.title, d.pulse) : { name: d.title, origin: 'drag', error: d.error })),
  ];
  return { target: problem.target, ...region, threshold, sortBy, rows: sortRows(rows, sortBy) };
}
