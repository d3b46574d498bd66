// The only file of the core that exports to JavaScript: thin (pointer, length, ...)
// wrappers. Validation happens in TypeScript (src/core); kernels trust their inputs.

export { arenaReset, arenaAlloc, arenaRelease, arenaUsed } from './memory';
export { ensembleFigure, blochPath, currentSeriesTerms, currentHalvings } from './ensemble';
export { ensembleGradient } from './gradient';
export { problemSet, problemVariables, problemInfidelity, controlsFromVariables, objective } from './control';
export {
  optInit, optStep, optObjective, optGradientNorm, optVariables, optEvaluations, optIterations,
} from './lbfgs';
export { ladderPropagator } from './ladder';
export { ladderFigure, ladderGradient, ladderPopulations, ladderWorkspaceSize } from './ladder-sweep';
