// What crosses the worker boundary: plain data (typed arrays moved, not copied) and one
// coarse call per job. The worker implements CoreService (service.ts); the page reaches it
// only through the client (client.ts).
import type { QubitDrive } from '../core/line.ts';
import type { DesignResult, Evaluation, GridAxis, LadderSystem, Line, Member, Problem, Progress, Pulse, Target, Vec3 } from '../core/types.ts';
import type { Checkpoint } from '../core/best-start.ts';
import type { CompareRow, NamedPulse } from '../core/compare.ts';
import type { DurationTrial, ShortestResult } from '../core/shortest.ts';
import type { Cuts } from '../core/robustness.ts';
import type { EncodedWaveform, ExportReport, SampleUnits, WaveformFormat } from '../io/export/index.ts';
import type { Spectrum, SpectrumRequest } from '../core/spectrum.ts';

export type { Spectrum, SpectrumRequest };

/** An error as it survives the boundary: its class name, message and, for a SpecError, the field. */
export interface ErrorInfo {
  name: string;
  message: string;
  field?: string;
}

/** The outcome of validating a spec: the normalised problem, or the library's first complaint. */
export type SpecCheck = { ok: true; problem: Problem } | { ok: false; error: ErrorInfo };

/** A progress report without samples (the convergence chart's point). */
export type ProgressPoint = Omit<Progress, 'pulse'>;

/** The latest samples of a running start. */
export interface LivePulse {
  start: number;
  iteration: number;
  i: Float64Array;
  q: Float64Array;
}

/** Progress reports gathered over a short interval, so that messages stay few. */
export interface ProgressBatch {
  points: ProgressPoint[];
  /** The newest samples of each start that reported some since the last batch. */
  live: LivePulse[];
}

/** Called while a file is read: the fraction of its bytes read, and what is being done. */
export type FileProgressSink = (fraction: number, stage: 'reading' | 'checking' | 'evaluating') => void;

/** Called with each batch while a design runs. */
export type ProgressSink = (batch: ProgressBatch) => void;

/** A sequence the library can build, for the comparison view's choices. */
export interface CompositeChoice {
  name: string;
  title: string;
  corrects: string;
  source: string;
  angles: string;
}

/** What the worker reports once the core is loaded. */
export interface CoreInfo {
  composites: CompositeChoice[];
}

/** A design result as returned by one worker for its share of the starts. */
export type DesignShare = DesignResult;

/** Infidelity on a detuning x amplitude-error grid, row-major by amplitude error. */
export interface MapResult {
  detuning: GridAxis;
  amplitudeError: GridAxis;
  infidelity: Float64Array;
  /** On a ladder of more than two levels: the leakage on the same grid. */
  leakage?: Float64Array;
}

/** Some consecutive points of a map's grid (row-major, detuning fastest) from point `start` on. */
export interface MapPart {
  start: number;
  infidelity: Float64Array;
  /** On a ladder of more than two levels: the leakage at the same points. */
  leakage?: Float64Array;
}

/** Populations of every level against time: `values[k * levels + l]` is level l's at `startS + k dt` (k = 0..N; k = 0 the initial state, k the state after drive sample k - 1). */
export interface Populations {
  levels: number;
  /** The drive's sample period (s): the programmed one without a line, the line's fine step with one. */
  dt: number;
  /** When the drive starts relative to the programmed pulse (s). */
  startS: number;
  values: Float64Array;
  /** The member's leakage averaged over the qubit subspace, L = 1 - Tr(M^dag M)/2 (a gate target's leakage map at that member). */
  averageLeakage: number;
}

/** One-dimensional cuts through zero error: along detuning (no amplitude error) and along amplitude error (no detuning). */
export type { Cuts } from '../core/robustness.ts';

/** A pulse's figures and a comparison row, exactly as the library (and `gatesmith compare --json`) gives them. */
export type { CompareFigures, CompareRow, NamedPulse } from '../core/compare.ts';

/** What the comparison computes: the same grid, threshold and ensemble for every row. */
export interface CompareRequest {
  spec: unknown;
  pulses: NamedPulse[];
  composites: string[];
  detuning: GridAxis;
  amplitudeError: GridAxis;
  threshold: number;
  /** Also give every row's mean and worst without the spec's line (what ignoring it would show). */
  withoutLine?: boolean;
}

/** What an exported waveform is judged against: a target and the ensemble's members (the spec's, normally). */
export interface ExportJudge {
  target: Target;
  members: Member[];
  /** The line the qubit sees the waveform through (the spec's). */
  line?: Line;
  /** The system the waveform drives (the spec's; absent: the two-level qubit). */
  system?: LadderSystem;
}

/** The instrument export of a pulse as the export panel shows it. */
export interface ExportPreview {
  /** The library's export report (gate figures null without a judge). */
  report: ExportReport;
  /** The waveform as played: I/Q in Hz at the instrument sample period, SSB demodulated, padding kept. */
  played: Pulse;
}

/** How an exported waveform is written: the container, its units, and metadata for the pulse JSON. */
export interface ExportFileOptions {
  format: WaveformFormat;
  units?: SampleUnits;
  metadata?: Record<string, unknown>;
}

/** The goal of a shortest-duration search and its range in whole samples (the library's ShortestOptions without callbacks). */
export interface ShortestRequest {
  goalMean: number;
  goalWorst?: number;
  minSegments?: number;
  maxSegments?: number;
}

/**
 * Each duration tried, as soon as its design ends, with the rectangular pulse's time (theta /
 * (2 pi peak Rabi)) to draw beside it and, for a duration that met the goal, its pulse (what a
 * search ended at once keeps).
 */
export type TrialSink = (trial: DurationTrial, lowerBoundS: number, pulse?: Pulse) => void;

/** The search's result without the winning design's per-start record (the pulse and figures are kept). */
export type ShortestOutcome = Omit<ShortestResult, 'design'>;

export type { DurationTrial } from '../core/shortest.ts';

/** Bloch paths of several members, each thinned for drawing (service.ts decimatePath). */
export interface EnsemblePaths {
  /** Every member's kept points one after the other, 3 values per point (single precision: for drawing). */
  paths: Float32Array;
  /** Member m's points are offsets[m] to offsets[m + 1] - 1 (members + 1 values). */
  offsets: Int32Array;
  /** Every member's final Bloch vector in full precision, 3 values each (for the figures). */
  ends: Float64Array;
}

/** Names the starts outpaced at a comparison of the starts (best-start.ts Referee.report). */
export type StartJudge = (checkpoint: Checkpoint) => Promise<number[]>;

/** The API the worker exposes; every method is one job. */
export interface CoreService {
  /** Loads the core (once) and lists what it can build. */
  ready(): Promise<CoreInfo>;
  /** Validates a spec with the library's own rules. */
  checkSpec(spec: unknown): SpecCheck;
  /**
   * Designs with the given starts (a stage of a pruned design: api.ts DesignOptions.stage); progress is batched; `stop` ends it early keeping the best pulse.
   * `judge` compares the starts with those of the other workers (api.ts DesignOptions.judge).
   */
  design(spec: unknown, startIndices: number[], onProgress?: ProgressSink, livePulseEveryMs?: number, stage?: 'probe' | 'finish', judge?: StartJudge): Promise<DesignShare>;
  /** The shortest duration whose design meets the goal (the library's shortestDuration); `stop` ends it keeping what was found. */
  shortest(spec: unknown, request: ShortestRequest, onTrial?: TrialSink): Promise<ShortestOutcome>;
  /** Ends every running design of this worker within one iteration. */
  stop(): number;
  /** Figures of a pulse on the spec's ensemble and target. */
  evaluate(spec: unknown, pulse: Pulse): Promise<Evaluation>;
  /** Infidelity (and on a ladder leakage) of a pulse on a grid, through the line, on the system. */
  map(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): Promise<MapResult>;
  /** Grid points `start` to `start + count - 1` of `map` (row-major, detuning fastest), the same values bit for bit: a long map is computed in such parts so that other jobs need not wait for all of it. */
  mapPart(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, start: number, count: number, line?: Line, system?: LadderSystem): Promise<MapPart>;
  /** Cuts through zero error with the grid's ranges and point counts. */
  cuts(target: Target, pulse: Pulse, detuning: GridAxis, amplitudeError: GridAxis, line?: Line, system?: LadderSystem): Promise<Cuts>;
  /** Summary figures and cuts of the given pulses and composite sequences under the spec's limits. */
  compare(request: CompareRequest): Promise<CompareRow[]>;
  /** Bloch vector after each sample for one member, 3 (N + 1) values. */
  trajectory(pulse: Pulse, member: Member, from: Vec3, line?: Line, system?: LadderSystem): Promise<Float64Array>;
  /** Population of every level after each sample of the drive through the line, for one member. */
  populations(pulse: Pulse, member: Member, system: LadderSystem, from: Vec3, line?: Line): Promise<Populations>;
  /** Bloch paths of several members from one initial state (through the line when given), each thinned so that it stays within `tolerance` (unit sphere) of the full path. */
  ensembleTrajectories(pulse: Pulse, members: Member[], from: Vec3, tolerance: number, line?: Line): Promise<EnsemblePaths>;
  /** |X(D)| of the held pulse over a span of detunings (src/core/spectrum.ts). */
  spectrum(pulse: Pulse, request: SpectrumRequest): Promise<Spectrum>;
  /** The drive the qubit sees when the pulse is played through the line (the one library function, qubitDrive). */
  drive(pulse: Pulse, line?: Line): Promise<QubitDrive>;
  /** Reads a pulse file's text (PulseFormatError when malformed). */
  readPulse(text: string): Pulse;
  /**
   * Reads a pulse file itself, reporting the fraction read so far (PulseFormatError when
   * malformed), and evaluates it on `spec` when one is given (the samples then cross to the
   * page once, not back again to be evaluated).
   */
  readPulseFile(file: Blob, onProgress?: FileProgressSink, spec?: unknown): Promise<{ pulse: Pulse; evaluation?: Evaluation }>;
  /** Writes a pulse file's text. */
  writePulse(pulse: Pulse): string;
  /** The waveform as the instrument plays it and its report, judged on the members when given (ExportError when refused). */
  exportPreview(pulse: Pulse, settings: unknown, judge: ExportJudge | null): Promise<ExportPreview>;
  /** The bytes of the exported waveform in a format (and its description for npy and raw), as the command line writes them. */
  exportFile(pulse: Pulse, settings: unknown, options: ExportFileOptions): Promise<EncodedWaveform>;
}
