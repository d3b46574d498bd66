// The ensemble figure and its exact gradient from the wasm core, as plain arrays:
// for tests against the oracle and for the benchmark (which re-runs a prepared job).
import { BUFFER, createBlock, readBuffer, setSamples } from './block.ts';
import { checkPulse, encodeMembers } from './encode.ts';
import { checkPulseAngles } from './limits.ts';
import { lineLayout, qubitDrive } from './line.ts';
import { checkTarget } from './problem-check.ts';
import type { Line, Member, Pulse, Target } from './types.ts';
import { getCore } from './wasm.ts';

/** Figure and gradient of the weighted mean infidelity with respect to every sample (per Hz). */
export interface FigureGradient {
  mean: number;
  perMember: Float64Array;
  gradI: Float64Array;
  gradQ: Float64Array;
}

/** A job placed in wasm memory once; `run` recomputes it until `dispose` frees its buffers. */
export interface GradientJob {
  run(): number;
  result(): FigureGradient;
  /** Series settings of the last run: terms and halvings (assembly/qubit.ts). */
  series(): { terms: number; halvings: number };
  dispose(): void;
}

/**
 * Place pulse, members and target in a held problem block for repeated gradient
 * evaluations; through `line` (its direct sum or FFT forced by `method`) when given.
 */
export function prepareGradientJob(target: Target, pulse: Pulse, members: Member[], line?: Line, method?: 'direct' | 'fft'): GradientJob {
  checkTarget(target);
  checkPulse(pulse);
  const core = getCore();
  const n = pulse.i.length;
  const enc = encodeMembers(members, 2, true);
  checkPulseAngles(qubitDrive(pulse, line), members);
  const drive = line ? { drive: lineLayout(line, n, pulse.dt, method) } : {};
  const p = createBlock(core, { target, segments: n, dt: pulse.dt, members: enc, held: true, ...drive });
  setSamples(core, p, pulse.i, pulse.q);
  const run = (): number => core.exports.problemGradient(p);
  return {
    run,
    result: () => ({
      mean: run(),
      perMember: readBuffer(core, p, BUFFER.perMember, enc.count),
      gradI: readBuffer(core, p, BUFFER.gradI, n),
      gradQ: readBuffer(core, p, BUFFER.gradQ, n),
    }),
    series: () => {
      const packed = core.exports.problemSeries(p);
      return { terms: packed & 0xff, halvings: packed >> 8 };
    },
    dispose: () => core.exports.problemFree(p),
  };
}

/** Figure and exact gradient of a pulse on an ensemble (weights normalised), through `line` when given. */
export function figureAndGradient(target: Target, pulse: Pulse, members: Member[], line?: Line, method?: 'direct' | 'fft'): FigureGradient {
  const job = prepareGradientJob(target, pulse, members, line, method);
  try {
    return job.result();
  } finally {
    job.dispose();
  }
}
