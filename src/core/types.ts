// Shared types of the gatesmith library. Units: Hz and seconds everywhere
// (see README "Conventions"); the factor 2*pi is applied inside the core only.

/** A Bloch vector or rotation axis, (x, y, z). */
export type Vec3 = [number, number, number];

/** One member of an error ensemble: detuning (Hz), relative amplitude error, weight. */
export interface Member {
  detuning: number;
  amplitudeError: number;
  weight: number;
  /** Error of the anharmonicity (Hz) on a ladder; absent or 0 on the qubit. */
  anharmonicityError?: number;
}

/** The system driven: a ladder of `levels` with anharmonicity (Hz; negative for a transmon); levels 2 is the qubit. */
export interface LadderSystem {
  levels: number;
  anharmonicity: number;
}

/** What a pulse must do: a gate (phase-insensitive) or a point-to-point state transfer. */
export type Target =
  | { kind: 'gate'; axis: Vec3; angleRad: number; freePhaseAfter?: boolean }
  | { kind: 'state'; from: Vec3; to: Vec3 };

/** How the drive-amplitude limit is held: the disc sqrt(I^2+Q^2) <= rabiMax, or a per-axis box. */
export type AmplitudeBound = 'disc' | 'box';

/** Hardware limits and penalties applied while designing. */
export interface Constraints {
  /** First and last samples held at zero amplitude. */
  zeroEdges: boolean;
  /** Weight of the sample-to-sample change penalty (dimensionless, 0 = off). */
  smoothness: number;
  /** The amplitude bound; 'box' lets the peak reach sqrt(2) rabiMax and must be asked for. */
  bound: AmplitudeBound;
}

/** Optimiser settings. */
export interface OptimizerSettings {
  starts: number;
  seed: number;
  maxIterations: number;
  /** Stop when the ensemble mean infidelity falls below this. */
  targetInfidelity: number;
  /** Stop when the gradient's infinity norm falls below this. */
  gradientTolerance: number;
  /** Wall-clock budget per design, seconds (Infinity = none). */
  timeLimit: number;
  /** L-BFGS memory (number of correction pairs). */
  memory: number;
  /** Iterations over which a start must improve its objective by stallTolerance (0 = never stop on a stall). */
  stallIterations: number;
  /** Relative improvement over stallIterations below which a start has stalled. */
  stallTolerance: number;
  /** Iterations every start runs before only the keepStarts best go on (0 = no pruning). */
  pruneAfter: number;
  /** Starts that go on after pruneAfter iterations: the lowest objectives there. */
  keepStarts: number;
  /**
   * Iterations between comparisons of the starts, and the window of a start's recent rate
   * (0 = never): a start that could not overtake the leading start even descending at
   * outpaceFactor times that rate until maxIterations stops (best-start.ts outpacedStarts).
   */
  outpaceEvery: number;
  /** How much faster than its recent rate a start is assumed to keep descending when judged. */
  outpaceFactor: number;
  /**
   * The core's build a design runs on (src/core/wasm.ts CoreBuild): 'portable' (absent: the
   * default, the same bits on every engine) or 'fused' (relaxed SIMD, faster, another last
   * bit; where the engine cannot run it, the portable build runs). The pulse records which ran.
   */
  arithmetic?: 'portable' | 'fused';
}

/** The response of the line between the instrument and the qubit (docs/physics.md section 5). */
export type LineResponse =
  /** |H(f)| = exp(-ln2 f^2 / (2 bandwidth^2)): -3 dB at `bandwidth` (Hz), symmetric, no delay. */
  | { kind: 'gaussian'; bandwidth: number }
  /** First-order RC stages in series, one -3 dB bandwidth (Hz) each. */
  | { kind: 'lowpass'; bandwidths: number[] }
  /** A measured impulse response, one value per fine step from lag 0 (normalised to unit gain); `source` names its file. */
  | { kind: 'impulse'; values: number[]; source?: string };

/** The line: the programmed samples held on dt / oversample and passed through a response. */
export interface Line {
  oversample: number;
  /** Null: the held samples alone. */
  response: LineResponse | null;
  /** Overall delay (s), a whole number of fine steps. */
  delay: number;
  /** Where the amplitude bound holds: the programmed samples, or also the drive the qubit sees. */
  boundOn: 'programmed' | 'both';
  /**
   * The fine step (s): the spec's dt / oversample. A pulse of another dt (an exported
   * waveform) is simulated on a whole number of steps per sample near it; absent, on
   * its own dt / oversample.
   */
  fineStep?: number;
}

/** A validated, normalised design problem (what `parseSpec` returns). */
export interface Problem {
  target: Target;
  /** Total duration (s). */
  duration: number;
  segments: number;
  /** Segment length duration/segments (s). */
  dt: number;
  /** Peak Rabi frequency (Hz). */
  rabiMax: number;
  /** Ensemble members with weights normalised to sum 1. */
  members: Member[];
  constraints: Constraints;
  optimizer: OptimizerSettings;
  /** A ladder of more than two levels (the spec's system section); absent: the two-level qubit. */
  system?: LadderSystem;
  /** The line between the instrument and the qubit; absent: the qubit sees the held samples. */
  line?: Line;
}

/** Metadata carried by a pulse file. */
export interface PulseMetadata {
  name?: string;
  /** How the pulse was made: 'design', 'composite', 'import', ... */
  origin?: string;
  /** The design spec as given (JSON), when there is one. */
  spec?: unknown;
  /** Figures reached, as reported when the pulse was made. */
  figures?: Record<string, number | string>;
  /** A designed pulse: the core's build that made it ('portable' or 'fused'; absent in files written before it was recorded). */
  arithmetic?: 'portable' | 'fused';
  [key: string]: unknown;
}

/** A piecewise-constant I/Q pulse: samples of length dt, Rabi frequencies in Hz. */
export interface Pulse {
  dt: number;
  i: Float64Array;
  q: Float64Array;
  metadata: PulseMetadata;
}

/** Figures of one ensemble member. */
export interface MemberFigure extends Member {
  /** 1 - F (gate: phase-insensitive, F = |Tr(V^dag U)|^2/4; state: 1 - |<to|U|from>|^2). */
  infidelity: number;
  /** Ladder: population that left levels 0, 1 (gate: averaged over the two basis states). */
  leakage?: number;
  /** Gate with freePhaseAfter: the angle phi (rad) of Rz(phi) = exp(-i phi sz/2) that follows the pulse. */
  phaseAfter?: number;
}

/** The result of evaluating a pulse on an ensemble. */
export interface Evaluation {
  members: MemberFigure[];
  /** Weighted mean of the members' infidelities. */
  meanInfidelity: number;
  worstInfidelity: number;
  /** Index into members of the worst one. */
  worstIndex: number;
  /** Ladder: the levels evaluated on, the weighted mean and the worst leakage. */
  levels?: number;
  meanLeakage?: number;
  worstLeakage?: number;
  /** Ladder gate: weighted mean of 1 - (Tr(M^dag M) + |Tr(V^dag M)|^2)/6 (Pedersen et al. 2007). */
  meanAverageInfidelity?: number;
}

/** A design on a ladder re-evaluated on two more levels. */
export interface TruncationCheck {
  levels: number;
  meanInfidelity: number;
  meanLeakage: number;
  /** True when the mean infidelity or the mean leakage changes by more than a factor two. */
  differs: boolean;
}

/** Why an optimiser run stopped. */
export type StopReason =
  | 'target-reached'
  | 'gradient-tolerance'
  | 'max-iterations'
  | 'time-limit'
  | 'stopped'
  | 'line-search-failed'
  | 'stalled'
  | 'pruned'
  | 'outpaced';

/** One progress report of a running design. */
export interface Progress {
  start: number;
  iteration: number;
  /** Weighted mean infidelity over the ensemble (penalty not included). */
  meanInfidelity: number;
  /** Objective minimised: mean infidelity plus the smoothness penalty. */
  objective: number;
  gradientNorm: number;
  elapsedS: number;
  /** The current samples, present when the caller asked for them (throttled). */
  pulse?: { i: Float64Array; q: Float64Array };
}

/** The outcome of one optimiser start. */
export interface StartResult {
  start: number;
  pulse: Pulse;
  meanInfidelity: number;
  objective: number;
  iterations: number;
  evaluations: number;
  stopReason: StopReason;
  elapsedS: number;
}

/** The outcome of a design: the best start, its evaluation, and every start. */
export interface DesignResult {
  pulse: Pulse;
  evaluation: Evaluation;
  best: StartResult;
  starts: StartResult[];
  elapsedS: number;
  /** Set by a design's probe stage: how many starts go on (best-start.ts startsToContinue). */
  keepStarts?: number;
  /** A ladder design: the best pulse on levels + 2 (a warning when `differs`). */
  truncationCheck?: TruncationCheck;
}

/** A uniform grid axis. */
export interface GridAxis {
  min: number;
  max: number;
  points: number;
}

/** The figure and drive gradient of one share. */
export interface ShareResult {
  mean: number;
  gradI: Float64Array;
  gradQ: Float64Array;
}

/** Member shares evaluated by other threads (src/core/member-split.ts): handed the drive, then waited for (share-threads.ts). */
export interface SharePool {
  /** Share indices this thread evaluates itself (the first block); the pool's threads take the next blocks. */
  readonly local: readonly number[];
  /** True: every evaluation uses the pool; false: the faster route, by measured times (member-split.ts ShareRoute). */
  readonly always: boolean;
  /** Evaluations handed to the pool so far. */
  readonly posted: number;
  /** Hand the drive to the pool's threads; they start at once. */
  post(driveI: Float64Array, driveQ: Float64Array): void;
  /** Wait for the pool's threads: each helper's sum of its block of shares, in thread order (views valid until the next post). */
  collect(): readonly ShareResult[];
  /** End the pool's threads. */
  close(): void;
}
