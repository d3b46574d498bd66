// The public library API over the wasm core: evaluate, design, robustness maps and
// Bloch trajectories. The same code serves the command line (Node) and the app's
// workers. Validation happens here; the kernels trust what they are given.
import { ArgumentError, describeValue } from './errors.ts';
import { checkPulse, encodeMembers, encodeTarget, targetMode } from './encode.ts';
import { bestStart } from './best-start.ts';
import { axisValues, checkRegion } from './grid.ts';
import { parseSpec } from './spec.ts';
import type {
  DesignResult, Evaluation, GridAxis, Member, Problem, Progress, Pulse, StartResult, StopReason, Target,
} from './types.ts';
import { getCore, loadCore, STEP_GRADIENT_TOLERANCE, STEP_LINE_SEARCH_FAILED } from './wasm.ts';
import { initialVariables } from './start.ts';

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

/** Load the wasm core from a URL, bytes or module (browsers; Node loads it by itself). */
export async function initCore(source: BufferSource | WebAssembly.Module | URL | string): Promise<void> {
  await loadCore(source);
}

function isProblem(spec: unknown): spec is Problem {
  const p = spec as Problem;
  return typeof p === 'object' && p !== null && Array.isArray(p.members) && typeof p.dt === 'number'
    && typeof p.target === 'object' && p.target !== null && 'kind' in p.target;
}

/** A Problem as given, or the spec JSON validated into one. */
export function toProblem(spec: unknown): Problem {
  return isProblem(spec) ? spec : parseSpec(spec);
}

/** Evaluate a pulse on a spec's (or problem's) ensemble and target. */
export function evaluate(spec: unknown, pulse: Pulse): Evaluation {
  const problem = toProblem(spec);
  return evaluateMembers(problem.target, pulse, problem.members);
}

/** Evaluate a pulse for a target on explicit members (weights normalised here). */
export function evaluateMembers(target: Target, pulse: Pulse, members: Member[]): Evaluation {
  checkPulse(pulse);
  const enc = encodeMembers(members, 4, true);
  const perMember = figures(target, pulse, enc.scale, enc.detuning, enc.weight);
  let mean = 0;
  let worstIndex = 0;
  const out = members.map((m, j) => {
    mean += enc.weight[j] * perMember[j];
    if (perMember[j] > perMember[worstIndex]) worstIndex = j;
    return { detuning: m.detuning, amplitudeError: m.amplitudeError, weight: enc.weight[j], infidelity: perMember[j] };
  });
  return { members: out, meanInfidelity: mean, worstInfidelity: perMember[worstIndex], worstIndex };
}

/** Per-member infidelities from the core (arrays padded to a multiple of 4). */
function figures(target: Target, pulse: Pulse, scale: Float64Array, detuning: Float64Array, weight: Float64Array): Float64Array {
  const core = getCore();
  const n = pulse.i.length;
  const m = scale.length;
  return core.job(() => {
    const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
    const sPtr = core.put(scale), dPtr = core.put(detuning), wPtr = core.put(weight);
    const tPtr = core.put(encodeTarget(target));
    const outPtr = core.alloc(m);
    core.exports.ensembleFigure(iPtr, qPtr, n, pulse.dt, sPtr, dPtr, wPtr, m, tPtr, targetMode(target), outPtr);
    return core.read(outPtr, m);
  });
}

/** Members per core call of a map: bounds the arena and keeps each call short. */
const MAP_CHUNK = 8192;

/** Infidelity of a pulse on a detuning x amplitude-error grid. */
export function robustnessMap(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis): RobustnessMap {
  checkPulse(pulse);
  checkRegion({ detuning, amplitudeError });
  const dv = axisValues(detuning), av = axisValues(amplitudeError);
  const total = dv.length * av.length;
  const infidelity = new Float64Array(total);
  for (let start = 0; start < total; start += MAP_CHUNK) {
    const count = Math.min(MAP_CHUNK, total - start);
    const padded = Math.ceil(count / 4) * 4;
    const scale = new Float64Array(padded), det = new Float64Array(padded), weight = new Float64Array(padded);
    for (let j = 0; j < padded; j++) {
      const idx = start + Math.min(j, count - 1);
      scale[j] = 1 + av[Math.floor(idx / dv.length)];
      det[j] = dv[idx % dv.length];
    }
    infidelity.set(figures(target, pulse, scale, det, weight).subarray(0, count), start);
  }
  return { detuning: { ...detuning }, amplitudeError: { ...amplitudeError }, infidelity };
}

/** Bloch vector after each sample, 3*(N+1) values starting with `from`. */
export function blochTrajectory(pulse: Pulse, member: Member, from: [number, number, number]): Float64Array {
  checkPulse(pulse);
  const norm = Math.hypot(from[0], from[1], from[2]);
  if (!(norm > 0)) throw new ArgumentError(`from: ${describeValue(from)} is not allowed; give a non-zero Bloch vector`);
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

// The optimiser's state lives in the core's globals: designs on one core run one after
// another (short jobs such as maps may still run while a design waits between iterations).
let designQueue: Promise<unknown> = Promise.resolve();

/** Design a pulse by ensemble GRAPE with L-BFGS. */
export function design(spec: unknown, options: DesignOptions = {}): Promise<DesignResult> {
  const problem = toProblem(spec);
  const run = designQueue.then(() => designNow(problem, options));
  designQueue = run.catch(() => undefined);
  return run;
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

/** The design result of finished starts: the best (best-start.ts) is evaluated. */
function bestOfStarts(problem: Problem, starts: StartResult[], t0: number): DesignResult {
  const best = bestStart(starts);
  const evaluation = evaluateMembers(problem.target, best.pulse, problem.members);
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
  const core = getCore();
  const ex = core.exports;
  const { segments: n, dt, rabiMax, constraints, optimizer } = problem;
  // Pairs of members; the gradient kernel takes a last pair alone (assembly/gradient.ts).
  const enc = encodeMembers(problem.members, 2, true);
  const tStart = performance.now();
  const deadline = tStart + Math.max(0, timeLeftS) * 1000;

  // The start's buffers live above this mark until it ends; short jobs run during its
  // waits nest above them (see Core.job).
  const mark = core.mark();
  try {
    const iPtr = core.alloc(n), qPtr = core.alloc(n);
    const sPtr = core.put(enc.scale), dPtr = core.put(enc.detuning), wPtr = core.put(enc.weight);
    const tPtr = core.put(encodeTarget(problem.target));
    const outPtr = core.alloc(enc.padded), gIPtr = core.alloc(n), gQPtr = core.alloc(n), workPtr = core.alloc(12 * n);
    const nVar = ex.problemSet(n, dt, rabiMax, constraints.bound === 'box' ? 1 : 0, constraints.zeroEdges ? 1 : 0,
      constraints.smoothness, targetMode(problem.target), enc.padded, iPtr, qPtr, sPtr, dPtr, wPtr, tPtr, outPtr, gIPtr, gQPtr, workPtr);
    const x0 = core.put(initialVariables(problem, start, nVar));
    const f0 = ex.optInit(x0, nVar, optimizer.memory, optimizer.gradientTolerance);
    if (Number.isNaN(f0)) throw new RangeError(`the core ran out of memory for ${n} segments x ${enc.padded} members`);

    let iteration = 0;
    let stopReason: StopReason = 'max-iterations';
    let lastYield = performance.now();
    let lastPulse = -Infinity;
    const report = (): void => {
      if (!options.onProgress) return;
      const now = performance.now();
      const progress: Progress = {
        start, iteration, meanInfidelity: ex.problemInfidelity(), objective: ex.optObjective(),
        gradientNorm: ex.optGradientNorm(), elapsedS: (now - t0) / 1000,
      };
      if (options.progressPulseEveryMs !== undefined && now - lastPulse >= options.progressPulseEveryMs) {
        lastPulse = now;
        progress.pulse = { i: core.read(iPtr, n), q: core.read(qPtr, n) };
      }
      options.onProgress(progress);
    };
    report();
    for (;;) {
      if (ex.problemInfidelity() <= optimizer.targetInfidelity) { stopReason = 'target-reached'; break; }
      if (options.signal?.aborted) { stopReason = 'stopped'; break; }
      if (iteration >= optimizer.maxIterations) { stopReason = 'max-iterations'; break; }
      if (performance.now() >= deadline) { stopReason = 'time-limit'; break; }
      const status = ex.optStep();
      if (status === STEP_GRADIENT_TOLERANCE) { stopReason = 'gradient-tolerance'; break; }
      if (status === STEP_LINE_SEARCH_FAILED) { stopReason = 'line-search-failed'; break; }
      iteration++;
      report();
      if (performance.now() - lastYield > YIELD_EVERY_MS) {
        await yieldToEventLoop();
        lastYield = performance.now();
      }
    }
    // Samples of the accepted point (the last trial of a line search may differ).
    ex.controlsFromVariables(ex.optVariables());
    const pulse: Pulse = {
      dt,
      i: core.read(iPtr, n),
      q: core.read(qPtr, n),
      metadata: { origin: 'design', name: `design start ${start}` },
    };
    holdBound(pulse, rabiMax, constraints.bound);
    return {
      start, pulse, meanInfidelity: ex.problemInfidelity(), objective: ex.optObjective(),
      iterations: iteration, evaluations: ex.optEvaluations(), stopReason, elapsedS: (performance.now() - tStart) / 1000,
    };
  } finally {
    core.release(mark);
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
