// The ensemble figure and its exact gradient from the wasm core, as plain arrays:
// for tests against the oracle and for the benchmark (which re-runs a prepared job).
import { BUFFER, createBlock, readBuffer, setSamples } from './block.ts';
import { checkPulse } from './encode.ts';
import { blockSystem, encodeSystem } from './system.ts';
import { checkPulseAngles } from './limits.ts';
import { lineLayout, qubitDrive } from './line.ts';
import { checkTarget } from './problem-check.ts';
import type { LadderSystem, Line, Member, Pulse, Target } from './types.ts';
import { getCore, type CoreBuild } from './wasm.ts';

/** Figure and gradient of the weighted mean infidelity with respect to every sample (per Hz). */
export interface FigureGradient {
  mean: number;
  perMember: Float64Array;
  /** On a ladder: every member's leakage. */
  leakage?: Float64Array;
  gradI: Float64Array;
  gradQ: Float64Array;
}

/** A job placed in wasm memory once; `run` recomputes it until `dispose` frees its buffers. */
export interface GradientJob {
  run(): number;
  /** The figure alone (the maps' sweep), for the benchmark. */
  figure(): number;
  result(): FigureGradient;
  /** Series settings of the last run: terms and halvings (assembly/qubit.ts). */
  series(): { terms: number; halvings: number };
  dispose(): void;
}

/**
 * Place pulse, members, target (and a ladder system) in a held problem block for repeated
 * gradient evaluations; through `line` (its direct sum or FFT forced by `method`) when given,
 * on the core `build` (wasm.ts buildFor says which runs).
 */
export function prepareGradientJob(
  target: Target, pulse: Pulse, members: Member[], line?: Line, method?: 'direct' | 'fft', system?: LadderSystem, build: CoreBuild = 'portable',
): GradientJob {
  checkTarget(target);
  checkPulse(pulse);
  const core = getCore(build);
  const n = pulse.i.length;
  const enc = encodeSystem(target, members, system);
  const m = enc.members.count, padded = enc.members.padded;
  checkPulseAngles(qubitDrive(pulse, line), members);
  const drive = line ? { drive: lineLayout(line, n, pulse.dt, method) } : {};
  const p = createBlock(core, { ...blockSystem(enc), target, segments: n, dt: pulse.dt, held: true, ...drive });
  setSamples(core, p, pulse.i, pulse.q);
  const run = (): number => core.exports.problemGradient(p);
  return {
    run,
    figure: () => core.exports.problemFigure(p),
    result: () => {
      const mean = run();
      const values = readBuffer(core, p, BUFFER.perMember, (enc.ladder ? 3 : 1) * padded);
      const out: FigureGradient = {
        mean, perMember: values.slice(0, m), gradI: readBuffer(core, p, BUFFER.gradI, n), gradQ: readBuffer(core, p, BUFFER.gradQ, n),
      };
      if (enc.ladder) out.leakage = values.slice(padded, padded + m);
      return out;
    },
    series: () => {
      const packed = core.exports.problemSeries(p);
      return { terms: packed & 0xff, halvings: packed >> 8 };
    },
    dispose: () => core.exports.problemFree(p),
  };
}

/** Figure and exact gradient of a pulse on an ensemble (weights normalised), through `line` when given, on a ladder with `system`. */
export function figureAndGradient(
  target: Target, pulse: Pulse, members: Member[], line?: Line, method?: 'direct' | 'fft', system?: LadderSystem, build: CoreBuild = 'portable',
): FigureGradient {
  const job = prepareGradientJob(target, pulse, members, line, method, system, build);
  try {
    return job.result();
  } finally {
    job.dispose();
  }
}
