// Held samples as the points of a stepped line (src/app/plot/held.ts): the invariant is that
// the stepped line through the points takes, at every sample's time, that sample's value
// (chart.js `stepped: 'after'` holds each point's value until the next point's x).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { heldRuns } from '../../src/app/plot/held.ts';

/** The value a stepped-after line through `points` takes at x. */
function steppedAt(points: { x: number; y: number }[], x: number): number {
  let y = NaN;
  for (const p of points) if (p.x <= x) y = p.y;
  return y;
}

describe('heldRuns', () => {
  it('keeps one point per run of equal samples and one at the end', () => {
    expect(heldRuns([3, 3, 3, 5, 5, 0], 1, 10)).toEqual([
      { x: 10, y: 3 },
      { x: 13, y: 5 },
      { x: 15, y: 0 },
      { x: 16, y: 0 },
    ]);
    expect(heldRuns([], 1, 0)).toEqual([]);
  });
  it('draws every sample at its value, in scaled units (property over random held waveforms)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 1, maxLength: 60 }), fc.integer({ min: 1, max: 6 }), (values, repeat) => {
        // Each value held `repeat` samples of 2 ns, drawn in ns and MHz.
        const samples = values.flatMap((v) => new Array<number>(repeat).fill(v * 1e6));
        const points = heldRuns(samples, 2e-9, 4e-9, 1e-9, 1e6);
        expect(points.length).toBeLessThanOrEqual(values.length + 1);
        samples.forEach((v, k) => expect(steppedAt(points, 4 + 2 * k + 1)).toBeCloseTo(v / 1e6, 12));
        expect(points.at(-1)!.x).toBeCloseTo(4 + 2 * samples.length, 9);
      }),
    );
  });
});
