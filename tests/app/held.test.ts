// Held samples as the points of a stepped line (src/app/plot/held.ts): the invariant is that
// the line chart.js draws through the points with `stepped: HELD_STEP` takes, over every
// sample's interval [k dt, (k + 1) dt), that sample's value. How chart.js 4 steps a line is
// read from its source (`_steppedLineTo`: 'before' draws lineTo(next.x, previous.y) then
// lineTo(next.x, next.y), so a point's value holds until the next point's x).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { HELD_STEP, heldPoints, heldRuns } from '../../src/app/plot/held.ts';

/** The value a line stepped 'before' through `points` takes at x (NaN in a gap). */
function steppedAt(points: { x: number; y: number }[], x: number): number {
  let y = NaN;
  for (let k = 0; k + 1 < points.length; k++) if (points[k].x <= x && x < points[k + 1].x) y = points[k].y;
  return y;
}

describe('heldRuns', () => {
  it('is drawn with the step that holds a value after its point', () => {
    expect(HELD_STEP).toBe('before');
  });
  it('keeps one point per run of equal samples and one at the end', () => {
    expect(heldRuns([3, 3, 3, 5, 5, 0], 1, 10)).toEqual([
      { x: 10, y: 3 },
      { x: 13, y: 5 },
      { x: 15, y: 0 },
      { x: 16, y: 0 },
    ]);
    expect(heldRuns([], 1, 0)).toEqual([]);
  });
  it('closes a run where a gap (NaN) begins, so that a lone sample before a gap is drawn', () => {
    expect(heldRuns([NaN, 2, NaN, NaN], 1, 0)).toEqual([
      { x: 0, y: NaN },
      { x: 1, y: 2 },
      { x: 2, y: 2 },
      { x: 2, y: NaN },
      { x: 4, y: NaN },
    ]);
  });
  it('draws every sample at its value over its own interval, in scaled units (property over random held waveforms)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 1, maxLength: 60 }), fc.integer({ min: 1, max: 6 }), (values, repeat) => {
        // Each value held `repeat` samples of 2 ns, drawn in ns and MHz, starting at 4 ns.
        const samples = values.flatMap((v) => new Array<number>(repeat).fill(v * 1e6));
        const points = heldRuns(samples, 2e-9, 4e-9, 1e-9, 1e6);
        expect(points.length).toBeLessThanOrEqual(values.length + 1);
        samples.forEach((v, k) => {
          expect(steppedAt(points, 4 + 2 * k + 0.01)).toBeCloseTo(v / 1e6, 12);
          expect(steppedAt(points, 4 + 2 * k + 1.99)).toBeCloseTo(v / 1e6, 12);
        });
        expect(points.at(-1)!.x).toBeCloseTo(4 + 2 * samples.length, 9);
      }),
    );
  });
});

describe('heldPoints', () => {
  it('keeps the runs of a short pulse', () => {
    expect(heldPoints([0, 1, 1, 0], 1, 0)).toEqual(heldRuns([0, 1, 1, 0], 1, 0));
  });
  it('summarises a long pulse in few points and loses no extreme (invariant: every sample lies within its bucket envelope)', () => {
    const n = 100_000;
    const values = Float64Array.from({ length: n }, (_, k) => Math.sin(k / 700) * 1e7 + (k === 54_321 ? 3e7 : 0));
    const points = heldPoints(values, 1e-9, 0, 1e-9, 1e6, 2048);
    expect(points.length).toBeLessThanOrEqual(2048 + 1);
    const ys = points.map((p) => p.y);
    expect(Math.max(...ys)).toBeCloseTo(Math.max(...values) / 1e6, 12);
    expect(Math.min(...ys)).toBeCloseTo(Math.min(...values) / 1e6, 12);
    expect(points[0].x).toBe(0);
    expect(points.at(-1)!.x).toBeCloseTo(n, 6);
  });
});
