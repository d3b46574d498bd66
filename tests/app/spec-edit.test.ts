// Editing the spec from the form: values at dotted paths, axis shapes, typed vectors and
// the sample-period link between duration and samples.
import { describe, expect, it } from 'vitest';
import { parseSpec } from '../../src/core/spec.ts';
import { demoSpec } from '../../src/app/demo.ts';
import {
  axisDefault,
  axisMode,
  durationForSamplePeriod,
  formatVector,
  getAt,
  parseVector,
  samplePeriod,
  setAt,
  targetDefault,
} from '../../src/app/spec-edit.ts';

describe('paths', () => {
  it('reads and replaces nested values without touching the original', () => {
    const spec = demoSpec();
    const before = JSON.stringify(spec);
    const edited = setAt(spec, 'ensemble.detuning.max', 2e6);
    expect(getAt(edited, 'ensemble.detuning.max')).toBe(2e6);
    expect(getAt(edited, 'ensemble.detuning.min')).toBe(-1e6);
    expect(JSON.stringify(spec)).toBe(before);
    // Unchanged branches are shared, changed ones copied.
    expect(edited.target).toBe(spec.target);
    expect(edited.ensemble).not.toBe(spec.ensemble);
  });
  it('creates missing parents and removes a key (and an emptied parent) on undefined', () => {
    const spec = { duration: 1e-7 };
    const withSmooth = setAt(spec, 'constraints.smoothness', 0.1);
    expect(withSmooth).toEqual({ duration: 1e-7, constraints: { smoothness: 0.1 } });
    expect(setAt(withSmooth, 'constraints.smoothness', undefined)).toEqual({ duration: 1e-7 });
    expect(getAt(spec, 'optimizer.starts')).toBeUndefined();
  });
});

describe('axis shapes', () => {
  it('names the shape of each axis form the spec allows (issue 2)', () => {
    expect(axisMode(undefined)).toBe('none');
    expect(axisMode({ min: -1, max: 1, points: 3 })).toBe('range');
    expect(axisMode({ sigma: 0.02, points: 5 })).toBe('gaussian');
    expect(axisMode({ values: [0, 1] })).toBe('list');
  });
  it('gives defaults that the library accepts', () => {
    for (const mode of ['range', 'gaussian', 'list', 'none'] as const) {
      const spec = setAt(demoSpec(), 'ensemble.detuning', axisDefault(mode, 1e6));
      const problem = parseSpec(spec);
      const detunings = new Set(problem.members.map((m) => m.detuning));
      expect(detunings.size).toBe(mode === 'none' ? 1 : mode === 'list' ? 3 : 5);
    }
    for (const kind of ['gate', 'state'] as const) expect(parseSpec(setAt(demoSpec(), 'target', targetDefault(kind))).target.kind).toBe(kind);
  });
});

describe('vectors', () => {
  it('reads named axes and three numbers', () => {
    expect(parseVector('+x')).toEqual({ ok: true, value: [1, 0, 0] });
    expect(parseVector('y')).toEqual({ ok: true, value: [0, 1, 0] });
    expect(parseVector('\u2212z')).toEqual({ ok: true, value: [0, 0, -1] });
    expect(parseVector('0, 0.6, 0.8')).toEqual({ ok: true, value: [0, 0.6, 0.8] });
    expect(parseVector('[1 1 0]')).toEqual({ ok: true, value: [1, 1, 0] });
  });
  it('refuses what is not a direction', () => {
    const bad = (t: string) => {
      const r = parseVector(t);
      return r.ok ? '' : r.message;
    };
    expect(bad('0, 0, 0')).toMatch(/zero vector/);
    expect(bad('1, 2')).toMatch(/not a vector/);
    expect(bad('north')).toMatch(/not a vector/);
  });
  it('prints a signed unit axis by name and anything else as numbers', () => {
    expect(formatVector([0, 0, -1])).toBe('-z');
    expect(formatVector([1, 1, 0])).toBe('1, 1, 0');
    expect(parseVector(formatVector([0.6, 0, 0.8]))).toEqual({ ok: true, value: [0.6, 0, 0.8] });
  });
});

describe('sample period', () => {
  it('is duration / samples, printed without rounding noise', () => {
    expect(samplePeriod(demoSpec())).toBe(2e-9);
    expect(samplePeriod({ duration: 1e-6, segments: 3 })).toBe(Number((1e-6 / 3).toPrecision(15)));
    expect(samplePeriod({ duration: 1e-6, segments: 0 })).toBeNaN();
  });
  it('sets the duration to samples x period (2 ns x 100 = 200 ns exactly as typed)', () => {
    // 2e-9 * 100 = 2.0000000000000002e-7 in IEEE 754 doubles; the form must show 200 ns.
    expect(2e-9 * 100).not.toBe(2e-7);
    expect(durationForSamplePeriod(2e-9, 100)).toBe(2e-7);
    expect(durationForSamplePeriod(5e-7, 80)).toBe(4e-5);
  });
});

describe('mergeSpec and isWholeSpec', () => {
  it('merges a part of a spec: top-level keys replaced, optimizer, constraints and ensemble key by key', async () => {
    const { mergeSpec, isWholeSpec } = await import('../../src/app/spec-edit.ts');
    const spec = { target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: 2e-7, segments: 100, rabiMax: 1e7, optimizer: { starts: 5, seed: 1 }, ensemble: { detuning: { min: -1, max: 1, points: 3 } } };
    expect(isWholeSpec(spec)).toBe(true);
    expect(isWholeSpec({ duration: 4e-7 })).toBe(false);
    const merged = mergeSpec(spec, { duration: 4e-7, optimizer: { starts: 3 }, ensemble: { amplitudeError: { sigma: 0.02, points: 3 } } });
    expect(merged.keys).toEqual(['duration', 'optimizer.starts', 'ensemble.amplitudeError']);
    expect(merged.spec).toEqual({ ...spec, duration: 4e-7, optimizer: { starts: 3, seed: 1 }, ensemble: { detuning: { min: -1, max: 1, points: 3 }, amplitudeError: { sigma: 0.02, points: 3 } } });
    // The spec given is not changed.
    expect(spec.duration).toBe(2e-7);
  });
});
