// One design run as the page follows it: Run and Stop, the convergence record, the live
// figures (iteration, mean and worst infidelity, elapsed time) and the live waveform.
// Progress arrives in batches from several workers; the page redraws on its own clock.
import type { StopReason } from '../../core/types.ts';
import type { DesignOutcome } from '../../worker/client.ts';
import type { ProgressBatch } from '../../worker/protocol.ts';
import { Convergence } from '../convergence.ts';
import { runHistory, type RunHistory } from '../run-history.ts';
import { formatClock } from '../units.ts';
import { newPulseId, type PulseEntry, type Session } from './session.svelte.ts';

/** Where a run is. */
export type RunStatus = 'idle' | 'running' | 'stopping' | 'done' | 'failed';

/** The samples shown while a run goes on. */
export interface LiveWaveform {
  start: number;
  iteration: number;
  dt: number;
  i: Float64Array;
  q: Float64Array;
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
};

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
  meanInfidelity = $state<number | null>(null);
  worstInfidelity = $state<number | null>(null);
  /** Iteration of the pulse the worst figure belongs to. */
  worstAt = $state<number | null>(null);
  elapsedS = $state(0);
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

  constructor(private readonly session: Session) {}

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
    this.meanInfidelity = null;
    this.worstInfidelity = null;
    this.worstAt = null;
    this.leaderStart = null;
    this.history = null;
    this.restoredFrom = null;
    this.version++;
    this.t0 = performance.now();
    this.elapsedS = 0;
    this.timer = setInterval(() => (this.elapsedS = (performance.now() - this.t0) / 1000), 100);
    const dt = problem.dt;
    try {
      const outcome = await session.client.design(spec, problem.optimizer.starts, (batch) => this.take(batch, spec, dt));
      this.finish(outcome, spec);
      return outcome;
    } catch (error) {
      this.status = 'failed';
      this.error = `${(error as Error).name}: ${(error as Error).message}`;
      session.notice = { kind: 'error', text: `The design failed: ${(error as Error).message}` };
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

  private take(batch: ProgressBatch, spec: unknown, dt: number): void {
    if (!this.active) return;
    this.convergence.add(batch.points);
    const leader = this.convergence.leader();
    if (leader) {
      this.iteration = this.convergence.totalIterations();
      this.meanInfidelity = leader.meanInfidelity;
      this.leaderStart = leader.start;
    }
    const live = batch.live.find((l) => l.start === leader?.start) ?? (this.live ? undefined : batch.live[0]);
    if (live) {
      this.live = { start: live.start, iteration: live.iteration, dt, i: live.i, q: live.q };
      void this.evaluateLive(spec);
    }
    this.version++;
  }

  // The worst member is not part of a progress report: the analysis worker evaluates the
  // live pulse now and then, while the designers keep designing.
  private async evaluateLive(spec: unknown): Promise<void> {
    const live = this.live;
    if (!live || this.evaluating || performance.now() - this.lastEvaluation < LIVE_EVALUATION_MS) return;
    this.evaluating = true;
    this.lastEvaluation = performance.now();
    try {
      const evaluation = await this.session.client.evaluate(spec, { dt: live.dt, i: live.i, q: live.q, metadata: {} });
      if (this.active) {
        this.worstInfidelity = evaluation.worstInfidelity;
        this.worstAt = live.iteration;
      }
    } catch {
      // A figure that could not be had is simply not shown.
    } finally {
      this.evaluating = false;
    }
  }

  private finish(outcome: DesignOutcome, spec: unknown): void {
    this.outcome = outcome;
    this.status = 'done';
    this.meanInfidelity = outcome.evaluation.meanInfidelity;
    this.worstInfidelity = outcome.evaluation.worstInfidelity;
    this.worstAt = null;
    this.iteration = outcome.starts.reduce((sum, s) => sum + s.iterations, 0);
    this.leaderStart = outcome.best.start;
    this.live = { start: outcome.best.start, iteration: outcome.best.iterations, dt: outcome.pulse.dt, i: outcome.pulse.i, q: outcome.pulse.q };
    this.runs++;
    const when = formatClock(Date.now());
    const name = typeof (spec as { name?: unknown }).name === 'string' ? (spec as { name: string }).name : 'design';
    const pulse = outcome.pulse;
    pulse.metadata = { ...pulse.metadata, origin: 'design', name, spec, stopped: outcome.stopped };
    this.history = runHistory(outcome, this.convergence);
    this.session.addPulse({
      id: newPulseId('design'),
      label: `${name} #${this.runs} (${when}${outcome.stopped ? ', stopped' : ''})`,
      pulse,
      evaluation: { meanInfidelity: outcome.evaluation.meanInfidelity, worstInfidelity: outcome.evaluation.worstInfidelity },
      history: this.history,
    });
    this.version++;
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
    this.meanInfidelity = entry.evaluation?.meanInfidelity ?? null;
    this.worstInfidelity = entry.evaluation?.worstInfidelity ?? null;
    this.worstAt = null;
    const best = h.starts.find((s) => s.start === h.best);
    this.live = { start: h.best, iteration: best?.iterations ?? 0, dt: entry.pulse.dt, i: entry.pulse.i, q: entry.pulse.q };
    this.version++;
  }
}
