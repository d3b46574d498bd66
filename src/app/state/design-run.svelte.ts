// One design run as the page follows it: Run and Stop, the convergence record, the live
// figures (iteration, mean and worst infidelity, elapsed time) and the live waveform.
// Progress arrives in batches from several workers; the page redraws on its own clock.
import type { StopReason } from '../../core/types.ts';
import { ReportedPulses, type DesignOutcome, type KeptPulse } from '../../worker/client.ts';
import type { ProgressBatch } from '../../worker/protocol.ts';
import { Convergence } from '../convergence.ts';
import { runHistory, type RunHistory } from '../run-history.ts';
import { formatClock } from '../units.ts';
import { newPulseId, type PulseEntry, type Session } from './session.svelte.ts';

/** Where a run is. */
/** Where a run stands; `stopped-empty`: stopped before any start reported a pulse, so nothing was kept. */
export type RunStatus = 'idle' | 'running' | 'stopping' | 'done' | 'stopped-empty' | 'failed';

/** The samples shown while a run goes on, with the figures of those very samples. */
export interface LiveWaveform {
  start: number;
  iteration: number;
  dt: number;
  i: Float64Array;
  q: Float64Array;
  /** Weighted mean and worst member over the spec's ensemble (worst NaN while unknown). */
  meanInfidelity: number;
  worstInfidelity: number;
}

/** Shortest gap between two evaluations of the live pulse on the ensemble (for the worst member). */
export const LIVE_EVALUATION_MS = 300;

const STOP_WORDS: Record<StopReason, string> = {
  'target-reached': 'reached the target infidelity',
  'gradient-tolerance': 'gradient below tolerance',
  'max-iterations': 'iteration budget used',
  'time-limit': 'time budget used',
  stopped: 'stopped',
  'line-search-failed': 'no further descent (line search)',
  stalled: 'progress stalled',
  pruned: 'pruned: set aside after the first iterations',
  outpaced: 'could not overtake the best start',
};

/** How a failed run's notice begins (a later successful run clears it). */
export const DESIGN_FAILED = 'The design failed:';

/** Words for why a start ended. */
export function stopReasonText(reason: StopReason): string {
  return STOP_WORDS[reason] ?? reason;
}

/** A design run's live state. */
export class DesignRun {
  status = $state<RunStatus>('idle');
  /** Bumped whenever new progress arrived (charts redraw on it). */
  version = $state(0);
  iteration = $state(0);
  leaderStart = $state<number | null>(null);
  elapsedS = $state(0);
  /** The pulse shown (the best reported so far, or the result) with its own figures. */
  live = $state.raw<LiveWaveform | null>(null);
  outcome = $state.raw<DesignOutcome | null>(null);
  error = $state<string | null>(null);
  convergence = new Convergence();
  /** The starts table and curves of the run shown (this one's once it ends, or one restored with its pulse). */
  history = $state.raw<RunHistory | null>(null);
  /** The label of the pulse whose history is shown after a reload or a project, else null. */
  restoredFrom = $state<string | null>(null);

  private t0 = 0;
  private timer: ReturnType<typeof setInterval> | null = null;
  private lastEvaluation = 0;
  private evaluating = false;
  private runs = 0;
  private reported = new ReportedPulses();
  private runId = 0;
  /** The next evaluation of the best reported pulse, when one is waiting for its turn. */
  private evaluationTimer: ReturnType<typeof setTimeout> | null = null;

  constructor(private readonly session: Session) {}

  /** Mean infidelity of the pulse shown, or null before any. */
  get meanInfidelity(): number | null {
    return this.live?.meanInfidelity ?? null;
  }

  /** Worst member's infidelity of the pulse shown, or null while unknown. */
  get worstInfidelity(): number | null {
    const worst = this.live?.worstInfidelity;
    return worst === undefined || Number.isNaN(worst) ? null : worst;
  }

  /** True while a run is going (Run disabled, Stop enabled). */
  get active(): boolean {
    return this.status === 'running' || this.status === 'stopping';
  }

  /** Whether Run can start now, and if not, why. */
  get blocker(): string | null {
    if (this.active) return 'a design is running';
    if (!this.session.ready) return 'the core is loading';
    const fields = Object.values(this.session.fieldErrors);
    if (fields.length) return fields[0];
    if (this.session.specError) return this.session.specError.message;
    if (!this.session.problem) return 'the spec is being checked';
    return null;
  }

  /** Starts a design of the current spec; resolves when it ends (by itself or by Stop). */
  async run(): Promise<DesignOutcome | null> {
    const session = this.session;
    await session.validate();
    const problem = session.problem;
    if (this.blocker || !problem) return null;
    const spec = $state.snapshot(session.spec);
    this.convergence = new Convergence();
    this.status = 'running';
    this.error = null;
    this.outcome = null;
    this.live = null;
    this.iteration = 0;
    this.leaderStart = null;
    this.history = null;
    this.restoredFrom = null;
    this.reported = new ReportedPulses();
    const id = ++this.runId;
    this.version++;
    this.t0 = performance.now();
    this.elapsedS = 0;
    this.timer = setInterval(() => (this.elapsedS = (performance.now() - this.t0) / 1000), 100);
    const dt = problem.dt;
    try {
      const outcome = await session.client.design(spec, problem.optimizer.starts, (batch) => this.take(batch, spec, dt, id));
      this.finish(outcome, spec);
      // A failure of an earlier run is no longer news once a run succeeded.
      if (session.notice?.kind === 'error' && session.notice.text.startsWith(DESIGN_FAILED)) session.notice = null;
      return outcome;
    } catch (error) {
      if ((error as Error).name === 'StoppedBeforeAnyPulse') {
        this.status = 'stopped-empty';
        return null;
      }
      this.status = 'failed';
      this.error = `${(error as Error).name}: ${(error as Error).message}`;
      session.notice = { kind: 'error', text: `${DESIGN_FAILED} ${(error as Error).message}` };
      return null;
    } finally {
      if (this.timer) clearInterval(this.timer);
      this.timer = null;
      this.elapsedS = (performance.now() - this.t0) / 1000;
    }
  }

  /** Asks every worker to stop; the run then ends with the best pulse so far. */
  async stop(): Promise<void> {
    if (this.status !== 'running') return;
    this.status = 'stopping';
    await this.session.client.stop();
  }

  private take(batch: ProgressBatch, spec: unknown, dt: number, id: number): void {
    if (!this.active || id !== this.runId) return;
    this.convergence.add(batch.points);
    this.reported.add(batch);
    const leader = this.convergence.leader();
    if (leader) {
      this.iteration = this.convergence.totalIterations();
      this.leaderStart = leader.start;
    }
    void this.evaluateLive(spec, dt, id);
    this.version++;
  }

  // The pulse shown is the best one reported so far, shown once the analysis worker has
  // evaluated it, so that its mean and worst member are of those very samples; the
  // designers keep designing meanwhile.
  private async evaluateLive(spec: unknown, dt: number, id: number): Promise<void> {
    const best = this.reported.best();
    if (!best || this.evaluating || this.isShown(best)) return;
    const wait = LIVE_EVALUATION_MS - (performance.now() - this.lastEvaluation);
    if (wait > 0 && this.live) {
      if (!this.evaluationTimer) {
        this.evaluationTimer = setTimeout(() => {
          this.evaluationTimer = null;
          void this.evaluateLive(spec, dt, id);
        }, wait);
      }
      return;
    }
    this.evaluating = true;
    this.lastEvaluation = performance.now();
    try {
      const evaluation = await this.session.client.evaluate(spec, { dt, i: best.live.i, q: best.live.q, metadata: {} });
      if (this.active && id === this.runId) this.show(best, dt, evaluation.meanInfidelity, evaluation.worstInfidelity);
    } catch {
      // A figure that could not be had: the pulse is shown with the figures of its report.
      if (this.active && id === this.runId) this.show(best, dt, best.point.meanInfidelity, NaN);
    } finally {
      this.evaluating = false;
    }
    if (this.active && id === this.runId) void this.evaluateLive(spec, dt, id);
  }

  private isShown(kept: KeptPulse): boolean {
    return this.live !== null && this.live.start === kept.live.start && this.live.iteration === kept.live.iteration;
  }

  private show(kept: KeptPulse, dt: number, meanInfidelity: number, worstInfidelity: number): void {
    const { start, iteration, i, q } = kept.live;
    this.live = { start, iteration, dt, i, q, meanInfidelity, worstInfidelity };
    this.version++;
  }

  private finish(outcome: DesignOutcome, spec: unknown): void {
    this.outcome = outcome;
    this.status = 'done';
    this.iteration = Math.max(this.iteration, outcome.starts.reduce((sum, s) => sum + s.iterations, 0));
    this.leaderStart = outcome.best.start;
    const { meanInfidelity, worstInfidelity } = outcome.evaluation;
    this.live = { start: outcome.best.start, iteration: outcome.best.iterations, dt: outcome.pulse.dt, i: outcome.pulse.i, q: outcome.pulse.q, meanInfidelity, worstInfidelity };
    this.runs++;
    const when = formatClock(Date.now());
    const name = typeof (spec as { name?: unknown }).name === 'string' ? (spec as { name: string }).name : 'design';
    const pulse = outcome.pulse;
    pulse.metadata = { ...pulse.metadata, origin: 'design', name, spec, stopped: outcome.stopped };
    this.history = runHistory(outcome, this.convergence);
    const entry = {
      id: newPulseId('design'),
      label: `${name} #${this.runs} (${when}${outcome.stopped ? ', stopped' : ''})`,
      pulse,
      evaluation: { meanInfidelity, worstInfidelity },
      history: this.history,
    };
    this.session.addPulse(entry);
    this.version++;
    // Stopped while the analysis worker was busy: its worst member is asked for now.
    if (Number.isNaN(worstInfidelity)) void this.completeFigures(entry, spec);
  }

  private async completeFigures(entry: { id: string; pulse: DesignOutcome['pulse'] }, spec: unknown): Promise<void> {
    try {
      const evaluation = await this.session.client.evaluate(spec, entry.pulse);
      const figures = { meanInfidelity: evaluation.meanInfidelity, worstInfidelity: evaluation.worstInfidelity };
      this.session.updatePulse(entry.id, { evaluation: figures });
      if (this.live && this.live.i === entry.pulse.i) this.live = { ...this.live, ...figures };
    } catch {
      // Left unknown; the views evaluate the pulse again when they need its figures.
    }
  }

  /**
   * Shows the history kept with a pulse (after a reload or on opening a project): the shown
   * pulse's if it has one, else the newest designed pulse's. Nothing changes while a run goes on.
   */
  restore(entry: PulseEntry | null = this.session.selected?.history ? this.session.selected : ([...this.session.pulses].reverse().find((p) => p.history) ?? null)): void {
    if (this.active || !entry?.history) return;
    const h = entry.history;
    this.convergence = Convergence.fromCurves(h.curves);
    this.history = h;
    this.restoredFrom = entry.label;
    this.outcome = null;
    this.leaderStart = h.best;
    this.iteration = h.starts.reduce((sum, s) => sum + s.iterations, 0);
    const best = h.starts.find((s) => s.start === h.best);
    const { meanInfidelity, worstInfidelity } = entry.evaluation ?? { meanInfidelity: NaN, worstInfidelity: NaN };
    this.live = { start: h.best, iteration: best?.iterations ?? 0, dt: entry.pulse.dt, i: entry.pulse.i, q: entry.pulse.q, meanInfidelity, worstInfidelity };
    this.version++;
  }
}
