// One optimiser start on its own problem block: created, stepped one iteration at a time,
// read, freed. Runs share nothing but the core's arena, so any number of them (and maps
// between their steps) interleave in one core and each gives the pulse it gives alone.
import { createBlock, freeBlock, readBuffer, BUFFER } from './block.ts';
import { blockSystem, encodeSystem } from './system.ts';
import { lineLayout } from './line.ts';
import { memberShares, splitObjective, type SharePool } from './member-split.ts';
import { initialVariables, variablesFromSamples } from './start.ts';
import type { Problem, StopReason } from './types.ts';
import { getCore, STEP_GRADIENT_TOLERANCE, STEP_LINE_SEARCH_FAILED, type Core } from './wasm.ts';
import * as pm from './portable-math.ts';

/** The optimiser's starting variables for one start: the given samples, else the seeded smooth pulse, in the bound's variables. */
export function startVariables(problem: Problem, start: number, nVar: number, samples?: { i: ArrayLike<number>; q: ArrayLike<number> }): Float64Array {
  if (samples) return variablesFromSamples(problem, samples, nVar);
  const x = initialVariables(problem, start, nVar);
  // The box's variables are the samples over rabiMax: start from the same pulse as the
  // tanh parametrisation would (I = rabiMax tanh(x)).
  if (problem.constraints.bound === 'box') for (let k = 0; k < x.length; k++) x[k] = pm.tanh(x[k]);
  return x;
}

/** Radius beyond which tanh rounds to its cap (1 - 2^-50): 2 e^-37 < 2^-50. */
const RADIUS_FLAT = 18.5;
/** Radii a sample pulled inward is re-centred to, tried in turn (tanh 0.995 ... 0.999988). */
const INWARD_RADII = [3, 4, 5, 6];
/** Radius above which a sample pulled inward counts as stuck (slope sech^2 below 1.3e-3). */
const RADIUS_PULLED = 4;
/** Re-centrings per start, at most. */
const MAX_RECENTRES = 20;

/** One optimiser start of a validated problem, stepped by the caller. */
export class StartRun {
  readonly start: number;
  private readonly core: Core;
  private readonly problem: Problem;
  private ptr: number;
  private iterationCount = 0;
  private recentres = 0;
  private lastRecentreObjective = Infinity;
  /** Ends the split of the objective into member shares, when it is split. */
  private unsplit: (() => void) | undefined;
  /** Objectives after the last max(stallIterations, outpaceEvery) + 1 iterations, a ring indexed by iteration. */
  private readonly history: Float64Array;

  /** `samples` (Hz, the problem's segments), when given, are where the start begins instead of its seeded pulse. */
  constructor(
    problem: Problem, start: number, core: Core = getCore(problem.optimizer.arithmetic), samples?: { i: ArrayLike<number>; q: ArrayLike<number> }, pool?: SharePool,
  ) {
    this.core = core;
    this.problem = problem;
    this.start = start;
    const enc = encodeSystem(problem.target, problem.members, problem.system);
    const { segments: n, dt, rabiMax, constraints, optimizer } = problem;
    this.history = new Float64Array(Math.max(optimizer.stallIterations, optimizer.outpaceEvery) + 1);
    const drive = problem.line ? lineLayout(problem.line, n, dt) : undefined;
    this.ptr = createBlock(core, {
      ...blockSystem(enc), target: problem.target, segments: n, dt, bound: constraints.bound, zeroEdges: constraints.zeroEdges,
      rabiMax, smoothness: constraints.smoothness, optimizer, held: true,
      ...(drive ? { drive } : {}),
    });
    try {
      // A large ensemble is evaluated in member shares (member-split.ts), on `pool`'s threads when given.
      const shares = memberShares(problem);
      if (shares.length > 1) this.unsplit = splitObjective(core, this.ptr, problem, shares, drive?.samples ?? n, drive?.dt ?? dt, pool);
      const nVar = core.exports.problemVariables(this.ptr);
      core.job(() => {
        const x0 = core.put(startVariables(problem, start, nVar, samples));
        core.exports.optInit(this.ptr, x0);
      });
      this.history[0] = this.objective;
    } catch (error) {
      this.dispose();
      throw error;
    }
  }

  /** One iteration: null, or why the optimiser cannot go on. */
  step(): StopReason | null {
    const status = this.core.exports.optStep(this.ptr);
    if (status === STEP_GRADIENT_TOLERANCE || status === STEP_LINE_SEARCH_FAILED) {
      if (this.problem.constraints.bound === 'disc' && this.recentre()) {
        this.advanced();
        return null;
      }
      return status === STEP_GRADIENT_TOLERANCE ? 'gradient-tolerance' : 'line-search-failed';
    }
    this.advanced();
    return null;
  }

  private advanced(): void {
    this.iterationCount++;
    this.history[this.iterationCount % this.history.length] = this.objective;
  }

  /**
   * True when the last stallIterations iterations lowered the objective by no more than
   * stallTolerance of its value before them (never when stallIterations is 0). A rule of
   * the start's own history, so where and beside what a start runs never changes it.
   */
  get stalled(): boolean {
    const { stallIterations: k, stallTolerance: tau } = this.problem.optimizer;
    if (k === 0 || this.iterationCount < k) return false;
    const before = this.history[(this.iterationCount - k) % this.history.length];
    return before - this.objective <= tau * before;
  }

  /** The objective after `iteration` iterations, one of the last max(stallIterations, outpaceEvery) + 1 (else a RangeError). */
  objectiveAt(iteration: number): number {
    if (!Number.isInteger(iteration) || iteration < 0 || iteration > this.iterationCount || this.iterationCount - iteration >= this.history.length) {
      throw new RangeError(`iteration: ${iteration} is not kept; the start keeps iterations ${Math.max(0, this.iterationCount - this.history.length + 1)} to ${this.iterationCount}`);
    }
    return this.history[iteration % this.history.length];
  }

  /**
   * The disc's way out of a stall. Under (I, Q) = rabiMax tanh(r)/r (x, y) a sample at the
   * bound has r growing without limit: the derivative along r is sech^2(r) and across it
   * 1/r, so the gradient with respect to the variables fades while the samples' own
   * gradient does not (measured: starts ending on the gradient tolerance with r up to 1e10
   * and a sample-space optimality residual of 2e-4). Re-centring to a radius where tanh
   * is not flat, with the memory of correction pairs dropped, lets the run go on:
   *  - r > RADIUS_FLAT, pushed outward: to RADIUS_FLAT, where tanh already rounds to its cap,
   *    so the sample is the same to rounding and only the scale across r is restored;
   *  - r > RADIUS_PULLED, pulled inward (the figure falls as the amplitude does): to
   *    the first of INWARD_RADII that does not raise the objective (a step inward).
   * Done at most MAX_RECENTRES times per start, and only while the run keeps improving.
   */
  private recentre(): boolean {
    if (this.recentres >= MAX_RECENTRES || !(this.objective < this.lastRecentreObjective)) return false;
    const ex = this.core.exports;
    const nVar = ex.problemVariables(this.ptr);
    const x = this.core.read(ex.optVariables(this.ptr), nVar);
    const f0 = this.objective;
    // The samples' own gradient at the accepted point (the last evaluation may be a trial).
    const g = this.core.job(() => {
      const xPtr = this.core.put(x), gPtr = this.core.alloc(nVar);
      ex.objective(this.ptr, xPtr, gPtr);
      return { i: readBuffer(this.core, this.ptr, BUFFER.gradI, this.problem.segments), q: readBuffer(this.core, this.ptr, BUFFER.gradQ, this.problem.segments) };
    });
    const first = this.problem.constraints.zeroEdges && this.problem.segments >= 3 ? 1 : 0;
    // Re-centred variables: every r beyond RADIUS_FLAT to it, and samples pulled inward
    // (beyond RADIUS_PULLED) to `inwardRadius` (Infinity: left where they are).
    const recentred = (inwardRadius: number): { x: Float64Array; changed: boolean } => {
      const out = x.slice();
      let changed = false;
      for (let f = 0; f < nVar / 2; f++) {
        const r = Math.hypot(x[2 * f], x[2 * f + 1]);
        // d(figure)/d(amplitude) along the sample's own direction (x, y).
        const pull = g.i[f + first] * x[2 * f] + g.q[f + first] * x[2 * f + 1];
        let to = Math.min(r, RADIUS_FLAT);
        if (pull > 0 && r > RADIUS_PULLED) to = Math.min(to, inwardRadius);
        if (to === r) continue;
        out[2 * f] *= to / r;
        out[2 * f + 1] *= to / r;
        changed = true;
      }
      return { x: out, changed };
    };
    const flat = recentred(Infinity);
    const tries = INWARD_RADII.map(recentred).filter((t) => t.changed);
    if (!flat.changed && tries.length === 0) return false;
    this.recentres++;
    this.lastRecentreObjective = f0;
    this.core.job(() => {
      // The inward steps from the largest, kept once the objective does not rise; else only the lossless part.
      for (const t of tries) if (ex.optMoveTo(this.ptr, this.core.put(t.x), 1) <= f0) return;
      ex.optMoveTo(this.ptr, this.core.put(flat.x), 1);
    });
    return true;
  }

  /** The start's problem block (assembly/problem.ts), for tools and tests that call the core on it. */
  get block(): number { return this.ptr; }
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
    this.unsplit?.();
    this.unsplit = undefined;
    if (this.ptr !== 0) freeBlock(this.core, this.ptr);
    this.ptr = 0;
  }
}
