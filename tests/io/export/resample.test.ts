// Tests of src/io/export/resample.ts and padding.ts against what each method means
// (settings.ts ResampleMethod) and hand-computed cases: a zero-order hold repeats each
// value dt*fs times; averaging keeps the pulse area (integral of I dt) exactly;
// linear interpolation is exact for a straight line; padding reaches the next multiple of
// the block size (docs/physics.md section 5).
import { describe, expect, it } from 'vitest';
import type { Pulse } from '../../../src/core/types.ts';
import { padding } from '../../../src/io/export/padding.ts';
import { resampledLength, resamplePulse, samplesPerSegment } from '../../../src/io/export/resample.ts';
import { expectClose } from '../../reference/tolerance.ts';

const pulseOf = (i: number[], dt: number): Pulse => ({ dt, i: Float64Array.from(i), q: Float64Array.from(i, (x) => -x / 2), metadata: {} });

describe('resamplePulse', () => {
  it("'hold' repeats each design sample dt * fs times (4 ns at 1 GHz: 4 samples each)", () => {
    const r = resamplePulse(pulseOf([1, 2, 3], 4e-9), 1e9, 'hold');
    expect(Array.from(r.i)).toEqual([1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3]);
    expect(r.holdSamples).toBe(4);
  });
  it('takes dt * fs as whole within floating-point rounding (0.1 us at 1.2 GHz = 120)', () => {
    expect(samplesPerSegment(1e-7, 1.2e9).whole).toBe(120);
    expect(samplesPerSegment(2.5e-9, 1e9).whole).toBeNull();
  });
  it("'hold-nearest' takes the design sample under each sample centre (dt * fs = 1.25, hand-computed)", () => {
    // ceil(3 * 1.25) = 4 samples; centres (n + 0.5) / 1.25 = 0.4, 1.2, 2.0, 2.8 -> design samples 0, 1, 2, 2.
    const r = resamplePulse(pulseOf([10, 20, 30], 1.25e-9), 1e9, 'hold-nearest');
    expect(Array.from(r.i)).toEqual([10, 20, 30, 30]);
  });
  it("'linear' reproduces a straight line between the first and last design-sample centres", () => {
    const dt = 3.7e-9;
    const fs = 1e9;
    const line = (t: number) => 2e6 + 1e14 * t; // value at time t (s)
    const design = pulseOf(Array.from({ length: 8 }, (_, k) => line((k + 0.5) * dt)), dt);
    const r = resamplePulse(design, fs, 'linear');
    for (let n = 0; n < r.i.length; n++) {
      const t = (n + 0.5) / fs;
      const inside = t >= 0.5 * dt && t <= 7.5 * dt;
      const expected = inside ? line(t) : line(t < 0.5 * dt ? 0.5 * dt : 7.5 * dt);
      expectClose(r.i[n], expected, { rel: 1e-12 }, `sample ${n}`);
    }
  });
  for (const dt of [2.5e-9, 0.4e-9, 1.7e-9]) {
    it(`'average' keeps the pulse area exactly (dt * fs = ${dt * 1e9})`, () => {
      const design = pulseOf([3e6, -1e6, 7e6, 2e6, 5e6, 0, 4e6], dt);
      const r = resamplePulse(design, 1e9, 'average');
      const area = design.i.reduce((s, x) => s + x * dt, 0);
      const exported = r.i.reduce((s, x) => s + x / 1e9, 0);
      expectClose(exported, area, { rel: 1e-12 }, 'area of I');
      expect(r.i.length).toBe(resampledLength(7, dt, 1e9));
    });
  }
  it('the resampled pulse part never ends before the design: ceil(N dt fs)', () => {
    expect(resampledLength(3, 1.25e-9, 1e9)).toBe(4);
    expect(resampledLength(10, 1.3e-9, 1e9)).toBe(13);
  });
});

describe('padding', () => {
  const rule = { granularity: 16, minLength: 0, maxLength: Infinity };
  it('pads 37 samples to 48: 11 after, 11 before, or 5 before and 6 after (split)', () => {
    expect(padding(37, { ...rule, pad: 'after' })).toEqual({ before: 0, after: 11, length: 48 });
    expect(padding(37, { ...rule, pad: 'before' })).toEqual({ before: 11, after: 0, length: 48 });
    expect(padding(37, { ...rule, pad: 'split' })).toEqual({ before: 5, after: 6, length: 48 });
  });
  it('keeps a length that is already a multiple, and honours the minimum length before the block size', () => {
    expect(padding(64, { ...rule, pad: 'after' }).length).toBe(64);
    expect(padding(10, { ...rule, minLength: 100, pad: 'after' }).length).toBe(112);
  });
});
