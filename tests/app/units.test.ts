// Engineering units of the app's forms: typed text -> SI value -> printed text.
// The SI prefixes (k = 1e3, M = 1e6, G = 1e9, m = 1e-3, µ = 1e-6, n = 1e-9, p = 1e-12) are
// those of the BIPM SI Brochure, 9th edition (2019), table 7.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formatElapsed, formatFigure, formatQuantity, parseQuantity, roundUpTwoDigits, shiftDecimal, type Quantity } from '../../src/app/units.ts';

function bad(text: string, quantity: Quantity, unit?: string): string {
  const parsed = parseQuantity(text, quantity, unit);
  return parsed.ok ? '' : parsed.message;
}

function value(text: string, quantity: Quantity, unit?: string): number {
  const parsed = parseQuantity(text, quantity, unit);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.value;
}

describe('parseQuantity', () => {
  it('reads SI prefixes to the double nearest the decimal value (SI Brochure table 7)', () => {
    expect(value('10 MHz', 'frequency')).toBe(1e7);
    expect(value('10MHz', 'frequency')).toBe(1e7);
    expect(value('250 kHz', 'frequency')).toBe(2.5e5);
    expect(value('5.1 GHz', 'frequency')).toBe(5.1e9);
    expect(value('-1 MHz', 'frequency')).toBe(-1e6);
    expect(value('\u22121 MHz', 'frequency')).toBe(-1e6);
    expect(value('200 ns', 'time')).toBe(2e-7);
    expect(value('2 us', 'time')).toBe(2e-6);
    expect(value('2 µs', 'time')).toBe(2e-6);
    expect(value('2 \u03bcs', 'time')).toBe(2e-6);
    expect(value('0.5 ms', 'time')).toBe(5e-4);
    expect(value('1.5e2 ns', 'time')).toBe(1.5e-7);
    expect(value('10 %', 'relative')).toBe(0.1);
    expect(value('300 ppm', 'relative')).toBe(3e-4);
    expect(value('90°', 'angle')).toBe(90);
    expect(value('1e-4', 'number')).toBe(1e-4);
    expect(value('100', 'count')).toBe(100);
  });

  it('reads sample rates as instruments print them, samples a second (common practice: "GS/s", "GSa/s")', () => {
    expect(value('2 GS/s', 'frequency')).toBe(2e9);
    expect(value('2 GSa/s', 'frequency')).toBe(2e9);
    expect(value('2.5 gsa/s', 'frequency')).toBe(2.5e9);
    expect(value('600 MS/s', 'frequency')).toBe(6e8);
    expect(value('100 kSa/s', 'frequency')).toBe(1e5);
  });

  it('says in which unit a bare number is read, the field\'s own (a time limit in seconds)', () => {
    expect(bad('five', 'time', 's')).toContain('a bare number is in s)');
    expect(bad('five', 'time')).toContain('a bare number is in ns)');
  });

  it('reads a bare number in the field unit', () => {
    expect(value('10', 'frequency')).toBe(1e7);
    expect(value('10', 'frequency', 'kHz')).toBe(1e4);
    expect(value('200', 'time')).toBe(2e-7);
    expect(value('5', 'relative')).toBe(0.05);
  });

  it('gives 200 ns exactly as the literal 2e-7, where 200 * 1e-9 would not be', () => {
    // IEEE 754 double rounding: 200 * 1e-9 = 2.0000000000000002e-7 (an inexact product).
    expect(200 * 1e-9).not.toBe(2e-7);
    expect(value('200 ns', 'time')).toBe(2e-7);
  });

  it('refuses bad text with a message naming the text and what is allowed', () => {
    const bad = (text: string, quantity: Quantity) => {
      const parsed = parseQuantity(text, quantity);
      expect(parsed.ok).toBe(false);
      return parsed.ok ? '' : parsed.message;
    };
    expect(bad('', 'frequency')).toMatch(/required/);
    expect(bad('ten MHz', 'frequency')).toMatch(/"ten MHz" is not a number.*Hz, kHz, MHz, GHz/);
    expect(bad('10 MHzz', 'frequency')).toMatch(/"MHzz" is not a unit here; allowed units are Hz, kHz, MHz, GHz/);
    expect(bad('10 ns', 'frequency')).toMatch(/"ns" is not a unit/);
    expect(bad('1,5 MHz', 'frequency')).toMatch(/decimal separator/);
    expect(bad('2.5', 'count')).toMatch(/whole number/);
    expect(bad('1e999', 'number')).toMatch(/out of range/);
    expect(bad('3 Hz', 'number')).toMatch(/plain number/);
  });
});

describe('formatQuantity', () => {
  it('chooses the engineering prefix that keeps the mantissa in [1, 1000)', () => {
    expect(formatQuantity(1e7, 'frequency')).toBe('10 MHz');
    expect(formatQuantity(-1e6, 'frequency')).toBe('-1 MHz');
    expect(formatQuantity(2.5e5, 'frequency')).toBe('250 kHz');
    expect(formatQuantity(0, 'frequency')).toBe('0 MHz');
    expect(formatQuantity(2e-7, 'time')).toBe('200 ns');
    expect(formatQuantity(2e-6, 'time')).toBe('2 µs');
    expect(formatQuantity(1.5e-3, 'time')).toBe('1.5 ms');
    expect(formatQuantity(0.1, 'relative')).toBe('10 %');
    expect(formatQuantity(-0.1, 'relative')).toBe('-10 %');
    expect(formatQuantity(0.004, 'relative')).toBe('0.4 %');
    expect(formatQuantity(3e-5, 'relative')).toBe('30 ppm');
    expect(formatQuantity(90, 'angle')).toBe('90°');
    expect(formatQuantity(1e-4, 'number')).toBe('1e-4');
    expect(formatQuantity(2000, 'count')).toBe('2000');
  });

  it('rounds to significant digits on request and honours a fixed unit', () => {
    expect(formatQuantity(1.23456e7, 'frequency', { significant: 3 })).toBe('12.3 MHz');
    expect(formatQuantity(999.96e3, 'frequency', { significant: 4 })).toBe('1 MHz');
    expect(formatQuantity(1e6, 'frequency', { unit: 'kHz' })).toBe('1000 kHz');
    expect(formatQuantity(0, 'relative', { significant: 3 })).toBe('0 %');
  });

  it('reads back to the same double for every finite value (round trip)', () => {
    const quantities: Quantity[] = ['frequency', 'time', 'relative', 'angle', 'number'];
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.constantFrom(...quantities), (x, quantity) => {
        const stored = Object.is(x, -0) ? 0 : x;
        const text = formatQuantity(stored, quantity);
        expect(value(text, quantity)).toBe(stored);
      }),
      { numRuns: 2000 },
    );
  });

  it('prints typed values back as typed (text -> value -> text)', () => {
    for (const [text, quantity] of [
      ['10 MHz', 'frequency'],
      ['137.5 kHz', 'frequency'],
      ['200 ns', 'time'],
      ['12.5 µs', 'time'],
      ['2.5 %', 'relative'],
    ] as const) {
      expect(formatQuantity(value(text, quantity), quantity)).toBe(text);
    }
  });
});

describe('shiftDecimal', () => {
  it('moves the decimal point in the digit string', () => {
    expect(shiftDecimal(1.2345e-7, -9)).toBe('123.45');
    expect(shiftDecimal(5e-10, -9)).toBe('0.5');
    expect(shiftDecimal(12, 3)).toBe('0.012');
    expect(shiftDecimal(-0.0004, -3, 2)).toBe('-0.4');
    expect(shiftDecimal(0, -2, 3)).toBe('0');
  });
});

describe('roundUpTwoDigits', () => {
  it('rounds up to two significant digits, exactly as decimals', () => {
    expect(roundUpTwoDigits(0.11427880055491223)).toBe(0.12);
    expect(roundUpTwoDigits(1e4)).toBe(1e4);
    expect(roundUpTwoDigits(2e6)).toBe(2e6);
    expect(roundUpTwoDigits(0.2)).toBe(0.2);
    expect(roundUpTwoDigits(987)).toBe(990);
    expect(roundUpTwoDigits(0)).toBe(0);
    expect(roundUpTwoDigits(1.234e-7)).toBe(1.3e-7);
    expect(roundUpTwoDigits(5e21)).toBe(5e21);
  });
});

describe('figures', () => {
  it('prints infidelities in scientific notation without a plus sign', () => {
    expect(formatFigure(3.4e-3)).toBe('3.40e-3');
    expect(formatFigure(1.234e-12, 2)).toBe('1.2e-12');
    expect(formatFigure(0)).toBe('0');
  });
  it('prints elapsed wall time with a unit', () => {
    expect(formatElapsed(0.3104)).toBe('310 ms');
    expect(formatElapsed(3.2)).toBe('3.20 s');
    expect(formatElapsed(125)).toBe('2 min 05 s');
  });
});
