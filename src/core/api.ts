// The public library API over the wasm core: evaluate, design, robustness maps and
// Bloch trajectories. The same code serves the command line (Node) and the app's
// workers. Validation happens here; the kernels trust what they are given.
import { ArgumentError, describeValue } from './errors.ts';
import { BUFFER, createBlock, readBuffer, setSamples } from './block.ts';
import { checkPulse, encodeMembers, encodeTarget, type EncodedMembers } from './encode.ts';
import { qubitDrive } from './line.ts';
import { lineJson } from './line-spec.ts';
import { StartRun } from './run.ts';
import { checkProblemAngles, checkPulseAngles } from './limits.ts';
import { checkProblem, checkTarget } from './problem-check.ts';
import { bestStart } from './best-start.ts';
import { axisValues, checkRegion } from './grid.ts';
import { parseSpec } from './spec.ts';
import type {
  DesignResult, Evaluation, GridAxis, Line, Member, Problem, Progress, Pulse, StartResult, StopReason, Target,
} from './types.ts';
import { getCore, loadCore } from './wasm.ts';

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

/**
 * The core's wasm: its bytes, a URL to fetch it from, or a compiled WebAssembly.Module (typed
 * without the DOM's names, so that a Node-only TypeScript project checks these declarations).
 */
export type CoreSource = ArrayBuffer | ArrayBufferView | URL | string | object;

/** Load the wasm core from a URL, bytes or module (browsers; Node loads it by itself). */
export async function initCore(source: CoreSource): Promise<void> {
  await loadCore(source as Parameters<typeof loadCore>[0]);
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

/** Evaluate a pulse on a spec's (or problem's) ensemble and target, through its line (if any). */
export function evaluate(spec: unknown, pulse: Pulse): Evaluation {
  const problem = toProblem(spec);
  return evaluateMembers(problem.target, pulse, problem.members, problem.line);
}

/** Evaluate a pulse for a target on explicit members (weights normalised here), through `line` when given. */
export function evaluateMembers(target: Target, pulse: Pulse, members: Member[], line?: Line): Evaluation {
  checkTarget(target);
  checkPulse(pulse);
  const enc = encodeMembers(members, 2, true);
  const drive = qubitDrive(pulse, line);
  checkPulseAngles(drive, members);
  const perMember = figures(target, drive, enc);
  let mean = 0;
  let worstIndex = 0;
  const out = members.map((m, j) => {
    mean += enc.weight[j] * perMember[j];
    if (perMember[j] > perMember[worstIndex]) worstIndex = j;
    return { detuning: m.detuning, amplitudeError: m.amplitudeError, weight: enc.weight[j], infidelity: perMember[j] };
  });
  return { members: out, meanInfidelity: mean, worstInfidelity: perMember[worstIndex], worstIndex };
}

/** Per-member infidelities from the core (members padded to the system's multiple). */
function figures(target: Target, pulse: Pulse, enc: EncodedMembers): Float64Array {
  const core = getCore();
  const n = pulse.i.length;
  return core.job(() => {
    const p = createBlock(core, { target, segments: n, dt: pulse.dt, members: enc });
    setSamples(core, p, pulse.i, pulse.q);
    core.exports.problemFigure(p);
    return readBuffer(core, p, BUFFER.perMember, enc.padded);
  });
}

/** Members per core call of a map: bounds the arena and keeps each call short. */
const MAP_CHUNK = 8192;

/** Infidelity of a pulse on a detuning x amplitude-error grid, through `line` when given. */
export function robustnessMap(target: Target, programmed: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line): RobustnessMap {
  checkTarget(target);
  checkPulse(programmed);
  checkRegion({ detuning, amplitudeError });
  const pulse = qubitDrive(programmed, line);
  const far = Math.max(Math.abs(detuning.min), Math.abs(detuning.max));
  checkPulseAngles(pulse, [{ detuning: far, amplitudeError: amplitudeError.max, weight: 1 }, { detuning: far, amplitudeError: amplitudeError.min, weight: 1 }]);
  const dv = axisValues(detuning), av = axisValues(amplitudeError);
  const total = dv.length * av.length;
  const infidelity = new Float64Array(total);
  for (let start = 0; start < total; start += MAP_CHUNK) {
    const count = Math.min(MAP_CHUNK, total - start);
    const padded = Math.ceil(count / 2) * 2;
    const scale = new Float64Array(padded), det = new Float64Array(padded), weight = new Float64Array(padded);
    for (let j = 0; j < padded; j++) {
      const idx = start + Math.min(j, count - 1);
      scale[j] = 1 + av[Math.floor(idx / dv.length)];
      det[j] = dv[idx % dv.length];
    }
    infidelity.set(figures(target, pulse, { count, padded, scale, detuning: det, weight }).subarray(0, count), start);
  }
  return { detuning: { ...detuning }, amplitudeError: { ...amplitudeError }, infidelity };
}

/** Bloch vector after each sample of the drive the qubit sees (the pulse itself without a line), 3*(N+1) values starting with `from`. */
export function blochTrajectory(programmed: Pulse, member: Member, from: [number, number, number], line?: Line): Float64Array {
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
  const starts: StartResult[] = [];
  for (const s of indices) {
    const elapsed = (performance.now() - t0) / 1000;
    const remaining = problem.optimizer.timeLimit - elapsed;
    if (starts.length > 0 && (options.signal?.aborted || remaining <= 0)) break;
    starts.push(await runStart(problem, s, options, t0, remaining));
  }
  return bestOfStarts(problem, starts, t0);
}

/** The design result of finished starts: the best (best-start.ts) is evaluated, through the problem's line. */
export function bestOfStarts(problem: Problem, starts: StartResult[], t0: number): DesignResult {
  const best = bestStart(starts);
  const evaluation = evaluateMembers(problem.target, best.pulse, problem.members, problem.line);
  if (problem.line) best.pulse.metadata.line = lineJson(problem.line);
  best.pulse.metadata.figures = {
    meanInfidelity: evaluation.meanInfidelity,
    worstInfidelity: evaluation.worstInfidelity,
    iterations: best.iterations,
    stopReason: best.stopReason,
    start: best.start,
  };
  return { pulse: best.pulse, evaluation, best, starts, elapsedS: (performance.now() - t0) / 1000 };
}

/** One optimiser start; ends on a stop criterion, the signal, or the time left. */
async function runStart(problem: Problem, start: number, options: DesignOptions, t0: number, timeLeftS: number): Promise<StartResult> {
  const { dt, rabiMax, constraints, optimizer } = problem;
  const tStart = performance.now();
  const deadline = tStart + Math.max(0, timeLeftS) * 1000;
  const run = new StartRun(problem, start);
  try {
    let stopReason: StopReason = 'max-iterations';
    let lastYield = performance.now();
    let lastPulse = -Infinity;
    const report = (): void => {
      if (!options.onProgress) return;
      const now = performance.now();
      const progress: Progress = {
        start, iteration: run.iterations, meanInfidelity: run.infidelity, objective: run.objective,
        gradientNorm: run.gradientNorm, elapsedS: (now - t0) / 1000,
      };
      if (options.progressPulseEveryMs !== undefined && now - lastPulse >= options.progressPulseEveryMs) {
        lastPulse = now;
        progress.pulse = run.samples();
      }
      options.onProgress(progress);
    };
    report();
    for (;;) {
      if (run.infidelity <= optimizer.targetInfidelity) { stopReason = 'target-reached'; break; }
      if (options.signal?.aborted) { stopReason = 'stopped'; break; }
      if (run.iterations >= optimizer.maxIterations) { stopReason = 'max-iterations'; break; }
      if (performance.now() >= deadline) { stopReason = 'time-limit'; break; }
      const stop = run.step();
      if (stop) { stopReason = stop; break; }
      report();
      if (performance.now() - lastYield > YIELD_EVERY_MS) {
        await yieldToEventLoop();
        lastYield = performance.now();
      }
    }
    const samples = run.samples();
    const pulse: Pulse = { dt, i: samples.i, q: samples.q, metadata: { origin: 'design', name: `design start ${start}` } };
    holdBound(pulse, rabiMax, constraints.bound);
    if (problem.line?.boundOn === 'both') holdDriveBound(pulse, problem.line, rabiMax);
    return {
      start, pulse, meanInfidelity: run.infidelity, objective: run.objective,
      iterations: run.iterations, evaluations: run.evaluations, stopReason, elapsedS: (performance.now() - tStart) / 1000,
    };
  } finally {
    run.dispose();
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
