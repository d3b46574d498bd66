// Drawing a robustness map: the colour map's published end points, the log scale, the
// coarse fill-in, and the threshold contour against shapes with a closed form.
import { describe, expect, it } from 'vitest';
import { colourIndex, contourSegments, decadeRange, logInfidelity, renderPixels, ticks, type Grid } from '../../src/app/plot/heatmap.ts';
import { VIRIDIS } from '../../src/app/plot/viridis.ts';

describe('viridis table', () => {
  it('has 256 entries running from #440154 to #fde725 (matplotlib _cm_listed viridis, CC0)', () => {
    expect(VIRIDIS).toHaveLength(768);
    expect(Array.from(VIRIDIS.slice(0, 3))).toEqual([0x44, 0x01, 0x54]);
    expect(Array.from(VIRIDIS.slice(765))).toEqual([0xfd, 0xe7, 0x25]);
  });
  it('rises in lightness monotonically (a property viridis was designed for; van der Walt and Smith 2015)', () => {
    // Relative luminance per ITU-R BT.709 weights, as a proxy for lightness.
    const luminance = (k: number) => 0.2126 * VIRIDIS[3 * k] + 0.7152 * VIRIDIS[3 * k + 1] + 0.0722 * VIRIDIS[3 * k + 2];
    for (let k = 1; k < 256; k++) expect(luminance(k)).toBeGreaterThanOrEqual(luminance(k - 1) - 0.5);
  });
});

describe('log scale', () => {
  it('takes log10 and holds zeros and tiny values at the floor, never -Infinity', () => {
    expect(logInfidelity(1e-4)).toBeCloseTo(-4, 15);
    expect(logInfidelity(0)).toBe(-16);
    expect(logInfidelity(1e-30)).toBe(-16);
    expect(logInfidelity(NaN)).toBeNaN();
  });
  it('spans whole decades of the values, at most up to 10^0', () => {
    expect(decadeRange([3e-7, 2e-3, NaN])).toEqual({ lo: -7, hi: -2 });
    expect(decadeRange([0.5, 0.9])).toEqual({ lo: -1, hi: 0 });
    expect(decadeRange([NaN])).toEqual({ lo: -6, hi: 0 });
  });
  it('maps the range ends to the table ends', () => {
    expect(colourIndex(-7, -7, -2)).toBe(0);
    expect(colourIndex(-2, -7, -2)).toBe(255);
    expect(colourIndex(-4.5, -7, -2)).toBe(128);
    expect(colourIndex(5, -7, -2)).toBe(255);
  });
});

describe('pixels', () => {
  it('puts the largest amplitude error on the top row and fills NaN from the coarse map', () => {
    // 3 x 2 fine grid (rows: amplitude error), the second row not computed yet.
    const fine: Grid = { nx: 3, ny: 2, values: [1e-6, 1e-4, 1e-2, NaN, NaN, NaN] };
    const coarse: Grid = { nx: 2, ny: 2, values: [1e-6, 1e-2, 1e-2, 1e-2] };
    const px = renderPixels(fine, -6, -2, coarse);
    // Bottom row (row index 1 in the image) is fine row 0: first pixel is the darkest colour.
    expect(Array.from(px.slice(12, 15))).toEqual(Array.from(VIRIDIS.slice(0, 3)));
    expect(Array.from(px.slice(20, 23))).toEqual(Array.from(VIRIDIS.slice(765)));
    // Top row came from the coarse map's top row (1e-2 everywhere): the brightest colour, opaque.
    for (let x = 0; x < 3; x++) {
      expect(Array.from(px.slice(4 * x, 4 * x + 3))).toEqual(Array.from(VIRIDIS.slice(765)));
      expect(px[4 * x + 3]).toBe(255);
    }
  });
  it('leaves a point transparent when neither map has it', () => {
    const px = renderPixels({ nx: 1, ny: 1, values: [NaN] }, -6, 0);
    expect(px[3]).toBe(0);
  });
});

describe('threshold contour', () => {
  it('crosses a cell edge where log10 values interpolate to the level (marching squares, Lorensen and Cline 1987)', () => {
    // One cell: corners 1e-6 (x=0) and 1e-2 (x=1) on both rows; the level 1e-4 is half way in log.
    const segments = contourSegments({ nx: 2, ny: 2, values: [1e-6, 1e-2, 1e-6, 1e-2] }, 1e-4);
    expect(segments).toHaveLength(1);
    const [x0, y0, x1, y1] = segments[0];
    expect(x0).toBeCloseTo(0.5, 12);
    expect(x1).toBeCloseTo(0.5, 12);
    expect(new Set([y0, y1])).toEqual(new Set([0, 1]));
  });
  it('traces a circle for a radially growing infidelity, at the closed-form radius', () => {
    // f = 1e-6 * 10^(r^2 / 25): the 1e-4 level is the circle r = 5 * sqrt(2) grid units.
    const n = 41;
    const c = 20;
    const values = new Float64Array(n * n);
    for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) values[y * n + x] = 1e-6 * 10 ** (((x - c) ** 2 + (y - c) ** 2) / 25);
    const segments = contourSegments({ nx: n, ny: n, values }, 1e-4);
    const radius = 5 * Math.SQRT2;
    expect(segments.length).toBeGreaterThan(30);
    for (const [x0, y0, x1, y1] of segments) {
      for (const [x, y] of [[x0, y0], [x1, y1]]) expect(Math.abs(Math.hypot(x - c, y - c) - radius)).toBeLessThan(0.1);
    }
  });
  it('draws nothing when the whole grid is on one side', () => {
    expect(contourSegments({ nx: 3, ny: 3, values: new Array(9).fill(1e-8) }, 1e-4)).toEqual([]);
  });
});

describe('ticks', () => {
  it('falls on 1, 2 or 5 times a power of ten inside the range', () => {
    expect(ticks(-2e6, 2e6, 4)).toEqual([-2e6, -1e6, 0, 1e6, 2e6]);
    expect(ticks(-0.2, 0.2, 4)).toEqual([-0.2, -0.1, 0, 0.1, 0.2].map((v) => expect.closeTo(v, 12)));
    expect(ticks(1, 1)).toEqual([1]);
  });
});

describe('ratio of two maps', () => {
  it('is a / b cell by cell, symmetric in decades, and white where the two are equal', async () => {
    const { ratioGrid, ratioSpan, renderRatioPixels, divergingColour } = await import('../../src/app/plot/ratio.ts');
    const a = { nx: 2, ny: 2, values: [1e-6, 1e-3, 1e-4, NaN] };
    const b = { nx: 2, ny: 2, values: [1e-3, 1e-3, 1e-6, 1e-2] };
    const r = ratioGrid(a, b);
    // 10^(log10 a - log10 b): the decades subtract (a property of logarithms).
    expect(r.values[0]).toBeCloseTo(1e-3, 15);
    expect(r.values[1]).toBe(1);
    expect(r.values[2]).toBeCloseTo(100, 9);
    expect(r.values[3]).toBeNaN();
    expect(ratioSpan(r.values)).toBe(3);
    // The middle of RdBu is its neutral class #f7f7f7; the ends are its deepest blue and red.
    expect(divergingColour(0.5)).toEqual([0xf7, 0xf7, 0xf7]);
    expect(divergingColour(0)).toEqual([0x05, 0x30, 0x61]);
    expect(divergingColour(1)).toEqual([0x67, 0x00, 0x1f]);
    const pixels = renderRatioPixels(r, 3);
    // Row 0 of the image is the top (second row of the grid): cell (0, 1) is a / b = 100, red side.
    expect(pixels[0]).toBeGreaterThan(pixels[2]);
    // The unknown cell stays transparent.
    expect(pixels[7]).toBe(0);
    expect(() => ratioGrid(a, { nx: 1, ny: 4, values: [1, 1, 1, 1] })).toThrow('ratioGrid: grids of 2 x 2 and 1 x 4 points differ');
  });
});
