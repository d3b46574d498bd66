// The page's one door to the core: a small pool of workers behind coarse async calls.
// Designs spread their starts over the pool and keep the best pulse; maps come back coarse
// first, then at full resolution in bands computed in parallel. The only `wrap`.
import { proxy, releaseProxy, wrap, type Endpoint, type Remote } from 'comlink';
import { mergeDesigns } from '../core/best-start.ts';
import { axisValue } from '../core/grid.ts';
import type { QubitDrive } from '../core/line.ts';
import type { DesignResult, Evaluation, GridAxis, Line, Member, Pulse, Target, Vec3 } from '../core/types.ts';
import type { EncodedWaveform } from '../io/export/index.ts';
import type {
  CompareRequest,
  CompareRow,
  CoreInfo,
  CoreService,
  Cuts,
  EnsemblePaths,
  ExportFileOptions,
  ExportJudge,
  ExportPreview,
  MapResult,
  ProgressBatch,
  SpecCheck,
  Spectrum,
  SpectrumRequest,
} from './protocol.ts';

/** A merged design: the best start over every worker, and whether Stop ended it. */
export interface DesignOutcome extends DesignResult {
  stopped: boolean;
}

/** A map as it fills in: `infidelity` holds NaN where the full-resolution value is still to come. */
export interface MapUpdate {
  /** The coarse map (always present once the first image is drawn). */
  coarse: MapResult;
  /** The full-resolution grid, NaN where not yet computed; absent until the first band arrives. */
  fine?: MapResult;
  complete: boolean;
}

/** The last axis index of each band when `rows` rows are shared among `bands` workers. */
export function bandRows(rows: number, bands: number): Array<[number, number]> {
  const count = Math.max(1, Math.min(bands, rows));
  const out: Array<[number, number]> = [];
  for (let b = 0; b < count; b++) {
    const first = Math.floor((b * rows) / count);
    const last = Math.floor(((b + 1) * rows) / count) - 1;
    if (last >= first) out.push([first, last]);
  }
  return out;
}

/** A coarser axis over the same range: about a quarter of the points, never fewer than 2 (or 1). */
export function coarseAxis(axis: GridAxis, factor = 4): GridAxis {
  if (axis.points <= 2) return { ...axis };
  return { min: axis.min, max: axis.max, points: Math.max(2, Math.ceil((axis.points - 1) / factor) + 1) };
}

/** Split starts 0..starts-1 round-robin over `workers` workers (none left empty). */
export function shareStarts(starts: number, workers: number): number[][] {
  const count = Math.max(1, Math.min(starts, workers));
  const groups: number[][] = Array.from({ length: count }, () => []);
  for (let s = 0; s < starts; s++) groups[s % count].push(s);
  return groups;
}

export { axisValue };

/** The client over a pool: one worker for analysis, the others for designs. */
export class CoreClient {
  private readonly analysis: Remote<CoreService>;
  private readonly designers: Remote<CoreService>[];
  private readyPromise: Promise<CoreInfo> | null = null;
  private designing = false;
  private stopRequested = false;

  /** Wraps one endpoint for analysis jobs and one or more for design starts. */
  constructor(
    analysis: Endpoint,
    designers: Endpoint[],
    private readonly onDispose: () => void = () => undefined,
  ) {
    this.analysis = wrap<CoreService>(analysis);
    this.designers = designers.map((endpoint) => wrap<CoreService>(endpoint));
    if (this.designers.length === 0) this.designers.push(this.analysis);
  }

  /** Number of workers that run design starts. */
  get designWorkers(): number {
    return this.designers.length;
  }

  /** Loads the core in every worker; resolves with what it can build. */
  ready(): Promise<CoreInfo> {
    this.readyPromise ??= Promise.all([this.analysis.ready(), ...this.designers.map((d) => d.ready())]).then(([info]) => info);
    return this.readyPromise;
  }

  /** Validates a spec with the library's rules (first error, with its field). */
  checkSpec(spec: unknown): Promise<SpecCheck> {
    return this.analysis.checkSpec(spec);
  }

  /** Runs a design over the pool; `onProgress` gets batches from every worker. */
  async design(spec: unknown, starts: number, onProgress?: (batch: ProgressBatch) => void, livePulseEveryMs = 200): Promise<DesignOutcome> {
    if (this.designing) throw new Error('a design is already running; stop it first');
    await this.ready();
    this.designing = true;
    this.stopRequested = false;
    const t0 = performance.now();
    const groups = shareStarts(starts, this.designers.length);
    const sink = onProgress ? proxy(onProgress) : undefined;
    try {
      const shares = await Promise.all(groups.map((group, w) => this.designers[w].design(spec, group, sink, livePulseEveryMs)));
      return { ...mergeDesigns(shares, (performance.now() - t0) / 1000), stopped: this.stopRequested };
    } catch (error) {
      await this.stop();
      throw error;
    } finally {
      this.designing = false;
    }
  }

  /** True while a design runs. */
  get running(): boolean {
    return this.designing;
  }

  /** Ends the running design within one iteration of each worker; the best pulse so far is returned by design(). */
  async stop(): Promise<void> {
    if (!this.designing) return;
    this.stopRequested = true;
    await Promise.all(this.designers.map((d) => d.stop()));
  }

  /** Figures of a pulse on the spec's ensemble. */
  evaluate(spec: unknown, pulse: Pulse): Promise<Evaluation> {
    return this.analysis.evaluate(spec, pulse);
  }

  /** A map, coarse first, then full resolution in bands spread over the idle workers. */
  async map(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, onUpdate?: (update: MapUpdate) => void, line?: Line): Promise<MapUpdate> {
    const coarse = await this.analysis.map(target, pulse, coarseAxis(detuning), coarseAxis(amplitudeError), line);
    const update: MapUpdate = { coarse, complete: false };
    onUpdate?.({ ...update });
    const workers = this.designing ? [this.analysis] : [this.analysis, ...this.designers.filter((d) => d !== this.analysis)];
    const infidelity = new Float64Array(detuning.points * amplitudeError.points).fill(NaN);
    const fine: MapResult = { detuning: { ...detuning }, amplitudeError: { ...amplitudeError }, infidelity };
    const bands = bandRows(amplitudeError.points, workers.length);
    await Promise.all(
      bands.map(async ([first, last], b) => {
        const rows: GridAxis = { min: axisValue(amplitudeError, first), max: axisValue(amplitudeError, last), points: last - first + 1 };
        if (amplitudeError.points === 1) Object.assign(rows, amplitudeError);
        const part = await workers[b].map(target, pulse, detuning, rows, line);
        infidelity.set(part.infidelity, first * detuning.points);
        update.fine = fine;
        onUpdate?.({ ...update });
      }),
    );
    update.complete = true;
    onUpdate?.({ ...update });
    return update;
  }

  /** Cuts through zero error over the grid's ranges. */
  cuts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line): Promise<Cuts> {
    return this.analysis.cuts(target, pulse, detuning, amplitudeError, line);
  }

  /** The comparison table and cuts. */
  compare(request: CompareRequest): Promise<CompareRow[]> {
    return this.analysis.compare(request);
  }

  /** Bloch vectors after each sample for one member. */
  trajectory(pulse: Pulse, member: Member, from: Vec3, line?: Line): Promise<Float64Array> {
    return this.analysis.trajectory(pulse, member, from, line);
  }

  /** The drive the qubit sees through the line. */
  drive(pulse: Pulse, line?: Line): Promise<QubitDrive> {
    return this.analysis.drive(pulse, line);
  }

  /** Bloch paths of several members, each thinned to at most `maxPoints` points. */
  ensembleTrajectories(pulse: Pulse, members: Member[], from: Vec3, maxPoints = 600, line?: Line): Promise<EnsemblePaths> {
    return this.analysis.ensembleTrajectories(pulse, members, from, maxPoints, line);
  }

  /** The held pulse's spectrum over a span of detunings, computed in the analysis worker. */
  spectrum(pulse: Pulse, request: SpectrumRequest): Promise<Spectrum> {
    return this.analysis.spectrum(pulse, request);
  }

  /** Reads a pulse file (rejects with a PulseFormatError named error when malformed). */
  readPulse(text: string): Promise<Pulse> {
    return this.analysis.readPulse(text);
  }

  /** Pulse file text of a pulse. */
  writePulse(pulse: Pulse): Promise<string> {
    return this.analysis.writePulse(pulse);
  }

  /** The instrument waveform of a pulse as played, and its report on the judge's members (rejects with ExportError when refused). */
  exportPreview(pulse: Pulse, settings: unknown, judge: ExportJudge | null): Promise<ExportPreview> {
    return this.analysis.exportPreview(pulse, settings, judge);
  }

  /** The exported waveform's file bytes (and description), exactly as the command line writes them. */
  exportFile(pulse: Pulse, settings: unknown, options: ExportFileOptions): Promise<EncodedWaveform> {
    return this.analysis.exportFile(pulse, settings, options);
  }

  /** Releases the workers. */
  dispose(): void {
    for (const remote of new Set([this.analysis, ...this.designers])) remote[releaseProxy]();
    this.onDispose();
  }
}

/**
 * Design workers to start: one per core but one, up to four. The spare core keeps the page
 * responsive: on a 2-core machine two design workers left main-thread tasks of 50-73 ms
 * (chart redraws preempted), one leaves none and the demo design takes 0.57 s instead of 0.5 s.
 */
export function designWorkerCount(hardwareConcurrency: number | undefined): number {
  return Math.max(1, Math.min(4, (hardwareConcurrency || 2) - 1));
}

/** The client over real Web Workers (browser only). */
export function createBrowserClient(): CoreClient {
  const workers: Worker[] = [];
  const start = () => {
    const worker = new Worker(new URL('./worker.ts', import.meta.url), { type: 'module', name: 'gatesmith-core' });
    workers.push(worker);
    return worker;
  };
  const analysis = start();
  const designers = Array.from({ length: designWorkerCount(navigator.hardwareConcurrency) }, start);
  return new CoreClient(analysis, designers, () => workers.forEach((w) => w.terminate()));
}
