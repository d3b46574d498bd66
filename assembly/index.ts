// The only file of the core that exports to JavaScript: thin (pointer, length, ...)
// wrappers. Validation happens in TypeScript (src/core); kernels trust their inputs.
// Every job works on a problem block (problem.ts) reached by a pointer.

export { arenaReset, arenaAlloc, arenaRelease, arenaUsed } from './memory';
export { problemCreate, problemFree, problemBuffer, problemSetShares } from './problem';
export {
  problemFigure, problemGradient, problemDrive, problemInfidelity, problemVariables, problemSeries,
  controlsFromVariables, objective,
} from './control';
export { blochPath } from './qubit';
export {
  optInit, optStep, optObjective, optGradientNorm, optVariables, optGradient, optEvaluations, optIterations, optStoredPairs, optMoveTo,
} from './lbfgs';
export { ladderPropagator } from './ladder';
export { ladderPopulations, ladderWorkspaceSize } from './ladder-sweep';
