// The object the worker exposes: each method is one job over the library (the same code
// the command line runs). Built over an injected library so that tests can expose it on a
// MessageChannel in one realm, exactly as the worker does across threads.
import type { DesignOptions, RobustnessMap } from '../core/api.ts';
import type { ShortestOptions, ShortestResult } from '../core/shortest.ts';
import type { Spectrum, SpectrumRequest } from '../core/spectrum.ts';
import type { CompareOptions, Comparison, NamedPulse } from '../core/compare.ts';
import type { Cuts } from '../core/robustness.ts';
import type { QubitDrive } from '../core/line.ts';
import type { DesignResult, Evaluation, GridAxis, LadderSystem, Line, Member, Problem, Progress, Pulse, Target, Vec3 } from '../core/types.ts';
import type { EncodedWaveform, EncodeOptions, ExportedWaveform, ExportReport, PulseEvaluator, WaveformFormat } from '../io/export/index.ts';
import type {
  CoreInfo,
  CoreService,
  ExportPreview,
  CompositeChoice,
  EnsemblePaths,
  ErrorInfo,
  LivePulse,
  MapPart,
  MapResult,
  Populations,
  ProgressPoint,
  ProgressSink,
  SpecCheck,
} from './protocol.ts';
import { releaseProxy } from 'comlink';
import { moved } from './transfer.ts';

/** The library functions the worker serves (bound to the real ones in library.ts). */
export interface CoreLibrary {
  parseSpec(json: unknown): Problem;
  design(spec: unknown, options?: DesignOptions): Promise<DesignResult>;
  /** The shortest duration at which a design meets a goal (what `gatesmith shortest` runs). */
  shortest(spec: unknown, options: ShortestOptions): Promise<ShortestResult>;
  /** The time of a rectangular pulse of the target's angle at the peak Rabi rate. */
  rectangularTime(problem: Problem): number;
  /** Figures on the spec's ensemble against the target the pulse is judged against (core/target-choice.ts). */
  evaluate(spec: unknown, pulse: Pulse): Evaluation;
  evaluateMembers(target: Target, pulse: Pulse, members: Member[], line?: Line, system?: LadderSystem): Evaluation;
  robustnessMap(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): RobustnessMap;
  /** Grid points `start` to `start + count - 1` of robustnessMap, the same values bit for bit. */
  robustnessMapPart(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, start: number, count: number, line?: Line, system?: LadderSystem): { infidelity: Float64Array; leakage?: Float64Array };
  blochTrajectory(pulse: Pulse, member: Member, from: Vec3, line?: Line, system?: LadderSystem): Float64Array;
  /** Population of every level after each sample of the drive through the line (ladderPopulations). */
  populations(pulse: Pulse, member: Member, system: LadderSystem, from: Vec3, line?: Line): Populations;
  /** The drive the qubit sees through a line (the pulse itself without one). */
  qubitDrive(pulse: Pulse, line: Line | undefined): QubitDrive;
  /** |X(D)| of the held pulse over a span of detunings. */
  heldSpectrum(pulse: Pulse, request: SpectrumRequest): Spectrum;
  /** Pulses and composite sequences judged on one spec, best first (what `gatesmith compare` prints). */
  compare(spec: unknown, pulses: readonly NamedPulse[], options?: CompareOptions): Comparison;
  /** The cuts through zero error along each axis. */
  cuts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): Cuts;
  composites: readonly CompositeChoice[];
  readPulse(text: string): Pulse;
  writePulse(pulse: Pulse): string;
  /** The instrument waveform of a pulse (ExportError when it is refused). */
  exportWaveform(pulse: Pulse, settings: unknown): ExportedWaveform;
  /** The export report; gate figures by `against` (null: the sample figures only). */
  exportReport(against: PulseEvaluator | null, design: Pulse, waveform: ExportedWaveform, withoutLine?: PulseEvaluator): Promise<ExportReport>;
  /** A waveform's file bytes, identical to what the command line writes. */
  encodeWaveform(waveform: ExportedWaveform, format: WaveformFormat, options?: EncodeOptions): Promise<EncodedWaveform>;
  /** The waveform as played: I/Q in Hz at the instrument sample period, SSB demodulated, padding kept. */
  playedPulse(waveform: ExportedWaveform): Pulse;
}

/** Gap between two progress messages to the page: often enough for a smooth chart, few enough to stay cheap. */
export const PROGRESS_BATCH_MS = 50;

/** An error as plain data (class name, message, SpecError field). */
export function errorInfo(error: unknown): ErrorInfo {
  if (error instanceof Error) {
    const field = (error as { field?: unknown }).field;
    return { name: error.name, message: error.message, ...(typeof field === 'string' ? { field } : {}) };
  }
  return { name: 'Error', message: String(error) };
}

// Gathers progress reports and sends them in batches, each with the newest samples of
// every start that reported some.
class ProgressBatcher {
  private points: ProgressPoint[] = [];
  private live = new Map<number, LivePulse>();
  private lastSent = 0;
  constructor(private readonly sink: ProgressSink | undefined) {}

  add(progress: Progress): void {
    if (!this.sink) return;
    const { pulse, ...point } = progress;
    this.points.push(point);
    if (pulse) this.live.set(point.start, { start: point.start, iteration: point.iteration, i: pulse.i, q: pulse.q });
    if (performance.now() - this.lastSent >= PROGRESS_BATCH_MS) void this.flush();
  }

  /** Sends what has gathered; the promise settles once the page has taken it. */
  flush(): Promise<void> {
    if (!this.sink || (this.points.length === 0 && this.live.size === 0)) return Promise.resolve();
    const batch = moved({ points: this.points, live: [...this.live.values()] });
    this.points = [];
    this.live.clear();
    this.lastSent = performance.now();
    // Not awaited while designing; a page that has gone away must not fail the design.
    return Promise.resolve(this.sink(batch)).catch(() => undefined);
  }
}

/** Most points kept of one member's path: beyond it the tolerance is widened for that path (a picture that dense is saturated). */
export const MAX_PATH_POINTS = 1 << 18;

/**
 * A Bloch path (3 values a point) thinned for drawing: a point is kept when it lies farther
 * than `tolerance` from the last point kept, and the last point always. Every point left out
 * lies within `tolerance` of the last kept one, so the drawn polyline and the full one are
 * within `tolerance` of each other everywhere (each dropped run stays in a ball of that
 * radius around its kept point); a projection onto the screen only shortens distances, so
 * the picture moves by at most `tolerance` times the sphere's radius, whatever the view.
 * Points come back as single precision (far below a pixel), with the kept sample indices.
 */
export function decimatePath(path: Float64Array, tolerance: number): { points: Float32Array; index: Int32Array } {
  const n = path.length / 3;
  const kept = new Int32Array(n);
  const pass = (tol: number): number => {
    const t2 = tol * tol;
    let count = 0;
    let lx = path[0], ly = path[1], lz = path[2];
    kept[count++] = 0;
    for (let k = 1; k < n; k++) {
      const x = path[3 * k], y = path[3 * k + 1], z = path[3 * k + 2];
      const dx = x - lx, dy = y - ly, dz = z - lz;
      if (dx * dx + dy * dy + dz * dz > t2 || k === n - 1) {
        kept[count++] = k;
        lx = x;
        ly = y;
        lz = z;
      }
    }
    return count;
  };
  let count = n > 0 ? pass(tolerance) : 0;
  for (let tol = tolerance; count > MAX_PATH_POINTS; ) count = pass((tol *= 2));
  const points = new Float32Array(3 * count);
  for (let p = 0; p < count; p++) points.set(path.subarray(3 * kept[p], 3 * kept[p] + 3), 3 * p);
  return { points, index: kept.slice(0, count) };
}

/** Fraction of a file read between two progress reports. */
const FILE_PROGRESS_STEP = 0.05;

/** A file's text, decoded as UTF-8 as its chunks arrive, with the fraction read reported now and then. */
export async function readWithProgress(file: Blob, onFraction: (fraction: number) => void): Promise<string> {
  if (typeof file.stream !== 'function' || file.size === 0) return file.text();
  const reader = file.stream().getReader();
  const decoder = new TextDecoder();
  const parts: string[] = [];
  let read = 0;
  let reported = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    read += value.byteLength;
    parts.push(decoder.decode(value, { stream: true }));
    if (read / file.size - reported >= FILE_PROGRESS_STEP) {
      reported = read / file.size;
      onFraction(reported);
    }
  }
  parts.push(decoder.decode());
  return parts.join('');
}

/** How a service reaches its core. */
export interface ServiceOptions {
  /** Prepares the core (fetching the wasm) once, before the first job. */
  load?: () => Promise<void>;
}

/** The worker's API over a library. */
export function createCoreService(library: CoreLibrary, options: ServiceOptions = {}): CoreService {
  let loading: Promise<void> | null = null;
  const running = new Set<AbortController>();
  const ensureLoaded = () => (loading ??= (options.load ?? (async () => undefined))());
  // Jobs need the loaded core; stop and checkSpec do not and stay immediate. Jobs may
  // overlap: each job and each design start has its own problem block in the core.
  const withCore = <T>(job: () => T | Promise<T>): Promise<T> => ensureLoaded().then(job);

  return {
    async ready(): Promise<CoreInfo> {
      await ensureLoaded();
      return { composites: library.composites.map((c) => ({ ...c })) };
    },

    checkSpec(spec: unknown): SpecCheck {
      try {
        return { ok: true, problem: library.parseSpec(spec) };
      } catch (error) {
        return { ok: false, error: errorInfo(error) };
      }
    },

    design(spec, startIndices, onProgress, livePulseEveryMs = 200, stage, judge) {
      // Registered before queueing, so that a stop sent while the job waits still ends it.
      const controller = new AbortController();
      running.add(controller);
      const batcher = new ProgressBatcher(onProgress);
      return withCore(async () => {
        const result = await library.design(spec, {
          signal: controller.signal,
          startIndices,
          stage,
          ...(judge ? { judge } : {}),
          progressPulseEveryMs: onProgress ? livePulseEveryMs : undefined,
          onProgress: (progress) => batcher.add(progress),
        });
        // The last batch is taken before the result arrives (one channel keeps the order).
        await batcher.flush();
        return moved(result);
      }).finally(() => {
        running.delete(controller);
        // A callback proxied from the page holds a message port open until released.
        (onProgress as { [releaseProxy]?: () => void } | undefined)?.[releaseProxy]?.();
        (judge as { [releaseProxy]?: () => void } | undefined)?.[releaseProxy]?.();
      });
    },

    shortest(spec, request, onTrial) {
      const controller = new AbortController();
      running.add(controller);
      return withCore(async () => {
        const { goalMean, goalWorst, minSegments, maxSegments } = request;
        const pending: Promise<unknown>[] = [];
        // A bad spec is named by the search itself below; no bound to send then.
        let lowerBoundS = NaN;
        try {
          lowerBoundS = library.rectangularTime(library.parseSpec(spec));
        } catch {
          /* reported by library.shortest */
        }
        const { design: _design, ...result } = await library.shortest(spec, {
          goalMean,
          goalWorst,
          minSegments,
          maxSegments,
          signal: controller.signal,
          // A page that has gone away must not fail the search.
          onTrial: onTrial
            ? (trial, pulse) => void pending.push(Promise.resolve(onTrial({ ...trial }, lowerBoundS, trial.met ? moved(pulse) : undefined)).catch(() => undefined))
            : undefined,
        });
        // Every trial reaches the page before the result (one channel keeps the order).
        await Promise.all(pending);
        return moved(result);
      }).finally(() => {
        running.delete(controller);
        (onTrial as { [releaseProxy]?: () => void } | undefined)?.[releaseProxy]?.();
      });
    },

    stop(): number {
      const count = running.size;
      for (const controller of running) controller.abort();
      return count;
    },

    evaluate(spec, pulse) {
      return withCore(() => library.evaluate(spec, pulse));
    },

    map(target, pulse, detuning, amplitudeError, line, system) {
      return withCore((): MapResult => {
        const map = library.robustnessMap(target, pulse, detuning, amplitudeError, line, system);
        const result: MapResult = { detuning: map.detuning, amplitudeError: map.amplitudeError, infidelity: map.infidelity };
        if (map.leakage) result.leakage = map.leakage;
        return moved(result);
      });
    },

    mapPart(target, pulse, detuning, amplitudeError, start, count, line, system) {
      return withCore((): MapPart => {
        const part = library.robustnessMapPart(target, pulse, detuning, amplitudeError, start, count, line, system);
        const result: MapPart = { start, infidelity: part.infidelity };
        if (part.leakage) result.leakage = part.leakage;
        return moved(result);
      });
    },

    cuts(target, pulse, detuning, amplitudeError, line, system) {
      return withCore(() => moved(library.cuts(target, pulse, detuning, amplitudeError, line, system)));
    },

    compare(request) {
      return withCore(() => {
        const { spec, pulses, composites, detuning, amplitudeError, threshold, withoutLine } = request;
        const { rows } = library.compare(spec, pulses, { composites, region: { detuning, amplitudeError }, threshold, cuts: true, withoutLine });
        return moved(rows);
      });
    },

    trajectory(pulse, member, from, line, system) {
      return withCore(() => moved(library.blochTrajectory(pulse, member, from, line, system)));
    },

    populations(pulse, member, system, from, line) {
      return withCore(() => moved(library.populations(pulse, member, system, from, line)));
    },

    drive(pulse, line) {
      return withCore(() => moved(library.qubitDrive(pulse, line)));
    },

    ensembleTrajectories(pulse, members, from, tolerance, line) {
      return withCore((): EnsemblePaths => {
        // Through a line the path has a point per fine step, not per sample: thinned by its own shape.
        const parts: Float32Array[] = [];
        const offsets = new Int32Array(members.length + 1);
        const ends = new Float64Array(3 * members.length);
        members.forEach((member, m) => {
          const path = library.blochTrajectory(pulse, member, from, line);
          ends.set(path.subarray(path.length - 3), 3 * m);
          const { points } = decimatePath(path, tolerance);
          parts.push(points);
          offsets[m + 1] = offsets[m] + points.length / 3;
        });
        const paths = new Float32Array(3 * offsets[members.length]);
        parts.forEach((points, m) => paths.set(points, 3 * offsets[m]));
        return moved({ paths, offsets, ends });
      });
    },

    spectrum(pulse, request) {
      // Pure TypeScript (no core), but long for big pulses: it runs here, off the page's thread.
      return Promise.resolve().then(() => moved(library.heldSpectrum(pulse, request)));
    },

    readPulse(text) {
      return moved(library.readPulse(text));
    },

    async readPulseFile(file, onProgress, spec) {
      // Read here, off the page's thread: a pulse file may be tens of megabytes.
      try {
        const text = await readWithProgress(file, (fraction) => void onProgress?.(fraction, 'reading'));
        await onProgress?.(1, 'checking');
        const pulse = library.readPulse(text);
        if (spec === undefined) return moved({ pulse });
        await onProgress?.(1, 'evaluating');
        // A figure that cannot be had leaves the pulse without one; the file still opens.
        const evaluation = await withCore(() => library.evaluate(spec, pulse)).catch(() => undefined);
        return moved({ pulse, ...(evaluation ? { evaluation } : {}) });
      } finally {
        (onProgress as { [releaseProxy]?: () => void } | undefined)?.[releaseProxy]?.();
      }
    },

    writePulse(pulse) {
      return library.writePulse(pulse);
    },

    exportPreview(pulse, settings, judge) {
      // The evaluation runs on the core, so the whole job waits its turn like any other.
      return withCore(async (): Promise<ExportPreview> => {
        const waveform = library.exportWaveform(pulse, settings);
        const evaluate = judge ? (p: Pulse) => library.evaluateMembers(judge.target, p, judge.members, judge.line, judge.system) : null;
        // Without the line, still on the system: what ignoring the line alone would show.
        const naive = judge?.line ? (p: Pulse) => library.evaluateMembers(judge.target, p, judge.members, undefined, judge.system) : undefined;
        const report = await library.exportReport(evaluate, pulse, waveform, naive);
        return moved({ report, played: library.playedPulse(waveform) });
      });
    },

    async exportFile(pulse, settings, options) {
      // Sampling, quantising and encoding do not touch the core: no need to queue.
      const waveform = library.exportWaveform(pulse, settings);
      const { units, metadata } = options;
      return moved(await library.encodeWaveform(waveform, options.format, { units, metadata }));
    },
  };
}
