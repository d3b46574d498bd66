// The public library API over the wasm core: evaluate, design, robustnessMap.
// (Being written now: signatures are final, bodies land shortly.)
import type { DesignResult, Evaluation, GridAxis, Member, Problem, Progress, Pulse, Target } from './types.ts';

/** Options of a design run. */
export interface DesignOptions {
  /** Called after every optimiser iteration of every start. */
  onProgress?: (progress: Progress) => void;
  /** Aborting it ends the run within one iteration; the best pulse so far is returned. */
  signal?: AbortSignal;
  /** Which start indices to run (default all 0..starts-1); lets a pool of workers split them. */
  startIndices?: number[];
  /** Attach the current samples to a progress report at most this often (ms); default never. */
  progressPulseEveryMs?: number;
}

/** The figure on a grid of detuning x amplitude error. */
export interface RobustnessMap {
  detuning: GridAxis;
  amplitudeError: GridAxis;
  /** Row-major [amplitudeErrorIndex * detuning.points + detuningIndex]. */
  infidelity: Float64Array;
}

/** Evaluate a pulse on a spec's (or problem's) ensemble and target. */
export declare function evaluate(spec: unknown, pulse: Pulse): Evaluation;
/** Evaluate a pulse for a target on explicit members (weights normalised here). */
export declare function evaluateMembers(target: Target, pulse: Pulse, members: Member[]): Evaluation;
/** Design a pulse by ensemble GRAPE with L-BFGS. */
export declare function design(spec: unknown, options?: DesignOptions): Promise<DesignResult>;
/** Infidelity of a pulse on a detuning x amplitude-error grid. */
export declare function robustnessMap(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis): RobustnessMap;
/** Bloch vector after each sample, 3*(N+1) values starting with `from`. */
export declare function blochTrajectory(pulse: Pulse, member: Member, from: [number, number, number]): Float64Array;
export type { Problem };
