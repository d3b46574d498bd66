// The gatesmith pulse file: JSON with the sample time `dt` (s), the I and Q Rabi
// frequencies (Hz) of each sample, a format name and version, and free metadata.
// Reading is lenient about what surrounds dt, i and q (any JSON object carrying them is a
// pulse) and strict about those three; writing keeps every double exactly.
import { checkPulse } from '../core/encode.ts';
import { PulseFormatError, describeValue } from '../core/errors.ts';
import { parseJsonText } from '../core/json-text.ts';
import type { Pulse, PulseMetadata } from '../core/types.ts';

/** The `format` name written into every pulse file. */
export const PULSE_FORMAT = 'gatesmith.pulse';

/** The pulse file version this code writes and reads. */
export const PULSE_VERSION = 1;

/** Options of readPulse. */
export interface ReadPulseOptions {
  /**
   * Keep q as the file stores it. By default an exported waveform whose I/Q were written for
   * an upconversion "minus" (metadata.export, whose q holds -Q) reads back as the drive the
   * qubit sees, so that every command judges the designed drive.
   */
  asStored?: boolean;
}

/** Reads a pulse from JSON text or from an already parsed value. */
export function readPulse(input: string | unknown, options: ReadPulseOptions = {}): Pulse {
  const doc = typeof input === 'string' ? parseJson(input) : input;
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) {
    throw fieldError('(document)', doc, 'a JSON object with "dt", "i" and "q"');
  }
  const obj = doc as Record<string, unknown>;
  if (obj.format !== undefined && obj.format !== PULSE_FORMAT) {
    throw fieldError('format', obj.format, `"${PULSE_FORMAT}" (or leave it out)`);
  }
  if (obj.version !== undefined && obj.version !== PULSE_VERSION) {
    throw fieldError('version', obj.version, `${PULSE_VERSION} (this program reads version ${PULSE_VERSION} pulses)`);
  }
  const dt = obj.dt;
  if (typeof dt !== 'number' || !Number.isFinite(dt) || dt <= 0) {
    throw fieldError('dt', dt, 'a finite number > 0 (the sample time in seconds)');
  }
  const i = readSamples(obj.i, 'i');
  const q = readSamples(obj.q, 'q');
  if (i.length !== q.length) {
    throw new PulseFormatError(`pulse fields "i" and "q" have ${i.length} and ${q.length} samples; they must have the same length`);
  }
  let metadata: PulseMetadata = {};
  if (obj.metadata !== undefined) {
    if (typeof obj.metadata !== 'object' || obj.metadata === null || Array.isArray(obj.metadata)) {
      throw fieldError('metadata', obj.metadata, 'a JSON object (or leave it out)');
    }
    metadata = obj.metadata as PulseMetadata;
  }
  const exported = metadata.export as { layout?: unknown; upconversion?: unknown } | undefined;
  if (!options.asStored && exported?.layout === 'iq' && exported.upconversion === 'minus') {
    for (let k = 0; k < q.length; k++) q[k] = q[k] === 0 ? 0 : -q[k];
  }
  return { dt, i, q, metadata };
}

/** Writes a pulse as JSON text that reads back to the same doubles. */
export function writePulse(pulse: Pulse): string {
  checkPulse(pulse);
  const lines = [
    '{',
    `  "format": ${JSON.stringify(PULSE_FORMAT)},`,
    `  "version": ${PULSE_VERSION},`,
    `  "dt": ${formatNumber(pulse.dt)},`,
    `  "i": ${formatSamples(pulse.i)},`,
    `  "q": ${formatSamples(pulse.q)},`,
    `  "metadata": ${JSON.stringify(pulse.metadata ?? {}, null, 2).replace(/\n/g, '\n  ')}`,
    '}',
  ];
  return lines.join('\n') + '\n';
}

function parseJson(text: string): unknown {
  try {
    return parseJsonText(text);
  } catch (error) {
    throw new PulseFormatError(`pulse: ${(error as Error).message}`);
  }
}

function fieldError(field: string, value: unknown, allowed: string): PulseFormatError {
  return new PulseFormatError(`pulse field "${field}": ${describeValue(value)} is not allowed; ${allowed}`);
}

function readSamples(value: unknown, field: 'i' | 'q'): Float64Array {
  const allowed = `a non-empty array of finite numbers (the ${field === 'i' ? 'in-phase' : 'quadrature'} Rabi frequency of each sample, Hz)`;
  const isNumeric = Array.isArray(value) || value instanceof Float64Array || value instanceof Float32Array;
  if (!isNumeric || (value as ArrayLike<unknown>).length === 0) {
    throw fieldError(field, value, allowed);
  }
  const list = value as ArrayLike<unknown>;
  const samples = new Float64Array(list.length);
  for (let k = 0; k < list.length; k++) {
    const x = list[k];
    if (typeof x !== 'number' || !Number.isFinite(x)) throw fieldError(`${field}[${k}]`, x, 'a finite number (Hz)');
    samples[k] = x;
  }
  return samples;
}

// JSON.stringify already prints the shortest text that parses back to the same double;
// only the sign of zero needs help (it prints -0 as "0").
function formatNumber(x: number): string {
  return Object.is(x, -0) ? '-0' : JSON.stringify(x);
}

function formatSamples(samples: ArrayLike<number>): string {
  const parts: string[] = new Array(samples.length);
  for (let k = 0; k < samples.length; k++) {
    parts[k] = formatNumber(samples[k]);
  }
  return `[${parts.join(', ')}]`;
}
