// The shortest-duration search as the design view runs it: the goal typed by the user,
// every duration tried as it arrives, and the winning pulse added to the session's pulses.
import type { DurationTrial, ShortestOutcome, ShortestRequest } from '../../worker/protocol.ts';
import { formatQuantity } from '../units.ts';
import { newPulseId, type Session } from './session.svelte.ts';

/** A goal field's text read as an infidelity, or the reason it cannot be, in the user's words. */
export function readGoal(label: string, text: string, optional: boolean): { value?: number; error?: string } {
  const trimmed = text.trim();
  if (trimmed === '') return optional ? {} : { error: `${label}: a value is needed; an infidelity above 0 and at most 1, e.g. 1e-4` };
  const value = Number(trimmed);
  if (!Number.isFinite(value) || !(value > 0 && value <= 1)) {
    return { error: `${label}: "${trimmed}" is not allowed; an infidelity above 0 and at most 1, e.g. 1e-4` };
  }
  return { value };
}

/** The name of the winning pulse: the spec's name and the duration it takes. */
export function shortestLabel(name: string, durationS: number, segments: number): string {
  return `${name} shortest ${formatQuantity(durationS, 'time', { significant: 4 })} (${segments} samples)`;
}

/** One search's state. */
export class ShortestRun {
  goalMeanText = $state('1e-4');
  goalWorstText = $state('');
  trials = $state.raw<DurationTrial[]>([]);
  outcome = $state.raw<ShortestOutcome | null>(null);
  /** The goal the shown curve was searched for (the fields may change after). */
  goal = $state.raw<ShortestRequest | null>(null);
  /** The rectangular pulse's time for the searched spec (theta / (2 pi peak Rabi)), once known. */
  lowerBoundS = $state<number | null>(null);
  active = $state(false);
  error = $state<string | null>(null);

  constructor(private readonly session: Session) {}

  /** The goal fields' complaints, by field. */
  get fieldErrors(): { mean?: string; worst?: string } {
    return { mean: readGoal('goal mean infidelity', this.goalMeanText, false).error, worst: readGoal('goal worst infidelity', this.goalWorstText, true).error };
  }

  /** True when the goal reads and the spec is valid. */
  get canRun(): boolean {
    const e = this.fieldErrors;
    return !this.active && !e.mean && !e.worst && this.session.valid;
  }

  /** Searches for the shortest duration; the winner joins the pulse list. */
  async run(): Promise<void> {
    if (!this.canRun) return;
    const goalMean = readGoal('goal mean infidelity', this.goalMeanText, false).value!;
    const goalWorst = readGoal('goal worst infidelity', this.goalWorstText, true).value;
    const request: ShortestRequest = goalWorst === undefined ? { goalMean } : { goalMean, goalWorst };
    const spec = $state.snapshot(this.session.spec);
    this.goal = request;
    this.trials = [];
    this.outcome = null;
    this.lowerBoundS = null;
    this.error = null;
    this.active = true;
    try {
      const outcome = await this.session.client.shortest(spec, request, (trial, lowerBoundS) => {
        this.trials = [...this.trials, trial];
        if (Number.isFinite(lowerBoundS)) this.lowerBoundS = lowerBoundS;
      });
      this.trials = outcome.tried;
      this.outcome = outcome;
      // Unknown (NaN) when Stop ended the search before its first duration was judged.
      this.lowerBoundS = Number.isFinite(outcome.lowerBoundS) ? outcome.lowerBoundS : null;
      if (outcome.pulse && outcome.durationS !== null && outcome.segments !== null) {
        const named = (spec as { name?: unknown }).name;
        const name = typeof named === 'string' ? named : 'design';
        const pulse = outcome.pulse;
        pulse.metadata = { ...pulse.metadata, origin: 'shortest', name, spec, goal: { ...request } };
        this.session.addPulse({
          id: newPulseId('shortest'),
          label: shortestLabel(name, outcome.durationS, outcome.segments),
          pulse,
          evaluation: { meanInfidelity: outcome.meanInfidelity!, worstInfidelity: outcome.worstInfidelity! },
        });
      }
    } catch (error) {
      this.error = (error as Error).message;
    } finally {
      this.active = false;
    }
  }

  /** Ends the search within the design running now, keeping what was found. */
  stop(): void {
    if (this.active) void this.session.client.stop();
  }
}

const searches = new WeakMap<Session, ShortestRun>();
/** The session's one search, kept while the page lives, so that leaving the design view keeps its curve. */
export function shortestRunOf(session: Session): ShortestRun {
  let search = searches.get(session);
  if (!search) searches.set(session, (search = new ShortestRun(session)));
  return search;
}
