// The DRAG family: the analytic pulses a transmon lab calibrates, built under the same
// limits as a design (duration, segments, peak) and calibrated numerically on the spec's
// ensemble for the spec's figure, as a lab would.
//
//   I(t) = A g(t),  Q(t) = -beta A g'(t) / (2 pi alpha)      (DRAG quadrature: Motzoi,
//   Gambetta, Rebentrost, Wilhelm, PRL 103, 110501, 2009)
// g is a Gaussian (sigma = duration/4 by default, shifted so that it is 0 at both edges) or
// a raised cosine (1 - cos(2 pi t/T))/2; A makes the resonant area equal the target angle,
// times a calibrated factor. In our convention beta = 1 cancels the |1>-|2> transition's
// drive at first order (docs/transmon.md). The drive may be detuned by delta (Hz) to follow
// the AC Stark shift of the qubit (Gambetta, Motzoi, Merkel, Wilhelm, PRA 83, 012308,
// 2011): a drive at f_d + delta is, in the frame of f_d, W(t) e^{-i 2 pi delta (t - T/2)}
// (docs/physics.md section 1: phase and frequency of the drive go together), the phase
// ramp centred so that the pulse's axis is the target axis at its middle.
// Samples are the envelope at each sample's midpoint.
import { evaluateMembers, toProblem } from './api.ts';
import { ArgumentError, describeValue } from './errors.ts';
import { nelderMead } from './simplex.ts';
import type { Evaluation, Pulse, Target } from './types.ts';
import * as pm from './portable-math.ts';

/** Envelopes of the DRAG family. */
export type DragEnvelope = 'gaussian' | 'cosine';

/** The parameters of one DRAG pulse. */
export interface DragParameters {
  envelope: DragEnvelope;
  /** Factor on the amplitude that gives the target angle on resonance (1 = nominal). */
  amplitudeScale: number;
  /** DRAG coefficient (0: the plain envelope). */
  beta: number;
  /** Drive detuning (Hz), drive minus nominal drive frequency. */
  driveDetuning: number;
  /** Gaussian width as a fraction of the duration (default 1/4). */
  sigmaFraction?: number;
}

/** The limits a DRAG pulse is built under: those of the design. */
export interface DragLimits {
  duration: number;
  segments: number;
  rabiMax: number;
}

/** Envelope g and its derivative g' (per second) at time t of a pulse of length T. */
function envelope(kind: DragEnvelope, t: number, T: number, sigmaFraction: number): [number, number] {
  if (kind === 'cosine') return [(1 - pm.cos((2 * Math.PI * t) / T)) / 2, (Math.PI / T) * pm.sin((2 * Math.PI * t) / T)];
  const sigma = sigmaFraction * T;
  const x = t - T / 2;
  const bell = pm.exp(-(x * x) / (2 * sigma * sigma));
  const edge = pm.exp(-(T * T) / (8 * sigma * sigma));
  return [bell - edge, (-x / (sigma * sigma)) * bell];
}

/** The rotation angle and axis phase of a gate target about an axis in the xy-plane. */
function gateAngle(target: Target): { angle: number; direction: [number, number] } {
  if (target.kind !== 'gate') throw new ArgumentError('target: DRAG pulses are gates; give a gate target {"gate": {"axis", "angleDeg"}}');
  const [x, y, z] = target.axis;
  if (Math.abs(z) > 1e-9 * Math.hypot(x, y, z)) {
    throw new ArgumentError(`target.gate.axis: ${describeValue(target.axis)} is not allowed for a DRAG pulse; its axis must lie in the xy-plane (z = 0)`);
  }
  const r = Math.hypot(x, y);
  return { angle: target.angleRad, direction: [x / r, y / r] };
}

/** A DRAG pulse of a gate target on a ladder of anharmonicity alpha (Hz), sampled under the limits. */
export function dragPulse(target: Target, limits: DragLimits, anharmonicity: number, parameters: DragParameters): Pulse {
  const { angle, direction } = gateAngle(target);
  const { envelope: kind, amplitudeScale, beta, driveDetuning } = parameters;
  const sigmaFraction = parameters.sigmaFraction ?? 0.25;
  if (beta !== 0 && !(anharmonicity !== 0 && Number.isFinite(anharmonicity))) {
    throw new ArgumentError(`system.anharmonicity: ${describeValue(anharmonicity)} is not allowed for a DRAG quadrature; give a non-zero number of Hz`);
  }
  if (!(sigmaFraction > 0) || !Number.isFinite(sigmaFraction)) {
    throw new ArgumentError(`sigmaFraction: ${describeValue(sigmaFraction)} is not allowed; a number > 0 (Gaussian width / duration)`);
  }
  const n = limits.segments, T = limits.duration, dt = T / n;
  const g = new Float64Array(n), dg = new Float64Array(n);
  let area = 0;
  for (let k = 0; k < n; k++) {
    [g[k], dg[k]] = envelope(kind, (k + 0.5) * dt, T, sigmaFraction);
    area += g[k] * dt;
  }
  // Resonant area of I equals angle / (2 pi) turns.
  const a = (amplitudeScale * angle) / (2 * Math.PI * area);
  const i = new Float64Array(n), q = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const ix = a * g[k];
    const qy = beta === 0 ? 0 : (-beta * a * dg[k]) / (2 * Math.PI * anharmonicity);
    // The drive's phase: the axis's direction turned by the detuning's ramp about mid-pulse.
    const ramp = -2 * Math.PI * driveDetuning * ((k + 0.5) * dt - T / 2);
    const cr = pm.cos(ramp), sr = pm.sin(ramp);
    const c = direction[0] * cr - direction[1] * sr, s = direction[1] * cr + direction[0] * sr;
    i[k] = ix * c - qy * s;
    q[k] = ix * s + qy * c;
  }
  return {
    dt, i, q,
    metadata: {
      origin: 'drag',
      name: `${beta === 0 ? '' : 'DRAG '}${kind === 'gaussian' ? 'Gaussian' : 'cosine'}`,
      drag: { envelope: kind, amplitudeScale, beta, driveDetuning, sigmaFraction: kind === 'gaussian' ? sigmaFraction : undefined },
    },
  };
}

/** Largest |W| of a pulse's samples (Hz). */
export function peakAmplitude(pulse: Pulse): number {
  let peak = 0;
  for (let k = 0; k < pulse.i.length; k++) peak = Math.max(peak, Math.hypot(pulse.i[k], pulse.q[k]));
  return peak;
}

/** Which parameters a calibration tunes. */
export type DragKnob = 'amplitudeScale' | 'beta' | 'driveDetuning';

/** Options of a DRAG calibration. */
export interface DragCalibrationOptions {
  envelope: DragEnvelope;
  /** Parameters tuned (default all three); the others stay at `start`. */
  tune?: DragKnob[];
  /** Starting values (default amplitude 1, beta 1, drive detuning 0). */
  start?: Partial<DragParameters>;
  /** Most figure evaluations (default 400). */
  maxEvaluations?: number;
}

/** A calibrated DRAG pulse, its parameters and its figures on the spec's ensemble. */
export interface DragCalibration {
  pulse: Pulse;
  parameters: DragParameters;
  /** The library's evaluation on the spec (through its line, on its system: with leakage on a ladder). */
  evaluation: Evaluation;
  evaluations: number;
  /** True when the calibrated pulse sits at the peak limit (the limit, not the figure, set it). */
  atPeakLimit: boolean;
}

/**
 * Tune amplitude, beta and drive detuning (Nelder-Mead) for the lowest mean figure of the
 * spec (a spec's JSON or a Problem: its target and free phase, ensemble, system and line),
 * holding the peak limit. Every figure is the library's evaluate(), as for any other pulse.
 */
export function calibrateDrag(spec: unknown, options: DragCalibrationOptions): DragCalibration {
  const problem = toProblem(spec);
  const anharmonicity = problem.system?.anharmonicity ?? 0;
  // Without an anharmonicity there is no DRAG quadrature to tune.
  const tune = (options.tune ?? ['amplitudeScale', 'beta', 'driveDetuning']).filter((knob) => knob !== 'beta' || anharmonicity !== 0);
  const limits: DragLimits = { duration: problem.duration, segments: problem.segments, rabiMax: problem.rabiMax };
  const base: DragParameters = {
    envelope: options.envelope, amplitudeScale: 1, beta: anharmonicity === 0 ? 0 : 1, driveDetuning: 0, ...options.start,
  };
  // Variables scaled to order one: the detuning in cycles over the pulse.
  const scale: Record<DragKnob, number> = { amplitudeScale: 1, beta: 1, driveDetuning: 1 / problem.duration };
  const steps: Record<DragKnob, number> = { amplitudeScale: 0.05, beta: 0.3, driveDetuning: 0.05 };
  const parametersOf = (x: number[]): DragParameters => {
    const p = { ...base };
    tune.forEach((knob, k) => (p[knob] = x[k] * scale[knob]));
    return p;
  };
  // The envelope alone must reach the angle under the limit; the calibration then holds it.
  const nominal = dragPulse(problem.target, limits, anharmonicity, { ...base, amplitudeScale: 1, beta: 0, driveDetuning: 0 });
  if (peakAmplitude(nominal) > problem.rabiMax) {
    throw new ArgumentError(`rabiMax: ${problem.rabiMax} Hz is too low for a ${options.envelope} pulse of this angle in ${problem.duration} s ` +
      `(its peak is ${peakAmplitude(nominal).toPrecision(3)} Hz); raise rabiMax or the duration`);
  }
  // The spec's own evaluation: through its line (docs/physics.md section 5), on its system.
  const evaluateOnSpec = (pulse: Pulse): Evaluation => evaluateMembers(problem.target, pulse, problem.members, problem.line, problem.system);
  const figure = (x: number[]): number => {
    const pulse = dragPulse(problem.target, limits, anharmonicity, parametersOf(x));
    const peak = peakAmplitude(pulse);
    // Above the limit: worse than any allowed pulse, and more so the further above.
    if (peak > problem.rabiMax) return 1 + peak / problem.rabiMax;
    return evaluateOnSpec(pulse).meanInfidelity;
  };
  const x0 = tune.map((knob) => base[knob] / scale[knob]);
  const result = nelderMead(figure, x0, {
    steps: tune.map((knob) => steps[knob]), maxEvaluations: options.maxEvaluations ?? 400, valueTolerance: 1e-14,
  });
  const parameters = parametersOf(result.x);
  const pulse = dragPulse(problem.target, limits, anharmonicity, parameters);
  // Every point under the limit scores below 1, every point above it above 1.
  if (peakAmplitude(pulse) > problem.rabiMax) {
    throw new ArgumentError(`rabiMax: ${problem.rabiMax} Hz is too low for the ${options.envelope} DRAG pulse in ${problem.duration} s ` +
      `(the search found no pulse under it); raise rabiMax or the duration`);
  }
  const evaluation = evaluateOnSpec(pulse);
  const figures: Record<string, number> = { meanInfidelity: evaluation.meanInfidelity, worstInfidelity: evaluation.worstInfidelity };
  if (evaluation.meanLeakage !== undefined) figures.meanLeakage = evaluation.meanLeakage;
  pulse.metadata.figures = figures;
  return { pulse, parameters, evaluation, evaluations: result.evaluations, atPeakLimit: peakAmplitude(pulse) > 0.999 * problem.rabiMax };
}
