// The page's one door to the core: a small pool of workers behind coarse async calls.
// Designs spread their starts over the pool and keep the best pulse; maps come back coarse
// first, then at full resolution, each in parts of bounded core time computed in parallel.
// The only `wrap`.
import { proxy, releaseProxy, wrap, type Endpoint, type Remote } from 'comlink';
import { mergeDesigns, mergePruned, prunes, Referee, startsToContinue, type Checkpoint } from '../core/best-start.ts';
import { QUBIT_NS, systemCostFactor } from '../core/cost.ts';
import { axisValue, axisValues } from '../core/grid.ts';
import { driveSamples } from '../core/line-spec.ts';
import { chooseTarget } from '../core/target-choice.ts';
import type { QubitDrive } from '../core/line.ts';
import type { DesignResult, Evaluation, GridAxis, LadderSystem, Line, Member, Problem, Pulse, StartResult, Target, Vec3 } from '../core/types.ts';
import type { EncodedWaveform } from '../io/export/index.ts';
import { sendable } from './transfer.ts';
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
  FileProgressSink,
  LivePulse,
  MapPart,
  MapResult,
  Populations,
  ProgressBatch,
  ProgressPoint,
  DurationTrial,
  ShortestOutcome,
  ShortestRequest,
  SpecCheck,
  TrialSink,
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

/**
 * Core time one part of a map may take by the cost model (core/cost.ts, objective and
 * gradient, an upper bound for the figure a map computes), in ns: a job sent to a worker
 * while it computes a map (a design's check, the worst member, another map) waits for at
 * most one part, not for the whole map.
 */
export const MAP_PART_NS = 50e6;

/** Grid points per part of a map of a drive of `samples` samples on a system `costFactor` times the qubit's cost: about MAP_PART_NS of core time, at least one. */
export function mapPartPoints(samples: number, costFactor: number): number {
  const points = Math.floor(MAP_PART_NS / (Math.max(1, samples) * QUBIT_NS * costFactor));
  // Whole groups of four members fill the qubit kernels' lanes.
  return points >= 8 ? points - (points % 4) : Math.max(1, points);
}

/**
 * Grid points per part of a map of `pulse` against `target`: sized by the drive the core
 * evaluates, which through a line is the held samples on the line's fine grid with the
 * response's tails, several times the programmed samples.
 */
export function mapPartSize(pulse: Pulse, target: Target, line?: Line, system?: LadderSystem): number {
  return mapPartPoints(driveSamples(line, pulse.i.length, pulse.dt), systemCostFactor({ target, system }));
}

/** `total` grid points in consecutive parts of at most `size` points: [first point, count]. */
export function mapParts(total: number, size: number): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let start = 0; start < total; start += size) out.push([start, Math.min(size, total - start)]);
  return out;
}

/** The error a map ends with when its signal aborts: the parts not yet sent are dropped. */
function aborted(signal: AbortSignal): Error {
  return signal.reason instanceof Error ? signal.reason : new DOMException('the map was dropped', 'AbortError');
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

/**
 * What a design ended by Stop before any start reported a pulse rejects with: nothing is kept.
 * (Its first iteration may take seconds on a big ladder; Stop does not wait for it.)
 */
export class StoppedBeforeAnyPulse extends Error {
  override name = 'StoppedBeforeAnyPulse';
  constructor() {
    super('stopped before any start finished its first iteration; no pulse was kept');
  }
}

/** The newest samples of a start with the progress report they were taken at. */
export interface KeptPulse {
  live: LivePulse;
  point: ProgressPoint;
}

/**
 * The samples of every start as last reported, by start: what a run ended at once keeps.
 * A live pulse is kept only with its own report (same start and iteration), so that its
 * figures belong to it.
 */
export class ReportedPulses {
  private readonly kept = new Map<number, KeptPulse>();
  private readonly latest = new Map<number, ProgressPoint>();

  /** Takes a batch of progress. */
  add(batch: ProgressBatch): void {
    for (const point of batch.points) this.latest.set(point.start, point);
    for (const live of batch.live) {
      const point = batch.points.find((p) => p.start === live.start && p.iteration === live.iteration);
      if (point) this.kept.set(live.start, { live, point });
    }
  }

  /** The kept pulse of lowest objective, or null before any. */
  best(): KeptPulse | null {
    let best: KeptPulse | null = null;
    for (const k of this.kept.values()) if (!best || k.point.objective < best.point.objective) best = k;
    return best;
  }

  /** Every start with a kept pulse, with its newest report. */
  starts(): Array<KeptPulse & { newest: ProgressPoint }> {
    return [...this.kept.values()].sort((a, b) => a.live.start - b.live.start).map((k) => ({ ...k, newest: this.latest.get(k.live.start) ?? k.point }));
  }
}

/** Samples held to the amplitude bound, as the library returns a design's (rounding can leave them a hair over it). */
export function heldToBound(i: Float64Array, q: Float64Array, rabiMax: number, bound: Problem['constraints']['bound']): void {
  for (let k = 0; k < i.length; k++) {
    if (bound === 'box') {
      i[k] = Math.max(-rabiMax, Math.min(rabiMax, i[k]));
      q[k] = Math.max(-rabiMax, Math.min(rabiMax, q[k]));
    } else {
      const r = Math.hypot(i[k], q[k]);
      if (r > rabiMax) {
        const f = (rabiMax / r) * (1 - 2 ** -52);
        i[k] *= f;
        q[k] *= f;
      }
    }
  }
}

/** A running design as the client follows it. */
interface Running {
  spec: unknown;
  /** Null until the spec is checked. */
  problem: Problem | null;
  /** True once the designers were given the job. */
  started: boolean;
  t0: number;
  reported: ReportedPulses;
  /** Ends the design at once with an outcome, or with StoppedBeforeAnyPulse (after the designers were replaced). */
  abandon: (outcome: DesignOutcome | StoppedBeforeAnyPulse) => void;
}

/** A running shortest-duration search as the client follows it: the durations tried so far and the pulses of those that met the goal. */
interface Searching {
  dt: number;
  tried: DurationTrial[];
  met: Map<number, Pulse>;
  lowerBoundS: number;
  /** True once the designer was given the job. */
  started: boolean;
  /** Ends the search at once with what was found (after the designers were replaced). */
  abandon: (outcome: ShortestOutcome) => void;
}

/** The outcome of a search ended at once: the shortest duration that met the goal among those tried. */
export function keptShortest(s: Pick<Searching, 'dt' | 'tried' | 'met' | 'lowerBoundS'>): ShortestOutcome {
  const tried = [...s.tried].sort((a, b) => a.segments - b.segments);
  const best = tried.find((t) => t.met && s.met.has(t.segments)) ?? null;
  return {
    durationS: best ? best.durationS : null,
    segments: best ? best.segments : null,
    meanInfidelity: best ? best.meanInfidelity : null,
    worstInfidelity: best ? best.worstInfidelity : null,
    pulse: best ? s.met.get(best.segments)! : null,
    tried,
    lowerBoundS: s.lowerBoundS,
    dt: s.dt,
    stopped: true,
  };
}

/** The client over a pool: one worker for analysis, the others for designs. */
export class CoreClient {
  private readonly analysis: Remote<CoreService>;
  private readonly designers: Remote<CoreService>[];
  private readonly designerEndpoints: Endpoint[];
  private readyPromise: Promise<CoreInfo> | null = null;
  private designersPromise: Promise<void> | null = null;
  /** Calls in flight on the analysis worker other than map parts (a compare, an export, a figure). */
  private analysisCalls = 0;
  /** Called whenever the analysis worker has no such call left. */
  private readonly analysisIdle = new Set<() => void>();
  private designing = false;
  private stopRequested = false;
  private current: Running | null = null;
  private searching: Searching | null = null;
  /** Per designer, a promise that rejects when Stop ends that designer's worker (calls in flight on it never settle). */
  private ended: Array<{ promise: Promise<never>; reject: (reason: Error) => void }> = [];
  /**
   * Most workers a map's bands run on at once. The browser client leaves one core to the
   * page: with every core busy with a map, the page's own tasks were stretched past 50 ms.
   */
  mapWorkers = Infinity;

  /**
   * Wraps one endpoint for analysis jobs and one or more for design starts. With `replace`
   * (a fresh endpoint for a designer's, whose worker it ends), Stop ends a design at once:
   * the designers are replaced and the best pulse reported so far is kept; without it, Stop
   * waits for each designer's current iteration.
   */
  constructor(
    analysis: Endpoint,
    designers: Endpoint[],
    private readonly onDispose: () => void = () => undefined,
    private readonly replace: ((designer: Endpoint) => Endpoint) | null = null,
  ) {
    this.analysis = wrap<CoreService>(analysis);
    this.designerEndpoints = [...designers];
    this.designers = designers.map((endpoint) => wrap<CoreService>(endpoint));
    if (this.designers.length === 0) this.designers.push(this.analysis);
    this.ended = this.designers.map(() => endedPromise());
  }

  /** Number of workers that run design starts. */
  get designWorkers(): number {
    return this.designers.length;
  }

  /**
   * Loads the core in the analysis worker, which answers the page's questions (checks,
   * figures, maps); resolves with what it can build. The design workers load with
   * `designersReady`, or with their first job.
   */
  ready(): Promise<CoreInfo> {
    this.readyPromise ??= this.analysis.ready();
    return this.readyPromise;
  }

  /** Loads the core in every design worker (a worker started late starts now). */
  designersReady(): Promise<void> {
    this.designersPromise ??= Promise.all(this.designers.map((d) => d.ready())).then(() => undefined);
    return this.designersPromise;
  }

  /**
   * The core loaded everywhere, then the spec checked on the analysis worker, or on the first
   * designer while another call keeps the analysis worker busy (a compare, an export: the
   * check would wait for it, and the run goes to the designers anyway).
   */
  private async readyAndChecked(spec: unknown): Promise<SpecCheck> {
    await Promise.all([this.ready(), this.designersReady()]);
    const checker = this.analysisCalls > 0 ? this.designers[0] : this.analysis;
    return checker.checkSpec(spec);
  }

  /** A call on the analysis worker, counted: while it runs, a map's parts go to an idle designer. */
  private async ask<T>(call: (analysis: Remote<CoreService>) => Promise<T>): Promise<T> {
    this.analysisCalls++;
    try {
      return await call(this.analysis);
    } finally {
      if (--this.analysisCalls === 0) this.analysisIdle.forEach((wake) => wake());
    }
  }

  /**
   * Validates a spec with the library's rules (first error, with its field): on the analysis
   * worker, or on a designer while another call keeps the analysis worker busy and no design
   * runs (the form's check would wait for a compare).
   */
  checkSpec(spec: unknown): Promise<SpecCheck> {
    return (this.analysisCalls > 0 && !this.designing ? this.designers[0] : this.analysis).checkSpec(spec);
  }

  /** Runs a design over the pool; `onProgress` gets batches from every worker. */
  async design(spec: unknown, starts: number, onProgress?: (batch: ProgressBatch) => void, livePulseEveryMs = 200): Promise<DesignOutcome> {
    if (this.designing) throw new Error('a design is already running; stop it first');
    this.designing = true;
    this.stopRequested = false;
    try {
      const reported = new ReportedPulses();
      let abandon: (outcome: DesignOutcome | StoppedBeforeAnyPulse) => void = () => undefined;
      const abandoned = new Promise<DesignOutcome>((resolve, reject) => (abandon = (o) => (o instanceof StoppedBeforeAnyPulse ? reject(o) : resolve(o))));
      // Followed from the start: the spec's check waits its turn on the analysis worker, which
      // may be busy with a long map, and Stop meanwhile ends the run at once.
      const running: Running = { spec, problem: null, t0: performance.now(), reported, abandon, started: false };
      this.current = running;
      const check = await Promise.race([this.readyAndChecked(spec), abandoned.then(() => null as never)]);
      if (!check.ok) this.current = null;
      const t0 = performance.now();
      running.problem = check.ok ? check.problem : null;
      running.t0 = t0;
      running.started = true;
      const groups = shareStarts(starts, this.designers.length);
      const sink = proxy((batch: ProgressBatch) => {
        reported.add(batch);
        onProgress?.(batch);
      });
      const designers = [...this.designers];
      const work = (async (): Promise<DesignOutcome> => {
        // Every start to the pruning point (the whole run when the spec does not prune), then the
        // best again from their start on, as one loop and the command line's threads do.
        // A design that does not prune compares its starts across the workers (best-start.ts Referee).
        const o = check.ok ? check.problem.optimizer : undefined;
        const referee = o && o.outpaceEvery > 0 && !prunes(o, o.starts) ? new Referee(groups.length, o) : undefined;
        const probes = await Promise.all(groups.map((group, w) => {
          const judge = referee && proxy((checkpoint: Checkpoint) => referee.report(w, checkpoint));
          return designers[w].design(spec, group, sink, livePulseEveryMs, 'probe', judge).then((share) => {
            referee?.end(w, share.starts);
            return share;
          }, (error: unknown) => {
            referee?.end(w, []);
            throw error;
          });
        }));
        const keep = probes[0].keepStarts;
        const going = keep === undefined || this.stopRequested ? [] : startsToContinue(probes.flatMap((r) => r.starts), keep);
        if (going.length === 0) return { ...mergeDesigns(probes, (performance.now() - t0) / 1000), stopped: this.stopRequested };
        const again = shareStarts(going.length, designers.length).map((g) => g.map((k) => going[k]));
        // A continued start retraces its probe first: the page has those reports already.
        const reached = new Map(probes.flatMap((r) => r.starts).map((r) => [r.start, r.iterations]));
        const fresh = (p: { start: number; iteration: number }): boolean => p.iteration > (reached.get(p.start) ?? -1);
        const finishSink = proxy((batch: ProgressBatch) => {
          const kept = { points: batch.points.filter(fresh), live: batch.live.filter(fresh) };
          reported.add(kept);
          onProgress?.(kept);
        });
        const finished = await Promise.all(again.map((group, w) => designers[w].design(spec, group, finishSink, livePulseEveryMs, 'finish')));
        return { ...mergePruned(probes, finished, (performance.now() - t0) / 1000), stopped: this.stopRequested };
      })();
      // Stop pressed while the run was being set up: the designers end their first iteration.
      if (this.stopRequested) void Promise.all(designers.map((d) => d.stop()));
      return await Promise.race([work, abandoned]);
    } catch (error) {
      if (!(error instanceof StoppedBeforeAnyPulse)) await this.stop();
      throw error;
    } finally {
      this.designing = false;
      this.current = null;
    }
  }

  /** The shortest duration meeting a goal, on one design worker; `onTrial` gets each duration tried. Stop ends it keeping what was found. */
  async shortest(spec: unknown, request: ShortestRequest, onTrial?: TrialSink): Promise<ShortestOutcome> {
    if (this.designing) throw new Error('a design is already running; stop it first');
    this.designing = true;
    this.stopRequested = false;
    try {
      let abandon: (outcome: ShortestOutcome) => void = () => undefined;
      const abandoned = new Promise<ShortestOutcome>((resolve) => (abandon = resolve));
      const searching: Searching = { dt: NaN, tried: [], met: new Map(), lowerBoundS: NaN, abandon, started: false };
      this.searching = searching;
      const check = await Promise.race([this.readyAndChecked(spec), abandoned]);
      if (!('ok' in check)) return check;
      if (check.ok) searching.dt = check.problem.dt;
      else this.searching = null;
      searching.started = true;
      const sink = proxy((trial: DurationTrial, lowerBoundS: number, pulse?: Pulse) => {
        searching.tried.push(trial);
        searching.lowerBoundS = lowerBoundS;
        if (pulse) searching.met.set(trial.segments, pulse);
        onTrial?.(trial, lowerBoundS, pulse);
      });
      const work = this.designers[0].shortest(spec, request, sink);
      if (this.stopRequested) void this.stop();
      return await Promise.race([work, abandoned]);
    } finally {
      this.designing = false;
      this.searching = null;
    }
  }

  /** True while a design runs. */
  get running(): boolean {
    return this.designing;
  }

  /**
   * Ends the running design or shortest search. With replaceable designers, at once, however
   * long the core call running in them: their workers are ended and replaced, and design()
   * resolves with the best pulse reported so far (its worst member left unknown, NaN, for the
   * page to ask for: the analysis worker may be busy) or, when no start has reported one yet,
   * rejects with StoppedBeforeAnyPulse; shortest() resolves with the durations tried so far.
   * Without replaceable designers, within one iteration of each designer.
   */
  async stop(): Promise<void> {
    if (!this.designing) return;
    this.stopRequested = true;
    const running = this.current;
    const searching = this.searching;
    if (!this.replace || (!running && !searching)) {
      await Promise.all(this.designers.map((d) => d.stop()));
      return;
    }
    this.current = null;
    this.searching = null;
    // Designers not yet given the job have nothing to end.
    if (running?.started || searching?.started) this.replaceDesigners();
    if (searching) {
      searching.abandon(keptShortest(searching));
      return;
    }
    const best = running!.reported.best();
    running!.abandon(best ? this.keptOutcome(running!, best) : new StoppedBeforeAnyPulse());
  }

  private replaceDesigners(): void {
    for (let w = 0; w < this.designers.length; w++) {
      if (this.designers[w] === this.analysis) continue;
      // Not released: its calls in flight never settle, and releasing would reject them; a
      // map band waiting on one is told by `ended` and computed elsewhere.
      const endpoint = this.replace!(this.designerEndpoints[w]);
      this.designerEndpoints[w] = endpoint;
      this.designers[w] = wrap<CoreService>(endpoint);
      this.ended[w].reject(new Error('the worker was replaced'));
      this.ended[w] = endedPromise();
      // The new worker loads its core now, not when the next job arrives.
      void this.designers[w].ready().catch(() => undefined);
    }
  }

  /**
   * The outcome of a design ended at once: the best reported pulse with the mean of its report
   * and the worst member unknown (NaN), every start's newest figures.
   */
  private keptOutcome(running: Running, best: KeptPulse): DesignOutcome {
    // A pulse is reported only after the check found the problem.
    const problem = running.problem!;
    const pulseOf = (kept: KeptPulse): Pulse => {
      const i = kept.live.i.slice();
      const q = kept.live.q.slice();
      heldToBound(i, q, problem.rabiMax, problem.constraints.bound);
      return { dt: problem.dt, i, q, metadata: { origin: 'design', name: `design start ${kept.live.start + 1}` } };
    };
    const starts: StartResult[] = running.reported.starts().map((k) => ({
      start: k.live.start,
      pulse: pulseOf(k),
      meanInfidelity: k.point.meanInfidelity,
      objective: k.point.objective,
      iterations: k.newest.iteration,
      evaluations: 0,
      stopReason: 'stopped',
      elapsedS: k.newest.elapsedS,
    }));
    const chosen = starts.find((s) => s.start === best.live.start)!;
    const pulse = chosen.pulse;
    // Stop does not wait for an evaluation: on a big ladder one takes longer than Stop may,
    // and the analysis worker may be busy with a long map. The page asks for the worst member.
    const evaluation: Evaluation = { members: [], meanInfidelity: best.point.meanInfidelity, worstInfidelity: NaN, worstIndex: -1 };
    pulse.metadata.figures = {
      meanInfidelity: evaluation.meanInfidelity,
      worstInfidelity: evaluation.worstInfidelity,
      iterations: best.point.iteration,
      stopReason: 'stopped',
      start: best.live.start,
    };
    // The kept samples are those of the report, not of a later iteration.
    const kept: StartResult = { ...chosen, iterations: best.point.iteration };
    return { pulse, evaluation, best: kept, starts, elapsedS: (performance.now() - running.t0) / 1000, stopped: true };
  }

  // Every pulse goes to a worker as a copy made in slices and transferred (transfer.ts `sendable`).

  /** Figures of a pulse on the spec's ensemble. */
  async evaluate(spec: unknown, pulse: Pulse): Promise<Evaluation> {
    return this.ask(async (analysis) => analysis.evaluate(spec, await sendable(pulse)));
  }

  /**
   * A map, coarse first, then full resolution (on a ladder, with its leakage). Each grid is
   * computed in parts of about MAP_PART_NS of core time spread over the idle workers, so a job
   * sent meanwhile (a design's check, the worst member) waits for one part, and a design
   * started meanwhile gets its workers back after their current part. When `signal` aborts
   * (the map's settings changed), the parts not yet sent are dropped and the map rejects.
   * The values are those of the library's robustnessMap bit for bit.
   */
  async map(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, onUpdate?: (update: MapUpdate) => void, line?: Line, system?: LadderSystem, signal?: AbortSignal): Promise<MapUpdate> {
    const size = mapPartSize(pulse, target, line, system);
    const coarse = await this.mapInParts(target, pulse, coarseAxis(detuning), coarseAxis(amplitudeError), size, line, system, signal);
    const update: MapUpdate = { coarse, complete: false };
    onUpdate?.({ ...update });
    await this.mapInParts(target, pulse, detuning, amplitudeError, size, line, system, signal, (fine) => {
      update.fine = fine;
      onUpdate?.({ ...update });
    });
    update.complete = true;
    onUpdate?.({ ...update });
    return update;
  }

  /** One grid in parts of `size` points over the idle workers; `onPart` sees the grid (NaN where still to come) after each part. */
  private async mapInParts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, size: number, line: Line | undefined, system: LadderSystem | undefined, signal: AbortSignal | undefined, onPart?: (map: MapResult) => void): Promise<MapResult> {
    const total = detuning.points * amplitudeError.points;
    const infidelity = new Float64Array(total).fill(NaN);
    const map: MapResult = { detuning: { ...detuning }, amplitudeError: { ...amplitudeError }, infidelity };
    const parts = mapParts(total, size);
    let next = 0;
    const limit = Math.max(1, this.mapWorkers);
    const busy = new Set<Remote<CoreService>>();
    /**
     * Workers that may take the next part, best first: the analysis worker unless another call
     * runs on it (a compare, an export: the part would wait behind it), then the designers
     * while no design runs (a designer ended by Stop is gone from the list).
     */
    const takers = () => [
      ...(this.analysisCalls === 0 ? [this.analysis] : []),
      ...(this.designing ? [] : this.designers.filter((d) => d !== this.analysis)),
    ];
    await new Promise<void>((resolve, reject) => {
      let failed = false;
      const wake = () => pump();
      const finish = (error?: unknown) => {
        this.analysisIdle.delete(wake);
        if (error !== undefined) {
          failed = true;
          reject(error);
        } else resolve();
      };
      // Each idle taker takes the next part, up to `limit` at once; when none may, the analysis
      // worker takes it all the same (queued behind its call), or the map would wait for ever.
      const pump = (): void => {
        if (failed) return;
        if (signal?.aborted) return finish(aborted(signal));
        if (next >= parts.length) {
          if (busy.size === 0) finish();
          return;
        }
        while (next < parts.length && busy.size < limit) {
          const worker = takers().find((w) => !busy.has(w)) ?? (busy.size === 0 ? this.analysis : undefined);
          if (!worker) break;
          const [start, count] = parts[next++];
          busy.add(worker);
          this.onSurvivor(worker, async (on) => on.mapPart(target, await sendable(pulse), detuning, amplitudeError, start, count, line, system)).then(
            (part: MapPart) => {
              busy.delete(worker);
              infidelity.set(part.infidelity, start);
              if (part.leakage) {
                map.leakage ??= new Float64Array(total).fill(NaN);
                map.leakage.set(part.leakage, start);
              }
              onPart?.(map);
              pump();
            },
            finish,
          );
        }
      };
      // Once the analysis worker's other calls end, it takes parts again.
      this.analysisIdle.add(wake);
      pump();
    });
    if (signal?.aborted) throw aborted(signal);
    return map;
  }

  /**
   * A job on `worker`; when that worker is a designer that Stop ends meanwhile, the job runs
   * again on the analysis worker (a map band must not wait for ever on a worker that is gone).
   */
  private async onSurvivor<T>(worker: Remote<CoreService>, job: (worker: Remote<CoreService>) => Promise<T>): Promise<T> {
    const w = this.designers.indexOf(worker);
    if (w < 0 || worker === this.analysis) return job(worker);
    try {
      return await Promise.race([job(worker), this.ended[w].promise]);
    } catch (error) {
      if (this.designers[w] === worker) throw error;
      return job(this.analysis);
    }
  }

  /**
   * Cuts through zero error over the grid's ranges (the library's cuts bit for bit: one-row
   * maps against the target chooseTarget picks), in parts as a map is, dropped like one when
   * `signal` aborts.
   */
  async cuts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem, signal?: AbortSignal): Promise<Cuts> {
    const used = chooseTarget(target, pulse).targetUsed;
    const size = mapPartSize(pulse, used, line, system);
    const zero: GridAxis = { min: 0, max: 0, points: 1 };
    const along = await this.mapInParts(used, pulse, detuning, zero, size, line, system, signal);
    const across = await this.mapInParts(used, pulse, zero, amplitudeError, size, line, system, signal);
    const cuts: Cuts = { detuning: axisValues(detuning), detuningInfidelity: along.infidelity, amplitudeError: axisValues(amplitudeError), amplitudeErrorInfidelity: across.infidelity };
    if (along.leakage && across.leakage) {
      cuts.detuningLeakage = along.leakage;
      cuts.amplitudeErrorLeakage = across.leakage;
    }
    return cuts;
  }

  /** The comparison table and cuts. */
  async compare(request: CompareRequest): Promise<CompareRow[]> {
    return this.ask(async (analysis) => analysis.compare(await sendable(request)));
  }

  /** Bloch vectors after each sample for one member. */
  async trajectory(pulse: Pulse, member: Member, from: Vec3, line?: Line, system?: LadderSystem): Promise<Float64Array> {
    return this.ask(async (analysis) => analysis.trajectory(await sendable(pulse), member, from, line, system));
  }

  /** Population of every level against time for one member (the drive through the line). */
  async populations(pulse: Pulse, member: Member, system: LadderSystem, from: Vec3, line?: Line): Promise<Populations> {
    return this.ask(async (analysis) => analysis.populations(await sendable(pulse), member, system, from, line));
  }

  /** The drive the qubit sees through the line. */
  async drive(pulse: Pulse, line?: Line): Promise<QubitDrive> {
    return this.ask(async (analysis) => analysis.drive(await sendable(pulse), line));
  }

  /** Bloch paths of several members, each within `tolerance` (unit sphere) of the full path. */
  async ensembleTrajectories(pulse: Pulse, members: Member[], from: Vec3, tolerance: number, line?: Line): Promise<EnsemblePaths> {
    return this.ask(async (analysis) => analysis.ensembleTrajectories(await sendable(pulse), members, from, tolerance, line));
  }

  /** The held pulse's spectrum over a span of detunings, computed in the analysis worker. */
  async spectrum(pulse: Pulse, request: SpectrumRequest): Promise<Spectrum> {
    return this.ask(async (analysis) => analysis.spectrum(await sendable(pulse), request));
  }

  /** Reads a pulse file (rejects with a PulseFormatError named error when malformed). */
  readPulse(text: string): Promise<Pulse> {
    return this.ask((analysis) => analysis.readPulse(text));
  }

  /** Reads a pulse file in the analysis worker (the page only passes it on), with progress, evaluated on `spec` when given. */
  readPulseFile(file: Blob, onProgress?: FileProgressSink, spec?: unknown): Promise<{ pulse: Pulse; evaluation?: Evaluation }> {
    return this.ask((analysis) => analysis.readPulseFile(file, onProgress ? proxy(onProgress) : undefined, spec));
  }

  /** Pulse file text of a pulse. */
  async writePulse(pulse: Pulse): Promise<string> {
    return this.ask(async (analysis) => analysis.writePulse(await sendable(pulse)));
  }

  /** The instrument waveform of a pulse as played, and its report on the judge's members (rejects with ExportError when refused). */
  async exportPreview(pulse: Pulse, settings: unknown, judge: ExportJudge | null): Promise<ExportPreview> {
    return this.ask(async (analysis) => analysis.exportPreview(await sendable(pulse), settings, judge));
  }

  /** The exported waveform's file bytes (and description), exactly as the command line writes them. */
  async exportFile(pulse: Pulse, settings: unknown, options: ExportFileOptions): Promise<EncodedWaveform> {
    return this.ask(async (analysis) => analysis.exportFile(await sendable(pulse), settings, options));
  }

  /** Releases the workers. */
  dispose(): void {
    for (const remote of new Set([this.analysis, ...this.designers])) remote[releaseProxy]();
    this.onDispose();
  }
}

/** A promise that only ever rejects, and its reject (nobody failing to catch it is an error). */
function endedPromise(): { promise: Promise<never>; reject: (reason: Error) => void } {
  let reject: (reason: Error) => void = () => undefined;
  const promise = new Promise<never>((_, no) => (reject = no));
  promise.catch(() => undefined);
  return { promise, reject };
}

/**
 * Design workers to start: one per core but one, up to four. The spare core keeps the page
 * responsive: on a 2-core machine two design workers left main-thread tasks of 50-73 ms
 * (chart redraws preempted), one leaves none and the demo design takes 0.57 s instead of 0.5 s.
 */
export function designWorkerCount(hardwareConcurrency: number | undefined): number {
  return Math.max(1, Math.min(4, (hardwareConcurrency || 2) - 1));
}

type Listener = Parameters<Endpoint['addEventListener']>[1];

/**
 * An endpoint whose worker is started by the first message sent to it: comlink can wrap it
 * at once, and the worker costs nothing until it is given something to do.
 */
export class LateWorker implements Endpoint {
  private worker: Worker | null = null;
  private ended = false;
  private readonly listeners: Array<[string, Listener, Parameters<Endpoint['addEventListener']>[2]]> = [];

  constructor(private readonly create: () => Worker) {}

  /** True once the worker was started. */
  get started(): boolean {
    return this.worker !== null;
  }

  postMessage(message: unknown, transfer?: Transferable[]): void {
    if (this.ended) return;
    if (!this.worker) {
      this.worker = this.create();
      for (const [type, listener, options] of this.listeners) this.worker.addEventListener(type, listener, options);
    }
    this.worker.postMessage(message, transfer ?? []);
  }

  addEventListener(type: string, listener: Listener, options?: Parameters<Endpoint['addEventListener']>[2]): void {
    this.listeners.push([type, listener, options]);
    this.worker?.addEventListener(type, listener, options);
  }

  removeEventListener(type: string, listener: Listener, options?: Parameters<Endpoint['removeEventListener']>[2]): void {
    const k = this.listeners.findIndex(([t, l]) => t === type && l === listener);
    if (k >= 0) this.listeners.splice(k, 1);
    this.worker?.removeEventListener(type, listener, options);
  }

  terminate(): void {
    this.ended = true;
    this.worker?.terminate();
  }
}

/**
 * The client over real Web Workers (browser only); Stop ends a design worker and starts a
 * fresh one. The analysis worker starts at once; the design workers start with their first
 * call (the page asks for them once its restored session is drawn: on two cores, a design
 * worker compiling its code beside the page's start stretched the page's first tasks).
 */
export function createBrowserClient(): CoreClient {
  const workers = new Set<Worker | LateWorker>();
  const create = () => new Worker(new URL('./worker.ts', import.meta.url), { type: 'module', name: 'gatesmith-core' });
  const start = () => {
    const worker = create();
    workers.add(worker);
    return worker;
  };
  const startLate = () => {
    const worker = new LateWorker(create);
    workers.add(worker);
    return worker;
  };
  const replace = (old: Endpoint) => {
    (old as Worker | LateWorker).terminate();
    workers.delete(old as Worker | LateWorker);
    return start();
  };
  const analysis = start();
  const designers = Array.from({ length: designWorkerCount(navigator.hardwareConcurrency) }, startLate);
  const client = new CoreClient(analysis, designers, () => workers.forEach((w) => w.terminate()), replace);
  client.mapWorkers = designWorkerCount(navigator.hardwareConcurrency);
  return client;
}
