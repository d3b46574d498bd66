// The spec's `line` section (docs/physics.md section 5, "The line"): validated into a
// Line, written back as JSON for pulse files, and its discrete kernel on the fine grid.
// No wasm here: the app's page validates specs with it.
import { ArgumentError, SpecError } from './errors.ts';
import { discreteKernel, MAX_KERNEL_TAPS, type DiscreteKernel } from './line-kernel.ts';
import { checkNumber, childPath, isObject, readArray, readChoice, readNumber, readObject, type JsonObject } from './spec-fields.ts';
import type { Line, LineResponse } from './types.ts';

/** Defaults of the line section's optional fields. */
export const LINE_DEFAULTS = { oversample: 8, delay: 0, boundOn: 'programmed' } as const;
/** Most fine steps per programmed sample. */
export const MAX_OVERSAMPLE = 64;
/** Most samples of the drive the qubit sees (the system's scratch grows with it). */
export const MAX_DRIVE_SAMPLES = 1_000_000;

const LINE_KEYS = ['oversample', 'response', 'delay', 'boundOn'];

/** The spec's `line` section validated (undefined when absent); `dt` is the programmed sample period. */
export function parseLine(value: unknown, dt: number, segments: number, path = 'line'): Line | undefined {
  if (value === undefined) return undefined;
  const obj = readObject(value, path, LINE_KEYS, 'the line section');
  const oversample = readNumber(obj, 'oversample', path, { integer: true, min: 1, max: MAX_OVERSAMPLE }, LINE_DEFAULTS.oversample);
  const response = obj.response === undefined ? null : parseResponse(obj.response, childPath(path, 'response'));
  const delay = readNumber(obj, 'delay', path, { min: 0, unit: 's' }, LINE_DEFAULTS.delay);
  checkDelay(delay, dt / oversample, childPath(path, 'delay'), oversample);
  const boundOn = readChoice(obj, 'boundOn', path, ['programmed', 'both'] as const, LINE_DEFAULTS.boundOn);
  const line: Line = { oversample, response, delay, boundOn, fineStep: dt / oversample };
  checkDriveSize(line, dt, segments, path);
  return line;
}

function parseResponse(value: unknown, path: string): LineResponse {
  const obj = readObject(value, path, ['gaussian', 'lowpass', 'impulse'], 'the line response');
  const kinds = Object.keys(obj);
  if (kinds.length !== 1) {
    throw new SpecError(path, value, 'exactly one of {"gaussian": {"bandwidth"}}, {"lowpass": {"bandwidth"}} or {"impulse": {"values"}}');
  }
  const kind = kinds[0];
  const p = childPath(path, kind);
  const band = { min: 0, minExclusive: true, unit: 'Hz' };
  if (kind === 'gaussian') {
    const g = readObject(obj.gaussian, p, ['bandwidth'], 'a Gaussian response');
    return { kind: 'gaussian', bandwidth: readNumber(g, 'bandwidth', p, band) };
  }
  if (kind === 'lowpass') {
    const l = readObject(obj.lowpass, p, ['bandwidth'], 'a first-order lowpass (RC) response');
    const field = childPath(p, 'bandwidth');
    if (Array.isArray(l.bandwidth)) {
      const list = readArray(l.bandwidth, field, 16, 'bandwidths (Hz), one per RC stage in series');
      return { kind: 'lowpass', bandwidths: list.map((b, k) => checkNumber(b, childPath(field, k), band)) };
    }
    return { kind: 'lowpass', bandwidths: [readNumber(l, 'bandwidth', p, { ...band })] };
  }
  const im = readObject(obj.impulse, p, ['values', 'file'], 'a measured impulse response');
  if (im.values === undefined && typeof im.file === 'string') {
    throw new SpecError(childPath(p, 'file'), im.file,
      'a file is read by the command line (relative to the spec) or the app\'s upload; to the library give "values", one per fine step');
  }
  const field = childPath(p, 'values');
  const list = readArray(im.values, field, MAX_KERNEL_TAPS, 'numbers, one per fine step of dt / oversample from lag 0');
  const values = list.map((v, k) => checkNumber(v, childPath(field, k), {}));
  const sum = values.reduce((s, v) => s + v, 0);
  if (!(sum > 0)) {
    throw new SpecError(field, `values summing to ${sum}`, 'values whose sum (the gain at zero frequency) is > 0: they are normalised to unit gain');
  }
  return { kind: 'impulse', values, ...(typeof im.file === 'string' ? { source: im.file } : {}) };
}

/** Refuse a delay that is not a whole number of fine steps, naming the nearest allowed. */
function checkDelay(delay: number, fine: number, field: string, oversample: number): void {
  const steps = delay / fine;
  const whole = Math.round(steps);
  if (Math.abs(steps - whole) <= 1e-9 * Math.max(1, whole)) return;
  const below = Math.floor(steps) * fine, above = Math.ceil(steps) * fine;
  const nearest = steps - Math.floor(steps) < 0.5 ? below : above;
  throw new SpecError(field, delay,
    `it must be a whole number of fine steps of dt / oversample (${oversample}) = ${fine.toPrecision(6)} s; the nearest allowed is ${nearest.toPrecision(6)} s (${below.toPrecision(6)} s or ${above.toPrecision(6)} s)`);
}

function checkDriveSize(line: Line, dt: number, segments: number, path: string): void {
  const fine = dt / line.oversample;
  const kernel = kernelOf(line, fine);
  const samples = segments * line.oversample + kernel.h.length - 1;
  if (samples > MAX_DRIVE_SAMPLES) {
    throw new SpecError(childPath(path, 'oversample'), line.oversample,
      `with ${segments} segments and a kernel of ${kernel.h.length} fine steps the qubit's drive would have ${samples} samples; at most ${MAX_DRIVE_SAMPLES}: lower the oversampling or the segments`);
  }
}

/** A Line built by hand checked with the spec's rules (throws SpecError naming the field). */
export function checkLine(line: Line, dt: number, segments: number): Line {
  if (!isObject(line)) throw new SpecError('line', line, 'the line {oversample, response, delay, boundOn}');
  const json = lineJson(line);
  return parseLine(json, dt, segments)!;
}

/** The line as its spec section (what a pulse file records as `metadata.line`). */
export function lineJson(line: Line): JsonObject {
  const r = line.response;
  let response: JsonObject | undefined;
  if (r?.kind === 'gaussian') response = { gaussian: { bandwidth: r.bandwidth } };
  else if (r?.kind === 'lowpass') response = { lowpass: { bandwidth: r.bandwidths.length === 1 ? r.bandwidths[0] : [...r.bandwidths] } };
  else if (r?.kind === 'impulse') response = { impulse: { values: [...r.values], ...(r.source ? { file: r.source } : {}) } };
  return { oversample: line.oversample, ...(response ? { response } : {}), delay: line.delay, boundOn: line.boundOn };
}

const kernels = new WeakMap<Line, Map<number, DiscreteKernel>>();

/** The line's discrete kernel on a fine grid of `fine` seconds (computed once per line and grid). */
export function kernelOf(line: Line, fine: number): DiscreteKernel {
  let byFine = kernels.get(line);
  if (!byFine) kernels.set(line, (byFine = new Map()));
  let k = byFine.get(fine);
  if (!k) byFine.set(fine, (k = discreteKernel(line.response, fine)));
  return k;
}

/**
 * Fine steps per sample of `dt` through a line: its oversampling for the spec's own dt;
 * for another dt (an exported waveform) the whole number nearest dt / fineStep (at least
 * 1), where a Gaussian or RC response is discretised afresh. A measured impulse response
 * is given on its own fine step, so dt must be a whole number of them.
 */
export function lineOversample(line: Line, dt: number): number {
  if (line.fineStep === undefined) return line.oversample;
  const r = dt / line.fineStep;
  const whole = Math.round(r);
  if (whole >= 1 && Math.abs(r - whole) <= 1e-9 * r) return whole;
  if (line.response?.kind === 'impulse') {
    throw new ArgumentError(`pulse.dt: ${dt} s is not allowed through the measured impulse response, given on fine steps of ${line.fineStep} s; ` +
      'the pulse\'s samples must last a whole number of them');
  }
  return Math.max(1, whole);
}

/**
 * Samples of the drive the qubit sees when n samples of dt play through `line`: the held
 * samples on the fine grid and the response's tails (lineLayout's drive; n without a line).
 */
export function driveSamples(line: Line | undefined, n: number, dt: number): number {
  if (!line) return n;
  const oversample = lineOversample(line, dt);
  // The last sample starts (n - 1) oversample fine steps in; the kernel combined with
  // holding (heldKernel) adds its taps + oversample - 1 from there.
  return (n - 1) * oversample + kernelOf(line, dt / oversample).h.length + oversample - 1;
}

/** The kernel combined with holding: c = h * box(oversample), length L + oversample - 1. */
export function heldKernel(h: Float64Array, oversample: number): Float64Array {
  const c = new Float64Array(h.length + oversample - 1);
  for (let t = 0; t < c.length; t++) {
    let s = 0;
    for (let r = 0; r < oversample; r++) if (t - r >= 0 && t - r < h.length) s += h[t - r];
    c[t] = s;
  }
  return c;
}

/** The line in words, e.g. "Gaussian 300 MHz (-3 dB), oversample 8, delay 0 s". */
export function describeLine(line: Line): string {
  const mhz = (f: number): string => `${Number((f / 1e6).toPrecision(4))} MHz`;
  const r = line.response;
  const response = r === null ? 'held samples only'
    : r.kind === 'gaussian' ? `Gaussian ${mhz(r.bandwidth)} (-3 dB)`
      : r.kind === 'lowpass' ? `${r.bandwidths.length === 1 ? 'RC lowpass' : `${r.bandwidths.length} RC stages`} ${r.bandwidths.map(mhz).join(', ')} (-3 dB)`
        : `measured impulse response of ${r.values.length} fine steps${r.source ? ` (${r.source})` : ''}`;
  return `${response}, oversample ${line.oversample}, delay ${line.delay} s${line.boundOn === 'both' ? ', bound also on the drive' : ''}`;
}
