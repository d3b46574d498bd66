// The design-time estimate (src/cli/estimate.ts) on the system a spec drives: the cost per
// segment-member of the ladder kernels against the qubit's, a + b d^3 fitted to timings,
// checked against the benchmark figures in docs/transmon.md (objective + gradient 0.49 to
// 0.55 us on 3 levels and 1.2 us on 5, against 9 ns for the qubit: npm run bench) and
// against the model's own scaling with the number of levels.
import { describe, expect, it } from 'vitest';
import { estimateDesign, longDesignNotice, systemCostFactor } from '../../src/cli/estimate.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Problem } from '../../src/core/types.ts';

const BASE = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } }, duration: 2e-8, segments: 48, rabiMax: 1e8,
  ensemble: { amplitudeError: { min: -0.05, max: 0.05, points: 5 } }, optimizer: { starts: 4, maxIterations: 1000 },
};
const onLevels = (levels: number): Problem => parseSpec({ ...BASE, system: { levels, anharmonicity: -2.05e8 } });
const qubit = parseSpec(BASE);
const QUBIT_COST = 1e-8; // s per member-sample, as if measured

describe('design estimate on the spec system', () => {
  it('costs the qubit kernels as before: factor 1, members padded to 4', () => {
    expect(systemCostFactor(qubit)).toBe(1);
    const e = estimateDesign(qubit, 1, QUBIT_COST);
    // 1.2 evaluations per iteration x 48 segments x 8 padded members.
    expect(e.iterationSeconds).toBeCloseTo(1.2 * QUBIT_COST * 48 * 8, 15);
    expect(e.secondsPerMemberSample).toBe(QUBIT_COST);
  });

  // Source: the benchmark figures in docs/transmon.md (npm run bench, loaded machine).
  it('costs a ladder member-sample about 55 times the qubit on 3 levels and 140 times on 5 (the benchmark, within 25 %)', () => {
    expect(systemCostFactor(onLevels(3)) / (490 / 9)).toBeGreaterThan(0.75);
    expect(systemCostFactor(onLevels(3)) / (490 / 9)).toBeLessThan(1.25);
    expect(systemCostFactor(onLevels(5)) / (1230 / 9)).toBeGreaterThan(0.75);
    expect(systemCostFactor(onLevels(5)) / (1230 / 9)).toBeLessThan(1.25);
  });

  it("scales a ladder design's estimate with the levels as a + b d^3, one member per lane", () => {
    const seconds = [3, 4, 5, 6, 7, 8].map((d) => estimateDesign(onLevels(d), 1, QUBIT_COST).iterationSeconds);
    for (let k = 1; k < seconds.length; k++) expect(seconds[k]).toBeGreaterThan(seconds[k - 1]);
    // The model's ratio between 8 and 3 levels: (a + 512 b) / (a + 27 b).
    const factor = (d: number) => systemCostFactor(onLevels(d));
    expect(seconds[5] / seconds[0]).toBeCloseTo(factor(8) / factor(3), 12);
    // Five members exactly (no padding on the ladder kernels), at the ladder's cost.
    expect(seconds[0]).toBeCloseTo(1.2 * QUBIT_COST * factor(3) * 48 * 5, 15);
    expect(estimateDesign(onLevels(5), 1, QUBIT_COST).secondsPerMemberSample).toBeCloseTo(QUBIT_COST * factor(5), 20);
  });

  it('costs a two-level gate with a free phase after (the ladder kernels on 2 levels) as the ladder', () => {
    const free = parseSpec({ ...BASE, target: { gate: { axis: [1, 0, 0], angleDeg: 180, freePhaseAfter: true } } });
    expect(systemCostFactor(free)).toBeGreaterThan(30);
  });

  it('announces a 5-level design with its ladder cost, where the same spec on the qubit would be short', () => {
    // At the cost assumed before measuring (2e-8 s per qubit member-sample).
    const ladder = estimateDesign(onLevels(5), 1);
    const two = estimateDesign(qubit, 1);
    expect(two.seconds).toBeLessThan(2);
    expect(ladder.seconds).toBeGreaterThan(2);
    expect(longDesignNotice(onLevels(5), ladder)).toMatch(/^this design may take up to about [\d.]+ s here: 4 starts x up to 1000 iterations of 48 segments x 5 members/);
  });
});
