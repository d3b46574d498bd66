// The library's comparison (src/core/compare.ts): every row ranked by its figures against the
// spec's target, "mean" the weighted mean over the spec's ensemble, "region mean" the plain
// mean over the map's grid. Checked against evaluate and robustnessMap computed here, the
// phase-insensitive fidelity of two rotations (docs/physics.md section 2) and the case the
// comparison used to get wrong (a BB1 built for another gate ranked first).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { evaluate, robustnessMap } from '../../src/core/api.ts';
import { compare, judgePulse } from '../../src/core/compare.ts';
import { buildComposite } from '../../src/core/composites.ts';
import { ensembleRegion } from '../../src/core/grid.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { expectClose } from '../reference/tolerance.ts';

const SPEC = JSON.parse(readFileSync(new URL('../../examples/transmon-x90.json', import.meta.url), 'utf8'));
const problem = parseSpec(SPEC);

describe('compare', () => {
  it('ranks a BB1 built for 180 deg about 45 deg by its figure against the X(90) target: last, not first', () => {
    const other = buildComposite('bb1', { angleDeg: 180, axisDeg: 45, rabiMax: problem.rabiMax, dt: problem.dt });
    const region = ensembleRegion(problem);
    // Against its own ideal its figures are of the order of the others' (3.7e-3 over this region;
    // the issue measured 4.5e-3 on the app's table), which is how it could rank first.
    const own = robustnessMap(other.metadata.ideal, other, region.detuning, region.amplitudeError).infidelity;
    const ownRegionMean = own.reduce((s, x) => s + x, 0) / own.length;
    expect(ownRegionMean).toBeGreaterThan(1e-3);
    expect(ownRegionMean).toBeLessThan(1e-2);

    const result = compare(problem, [{ name: 'bb1 for 180 about 45', pulse: other }], { composites: ['bb1', 'sk1', 'corpse'] });
    expect(result.rows.map((r) => r.name)).toEqual(['BB1', 'SK1', 'CORPSE', 'bb1 for 180 about 45']);
    const last = result.rows[3];
    expect(last.target).toEqual(problem.target);
    expect(last.note).toContain("does not meet the spec's target");
    // 1 - (q . q')^2 with q' = (cos 45, sin 45 x), q = (0, n45): (sin 45 cos 45)^2 = 1/4 at zero error.
    const zero = judgePulse(problem, other, { region: { detuning: { min: 0, max: 0, points: 1 }, amplitudeError: { min: 0, max: 0, points: 1 } } });
    expectClose(zero.figures.regionMeanInfidelity, 0.75, { rel: 1e-12 }, 'infidelity against X(90)');
    expect(last.figures!.regionMeanInfidelity).toBeGreaterThan(100 * ownRegionMean);
    for (const row of result.rows.slice(0, 3)) expect(row.figures!.meanInfidelity).toBeLessThan(last.figures!.meanInfidelity);
  });

  it('mean and worst over the spec\'s ensemble (evaluate), region mean and worst over the grid (robustnessMap)', () => {
    const bb1 = buildComposite('bb1', { angleDeg: 90, rabiMax: problem.rabiMax, dt: problem.dt });
    const region = { detuning: { min: -2e6, max: 2e6, points: 9 }, amplitudeError: { min: -0.2, max: 0.2, points: 7 } };
    const { rows, threshold } = compare(SPEC, [{ name: 'bb1', pulse: bb1 }], { region, cuts: true });
    const f = rows[0].figures!;
    const direct = evaluate(SPEC, bb1);
    expect(f.meanInfidelity).toBe(direct.meanInfidelity);
    expect(f.worstInfidelity).toBe(direct.worstInfidelity);
    expect(f.worstMember.detuning).toBe(direct.members[direct.worstIndex].detuning);
    const map = robustnessMap(problem.target, bb1, region.detuning, region.amplitudeError).infidelity;
    expectClose(f.regionMeanInfidelity, map.reduce((s, x) => s + x, 0) / map.length, { rel: 1e-15 }, 'region mean');
    expect(f.regionWorstInfidelity).toBe(Math.max(...map));
    expect(f.regionMeanInfidelity).not.toBe(f.meanInfidelity);
    expect(threshold).toBe(1e-4);
    // The cuts run through zero error on the region's ranges: the zero-detuning cut at eps = 0 is the plain figure.
    expect(rows[0].cuts!.detuning).toHaveLength(9);
    expect(rows[0].cuts!.amplitudeErrorInfidelity).toHaveLength(7);
  });

  it('refuses an unknown sort figure or a bad region, naming the field', () => {
    expect(() => compare(SPEC, [], { sortBy: 'speed' as 'mean' })).toThrow(/sortBy: "speed" is not allowed/);
    expect(() => compare(SPEC, [], { region: { detuning: { min: 1, max: 0, points: 3 }, amplitudeError: { min: 0, max: 0, points: 1 } } })).toThrow(/detuning: \[1,0\] is not allowed/);
    expect(() => compare(SPEC, [], { threshold: 2 })).toThrow(/threshold: 2 is not allowed/);
  });
});
