// What export does to the gate: the waveform as the instrument plays it (resampled,
// quantised, padded, demodulated back for SSB) evaluated on the design's ensemble beside
// the design itself, with the figures of the samples (peak, quantisation error, length).
import type { Evaluation, Member, Problem, Pulse } from '../../core/types.ts';
import type { WaveformDescription } from './description.ts';
import { codesToHz, codeStepHz } from './quantise.ts';
import { samplesToPulse, waveformSamples } from './playback.ts';
import type { ResampleMethod } from './settings.ts';
import type { ExportedWaveform } from './waveform.ts';

/** Evaluates a pulse on some target and ensemble (the core's evaluate, a worker's, or a test's). */
export type PulseEvaluator = (pulse: Pulse) => Evaluation | Promise<Evaluation>;

/** Mean and worst infidelity of one pulse on the ensemble. */
export interface GateFigures {
  meanInfidelity: number;
  worstInfidelity: number;
  /** The member where the worst infidelity occurs. */
  worstMember: Member;
  /** On a ladder: weighted mean and worst leakage. */
  meanLeakage?: number;
  worstLeakage?: number;
}

/** The report printed by `gatesmith export` and shown by the app's export panel. */
export interface ExportReport {
  description: WaveformDescription;
  resample: ResampleMethod;
  /** Instrument samples per design sample when whole, else null (resampled). */
  holdSamples: number | null;
  samples: { pulse: number; padBefore: number; padAfter: number; total: number };
  /** Durations (s): the design, the exported pulse part, the whole padded waveform. */
  durationS: { design: number; pulse: number; total: number };
  peak: {
    /** Largest |code| of a signal channel, and the full-scale code. */
    code: number;
    codeMax: number;
    /** Largest drive amplitude of the quantised waveform (Hz), of the design (Hz), and full scale (Hz). */
    hz: number;
    designHz: number;
    fullScaleHz: number;
  };
  quantisation: {
    /** One code step (Hz). */
    stepHz: number;
    /** Largest |quantised - unquantised| sample over the signal channels, in Hz and in codes (at most 0.5). */
    maxErrorHz: number;
    maxErrorCodes: number;
  };
  /**
   * Figures on the ensemble, or null without a target: the design; the exported waveform as
   * played (padding included: under detuning the idle padding also turns the qubit); its pulse
   * part alone.
   */
  gate: {
    design: GateFigures;
    exported: GateFigures;
    exportedPulseOnly: GateFigures;
    /**
     * With a line: the design and the exported waveform as played, without the line (what a
     * user who ignored it would see), beside the figures above, which are through it.
     */
    withoutLine?: { design: GateFigures; exported: GateFigures };
  } | null;
  warnings: string[];
}

/** An evaluator over a problem's target and members through its line (`withLine` false: without it), by the library's core (loaded on first use). */
export function evaluatorFor(problem: Problem, withLine = true): PulseEvaluator {
  return async (pulse) => {
    // Imported here so that callers with their own evaluator (the app's worker) never load the core.
    const { evaluateMembers } = await import('../../core/api.ts');
    return evaluateMembers(problem.target, pulse, problem.members, withLine ? problem.line : undefined, problem.system);
  };
}

/**
 * The report of an export: `against` is the design's problem (through its line), an
 * evaluator, or null for the sample figures only; `withoutLine` evaluates without the
 * line (given, or taken from a problem that has a line) for the figures beside.
 */
export async function exportReport(
  against: Problem | PulseEvaluator | null,
  design: Pulse,
  waveform: ExportedWaveform,
  withoutLine?: PulseEvaluator,
): Promise<ExportReport> {
  const d = waveform.description;
  const step = codeStepHz(d.bits, d.fullScaleHz);
  let maxErrorHz = 0;
  d.channels.forEach((name, c) => {
    if (name === 'marker') return;
    const played = codesToHz(waveform.codes[c], d.bits, d.fullScaleHz);
    const ideal = waveform.ideal[c];
    for (let n = 0; n < played.length; n++) maxErrorHz = Math.max(maxErrorHz, Math.abs(played[n] - ideal[n]));
  });
  let designPeak = 0;
  for (let k = 0; k < design.i.length; k++) designPeak = Math.max(designPeak, Math.hypot(design.i[k], design.q[k]));
  const pulseSamples = d.length - d.padBefore - d.padAfter;
  const fs = d.sampleRateHz;

  let gate: ExportReport['gate'] = null;
  if (against !== null) {
    const evaluate = typeof against === 'function' ? against : evaluatorFor(against);
    const samples = waveformSamples(waveform, 'codes');
    const [designEval, exportedEval, pulseOnlyEval] = await Promise.all([
      evaluate(design),
      evaluate(samplesToPulse(samples)),
      evaluate(samplesToPulse(samples, { unpad: true })),
    ]);
    gate = { design: figures(designEval), exported: figures(exportedEval), exportedPulseOnly: figures(pulseOnlyEval) };
    const naive = withoutLine ?? (typeof against === 'object' && against.line ? evaluatorFor(against, false) : undefined);
    if (naive) {
      const [d0, e0] = await Promise.all([naive(design), naive(samplesToPulse(samples))]);
      gate.withoutLine = { design: figures(d0), exported: figures(e0) };
    }
  }
  return {
    description: d,
    resample: d.resample,
    holdSamples: waveform.holdSamples,
    samples: { pulse: pulseSamples, padBefore: d.padBefore, padAfter: d.padAfter, total: d.length },
    durationS: { design: design.dt * design.i.length, pulse: pulseSamples / fs, total: d.length / fs },
    peak: { code: d.peakCode, codeMax: d.codeMax, hz: d.peakHz, designHz: designPeak, fullScaleHz: d.fullScaleHz },
    quantisation: { stepHz: step, maxErrorHz, maxErrorCodes: maxErrorHz / step },
    gate,
    warnings: [...waveform.warnings],
  };
}

function figures(e: Evaluation): GateFigures {
  const worst = e.members[e.worstIndex];
  const out: GateFigures = {
    meanInfidelity: e.meanInfidelity,
    worstInfidelity: e.worstInfidelity,
    worstMember: { detuning: worst.detuning, amplitudeError: worst.amplitudeError, weight: worst.weight, ...(worst.anharmonicityError ? { anharmonicityError: worst.anharmonicityError } : {}) },
  };
  if (e.meanLeakage !== undefined) Object.assign(out, { meanLeakage: e.meanLeakage, worstLeakage: e.worstLeakage });
  return out;
}
