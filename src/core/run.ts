// One optimiser start on its own problem block: created, stepped one iteration at a time,
// read, freed. Runs share nothing but the core's arena, so any number of them (and maps
// between their steps) interleave in one core and each gives the pulse it gives alone.
import { createBlock, freeBlock, readBuffer, BUFFER } from './block.ts';
import { encodeMembers } from './encode.ts';
import { initialVariables } from './start.ts';
import type { Problem, StopReason } from './types.ts';
import { getCore, STEP_GRADIENT_TOLERANCE, STEP_LINE_SEARCH_FAILED, type Core } from './wasm.ts';

/** The optimiser's starting variables for one start: the seeded smooth pulse in the bound's variables. */
export function startVariables(problem: Problem, start: number, nVar: number): Float64Array {
  const x = initialVariables(problem, start, nVar);
  // The box's variables are the samples over rabiMax: start from the same pulse as the
  // tanh parametrisation would (I = rabiMax tanh(x)).
  if (problem.constraints.bound === 'box') for (let k = 0; k < x.length; k++) x[k] = Math.tanh(x[k]);
  return x;
}

/** One optimiser start of a validated problem, stepped by the caller. */
export class StartRun {
  readonly start: number;
  private readonly core: Core;
  private readonly problem: Problem;
  private ptr: number;
  private iterationCount = 0;

  constructor(problem: Problem, start: number, core: Core = getCore()) {
    this.core = core;
    this.problem = problem;
    this.start = start;
    const enc = encodeMembers(problem.members, 2, true);
    const { segments: n, dt, rabiMax, constraints, optimizer } = problem;
    this.ptr = createBlock(core, {
      target: problem.target, segments: n, dt, members: enc, bound: constraints.bound, zeroEdges: constraints.zeroEdges,
      rabiMax, smoothness: constraints.smoothness, optimizer, held: true,
    });
    try {
      const nVar = core.exports.problemVariables(this.ptr);
      core.job(() => {
        const x0 = core.put(startVariables(problem, start, nVar));
        core.exports.optInit(this.ptr, x0);
      });
    } catch (error) {
      this.dispose();
      throw error;
    }
  }

  /** One iteration: null, or why the optimiser cannot go on. */
  step(): StopReason | null {
    const status = this.core.exports.optStep(this.ptr);
    if (status === STEP_GRADIENT_TOLERANCE) return 'gradient-tolerance';
    if (status === STEP_LINE_SEARCH_FAILED) return 'line-search-failed';
    this.iterationCount++;
    return null;
  }

  /** Iterations taken. */
  get iterations(): number { return this.iterationCount; }
  /** Weighted mean infidelity at the last evaluation (penalty excluded). */
  get infidelity(): number { return this.core.exports.problemInfidelity(this.ptr); }
  /** Objective at the accepted point. */
  get objective(): number { return this.core.exports.optObjective(this.ptr); }
  /** Infinity norm of the (projected) gradient at the accepted point. */
  get gradientNorm(): number { return this.core.exports.optGradientNorm(this.ptr); }
  /** Objective evaluations so far. */
  get evaluations(): number { return this.core.exports.optEvaluations(this.ptr); }

  /** Samples of the accepted point (the last trial of a line search may differ): O(n). */
  samples(): { i: Float64Array; q: Float64Array } {
    const ex = this.core.exports;
    ex.controlsFromVariables(this.ptr, ex.optVariables(this.ptr));
    const n = this.problem.segments;
    return { i: readBuffer(this.core, this.ptr, BUFFER.samplesI, n), q: readBuffer(this.core, this.ptr, BUFFER.samplesQ, n) };
  }

  /** Free the start's block (idempotent). */
  dispose(): void {
    if (this.ptr !== 0) freeBlock(this.core, this.ptr);
    this.ptr = 0;
  }
}
