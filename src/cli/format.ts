// Number formats of the command line's human-readable output (JSON output keeps raw doubles).
import type { StopReason, Target } from '../core/types.ts';

const FREQUENCY_UNITS: [number, string][] = [
  [1e9, 'GHz'],
  [1e6, 'MHz'],
  [1e3, 'kHz'],
  [1, 'Hz'],
];

const TIME_UNITS: [number, string][] = [
  [1, 's'],
  [1e-3, 'ms'],
  [1e-6, 'µs'],
  [1e-9, 'ns'],
  [1e-12, 'ps'],
];

/** A frequency in Hz with an SI prefix and four significant digits, e.g. "-1 MHz". */
export function formatFrequency(hz: number): string {
  return withUnit(hz, FREQUENCY_UNITS);
}

/** A time in seconds with an SI prefix, e.g. "200 ns". */
export function formatTime(seconds: number): string {
  return withUnit(seconds, TIME_UNITS);
}

/** An infidelity in scientific notation with three significant digits, e.g. "3.41e-4". */
export function formatInfidelity(x: number): string {
  return x === 0 ? '0' : x.toExponential(2).replace('e+', 'e');
}

/** A relative amplitude error as a signed percentage, e.g. "-10 %". */
export function formatRelative(x: number): string {
  const percent = Number((x * 100).toPrecision(4));
  return `${percent > 0 ? '+' : ''}${percent} %`;
}

/** Where a member sits: "detuning 0 Hz, amplitude error +5 %", with its anharmonicity error when it has one. */
export function formatMemberAt(member: { detuning: number; amplitudeError: number; anharmonicityError?: number }): string {
  const anharmonicity = member.anharmonicityError ? `, anharmonicity error ${formatFrequency(member.anharmonicityError)}` : '';
  return `detuning ${formatFrequency(member.detuning)}, amplitude error ${formatRelative(member.amplitudeError)}${anharmonicity}`;
}

/** A vector as "[x, y, z]" with up to four significant digits. */
export function formatVector(v: readonly number[]): string {
  return `[${v.map((c) => String(Number(c.toPrecision(4)))).join(', ')}]`;
}

/** A one-line description of a target, e.g. "gate: 90° about [1, 0, 0]". */
export function formatTarget(target: Target): string {
  if (target.kind === 'gate') {
    const degrees = Number(((target.angleRad * 180) / Math.PI).toPrecision(6));
    return `gate: ${degrees}° about ${formatVector(target.axis)}`;
  }
  return `state transfer: ${formatVector(target.from)} -> ${formatVector(target.to)} (Bloch vectors)`;
}

const STOP_WORDS: Record<StopReason, string> = {
  'target-reached': 'reached the target infidelity',
  'gradient-tolerance': 'gradient below tolerance',
  'max-iterations': 'iteration limit',
  'time-limit': 'time limit',
  stopped: 'stopped by the user',
  'line-search-failed': 'line search found no better point',
  stalled: 'progress stalled',
  pruned: 'pruned after the first iterations',
  outpaced: 'could not overtake the best start',
};

/** Why a start ended, in words, with the machine name beside it: "iteration limit (max-iterations)". */
export function formatStopReason(reason: StopReason): string {
  return `${STOP_WORDS[reason] ?? reason} (${reason})`;
}

function withUnit(value: number, units: [number, string][]): string {
  const base = units.find(([s]) => s === 1) ?? units[units.length - 1];
  if (value === 0 || !Number.isFinite(value)) return `${value} ${base[1]}`;
  const magnitude = Math.abs(value);
  const [scale, unit] = units.find(([s]) => magnitude >= s * 0.9995) ?? units[units.length - 1];
  return `${Number((value / scale).toPrecision(4))} ${unit}`;
}
