// Engineering units as a pulse engineer types and reads them (10 MHz, 200 ns, 10 %), over
// values stored in SI base units (Hz, seconds, plain fractions). Parsing and formatting go
// through decimal strings, never through multiplications by 1e-9, so that a value typed
// as "200 ns" is stored as exactly the double nearest 2e-7 and prints back as "200 ns".

/** What a form field holds; each has its own set of units. */
export type Quantity = 'frequency' | 'time' | 'relative' | 'angle' | 'number' | 'count';

/** A unit: its printed symbol, the spellings accepted when typing, and its power of ten. */
export interface Unit {
  symbol: string;
  aliases: string[];
  exponent: number;
}

/** The units of each quantity, smallest first. */
export const UNITS: Record<Quantity, Unit[]> = {
  // Sample rates are typed as instruments print them too: "2 GS/s", "2 GSa/s".
  frequency: [
    { symbol: 'Hz', aliases: ['hz', 's/s', 'sa/s'], exponent: 0 },
    { symbol: 'kHz', aliases: ['khz', 'ks/s', 'ksa/s'], exponent: 3 },
    { symbol: 'MHz', aliases: ['mhz', 'ms/s', 'msa/s'], exponent: 6 },
    { symbol: 'GHz', aliases: ['ghz', 'gs/s', 'gsa/s'], exponent: 9 },
  ],
  time: [
    { symbol: 'ps', aliases: ['ps'], exponent: -12 },
    { symbol: 'ns', aliases: ['ns'], exponent: -9 },
    { symbol: 'µs', aliases: ['us', 'µs', 'μs'], exponent: -6 },
    { symbol: 'ms', aliases: ['ms'], exponent: -3 },
    { symbol: 's', aliases: ['s'], exponent: 0 },
  ],
  relative: [
    { symbol: 'ppm', aliases: ['ppm'], exponent: -6 },
    { symbol: '%', aliases: ['%'], exponent: -2 },
  ],
  angle: [{ symbol: '°', aliases: ['°', 'deg'], exponent: 0 }],
  number: [],
  count: [],
};

/** The unit a bare number is read in, and the one values print in when no other fits. */
export const DEFAULT_UNIT: Record<Quantity, string> = {
  frequency: 'MHz',
  time: 'ns',
  relative: '%',
  angle: '°',
  number: '',
  count: '',
};

/** The outcome of reading a typed value. */
export type Parsed = { ok: true; value: number } | { ok: false; message: string };

const NUMBER = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+))(?:e([+-]?\d+))?\s*(.*)$/i;

function findUnit(quantity: Quantity, text: string): Unit | undefined {
  const key = text.toLowerCase();
  return UNITS[quantity].find((unit) => unit.aliases.includes(key) || unit.symbol === text);
}

function unitList(quantity: Quantity): string {
  return UNITS[quantity].map((unit) => unit.symbol).join(', ');
}

/** Reads a typed value of a quantity; a bare number is in `defaultUnit` (default: DEFAULT_UNIT). */
export function parseQuantity(text: string, quantity: Quantity, defaultUnit = DEFAULT_UNIT[quantity]): Parsed {
  const clean = text.trim().replace(/\u2212/g, '-');
  const shown = JSON.stringify(text.trim());
  if (clean === '') return { ok: false, message: 'a value is required' };
  if (/^[+-]?\d+,\d+/.test(clean)) {
    return { ok: false, message: `${shown} is not a number; use a point as the decimal separator` };
  }
  const match = NUMBER.exec(clean);
  if (!match) return { ok: false, message: `${shown} is not a number${unitHint(quantity, defaultUnit)}` };
  const [, mantissa, exponentText, unitText] = match;
  let exponent = exponentText === undefined ? 0 : Number(exponentText);
  if (unitText !== '') {
    const unit = findUnit(quantity, unitText);
    if (!unit) {
      const known = UNITS[quantity].length ? `allowed units are ${unitList(quantity)}` : 'this field takes a plain number';
      return { ok: false, message: `${JSON.stringify(unitText)} is not a unit here; ${known}` };
    }
    exponent += unit.exponent;
  } else if (defaultUnit !== '') {
    const unit = findUnit(quantity, defaultUnit);
    if (unit) exponent += unit.exponent;
  }
  const value = Number(`${mantissa}e${exponent}`);
  if (!Number.isFinite(value)) return { ok: false, message: `${shown} is out of range` };
  if (quantity === 'count' && !Number.isInteger(value)) {
    return { ok: false, message: `${shown} is not a whole number` };
  }
  return { ok: true, value: Object.is(value, -0) ? 0 : value };
}

function unitHint(quantity: Quantity, defaultUnit: string): string {
  if (quantity === 'count') return '; write a whole number';
  if (!UNITS[quantity].length) return '; write a number such as 0.5 or 1e-4';
  return `; write a number and one of ${unitList(quantity)} (a bare number is in ${defaultUnit || DEFAULT_UNIT[quantity]})`;
}

/**
 * Decimal digits of `value / 10^shift`, taken from the shortest exact representation of
 * `value` (or rounded to `significant` digits), by moving the decimal point in the string.
 */
export function shiftDecimal(value: number, shift: number, significant?: number): string {
  if (value === 0) return '0';
  const [mantissa, exponentText] = (significant ? value.toExponential(significant - 1) : value.toExponential()).split('e');
  const negative = mantissa.startsWith('-');
  const digits = mantissa.replace('-', '').replace('.', '');
  const point = Number(exponentText) - shift + 1;
  let text: string;
  if (point <= 0) text = '0.' + '0'.repeat(-point) + digits;
  else if (point >= digits.length) text = digits + '0'.repeat(point - digits.length);
  else text = digits.slice(0, point) + '.' + digits.slice(point);
  if (text.includes('.')) text = text.replace(/0+$/, '').replace(/\.$/, '');
  return (negative && /[1-9]/.test(text) ? '-' : '') + text;
}

/** Options of formatQuantity. */
export interface FormatOptions {
  /** Significant digits; omitted: the shortest digits that read back as the same double. */
  significant?: number;
  /** Print in this unit instead of the engineering choice. */
  unit?: string;
}

/** The unit that keeps a value's mantissa in [1, 1000) (or the nearest end of the list). */
export function engineeringUnit(value: number, quantity: Quantity): Unit | undefined {
  const units = UNITS[quantity];
  if (!units.length) return undefined;
  if (value === 0) return findUnit(quantity, DEFAULT_UNIT[quantity]) ?? units[0];
  const decade = Math.floor(Math.log10(Math.abs(value)) + 1e-12);
  // Relative errors read in % down to 0.01 % (as engineers quote them); ppm only below that.
  if (quantity === 'relative') return findUnit(quantity, decade >= -4 ? '%' : 'ppm');
  let chosen = units[0];
  for (const unit of units) if (unit.exponent <= decade) chosen = unit;
  return chosen;
}

/** Prints a stored value in engineering units ("200 ns", "10 MHz", "-0.5 %"); reads back exactly. */
export function formatQuantity(value: number, quantity: Quantity, options: FormatOptions = {}): string {
  if (!Number.isFinite(value)) return String(value);
  if (quantity === 'count') return String(value);
  const rounded = options.significant ? Number(value.toExponential(options.significant - 1)) : value;
  const unit = options.unit !== undefined ? findUnit(quantity, options.unit) : engineeringUnit(rounded, quantity);
  const shift = unit?.exponent ?? 0;
  let digits = shiftDecimal(rounded, shift, options.significant);
  const magnitude = Math.abs(rounded) / 10 ** shift;
  if (rounded !== 0 && (magnitude < 1e-3 || magnitude >= 1e6) && options.unit === undefined) {
    // Beyond the prefixes: keep the mantissa short with an exponent (still parseable).
    const [mantissa, exponent] = (options.significant ? rounded.toExponential(options.significant - 1) : rounded.toExponential()).split('e');
    digits = `${mantissa}e${Number(exponent) - shift}`;
  }
  if (!unit) return digits;
  return unit.symbol === '°' || unit.symbol === '%' ? `${digits}${unit.symbol === '%' ? ' %' : '°'}` : `${digits} ${unit.symbol}`;
}

/** An infidelity or other small figure in scientific notation, "3.40e-3" ("0" stays "0"). */
export function formatFigure(value: number, significant = 3): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const [mantissa, exponent] = value.toExponential(significant - 1).split('e');
  return `${mantissa}e${Number(exponent)}`;
}

/** Wall-clock seconds as shown beside a run: "850 ms", "3.2 s", "2 min 05 s". */
export function formatElapsed(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '–';
  if (seconds < 1) return `${Math.round(seconds * 1000)} ms`;
  if (seconds < 60) return `${seconds.toFixed(seconds < 10 ? 2 : 1)} s`;
  const minutes = Math.floor(seconds / 60);
  return `${minutes} min ${String(Math.floor(seconds - 60 * minutes)).padStart(2, '0')} s`;
}

/** A wall-clock time of day as hh:mm:ss in the user's locale. */
export function formatClock(epochMs: number): string {
  return new Date(epochMs).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit', second: '2-digit' });
}

/** A moment as an ISO 8601 UTC timestamp (what files record). */
export function isoTimestamp(epochMs: number): string {
  return new Date(epochMs).toISOString();
}

/** The smallest number >= x with two significant digits (0.1143 -> 0.12), for ranges that read well. */
export function roundUpTwoDigits(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return x;
  const [mantissa, exponent] = x.toExponential().split('e');
  // The mantissa is in [1, 10): ten times it, rounded up, is the two digits.
  const digits = Math.ceil(Number(`${mantissa}e1`) - 1e-9);
  return Number(`${digits}e${Number(exponent) - 1}`);
}
