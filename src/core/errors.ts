// Error classes of the library. Each has a distinct `name` so that callers across
// the worker boundary (where only name, message and stack survive) can branch on it.

/** A design spec field is missing or out of range. */
export class SpecError extends Error {
  override name = 'SpecError';
  /** Dotted path of the offending field, e.g. "ensemble.detuning.points". */
  readonly field: string;
  constructor(field: string, value: unknown, allowed: string) {
    super(`${field}: ${describeValue(value)} is not allowed; ${allowed}`);
    this.field = field;
  }
}

/** A pulse or waveform file cannot be read. */
export class PulseFormatError extends Error {
  override name = 'PulseFormatError';
}

/** An export cannot be written with the settings given (peak above full scale, ...). */
export class ExportError extends Error {
  override name = 'ExportError';
}

/** An argument to a library call is out of range (the message names it). */
export class ArgumentError extends Error {
  override name = 'ArgumentError';
}

/**
 * A value the core cannot compute exactly: a segment whose rotation angle is beyond what
 * the series and double-angle path of the kernels handle (assembly/su2.ts).
 */
export class SegmentAngleError extends Error {
  override name = 'SegmentAngleError';
  /** The field or argument to change, e.g. "rabiMax" or "pulse.i[12]". */
  readonly field: string;
  constructor(field: string, message: string) {
    super(message);
    this.field = field;
  }
}

/** A short printable form of a bad value for error messages. */
export function describeValue(value: unknown): string {
  if (value === undefined) return 'missing value';
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return JSON.stringify(value.length > 40 ? value.slice(0, 40) + '…' : value);
  try {
    const text = JSON.stringify(value);
    return text.length > 60 ? text.slice(0, 60) + '…' : text;
  } catch {
    return String(value);
  }
}
