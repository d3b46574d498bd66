// The line between the instrument and the qubit (docs/physics.md section 5, "The line"):
// its drive map for the core (assembly/line.ts; the spec section is line-spec.ts), and
// `qubitDrive`, the one function that turns a pulse and a line into the drive the qubit
// sees. Every figure (evaluate, maps, cuts, comparisons, the Bloch path, the export
// report) is taken of that drive; designs run the same map inside the core.
import { BUFFER, createBlock, DRIVE_LINE, readBuffer, setSamples, type DriveLayout } from './block.ts';
import { encodeMembers } from './encode.ts';
import { ArgumentError } from './errors.ts';
import { heldKernel, kernelOf, lineJson, lineOversample, MAX_DRIVE_SAMPLES } from './line-spec.ts';
import type { Line, Pulse } from './types.ts';
import { getCore } from './wasm.ts';

export { lineOversample };

/** Weight of the exterior penalty that holds the drive bound ("boundOn": "both"). */
export const DRIVE_BOUND_WEIGHT = 1e4;
/**
 * The FFT is used when the direct sum's products per channel, n Lc, exceed this many
 * times N log2 N (N the FFT size). Measured by `npm run bench` (the line's drive map):
 * the two take equal time near 3.4 on this project's machine (direct wins at 2.7, the
 * FFT at 4.2); 3 leans to the FFT, whose cost grows more slowly.
 */
export const FFT_CROSSOVER = 3;

/** Whether the line's map runs by FFT for n samples (the measured crossover, FFT_CROSSOVER). */
export function lineUsesFft(n: number, heldLength: number, fftSize: number): boolean {
  return n * heldLength > FFT_CROSSOVER * fftSize * Math.log2(fftSize);
}

/** The core's drive map of a line for n programmed samples of dt (assembly/line.ts), with the drive's timing. */
export interface LineLayout extends DriveLayout {
  /** When the drive's first sample starts, relative to the programmed pulse's start (s). */
  startS: number;
}

/** The drive map of a line for a block of n samples of dt; `method` forces the direct sum or the FFT (tests, benchmark). */
export function lineLayout(line: Line, n: number, dt: number, method?: 'direct' | 'fft'): LineLayout {
  const oversample = lineOversample(line, dt);
  const fine = dt / oversample;
  const kernel = kernelOf(line, fine);
  const c = heldKernel(kernel.h, oversample);
  const samples = (n - 1) * oversample + c.length;
  const size = 2 ** Math.ceil(Math.log2(samples));
  const fft = method ? method === 'fft' : lineUsesFft(n, c.length, size);
  const values = new Float64Array(8 + c.length + (fft ? 5 * size : 0));
  values[0] = oversample;
  values[1] = c.length;
  values[2] = fft ? 1 : 0;
  values[3] = fft ? size : 0;
  values[5] = line.boundOn === 'both' ? DRIVE_BOUND_WEIGHT : 0;
  values.set(c, 8);
  return { kind: DRIVE_LINE, samples, dt: fine, values, startS: line.delay - kernel.lead * fine };
}

/** The drive the qubit sees, on its own grid, and when it starts relative to the programmed pulse (s). */
export interface QubitDrive extends Pulse {
  startS: number;
}

/**
 * The drive the qubit sees when `pulse` is played through `line`: its samples held on
 * dt / oversample, convolved with the line's kernel, over the programmed duration and
 * the response's tails. Without a line, the pulse itself. The one way every figure gets
 * its drive.
 */
export function qubitDrive(pulse: Pulse, line: Line | undefined, method?: 'direct' | 'fft'): QubitDrive {
  if (!line) return { ...pulse, startS: 0 };
  const n = pulse.i.length;
  const oversample = lineOversample(line, pulse.dt);
  if (n * oversample > MAX_DRIVE_SAMPLES) {
    throw new ArgumentError(`line.oversample: ${line.oversample} with a pulse of ${n} samples gives more than ${MAX_DRIVE_SAMPLES} drive samples; lower it`);
  }
  const layout = lineLayout(line, n, pulse.dt, method);
  const core = getCore();
  const one = encodeMembers([{ detuning: 0, amplitudeError: 0, weight: 1 }], 2, true);
  const { i, q } = core.job(() => {
    const p = createBlock(core, { target: { kind: 'gate', axis: [1, 0, 0], angleRad: 0 }, segments: n, dt: pulse.dt, members: one, drive: layout });
    setSamples(core, p, pulse.i, pulse.q);
    core.exports.problemDrive(p);
    return { i: readBuffer(core, p, BUFFER.driveI, layout.samples), q: readBuffer(core, p, BUFFER.driveQ, layout.samples) };
  });
  return { dt: layout.dt, i, q, startS: layout.startS, metadata: { ...pulse.metadata, origin: 'line', line: lineJson(line) } };
}
