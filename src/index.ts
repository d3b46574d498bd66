// The package's main entry (`import { design } from 'gatesmith'`): the design and analysis
// library, the spec and pulse-file readers, composite pulses and robustness figures.
// Instrument export is `gatesmith/export`; Node-only helpers (threads, files) are `gatesmith/node`.
export { design, evaluate, evaluateMembers, robustnessMap, blochTrajectory, initCore, toProblem } from './core/api.ts';
export { axisValues } from './core/grid.ts';
export type { CoreSource, DesignOptions, RobustnessMap } from './core/api.ts';
export type * from './core/types.ts';
export { SpecError, PulseFormatError, ExportError, ArgumentError } from './core/errors.ts';
export { parseSpec, specJsonFromText, MAX_SEGMENTS, DEFAULT_CONSTRAINTS, DEFAULT_OPTIMIZER } from './core/spec.ts';
export { buildComposite, compositeNames, elementTable } from './core/composites.ts';
export type { CompositeName, CompositeInfo, CompositeOptions, CompositeMetadata, CompositeElement, BuiltElement, Bb1Placement } from './core/composites.ts';
export { summarise, summariseMap, cut, pulseFigures, DEFAULT_THRESHOLD } from './core/robustness.ts';
export type { RobustnessSummary, PulseFigures, SummaryOptions, Cut, ErrorAxis, ThresholdInterval } from './core/robustness.ts';
export { compare, judgePulse, evaluateJudged, sortRows, SORT_FIGURES } from './core/compare.ts';
export type { Comparison, CompareRow, CompareOptions, CompareFigures, JudgeOptions, JudgedEvaluation, NamedPulse, PulseJudgement, SortFigure } from './core/compare.ts';
export { chooseTarget } from './core/target-choice.ts';
export type { TargetChoice } from './core/target-choice.ts';
export { shortestDuration, rectangularTime, targetAngle, stretchPulse } from './core/shortest.ts';
export type { ShortestOptions, ShortestResult, DurationTrial } from './core/shortest.ts';
export { parseManifest, parseVariationsCsv, variationSpec, shardIndices, shardFromEnvironment, SHARDS_VARIABLE, MAX_VARIATIONS } from './core/batch.ts';
export type { BatchManifest, BatchVariation, Shard } from './core/batch.ts';
export { readPulse, writePulse, PULSE_FORMAT, PULSE_VERSION } from './io/pulse.ts';

