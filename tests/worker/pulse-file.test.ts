// A pulse file read in the worker (src/worker/service.ts readPulseFile): the same pulse as
// the library's reader gives for the file's text, the same figures as the library's
// evaluate, and progress that only grows, over the service called directly in this realm.
import { describe, expect, it } from 'vitest';
import { demoSpec } from '../../src/app/demo.ts';
import { library } from '../../src/worker/library.ts';
import { createCoreService, readWithProgress } from '../../src/worker/service.ts';

const pulseText = (n: number) => JSON.stringify({ dt: 2e-9, i: Array.from({ length: n }, (_, k) => 4e6 * Math.sin(k / 9)), q: new Array(n).fill(1e6) });

describe('readPulseFile', () => {
  it('gives the library\'s pulse and figures for the file, with progress that only grows', async () => {
    const text = pulseText(100);
    const stages: Array<[number, string]> = [];
    const service = createCoreService(library);
    const spec = demoSpec();
    const { pulse, evaluation } = await service.readPulseFile(new Blob([text]), (fraction, stage) => void stages.push([fraction, stage]), spec);
    const expected = library.readPulse(text);
    expect(Array.from(pulse.i)).toEqual(Array.from(expected.i));
    expect(Array.from(pulse.q)).toEqual(Array.from(expected.q));
    expect(evaluation?.meanInfidelity).toBe(library.evaluate(spec, expected).meanInfidelity);
    const fractions = stages.map(([f]) => f);
    expect(fractions).toEqual([...fractions].sort((a, b) => a - b));
    expect(stages.at(-2)).toEqual([1, 'checking']);
    expect(stages.at(-1)).toEqual([1, 'evaluating']);
  });

  it('refuses a malformed file with the library\'s PulseFormatError', async () => {
    const service = createCoreService(library);
    await expect(service.readPulseFile(new Blob(['{"dt": -1, "i": [], "q": []}']))).rejects.toMatchObject({ name: 'PulseFormatError' });
  });

  it('decodes UTF-8 split across chunks as the whole text would be (readWithProgress)', async () => {
    // "µ" is two bytes in UTF-8; a Blob of many parts streams in chunks.
    const text = `{"name": "${'µs '.repeat(50_000)}"}`;
    const seen: number[] = [];
    expect(await readWithProgress(new Blob([text]), (f) => seen.push(f))).toBe(text);
    expect(seen.every((f) => f > 0 && f <= 1)).toBe(true);
  });
});
