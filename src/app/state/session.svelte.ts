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
  type StoredPulse,
  type ViewSettings,
} from '../project.ts';
import type { RunHistory } from '../run-history.ts';
import { setAt, type SpecJson } from '../spec-edit.ts';
import { isoTimestamp } from '../units.ts';

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

/** A message shown to the user (errors keep the class name the UI branched on). */
export interface Notice {
  kind: 'error' | 'info';
  text: string;
}

/** Milliseconds between the last edit and the autosave. */
export const AUTOSAVE_DELAY_MS = 400;

let nextId = 1;
/** A fresh pulse id, unique in this page. */
export function newPulseId(prefix: string): string {
  return `${prefix}-${Date.now().toString(36)}-${(nextId++).toString(36)}`;
}

function storedPulse(entry: PulseEntry): StoredPulse {
  return {
    id: entry.id,
    label: entry.label,
    dt: entry.pulse.dt,
    i: Array.from(entry.pulse.i),
    q: Array.from(entry.pulse.q),
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
  pulses = $state.raw<PulseEntry[]>([]);
  selectedId = $state<string | null>(null);
  view = $state<ViewId>('design');
  settings = $state.raw<ViewSettings>(defaultSettings());
  notice = $state.raw<Notice | null>(null);
  composites = $state.raw<CompositeChoice[]>([]);
  ready = $state(false);
  /** Bumped whenever the whole spec is replaced (demo, JSON, project, link): the form retypes every field. */
  specRevision = $state(0);
  /** Set when the last autosave failed (the page says so; work stays in memory). */
  saveError = $state<string | null>(null);
  /** Bumped whenever a saved session or project replaced the pulses (the run's history is then restored). */
  projectRevision = $state(0);

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

  /** The library's complaint about the spec, if any. */
  get specError(): ErrorInfo | null {
    return this.check && !this.check.ok ? this.check.error : null;
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

  /** Loads the core, then restores the session: the link's spec first, else the autosave, else the demo. */
  async start(hash = ''): Promise<void> {
    try {
      this.composites = (await this.client.ready()).composites;
    } catch (error) {
      this.notice = { kind: 'error', text: `The core could not be loaded (${(error as Error).message}); reload the page, or rebuild with "npm start".` };
      return;
    }
    this.ready = true;
    if (this.storage) {
      try {
        const saved = await this.storage.load();
        if (saved !== undefined && saved !== null) {
          await this.apply(parseProject(saved));
        }
      } catch (error) {
        this.notice = { kind: 'error', text: `The saved session could not be restored (${(error as Error).message}); starting from the demo.` };
      }
    }
    try {
      const linked = specFromHash(hash);
      if (linked) {
        this.spec = linked;
        this.specRevision++;
        this.notice = { kind: 'info', text: 'Spec loaded from the link.' };
      }
    } catch (error) {
      this.notice = { kind: 'error', text: `${(error as Error).message}; the link was ignored.` };
    }
    await this.validate();
  }

  /** Replaces one spec value from the form. */
  setField(path: string, value: unknown): void {
    this.spec = setAt(this.spec, path, value);
    this.setFieldError(path, null);
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

  /** Replaces the whole spec (demo, JSON editor, link). */
  replaceSpec(spec: SpecJson): void {
    this.spec = spec;
    this.fieldErrors = {};
    this.specRevision++;
    this.specChanged();
  }

  private specChanged(): void {
    if (this.checkTimer) clearTimeout(this.checkTimer);
    this.checkTimer = setTimeout(() => void this.validate(), 60);
    this.changed();
  }

  /** Validates the current spec with the library (results of older edits are dropped). */
  async validate(): Promise<SpecCheck> {
    if (this.checkTimer) clearTimeout(this.checkTimer);
    this.checkTimer = null;
    const seq = ++this.checkSeq;
    const spec = this.spec;
    const check = await this.client.checkSpec($state.snapshot(spec));
    if (seq === this.checkSeq) this.check = check;
    return check;
  }

  /** Adds a pulse and shows it. */
  addPulse(entry: PulseEntry, select = true): void {
    this.pulses = [...this.pulses.filter((p) => p.id !== entry.id), entry];
    if (select) this.selectedId = entry.id;
    this.changed();
  }

  /** Forgets a pulse. */
  removePulse(id: string): void {
    this.pulses = this.pulses.filter((p) => p.id !== id);
    if (this.selectedId === id) this.selectedId = this.pulses.at(-1)?.id ?? null;
    this.changed();
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
    this.changed();
  }

  /** Opens a pulse file's text; a malformed file is refused with its reason and changes nothing. */
  async openPulseText(fileName: string, text: string): Promise<boolean> {
    let pulse: Pulse;
    try {
      pulse = await this.client.readPulse(text);
    } catch (error) {
      this.notice = { kind: 'error', text: `${fileName} was not opened: ${(error as Error).message}` };
      return false;
    }
    const entry: PulseEntry = { id: newPulseId('file'), label: fileName, pulse };
    if (this.problem) {
      const evaluation = await this.client.evaluate($state.snapshot(this.spec), pulse).catch(() => undefined);
      if (evaluation) entry.evaluation = { meanInfidelity: evaluation.meanInfidelity, worstInfidelity: evaluation.worstInfidelity };
    }
    this.addPulse(entry);
    this.notice = { kind: 'info', text: `Opened ${fileName}: ${pulse.i.length} samples.` };
    return true;
  }

  /** The session as a project. */
  toProject(): Project {
    return {
      format: PROJECT_FORMAT,
      version: PROJECT_VERSION,
      savedAt: isoTimestamp(Date.now()),
      spec: $state.snapshot(this.spec) as Record<string, unknown>,
      pulses: this.pulses.map(storedPulse),
      settings: { ...$state.snapshot(this.settings), view: this.view, selectedPulse: this.selectedId } as ViewSettings,
    };
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
      await this.apply(project);
      await this.validate();
      this.notice = { kind: 'info', text: `Opened project ${fileName}.` };
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
      pulse: { dt: p.dt, i: Float64Array.from(p.i), q: Float64Array.from(p.q), metadata: p.metadata },
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
      await this.storage.save(this.toProject());
      this.saveError = null;
    } catch (error) {
      this.saveError = (error as Error).message;
    }
  }
}
