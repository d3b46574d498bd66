// The pulse file: every double survives a write/read round trip bit for bit (checked
// with Object.is, so -0 and subnormals count), the text is plain JSON (read back by
// JSON.parse, independent of our reader), and each malformed file gives a
// PulseFormatError naming the field, the value and what is allowed.
import { describe, expect, it } from 'vitest';
import * as fc from 'fast-check';
import { ArgumentError, PulseFormatError } from '../../src/core/errors.ts';
import type { Pulse } from '../../src/core/types.ts';
import { PULSE_FORMAT, PULSE_VERSION, readPulse, writePulse } from '../../src/io/pulse.ts';

const FC = { seed: 20240612, numRuns: 200 };

const finite = fc.double({ noNaN: true, noDefaultInfinity: true });
const positive = fc.double({ min: Number.MIN_VALUE, max: 1e300, noNaN: true });

function samePulse(a: Pulse, b: Pulse): void {
  expect(Object.is(a.dt, b.dt)).toBe(true);
  expect(a.i.length).toBe(b.i.length);
  for (let k = 0; k < a.i.length; k++) {
    expect(Object.is(a.i[k], b.i[k]), `i[${k}]: ${a.i[k]} vs ${b.i[k]}`).toBe(true);
    expect(Object.is(a.q[k], b.q[k]), `q[${k}]: ${a.q[k]} vs ${b.q[k]}`).toBe(true);
  }
}

/** The PulseFormatError that reading `input` must throw. */
function formatError(input: unknown): PulseFormatError {
  try {
    readPulse(input);
  } catch (error) {
    expect(error).toBeInstanceOf(PulseFormatError);
    return error as PulseFormatError;
  }
  throw new Error(`readPulse accepted ${JSON.stringify(input)}`);
}

const GOOD = { dt: 2e-9, i: [1e6, -2.5e6, 0], q: [0, 3e6, -1e5] };

describe('round trip', () => {
  it('keeps every double exactly (random samples including -0, subnormals and extremes)', () => {
    const pulse = fc
      .tuple(positive, fc.array(fc.tuple(finite, finite), { minLength: 1, maxLength: 40 }))
      .map(([dt, pairs]): Pulse => ({
        dt,
        i: Float64Array.from(pairs, (p) => p[0]),
        q: Float64Array.from(pairs, (p) => p[1]),
        metadata: { name: 'random', figures: { meanInfidelity: 1e-12 } },
      }));
    fc.assert(
      fc.property(pulse, (p) => {
        const text = writePulse(p);
        const back = readPulse(text);
        samePulse(back, p);
        expect(back.metadata).toEqual(p.metadata);
        // Plain JSON: an independent parser sees the same numbers (up to the sign of zero,
        // which JSON.parse keeps as well for "-0").
        const doc = JSON.parse(text);
        expect(doc.format).toBe(PULSE_FORMAT);
        expect(doc.version).toBe(PULSE_VERSION);
        expect(doc.i.every((x: number, k: number) => Object.is(x, p.i[k]))).toBe(true);
      }),
      FC,
    );
  });

  it('keeps -0, the smallest subnormal and the largest double', () => {
    const extremes: Pulse = {
      dt: Number.MIN_VALUE,
      i: Float64Array.from([-0, Number.MIN_VALUE, Number.MAX_VALUE, -Number.MAX_VALUE]),
      q: Float64Array.from([0.1, 1 / 3, 2 ** -1074, 1e-310]),
      metadata: {},
    };
    samePulse(readPulse(writePulse(extremes)), extremes);
  });

  it('keeps nested metadata (the spec as given, figures)', () => {
    const metadata = { origin: 'design', spec: { target: { gate: { axis: [1, 0, 0], angleDeg: 90 } } }, figures: { meanInfidelity: 3.4e-4, stopReason: 'max-iterations' } };
    const back = readPulse(writePulse({ dt: 1e-9, i: new Float64Array([1]), q: new Float64Array([2]), metadata }));
    expect(back.metadata).toEqual(metadata);
  });
});

describe('lenient reading', () => {
  it('accepts any object with dt, i, q: no format, no version, extra keys, parsed or as text', () => {
    const fromObject = readPulse({ ...GOOD, comment: 'from a notebook' });
    expect(Array.from(fromObject.i)).toEqual(GOOD.i);
    expect(fromObject.metadata).toEqual({});
    expect(Array.from(readPulse(JSON.stringify(GOOD)).q)).toEqual(GOOD.q);
  });

  it('accepts typed arrays and returns Float64Arrays', () => {
    const p = readPulse({ dt: 1e-9, i: new Float64Array([1, 2]), q: new Float32Array([0.5, 0.25]) });
    expect(p.i).toBeInstanceOf(Float64Array);
    expect(Array.from(p.q)).toEqual([0.5, 0.25]);
  });
});

// [what is wrong, input, text the message must contain]
const MALFORMED: [string, unknown, string[]][] = [
  ['not JSON', '{"dt": 1e-9, "i": [1', ['not valid JSON']],
  ['an array', [1, 2, 3], ['"(document)"', 'a JSON object']],
  ['null', null, ['"(document)"']],
  ['a number', 5, ['"(document)"']],
  ['another format', { ...GOOD, format: 'someone.else' }, ['"format"', '"someone.else"', PULSE_FORMAT]],
  ['another version', { ...GOOD, version: 2 }, ['"version"', '2']],
  ['dt missing', { i: GOOD.i, q: GOOD.q }, ['"dt"', 'missing value', '> 0']],
  ['dt zero', { ...GOOD, dt: 0 }, ['"dt"', '0 is not allowed']],
  ['dt negative', { ...GOOD, dt: -1e-9 }, ['"dt"', '-1e-9']],
  ['dt a string', { ...GOOD, dt: '2e-9' }, ['"dt"', '"2e-9"']],
  ['i missing', { dt: 1e-9, q: GOOD.q }, ['"i"', 'missing value', 'in-phase']],
  ['q not an array', { ...GOOD, q: 'zeros' }, ['"q"', '"zeros"', 'quadrature']],
  ['i empty', { ...GOOD, i: [], q: [] }, ['"i"', '[]', 'non-empty']],
  ['i with a string', { ...GOOD, i: [1, 'x', 3] }, ['"i[1]"', '"x"', 'finite number']],
  ['q with null (how JSON writes NaN)', { ...GOOD, q: [0, null, 0] }, ['"q[1]"', 'null']],
  ['i with NaN', { ...GOOD, i: [0, 0, NaN] }, ['"i[2]"', 'NaN']],
  ['lengths differ', { ...GOOD, q: [0, 1] }, ['"i" and "q"', '3 and 2', 'same length']],
  ['metadata not an object', { ...GOOD, metadata: 'none' }, ['"metadata"', '"none"']],
  ['metadata an array', { ...GOOD, metadata: [] }, ['"metadata"']],
];

describe('malformed pulses', () => {
  it.each(MALFORMED)('%s gives a PulseFormatError saying so', (_what, input, fragments) => {
    const error = formatError(input);
    expect(error.name).toBe('PulseFormatError');
    for (const fragment of fragments) expect(error.message).toContain(fragment);
  });

  it('random JSON never gives any other error', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (value) => {
        try {
          const p = readPulse(value);
          expect(p.dt > 0 && p.i.length === p.q.length && p.i.length > 0).toBe(true);
        } catch (error) {
          expect(error).toBeInstanceOf(PulseFormatError);
        }
      }),
      FC,
    );
  });
});

describe('writing', () => {
  it('refuses non-finite samples, a bad dt and unequal lengths with an ArgumentError naming them', () => {
    const base = { dt: 1e-9, i: new Float64Array([0, 0]), q: new Float64Array([0, 0]), metadata: {} };
    expect(() => writePulse({ ...base, q: new Float64Array([0, Infinity]) })).toThrow(/pulse\.q\[1\]: Infinity/);
    expect(() => writePulse({ ...base, i: new Float64Array([NaN, 0]) })).toThrow(ArgumentError);
    expect(() => writePulse({ ...base, dt: 0 })).toThrow(/pulse\.dt: 0/);
    expect(() => writePulse({ ...base, q: new Float64Array([0]) })).toThrow(/pulse\.q: 1 samples is not allowed; as many as pulse\.i \(2\)/);
  });
});
