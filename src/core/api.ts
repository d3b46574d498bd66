// The public library API over the wasm core: evaluate, design, robustness maps and
// Bloch trajectories. The same code serves the command line (Node) and the app's
// workers. Validation happens here; the kernels trust what they are given.
import { ArgumentError, describeValue } from './errors.ts';
import { BUFFER, createBlock, readBuffer, setSamples } from './block.ts';
import { checkPulse, encodeMembers, encodeTarget } from './encode.ts';
import { blockSystem, encodeSystem, MAX_CHECK_LEVELS, type SystemEncoding } from './system.ts';
import { qubitDrive } from './line.ts';
import { lineJson } from './line-spec.ts';
import { StartRun } from './run.ts';
import { checkProblemAngles, checkPulseAngles } from './limits.ts';
import { checkProblem, checkTarget } from './problem-check.ts';
import { bestStart, outpacedStarts, prunes, startsToContinue, type Checkpoint } from './best-start.ts';
import { axisValues, checkRegion } from './grid.ts';
import { parseSpec } from './spec.ts';
import type {
  DesignResult, Evaluation, GridAxis, LadderSystem, Line, Member, MemberFigure, Problem, Progress, Pulse, SharePool, StartResult, StopReason, Target,
  TruncationCheck,
} from './types.ts';
import { buildFor, getCore, loadCore } from './wasm.ts';

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
  /**
   * One stage of a pruned design split over threads or workers (best-start.ts `prunes`):
   * 'probe' runs each start to `pruneAfter` iterations and returns the open ones as 'pruned'
   * (and `keepStarts`); 'finish' runs the given starts to the end without pruning. Default:
   * the whole design, pruned here when it runs every start.
   */
  stage?: 'probe' | 'finish';
  /**
   * Start 0 begins from these samples (Hz, the spec's number of segments) instead of its
   * random pulse, e.g. a pulse designed before; a sample above 98 % of the amplitude bound is
   * scaled down to it, where the optimiser can still move it. The other starts are unchanged,
   * so the result stays deterministic.
   */
  initialPulse?: { i: ArrayLike<number>; q: ArrayLike<number> };
  /**
   * Compares the starts every `outpaceEvery` iterations (best-start.ts outpacedStarts): given
   * this share's starts there, resolves with the starts to stop as outpaced. Default: the
   * design's own starts compared among themselves; a design split over threads or workers
   * passes a Referee's report, so that every share is compared with every start.
   */
  judge?: (checkpoint: Checkpoint) => number[] | Promise<number[]>;
  /** Called with each start's result as the start ends. */
  onStartEnd?: (result: StartResult) => void;
  /**
   * Threads that evaluate some member shares of a large problem (member-split.ts; Node's
   * designInThreads starts them). The shares and their sum do not depend on it: with or
   * without, a design gives the same bits.
   */
  sharePool?: SharePool;
}

/** The figure on a grid of detuning x amplitude error. */
export interface RobustnessMap {
  detuning: GridAxis;
  amplitudeError: GridAxis;
  /** Row-major [amplitudeErrorIndex * detuning.points + detuningIndex]. */
  infidelity: Float64Array;
  /** On a ladder: the leakage on the same grid. */
  leakage?: Float64Array;
}

/**
 * The core's wasm: its bytes, a URL to fetch it from, or a compiled WebAssembly.Module (typed
 * without the DOM's names, so that a Node-only TypeScript project checks these declarations).
 */
export type CoreSource = ArrayBuffer | ArrayBufferView | URL | string | object;

/**
 * Load the wasm core from a URL, bytes or module (browsers; Node loads it by itself), and
 * with `fused` its fused build (build/gatesmith-fused.wasm), fetched only where the engine
 * runs relaxed SIMD.
 */
export async function initCore(source: CoreSource, fused?: CoreSource): Promise<void> {
  type Source = Parameters<typeof loadCore>[0];
  await loadCore(source as Source, fused as Source | undefined);
}

function isProblem(spec: unknown): spec is Problem {
  const p = spec as Problem;
  return typeof p === 'object' && p !== null && Array.isArray(p.members) && typeof p.dt === 'number'
    && typeof p.target === 'object' && p.target !== null && 'kind' in p.target;
}

/** A Problem checked with the spec's rules, or the spec JSON validated into one. */
export function toProblem(spec: unknown): Problem {
  return isProblem(spec) ? checkProblem(spec) : parseSpec(spec);
}

/** Evaluate a pulse on a spec's (or problem's) ensemble, target and system, through its line (if any). */
export function evaluate(spec: unknown, pulse: Pulse): Evaluation {
  const problem = toProblem(spec);
  return evaluateMembers(problem.target, pulse, problem.members, problem.line, problem.system);
}

/**
 * Evaluate a pulse for a target on explicit members (weights normalised here), through
 * `line` when given, on the qubit or, with `system`, on a ladder (then with leakage per
 * member and over the ensemble).
 */
export function evaluateMembers(target: Target, pulse: Pulse, members: Member[], line?: Line, system?: LadderSystem, maxLevels?: number): Evaluation {
  checkTarget(target);
  checkPulse(pulse);
  const enc = encodeSystem(target, members, system, maxLevels);
  const drive = qubitDrive(pulse, line);
  checkPulseAngles(drive, members);
  const values = figures(target, drive, enc);
  const weight = enc.members.weight;
  const m = enc.members.padded;
  let mean = 0, meanLeakage = 0, meanAverage = 0, worstLeakage = 0;
  let worstIndex = 0;
  const out = members.map((member, j) => {
    mean += weight[j] * values[j];
    if (values[j] > values[worstIndex]) worstIndex = j;
    const figure: MemberFigure = { detuning: member.detuning, amplitudeError: member.amplitudeError, weight: weight[j], infidelity: values[j] };
    if (enc.ladder) {
      const leakage = values[m + j];
      figure.anharmonicityError = member.anharmonicityError ?? 0;
      figure.leakage = leakage;
      if (enc.mode === 2) figure.phaseAfter = values[2 * m + j];
      meanLeakage += weight[j] * leakage;
      worstLeakage = Math.max(worstLeakage, leakage);
      // 1 - F_avg = (L + 2 J)/3 on a gate: a sum of non-negative terms.
      meanAverage += weight[j] * (target.kind === 'gate' ? (leakage + 2 * values[j]) / 3 : values[j]);
    }
    return figure;
  });
  const evaluation: Evaluation = { members: out, meanInfidelity: mean, worstInfidelity: values[worstIndex], worstIndex };
  if (enc.ladder) Object.assign(evaluation, { levels: enc.levels, meanLeakage, worstLeakage, meanAverageInfidelity: meanAverage });
  return evaluation;
}

/** Below this, a change between two truncations is rounding, not truncation. */
const TRUNCATION_FLOOR = 1e-15;

/**
 * A ladder evaluation repeated on two more levels: `differs` when the mean infidelity or
 * the mean leakage changes by more than a factor two (the truncation matters).
 */
export function truncationCheck(target: Target, pulse: Pulse, members: Member[], system: LadderSystem, evaluation: Evaluation, line?: Line): TruncationCheck {
  const more = evaluateMembers(target, pulse, members, line, { ...system, levels: system.levels + 2 }, MAX_CHECK_LEVELS);
  const apart = (a: number, b: number): boolean => a > 2 * b + TRUNCATION_FLOOR || b > 2 * a + TRUNCATION_FLOOR;
  const leakage = more.meanLeakage ?? 0;
  return {
    levels: more.levels ?? system.levels + 2, meanInfidelity: more.meanInfidelity, meanLeakage: leakage,
    differs: apart(more.meanInfidelity, evaluation.meanInfidelity) || apart(leakage, evaluation.meanLeakage ?? 0),
  };
}

/** Per-member outputs from the core (the qubit: figures; a ladder: figures, leakages, phases, m each). */
function figures(target: Target, pulse: Pulse, enc: SystemEncoding): Float64Array {
  const core = getCore();
  const n = pulse.i.length;
  return core.job(() => {
    const p = createBlock(core, { ...blockSystem(enc), target, segments: n, dt: pulse.dt });
    setSamples(core, p, pulse.i, pulse.q);
    core.exports.problemFigure(p);
    return readBuffer(core, p, BUFFER.perMember, (enc.ladder ? 3 : 1) * enc.members.padded);
  });
}

/** Members per core call of a map: bounds the arena and keeps each call short. */
const MAP_CHUNK = 8192;

/** Infidelity of a pulse on a detuning x amplitude-error grid, through `line` when given (on a ladder with `system`, and its leakage). */
export function robustnessMap(target: Target, programmed: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): RobustnessMap {
  const part = robustnessMapPart(target, programmed, detuning, amplitudeError, 0, detuning.points * amplitudeError.points, line, system);
  const map: RobustnessMap = { detuning: { ...detuning }, amplitudeError: { ...amplitudeError }, infidelity: part.infidelity };
  if (part.leakage) map.leakage = part.leakage;
  return map;
}

/**
 * The grid points `start` to `start + count - 1` of robustnessMap (row-major: detuning
 * varies fastest), with the same values bit for bit: each point's value is computed from the
 * whole grid's axis values and does not depend on the other points of its call. The worker
 * computes a long map in such parts, so that other requests do not wait for the whole map.
 */
export function robustnessMapPart(target: Target, programmed: Pulse, detuning: GridAxis, amplitudeError: GridAxis, start: number, count: number, line?: Line, system?: LadderSystem): { infidelity: Float64Array; leakage?: Float64Array } {
  checkTarget(target);
  checkPulse(programmed);
  checkRegion({ detuning, amplitudeError });
  const total = detuning.points * amplitudeError.points;
  if (!Number.isInteger(start) || !Number.isInteger(count) || start < 0 || count < 0 || start + count > total) {
    throw new ArgumentError(`points ${describeValue(start)} to ${describeValue(start + count - 1)} are not allowed; a grid of ${detuning.points} x ${amplitudeError.points} has points 0 to ${total - 1}`);
  }
  const pulse = qubitDrive(programmed, line);
  const far = Math.max(Math.abs(detuning.min), Math.abs(detuning.max));
  checkPulseAngles(pulse, [{ detuning: far, amplitudeError: amplitudeError.max, weight: 1 }, { detuning: far, amplitudeError: amplitudeError.min, weight: 1 }]);
  const dv = axisValues(detuning), av = axisValues(amplitudeError);
  const infidelity = new Float64Array(count);
  const ladder = encodeSystem(target, [{ detuning: 0, amplitudeError: 0, weight: 1 }], system).ladder;
  const leakage = ladder ? new Float64Array(count) : undefined;
  for (let from = 0; from < count; from += MAP_CHUNK) {
    const size = Math.min(MAP_CHUNK, count - from);
    const chunk: Member[] = [];
    for (let j = 0; j < size; j++) {
      const idx = start + from + j;
      chunk.push({ detuning: dv[idx % dv.length], amplitudeError: av[Math.floor(idx / dv.length)], weight: 1 });
    }
    const enc = encodeSystem(target, chunk, system);
    const values = figures(target, pulse, enc);
    infidelity.set(values.subarray(0, size), from);
    if (leakage) leakage.set(values.subarray(enc.members.padded, enc.members.padded + size), from);
  }
  return leakage ? { infidelity, leakage } : { infidelity };
}

/**
 * Bloch vector after each sample of the drive the qubit sees (the pulse itself without a
 * line), 3*(N+1) values starting with `from`. Two levels only: on a ladder the state
 * leaves the qubit's sphere (use ladderPopulations).
 */
export function blochTrajectory(programmed: Pulse, member: Member, from: [number, number, number], line?: Line, system?: LadderSystem): Float64Array {
  if (system !== undefined && system.levels > 2) {
    throw new ArgumentError(`system.levels: ${describeValue(system.levels)} is not allowed for a Bloch trajectory; the Bloch sphere holds two levels only (ask for the populations of every level against time instead)`);
  }
  checkPulse(programmed);
  const pulse = qubitDrive(programmed, line);
  encodeMembers([member], 2, false);
  checkPulseAngles(pulse, [member]);
  const norm = Math.hypot(from[0], from[1], from[2]);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new ArgumentError(`from: ${describeValue(from)} is not allowed; give a non-zero Bloch vector of finite numbers`);
  const core = getCore();
  const n = pulse.i.length;
  return core.job(() => {
    const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
    // H rotates |0> onto `from`; G is unused by the path.
    const tPtr = core.put(encodeTarget({ kind: 'state', from, to: from }));
    const outPtr = core.alloc(3 * (n + 1));
    core.exports.blochPath(iPtr, qPtr, n, pulse.dt, 1 + member.amplitudeError, member.detuning, tPtr, outPtr);
    return core.read(outPtr, 3 * (n + 1));
  });
}

/** Let the event loop run (abort requests, progress messages) between iterations. */
function yieldToEventLoop(): Promise<void> {
  const g = globalThis as { setImmediate?: (cb: () => void) => void };
  if (g.setImmediate) return new Promise((resolve) => g.setImmediate!(resolve));
  return new Promise((resolve) => {
    const channel = new MessageChannel();
    channel.port1.onmessage = () => {
      channel.port1.close();
      resolve();
    };
    channel.port2.postMessage(0);
  });
}

const YIELD_EVERY_MS = 15;

/** Design a pulse by ensemble GRAPE with L-BFGS (each start on its own problem block, so designs run side by side). */
export function design(spec: unknown, options: DesignOptions = {}): Promise<DesignResult> {
  try {
    const problem = toProblem(spec);
    // Refused (SegmentAngleError) when a segment at the bound could turn a member further than the core computes exactly.
    checkProblemAngles(problem);
    return designNow(problem, options);
  } catch (error) {
    return Promise.reject(error);
  }
}

async function designNow(problem: Problem, options: DesignOptions): Promise<DesignResult> {
  const t0 = performance.now();
  const indices = options.startIndices ?? Array.from({ length: problem.optimizer.starts }, (_, k) => k);
  if (indices.length === 0) throw new ArgumentError('startIndices: the list is empty; give at least one start');
  for (const s of indices) {
    if (!Number.isInteger(s) || s < 0) throw new ArgumentError(`startIndices: ${describeValue(s)} is not allowed; use whole numbers >= 0`);
  }
  if (options.initialPulse) checkInitialPulse(options.initialPulse, problem.segments);
  const { pruneAfter, keepStarts, maxIterations, timeLimit } = problem.optimizer;
  const deadline = t0 + timeLimit * 1000;
  // 'probe' runs each start to the pruning point (of the whole design's starts); a design
  // run in one loop prunes its own starts here.
  const o = problem.optimizer;
  const pruning = options.stage === 'probe' ? prunes(o, o.starts) : options.stage === undefined && prunes(o, indices.length);
  const until = pruning ? Math.min(pruneAfter, maxIterations) : maxIterations;
  const starts: StartResult[] = [];
  const open: { run: StartRun; elapsedS: number }[] = [];
  const ended = (result: StartResult): void => {
    starts.push(result);
    options.onStartEnd?.(result);
  };
  try {
    if (o.outpaceEvery > 0 && !pruning && options.stage !== 'finish') {
      await designInStep(problem, indices, options, t0, deadline, starts, open, ended);
    } else {
      for (const s of indices) {
        if (starts.length + open.length > 0 && (options.signal?.aborted || performance.now() >= deadline)) break;
        const tStart = performance.now();
        const run = new StartRun(problem, s, undefined, s === 0 ? options.initialPulse : undefined, options.sharePool);
        const reason = await advance(problem, run, options, t0, deadline, until);
        const elapsedS = (performance.now() - tStart) / 1000;
        if (reason) {
          ended(startResult(problem, run, reason, elapsedS));
          run.dispose();
        } else open.push({ run, elapsedS });
      }
      // The probe stage hands its open starts back as 'pruned'; a whole design continues the best.
      const probes = [...starts, ...open.map(({ run, elapsedS }) => startResult(problem, run, 'pruned', elapsedS))];
      const going = options.stage === 'probe' ? [] : startsToContinue(probes, keepStarts);
      for (const { run, elapsedS } of open) {
        if (going.includes(run.start)) {
          const tStart = performance.now();
          const reason = (await advance(problem, run, options, t0, deadline, maxIterations)) ?? 'max-iterations';
          ended(startResult(problem, run, reason, elapsedS + (performance.now() - tStart) / 1000));
        } else ended(probes.find((r) => r.start === run.start)!);
      }
    }
  } finally {
    for (const { run } of open) run.dispose();
  }
  starts.sort((a, b) => a.start - b.start);
  const result = bestOfStarts(problem, starts, t0);
  if (options.stage === 'probe' && pruning) result.keepStarts = keepStarts;
  return result;
}

/**
 * The starts in step, outpaceEvery iterations at a time: after each round every start has
 * the same iteration count (or has ended), and the judge (options.judge, else these starts
 * among themselves) names the ones outpaced. A start's path never depends on the others,
 * so each start stops at the same iteration whatever the order, the threads or the workers.
 * Ended starts go to `ended`; the open ones stay in `open` for the caller to free.
 */
async function designInStep(
  problem: Problem, indices: number[], options: DesignOptions, t0: number, deadline: number,
  starts: StartResult[], open: { run: StartRun; elapsedS: number }[], ended: (result: StartResult) => void,
): Promise<void> {
  const { outpaceEvery, maxIterations } = problem.optimizer;
  const judge = options.judge ?? ((c: Checkpoint) => outpacedStarts(c.standings, c.iteration, problem.optimizer));
  for (let iteration = outpaceEvery; ; iteration += outpaceEvery) {
    const until = Math.min(iteration, maxIterations);
    // The first round creates each start as it comes to it, and none once the run is
    // stopped or out of time (as starts run one at a time would).
    const round = iteration === outpaceEvery ? indices : [...open];
    for (const item of round) {
      let entry: { run: StartRun; elapsedS: number };
      if (typeof item === 'number') {
        if (starts.length + open.length > 0 && (options.signal?.aborted || performance.now() >= deadline)) break;
        entry = { run: new StartRun(problem, item, undefined, item === 0 ? options.initialPulse : undefined, options.sharePool), elapsedS: 0 };
        open.push(entry);
      } else entry = item;
      const tStart = performance.now();
      const reason = await advance(problem, entry.run, options, t0, deadline, until);
      entry.elapsedS += (performance.now() - tStart) / 1000;
      if (reason) {
        ended(startResult(problem, entry.run, reason, entry.elapsedS));
        entry.run.dispose();
        open.splice(open.indexOf(entry), 1);
      }
    }
    if (open.length === 0) return;
    const standings = [
      ...starts.map((r) => ({ start: r.start, objective: r.objective })),
      ...open.map(({ run }) => ({ start: run.start, objective: run.objective, before: run.objectiveAt(iteration - outpaceEvery) })),
    ];
    const stop = new Set(await judge({ iteration, standings }));
    for (const entry of [...open]) {
      if (!stop.has(entry.run.start)) continue;
      ended(startResult(problem, entry.run, 'outpaced', entry.elapsedS));
      entry.run.dispose();
      open.splice(open.indexOf(entry), 1);
    }
  }
}

function checkInitialPulse(pulse: { i: ArrayLike<number>; q: ArrayLike<number> }, segments: number): void {
  for (const channel of ['i', 'q'] as const) {
    const v = pulse[channel];
    if (!v || v.length !== segments) {
      throw new ArgumentError(`initialPulse.${channel}: ${v ? `${v.length} samples` : 'missing value'} is not allowed; it must have the spec's ${segments} segments`);
    }
    for (let k = 0; k < v.length; k++) {
      if (!Number.isFinite(v[k])) throw new ArgumentError(`initialPulse.${channel}[${k}]: ${describeValue(v[k])} is not allowed; samples must be finite numbers (Hz)`);
    }
  }
}

/** The design result of finished starts: the best (best-start.ts) is evaluated, through the problem's line. */
export function bestOfStarts(problem: Problem, starts: StartResult[], t0: number): DesignResult {
  const best = bestStart(starts);
  const evaluation = evaluateMembers(problem.target, best.pulse, problem.members, problem.line, problem.system);
  if (problem.line) best.pulse.metadata.line = lineJson(problem.line);
  // The build the starts ran on: a last-bit difference can lead the optimiser elsewhere.
  best.pulse.metadata.arithmetic = buildFor(problem.optimizer.arithmetic ?? 'portable');
  const figures: Record<string, number | string> = {
    meanInfidelity: evaluation.meanInfidelity,
    worstInfidelity: evaluation.worstInfidelity,
    iterations: best.iterations,
    stopReason: best.stopReason,
    start: best.start,
  };
  const result: DesignResult = { pulse: best.pulse, evaluation, best, starts, elapsedS: 0 };
  if (evaluation.meanLeakage !== undefined) {
    figures.meanLeakage = evaluation.meanLeakage;
    figures.worstLeakage = evaluation.worstLeakage!;
  }
  if (problem.system) {
    const check = truncationCheck(problem.target, best.pulse, problem.members, problem.system, evaluation, problem.line);
    result.truncationCheck = check;
    figures.truncationCheckLevels = check.levels;
    figures.truncationCheckMeanInfidelity = check.meanInfidelity;
    figures.truncationCheckMeanLeakage = check.meanLeakage;
  }
  best.pulse.metadata.figures = figures;
  result.elapsedS = (performance.now() - t0) / 1000;
  return result;
}

/** A start's result at its accepted point. */
function startResult(problem: Problem, run: StartRun, stopReason: StopReason, elapsedS: number): StartResult {
  const samples = run.samples();
  // Named as people count starts (from 1, as the command line prints them); `start` stays the 0-based index.
  const pulse: Pulse = { dt: problem.dt, i: samples.i, q: samples.q, metadata: { origin: 'design', name: `design start ${run.start + 1}` } };
  holdBound(pulse, problem.rabiMax, problem.constraints.bound);
  if (problem.line?.boundOn === 'both') holdDriveBound(pulse, problem.line, problem.rabiMax);
  return {
    start: run.start, pulse, meanInfidelity: run.infidelity, objective: run.objective,
    iterations: run.iterations, evaluations: run.evaluations, stopReason, elapsedS,
  };
}

/** Steps a start until a stop criterion, the signal or the deadline (its reason), or until `until` iterations (null: it may go on). */
async function advance(problem: Problem, run: StartRun, options: DesignOptions, t0: number, deadline: number, until: number): Promise<StopReason | null> {
  const { optimizer } = problem;
  let lastYield = performance.now();
  let lastPulse = -Infinity;
  const report = (): void => {
    if (!options.onProgress) return;
    const now = performance.now();
    const progress: Progress = {
      start: run.start, iteration: run.iterations, meanInfidelity: run.infidelity, objective: run.objective,
      gradientNorm: run.gradientNorm, elapsedS: (now - t0) / 1000,
    };
    if (options.progressPulseEveryMs !== undefined && now - lastPulse >= options.progressPulseEveryMs) {
      lastPulse = now;
      progress.pulse = run.samples();
    }
    options.onProgress(progress);
  };
  // Iteration 0 once; a start advanced again (in step, or after the pruning point) goes on from where it was reported.
  if (run.iterations === 0) report();
  for (;;) {
    if (run.infidelity <= optimizer.targetInfidelity) return 'target-reached';
    if (options.signal?.aborted) return 'stopped';
    if (run.iterations >= optimizer.maxIterations) return 'max-iterations';
    if (run.stalled) return 'stalled';
    if (run.iterations >= until) return null;
    if (performance.now() >= deadline) return 'time-limit';
    const stop = run.step();
    if (stop) return stop;
    report();
    if (performance.now() - lastYield > YIELD_EVERY_MS) {
      await yieldToEventLoop();
      lastYield = performance.now();
    }
  }
}

/**
 * Guarantee the bound on the drive the qubit sees ("boundOn": "both"): the design holds
 * it by a penalty (assembly/line.ts), which leaves an excess of the order of the figure's
 * gradient over its weight; the line is linear, so scaling the samples by rabiMax over
 * the drive's peak removes it (the figures reported are of the scaled pulse).
 */
function holdDriveBound(pulse: Pulse, line: Line, rabiMax: number): void {
  const drive = qubitDrive(pulse, line);
  let peak = 0;
  for (let j = 0; j < drive.i.length; j++) peak = Math.max(peak, Math.hypot(drive.i[j], drive.q[j]));
  if (peak <= rabiMax) return;
  const f = (rabiMax / peak) * (1 - 2 ** -52);
  for (let k = 0; k < pulse.i.length; k++) {
    pulse.i[k] *= f;
    pulse.q[k] *= f;
  }
}

/** Guarantee the amplitude bound on the returned samples, whatever rounding did. */
function holdBound(pulse: Pulse, rabiMax: number, bound: 'disc' | 'box'): void {
  for (let k = 0; k < pulse.i.length; k++) {
    if (bound === 'box') {
      pulse.i[k] = Math.max(-rabiMax, Math.min(rabiMax, pulse.i[k]));
      pulse.q[k] = Math.max(-rabiMax, Math.min(rabiMax, pulse.q[k]));
    } else {
      const r = Math.hypot(pulse.i[k], pulse.q[k]);
      if (r > rabiMax) {
        const f = (rabiMax / r) * (1 - 2 ** -52);
        pulse.i[k] *= f;
        pulse.q[k] *= f;
      }
    }
  }
}
