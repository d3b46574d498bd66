// The ensemble figure and its exact gradient from the wasm core, as plain arrays:
// for tests against the oracle and for the benchmark (which re-runs a prepared job).
import { checkPulse, encodeMembers, encodeTarget, targetMode } from './encode.ts';
import type { Member, Pulse, Target } from './types.ts';
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
  dispose(): void;
}

/** Place pulse, members and target in the core for repeated gradient evaluations. */
export function prepareGradientJob(target: Target, pulse: Pulse, members: Member[]): GradientJob {
  checkPulse(pulse);
  const core = getCore();
  const n = pulse.i.length;
  const enc = encodeMembers(members, 2, true);
  const mark = core.mark();
  const iPtr = core.put(pulse.i), qPtr = core.put(pulse.q);
  const sPtr = core.put(enc.scale), dPtr = core.put(enc.detuning), wPtr = core.put(enc.weight);
  const tPtr = core.put(encodeTarget(target));
  const outPtr = core.alloc(enc.padded), gIPtr = core.alloc(n), gQPtr = core.alloc(n), workPtr = core.alloc(12 * n);
  const mode = targetMode(target);
  const run = (): number => core.exports.ensembleGradient(iPtr, qPtr, n, pulse.dt, sPtr, dPtr, wPtr, enc.padded, tPtr, mode, outPtr, gIPtr, gQPtr, workPtr);
  return {
    run,
    result: () => ({ mean: run(), perMember: core.read(outPtr, enc.count), gradI: core.read(gIPtr, n), gradQ: core.read(gQPtr, n) }),
    dispose: () => core.release(mark),
  };
}

/** Figure and exact gradient of a pulse on an ensemble (weights normalised). */
export function figureAndGradient(target: Target, pulse: Pulse, members: Member[]): FigureGradient {
  const job = prepareGradientJob(target, pulse, members);
  try {
    return job.result();
  } finally {
    job.dispose();
  }
}
