// The page's session: the spec being edited and its validation by the library, the pulses
// at hand (designed, opened, built for comparison), the view settings, and keeping all of
// it: autosave, project files and links. Reactive (Svelte runes); the worker is reached
// only through the client.
import { chooseTarget, type TargetChoice } from '../../core/target-choice.ts';
import type { Evaluation, Problem, Pulse, Target } from '../../core/types.ts';
import type { CoreClient } from '../../worker/client.ts';
import type { CompositeChoice, ErrorInfo, SpecCheck } from '../../worker/protocol.ts';
import { demoSpec } from '../demo.ts';
import {
  defaultSettings,
  parseProject,
  PROJECT_FORMAT,
  PROJECT_VERSION,
  ProjectFormatError,
  projectText,
  specFromHash,
  specHash,
  type Project,
  type SpecHistory,
  type StoredPulse,
  type ViewSettings,
} from '../project.ts';
import type { RunHistory } from '../run-history.ts';
import { setAt, type SpecJson } from '../spec-edit.ts';
import { exportSampleRate } from '../export-form.ts';
import { inFormWords, specLimits, type FieldNoteText } from '../spec-limits.ts';
import { isoTimestamp, roundUpTwoDigits } from '../units.ts';

/** The views of the page, in the order of their shortcuts (Alt+1 ...). */
export const VIEWS = [
  { id: 'design', title: 'Design' },
  { id: 'waveform', title: 'Waveform' },
  { id: 'robustness', title: 'Robustness' },
  { id: 'compare', title: 'Compare' },
  { id: 'bloch', title: 'Bloch sphere' },
  { id: 'export', title: 'Export' },
  { id: 'spectrum', title: 'Spectrum' },
] as const;

/** A view's id. */
export type ViewId = (typeof VIEWS)[number]['id'];

/** A pulse the page holds, with its label and (when known) its figures on the spec's ensemble. */
export interface PulseEntry {
  id: string;
  label: string;
  pulse: Pulse;
  evaluation?: Pick<Evaluation, 'meanInfidelity' | 'worstInfidelity'>;
  /** The design run that made it: starts table and convergence curves. */
  history?: RunHistory;
}

/** Where the session is kept between visits. */
export interface SessionStorage {
  load(): Promise<unknown>;
  save(project: Project): Promise<void>;
}

/** A message shown to the user (errors keep the class name the UI branched on), with an optional action (Undo). */
export interface Notice {
  kind: 'error' | 'info';
  text: string;
  action?: { label: string; run: () => void };
}

/** Most spec versions the undo history keeps. */
export const HISTORY_LENGTH = 100;
/** Edits of one field closer together than this are one step of the history (typing "10 MHz" is one edit). */
export const HISTORY_MERGE_MS = 1000;

/** Most characters of spec JSON the autosave keeps of the undo history (the newest steps first). */
export const SAVED_HISTORY_CHARS = 500_000;

/** Milliseconds between the last edit and the autosave. */
export const AUTOSAVE_DELAY_MS = 400;

/** Runs `job` once the page is idle (within 2 s), or on the next turn where there is no idle callback (Node). */
function whenIdle(job: () => void): void {
  const idle = (globalThis as { requestIdleCallback?: (callback: () => void, options: { timeout: number }) => number }).requestIdleCallback;
  if (idle) idle(job, { timeout: 2000 });
  else setTimeout(job, 0);
}

let nextId = 1;
/** A fresh pulse id, unique in this page. */
export function newPulseId(prefix: string): string {
  return `${prefix}-${Date.now().toString(36)}-${(nextId++).toString(36)}`;
}

/** Characters of a spec's JSON, measured once per spec (a spec of the history never changes). */
const specSizes = new WeakMap<SpecJson, number>();
function specChars(spec: SpecJson): number {
  let size = specSizes.get(spec);
  if (size === undefined) {
    size = JSON.stringify(spec).length;
    specSizes.set(spec, size);
  }
  return size;
}

// The store keeps typed arrays (copied in one piece); a file needs plain arrays for its JSON.
function storedPulse(entry: PulseEntry, typed: boolean): StoredPulse {
  return {
    id: entry.id,
    label: entry.label,
    dt: entry.pulse.dt,
    i: typed ? entry.pulse.i : Array.from(entry.pulse.i),
    q: typed ? entry.pulse.q : Array.from(entry.pulse.q),
    metadata: entry.pulse.metadata,
    ...(entry.evaluation ? { evaluation: { ...entry.evaluation } } : {}),
    ...(entry.history ? { history: $state.snapshot(entry.history) as RunHistory } : {}),
  };
}

/** The session state and what the page does with it. */
export class Session {
  spec = $state.raw<SpecJson>(demoSpec());
  /** Text that could not be read as a value, by spec path (the spec keeps its last good value). */
  fieldErrors = $state.raw<Record<string, string>>({});
  check = $state.raw<SpecCheck | null>(null);
  /** Physically odd values of the spec, by field (shown, never blocking). */
  warnings = $state.raw<FieldNoteText[]>([]);
  pulses = $state.raw<PulseEntry[]>([]);
  selectedId = $state<string | null>(null);
  view = $state<ViewId>('design');
  settings = $state.raw<ViewSettings>(defaultSettings());
  #notice = $state.raw<Notice | null>(null);
  /** The spec edits remembered when the notice was shown: while no later one came, its Undo is the latest action's. */
  private noticeAfterEdits = 0;
  private editsRemembered = 0;

  get notice(): Notice | null {
    return this.#notice;
  }

  set notice(notice: Notice | null) {
    this.#notice = notice;
    this.noticeAfterEdits = this.editsRemembered;
  }

  /**
   * Ctrl+Z: undoes the latest action. That is the one the notice offers to undo (a pulse
   * removed, a demo or a file loaded) while no spec edit came after it, else the last spec edit.
   */
  undoLatest(): void {
    const action = this.#notice?.action;
    if (action?.label === 'Undo' && this.noticeAfterEdits === this.editsRemembered) action.run();
    else this.undo();
  }
  composites = $state.raw<CompositeChoice[]>([]);
  ready = $state(false);
  /**
   * True once the saved session (or the demo) is in place, or the core failed to load: the
   * views are drawn from then on, not first for the empty session and again for the restored.
   */
  restored = $state(false);
  /** Bumped whenever the whole spec is replaced (demo, JSON, project, link): the form retypes every field. */
  specRevision = $state(0);
  /** A pulse file being opened, and how far (the page shows its progress). */
  opening = $state.raw<{ name: string; bytes: number; fraction: number; stage: 'reading' | 'checking' | 'evaluating' } | null>(null);
  /** Set when the last autosave failed (the page says so; work stays in memory). */
  saveError = $state<string | null>(null);
  /** Bumped whenever a saved session or project replaced the pulses (the run's history is then restored). */
  projectRevision = $state(0);

  /** Earlier specs, newest last (Ctrl+Z), and undone ones, newest last (Ctrl+Shift+Z). */
  private past = $state.raw<SpecJson[]>([]);
  private future = $state.raw<SpecJson[]>([]);
  /** The field and time of the last edit, to merge keystrokes into one history step. */
  private lastEdit: { path: string; at: number } | null = null;
  /** The spec field edited last in the form (a warning caused by it is said there). */
  editedPath = $state<string | null>(null);
  /** Series colours by pulse key ("origin:label"): a pulse keeps its colour in every view and run. */
  // A plain record, not reactive state: a colour, once given, never changes.
  private colours: Record<string, number> = {};
  private checkSeq = 0;
  private saveTimer: ReturnType<typeof setTimeout> | null = null;
  private checkTimer: ReturnType<typeof setTimeout> | null = null;

  constructor(
    readonly client: CoreClient,
    private readonly storage: SessionStorage | null = null,
  ) {}

  /** The validated problem, or null while the spec is invalid or being checked. */
  get problem(): Problem | null {
    return this.check?.ok ? this.check.problem : null;
  }

  /** The complaint about the spec (the library's, or the form's limits), in the form's words, if any. */
  get specError(): ErrorInfo | null {
    return this.check && !this.check.ok ? { ...this.check.error, message: inFormWords(this.check.error) } : null;
  }

  /**
   * The robustness and comparison region: set by hand in the map's fields, or else twice the
   * spec's ensemble in each error (a fifth of the peak Rabi frequency in detuning, 20 % in
   * amplitude, where the ensemble has none), with the points and threshold of the settings.
   */
  get region(): ViewSettings['map'] {
    const map = this.settings.map;
    const problem = this.problem;
    if (map.byHand || !problem) return map;
    let d = 0;
    let a = 0;
    for (const m of problem.members) {
      d = Math.max(d, Math.abs(m.detuning));
      a = Math.max(a, Math.abs(m.amplitudeError));
    }
    const dMax = roundUpTwoDigits(2 * d) || problem.rabiMax / 5;
    const aMax = Math.min(0.9, roundUpTwoDigits(2 * a) || 0.2);
    return {
      ...map,
      detuning: { min: -dMax, max: dMax, points: map.detuning.points },
      amplitudeError: { min: -aMax, max: aMax, points: map.amplitudeError.points },
    };
  }

  /** The warning about a field (physically odd, not blocking), or null. */
  warningAt(path: string): string | null {
    return this.warnings.find((w) => w.field === path)?.message ?? null;
  }

  /** True when every field reads and the library accepts the spec. */
  get valid(): boolean {
    return this.problem !== null && Object.keys(this.fieldErrors).length === 0;
  }

  /** The pulse shown in the analysis views. */
  get selected(): PulseEntry | null {
    return this.pulses.find((p) => p.id === this.selectedId) ?? null;
  }

  /** What a pulse is judged against: the library's choice for the spec's target (core/target-choice.ts), null without a valid spec. */
  targetOf(entry: PulseEntry | null): Target | null {
    return this.targetChoiceOf(entry)?.targetUsed ?? null;
  }

  /** The spec's target, the one a pulse is judged against and the note beside it; null without a pulse or a valid spec. */
  targetChoiceOf(entry: PulseEntry | null): TargetChoice | null {
    const target = this.problem?.target;
    if (!target) return null;
    if (!entry) return { targetGiven: target, targetUsed: target, targetNote: null };
    try {
      return chooseTarget(target, entry.pulse);
    } catch (error) {
      // A malformed metadata.ideal in an opened file: judged against the spec's target, and said so.
      return { targetGiven: target, targetUsed: target, targetNote: (error as Error).message };
    }
  }

  /** The palette index of a pulse, fixed the first time it is asked for (key: origin and label, as the comparison names it). */
  colourIndex(origin: string, label: string): number {
    const key = `${origin}:${label}`;
    this.colours[key] ??= Object.keys(this.colours).length;
    return this.colours[key];
  }

  /** The palette index of a pulse the session holds. */
  colourOfEntry(entry: PulseEntry): number {
    return this.colourIndex(String(entry.pulse.metadata.origin ?? 'design'), entry.label);
  }

  /** Loads the core, then restores the session: the link's spec first, else the autosave, else the demo. */
  async start(hash = ''): Promise<void> {
    let restored = () => undefined as void;
    this.restoring = new Promise<void>((resolve) => (restored = resolve));
    try {
      try {
        this.composites = (await this.client.ready()).composites;
      } catch (error) {
        this.notice = { kind: 'error', text: `The core could not be loaded (${(error as Error).message}); reload the page, or rebuild with "npm start".` };
        return;
      }
      this.ready = true;
      await this.restoreSaved(hash);
    } finally {
      restored();
      this.restored = true;
    }
    await this.validate();
    // The design workers load once the restored session is drawn and the page is idle: on
    // two cores, their start beside the page's own stretched its first tasks past 50 ms.
    whenIdle(() => void this.client.designersReady().catch((error: Error) => {
      this.notice = { kind: 'error', text: `The core could not be loaded for designs (${error.message}); reload the page, or rebuild with "npm start".` };
    }));
  }

  /** Settles once the saved session and the link are applied: a pulse opened meanwhile waits for it, or the restore would drop it. */
  private restoring: Promise<void> = Promise.resolve();

  private async restoreSaved(hash: string): Promise<void> {
    let resumed = false;
    if (this.storage) {
      try {
        const saved = await this.storage.load();
        if (saved !== undefined && saved !== null) {
          const project = parseProject(saved);
          await this.apply(project);
          resumed = true;
          // Ctrl+Z goes on where it was before the reload.
          if (project.specHistory) {
            this.past = project.specHistory.past.slice(-HISTORY_LENGTH);
            this.future = project.specHistory.future.slice(-HISTORY_LENGTH);
          }
        }
      } catch (error) {
        this.notice = { kind: 'error', text: `The saved session could not be restored (${(error as Error).message}); starting from the demo.` };
      }
    }
    // A reload keeps the link in the address: the spec it carries and the autosave's being
    // the same, there is nothing to load and no step to undo.
    this.applyLink(hash, (linked) => {
      // The autosaved spec (edited after the link was opened, say) stays one Ctrl+Z away.
      this.remember();
      this.spec = linked;
      this.specRevision++;
      return resumed ? this.undoNotice('Spec loaded from the link; the spec of your last session is one Undo away.') : { kind: 'info', text: 'Spec loaded from the link.' };
    });
  }

  /**
   * A link opened in the page's own tab: only the address's hash changes and the page is not
   * loaded again, so its spec is applied here; the spec it replaces is one Undo away.
   */
  openLink(hash: string): void {
    this.applyLink(hash, (linked) => {
      this.replaceSpec(linked);
      return this.undoNotice('Spec loaded from the link; your spec is one Undo away.');
    });
  }

  /** The spec of a link applied by `apply` (which gives the notice to show), unless it is the spec already there; a malformed link is named and ignored. */
  private applyLink(hash: string, apply: (linked: SpecJson) => Notice): void {
    try {
      const linked = specFromHash(hash);
      if (linked && JSON.stringify(linked) !== JSON.stringify(this.spec)) this.notice = apply(linked);
    } catch (error) {
      this.notice = { kind: 'error', text: `${(error as Error).message}; the link was ignored.` };
    }
  }

  /** A notice saying what replaced the spec, whose Undo (and Ctrl+Z) brings the spec before it back. */
  undoNotice(text: string): Notice {
    return { kind: 'info', text, action: { label: 'Undo', run: () => { this.undo(); this.notice = null; } } };
  }

  /** Replaces one spec value from the form (one undo step per field edit, keystrokes merged). */
  setField(path: string, value: unknown): void {
    const now = Date.now();
    const merge = this.lastEdit?.path === path && now - this.lastEdit.at < HISTORY_MERGE_MS;
    if (!merge) this.remember();
    this.lastEdit = { path, at: now };
    this.editedPath = path;
    this.spec = setAt(this.spec, path, value);
    this.setFieldError(path, null);
    this.specChanged();
  }

  /** True when there is an edit of the spec to undo. */
  get canUndo(): boolean {
    return this.past.length > 0;
  }

  /** True when there is an undone edit to redo. */
  get canRedo(): boolean {
    return this.future.length > 0;
  }

  /** Goes back to the spec before the last edit (the form retypes every field). */
  undo(): void {
    const previous = this.past.at(-1);
    if (!previous) return;
    this.past = this.past.slice(0, -1);
    this.future = [...this.future, this.spec];
    this.restore(previous);
  }

  /** Applies again the last undone edit. */
  redo(): void {
    const next = this.future.at(-1);
    if (!next) return;
    this.future = this.future.slice(0, -1);
    this.past = [...this.past, this.spec];
    this.restore(next);
  }

  private remember(): void {
    this.editsRemembered++;
    this.past = [...this.past.slice(-(HISTORY_LENGTH - 1)), this.spec];
    this.future = [];
  }

  private restore(spec: SpecJson): void {
    this.lastEdit = null;
    this.spec = spec;
    this.fieldErrors = {};
    this.specRevision++;
    this.specChanged();
  }

  /** Marks a field's text as unreadable (message) or readable again (null). */
  setFieldError(path: string, message: string | null): void {
    if (message === null) {
      if (!(path in this.fieldErrors)) return;
      const rest = { ...this.fieldErrors };
      delete rest[path];
      this.fieldErrors = rest;
    } else if (this.fieldErrors[path] !== message) {
      this.fieldErrors = { ...this.fieldErrors, [path]: message };
    }
  }

  /** Replaces the whole spec (demo, JSON editor, link); one step of the undo history. */
  replaceSpec(spec: SpecJson): void {
    this.remember();
    this.lastEdit = null;
    this.spec = spec;
    this.fieldErrors = {};
    this.specRevision++;
    this.specChanged();
  }

  private specChanged(): void {
    this.recheck();
    this.changed();
  }

  /** Validates the spec again shortly (edits in quick succession are checked once). */
  private recheck(): void {
    if (this.checkTimer) clearTimeout(this.checkTimer);
    this.checkTimer = setTimeout(() => void this.validate(), 60);
  }

  /** Validates the current spec with the library (results of older edits are dropped). */
  async validate(): Promise<SpecCheck> {
    if (this.checkTimer) clearTimeout(this.checkTimer);
    this.checkTimer = null;
    const seq = ++this.checkSeq;
    const spec = this.spec;
    let check = await this.client.checkSpec($state.snapshot(spec));
    let warnings: FieldNoteText[] = [];
    if (check.ok) {
      // What the core cannot compute never reaches it: the spec counts as invalid.
      // The period is judged against a rate the user chose; by default the export follows the spec.
      const limits = specLimits(check.problem, exportSampleRate(this.settings.export, check.problem.dt));
      warnings = limits.warnings;
      const refusal = limits.refusals[0];
      if (refusal) check = { ok: false, error: { name: 'SpecError', message: refusal.message, field: refusal.field } };
    }
    if (seq === this.checkSeq) {
      this.check = check;
      this.warnings = warnings;
    }
    return check;
  }

  /** Adds a pulse and shows it. */
  addPulse(entry: PulseEntry, select = true): void {
    this.pulses = [...this.pulses.filter((p) => p.id !== entry.id), entry];
    if (select) this.selectedId = entry.id;
    this.changed();
  }

  /** Replaces some fields of a pulse entry (its figures, once known). */
  updatePulse(id: string, patch: Partial<Omit<PulseEntry, 'id'>>): void {
    this.pulses = this.pulses.map((p) => (p.id === id ? { ...p, ...patch } : p));
    this.changed();
  }

  /** Forgets a pulse; the notice offers to bring it back where it was. */
  removePulse(id: string): void {
    const index = this.pulses.findIndex((p) => p.id === id);
    if (index < 0) return;
    const entry = this.pulses[index];
    const wasSelected = this.selectedId === id;
    this.pulses = this.pulses.filter((p) => p.id !== id);
    if (wasSelected) this.selectedId = this.pulses.at(-1)?.id ?? null;
    this.changed();
    this.notice = {
      kind: 'info',
      text: `Removed ${entry.label}.`,
      action: {
        label: 'Undo',
        run: () => {
          if (this.pulses.some((p) => p.id === entry.id)) return;
          const pulses = [...this.pulses];
          pulses.splice(Math.min(index, pulses.length), 0, entry);
          this.pulses = pulses;
          if (wasSelected) this.selectedId = entry.id;
          this.notice = { kind: 'info', text: `${entry.label} is back.` };
          this.changed();
        },
      },
    };
  }

  /** Shows a pulse in the analysis views. */
  select(id: string | null): void {
    this.selectedId = id;
    this.changed();
  }

  /** Switches the view. */
  show(view: ViewId): void {
    this.view = view;
    this.changed();
  }

  /** Replaces some view settings. */
  updateSettings(patch: Partial<ViewSettings>): void {
    this.settings = { ...this.settings, ...patch };
    // The spec form judges its sample period by the export's rate: a rate typed or reset is judged at once.
    if ('export' in patch) this.recheck();
    this.changed();
  }

  /** Opens a pulse file's text; a malformed file is refused with its reason and changes nothing. */
  async openPulseText(fileName: string, text: string): Promise<boolean> {
    return this.openPulse(fileName, async () => {
      const pulse = await this.client.readPulse(text);
      if (!this.problem) return { pulse };
      const evaluation = await this.client.evaluate($state.snapshot(this.spec), pulse).catch(() => undefined);
      return { pulse, ...(evaluation ? { evaluation } : {}) };
    });
  }

  /** Opens a pulse file: read, checked and evaluated in the worker, its progress in `opening`; a malformed file changes nothing. */
  async openPulseFile(file: File): Promise<boolean> {
    this.opening = { name: file.name, bytes: file.size, fraction: 0, stage: 'reading' };
    try {
      const spec = this.problem ? $state.snapshot(this.spec) : undefined;
      return await this.openPulse(file.name, () =>
        this.client.readPulseFile(
          file,
          (fraction, stage) => {
            if (this.opening?.name === file.name) this.opening = { ...this.opening, fraction, stage };
          },
          spec,
        ),
      );
    } finally {
      this.opening = null;
    }
  }

  private async openPulse(fileName: string, read: () => Promise<{ pulse: Pulse; evaluation?: Evaluation }>): Promise<boolean> {
    let pulse: Pulse;
    let evaluation: Evaluation | undefined;
    try {
      ({ pulse, evaluation } = await read());
    } catch (error) {
      this.notice = { kind: 'error', text: `${fileName} was not opened: ${(error as Error).message}` };
      return false;
    }
    await this.restoring;
    const entry: PulseEntry = { id: newPulseId('file'), label: fileName, pulse };
    if (evaluation) entry.evaluation = { meanInfidelity: evaluation.meanInfidelity, worstInfidelity: evaluation.worstInfidelity };
    this.addPulse(entry);
    this.notice = { kind: 'info', text: `Opened ${fileName}: ${pulse.i.length} samples.` };
    return true;
  }

  /**
   * The session as a project; `forStore` keeps the samples as typed arrays and the spec's undo
   * history (bounded by SAVED_HISTORY_CHARS): for the browser's store, not for a file.
   */
  toProject(forStore = false): Project {
    return {
      format: PROJECT_FORMAT,
      version: PROJECT_VERSION,
      savedAt: isoTimestamp(Date.now()),
      spec: $state.snapshot(this.spec) as Record<string, unknown>,
      pulses: this.pulses.map((p) => storedPulse(p, forStore)),
      settings: { ...$state.snapshot(this.settings), view: this.view, selectedPulse: this.selectedId } as ViewSettings,
      ...(forStore ? { specHistory: this.savedHistory() } : {}),
    };
  }

  /** The newest undo and redo steps whose JSON fits in SAVED_HISTORY_CHARS, the undo steps first. */
  private savedHistory(): SpecHistory {
    let budget = SAVED_HISTORY_CHARS;
    const newest = (list: SpecJson[]): SpecJson[] => {
      const out: SpecJson[] = [];
      for (let k = list.length - 1; k >= 0; k--) {
        budget -= specChars(list[k]);
        if (budget < 0) break;
        out.unshift(list[k]);
      }
      return out;
    };
    const past = newest(this.past);
    return { past, future: newest(this.future) };
  }

  /** The project file's text. */
  projectFileText(): string {
    return projectText(this.toProject());
  }

  /** Opens a project file; refuses a malformed one (or one whose pulses do not read) and changes nothing then. */
  async openProjectText(fileName: string, text: string): Promise<boolean> {
    try {
      const project = parseProject(text);
      // Pulses go through the library's own reader before anything is replaced.
      await Promise.all(project.pulses.map((p) => this.client.readPulse(JSON.stringify({ dt: p.dt, i: p.i, q: p.q, metadata: p.metadata }))));
      const before = { spec: this.spec, pulses: this.pulses, selectedId: this.selectedId, settings: this.settings, view: this.view };
      this.remember();
      await this.apply(project);
      await this.validate();
      this.notice = {
        kind: 'info',
        text: `Opened project ${fileName}.`,
        action: {
          label: 'Undo',
          run: () => {
            this.remember();
            this.restore(before.spec);
            this.pulses = before.pulses;
            this.selectedId = before.selectedId;
            this.settings = before.settings;
            this.view = before.view;
            this.notice = { kind: 'info', text: `Back to the session before ${fileName} was opened.` };
            this.changed();
          },
        },
      };
      return true;
    } catch (error) {
      const reason = error instanceof ProjectFormatError || (error as Error).name === 'PulseFormatError' ? (error as Error).message : String(error);
      this.notice = { kind: 'error', text: `${fileName} was not opened: ${reason}` };
      return false;
    }
  }

  private async apply(project: Project): Promise<void> {
    this.spec = project.spec;
    this.fieldErrors = {};
    this.specRevision++;
    this.pulses = project.pulses.map((p) => ({
      id: p.id,
      label: p.label,
      // Typed arrays from the browser's store are kept as they are (copying them element by element held the page).
      pulse: { dt: p.dt, i: p.i instanceof Float64Array ? p.i : Float64Array.from(p.i), q: p.q instanceof Float64Array ? p.q : Float64Array.from(p.q), metadata: p.metadata },
      ...(p.evaluation ? { evaluation: p.evaluation } : {}),
      ...(p.history ? { history: p.history } : {}),
    }));
    this.selectedId = project.settings.selectedPulse ?? this.pulses.at(-1)?.id ?? null;
    const view = VIEWS.find((v) => v.id === project.settings.view);
    this.view = view ? view.id : 'design';
    this.settings = project.settings;
    this.projectRevision++;
    this.changed();
  }

  /** The link carrying the current spec. */
  linkHash(): string {
    return specHash($state.snapshot(this.spec));
  }

  /** Schedules an autosave. */
  changed(): void {
    if (!this.storage) return;
    if (this.saveTimer) clearTimeout(this.saveTimer);
    this.saveTimer = setTimeout(() => void this.saveNow(), AUTOSAVE_DELAY_MS);
  }

  /** Saves at once (also called before the page unloads). */
  async saveNow(): Promise<void> {
    if (this.saveTimer) clearTimeout(this.saveTimer);
    this.saveTimer = null;
    if (!this.storage) return;
    try {
      await this.storage.save(this.toProject(true));
      this.saveError = null;
    } catch (error) {
      this.saveError = (error as Error).message;
    }
  }
}
