// What a design run leaves with its pulse: the starts table and every start's convergence
// curve, so that both come back with the pulse after a reload or from a project file.
import type { StopReason } from '../core/types.ts';
import type { DesignOutcome } from '../worker/client.ts';
import type { Convergence } from './convergence.ts';

/** A start as the page shows it: numbered from 1, as the command line does (indices stay 0-based inside). */
export function startNumber(index: number): number {
  return index + 1;
}

/** One row of the starts table. */
export interface StartRow {
  start: number;
  meanInfidelity: number;
  iterations: number;
  stopReason: StopReason;
  elapsedS: number;
}

/** One start's convergence curve: iterations and mean infidelities, in order. */
export interface HistoryCurve {
  start: number;
  iteration: number[];
  meanInfidelity: number[];
}

/** A finished run as kept with its pulse. */
export interface RunHistory {
  starts: StartRow[];
  /** The start whose pulse was kept. */
  best: number;
  stopped: boolean;
  elapsedS: number;
  curves: HistoryCurve[];
}

/** The history of a finished run: its starts and the curves the page drew (already thinned to a few hundred points each). */
export function runHistory(outcome: DesignOutcome, convergence: Convergence): RunHistory {
  return {
    starts: outcome.starts.map((s) => ({ start: s.start, meanInfidelity: s.meanInfidelity, iterations: s.iterations, stopReason: s.stopReason, elapsedS: s.elapsedS })),
    best: outcome.best.start,
    stopped: outcome.stopped,
    elapsedS: outcome.elapsedS,
    curves: convergence.series().map((s) => ({ start: s.start, iteration: [...s.iteration], meanInfidelity: [...s.meanInfidelity] })),
  };
}
