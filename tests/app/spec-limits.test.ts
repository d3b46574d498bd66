// The form's own limits on a spec (src/app/spec-limits.ts) and the library's messages told
// in the form's words. The limit is on the turns of the qubit within one sample, Rabi
// frequency times sample period (docs/physics.md section 1: the drive rotates the Bloch
// vector at Omega turns per second); the core loses the phase beyond it (checked in
// tests/core: no figure at 1e9 turns a sample). The odd thresholds are common practice.
import { describe, expect, it } from 'vitest';
import { parseSpec } from '../../src/core/spec.ts';
import { inFormWords, MAX_TURNS_PER_SAMPLE, specLimits } from '../../src/app/spec-limits.ts';
import { demoSpec } from '../../src/app/demo.ts';

const problemWith = (patch: Record<string, unknown>) => parseSpec({ ...demoSpec(), ...patch });

describe('specLimits', () => {
  it('accepts the demo without a word', () => {
    expect(specLimits(problemWith({}), 1e9)).toEqual({ refusals: [], warnings: [] });
  });

  it('refuses a drive that turns the qubit more than the core computes within a sample, at the field that is off', () => {
    // 1e30 Hz x 2 ns x (1 + 10 %) = 2.2e21 turns a sample.
    const rabi = specLimits(problemWith({ rabiMax: 1e30 }), 1e9).refusals;
    expect(rabi.map((r) => r.field)).toEqual(['rabiMax']);
    expect(rabi[0].message).toMatch(/^Peak Rabi: a peak Rabi frequency of 1e21 GHz turns the qubit 2\.2e21 times within one sample \(1e21 GHz × 2 ns\); the core computes at most 1e6 turns a sample$/);
    // Just inside: 1e6 turns in 2 ns is 5e14 Hz; with the ensemble's +10 % it passes the limit.
    expect(specLimits(problemWith({ rabiMax: MAX_TURNS_PER_SAMPLE / 2e-9 / 1.1 }), 1e9).refusals).toEqual([]);
    expect(specLimits(problemWith({ rabiMax: (1.01 * MAX_TURNS_PER_SAMPLE) / 2e-9 / 1.1 }), 1e9).refusals).toHaveLength(1);
    const duration = specLimits(problemWith({ duration: 1e30 }), 1e9).refusals;
    expect(duration.map((r) => r.field)).toEqual(['duration']);
    const detuning = specLimits(problemWith({ ensemble: { detuning: { min: -1, max: 1e30, points: 3 } } }), 1e9).refusals;
    expect(detuning.map((r) => r.field)).toEqual(['ensemble.detuning.max']);
    expect(detuning[0].message).toMatch(/^Detuning to: a detuning of 1e21 GHz turns the qubit 2e21 times within one sample of 2 ns/);
    const amplitude = specLimits(problemWith({ ensemble: { amplitudeError: { min: -0.1, max: 1e30, points: 3 } } }), 1e9).refusals;
    expect(amplitude[0].field).toBe('ensemble.amplitudeError.max');
    expect(amplitude[0].message).toMatch(/^Amplitude error to: /);
  });

  it('warns on a peak Rabi frequency above 1 GHz, a detuning range over ten peak Rabi frequencies and an angle beyond 720°', () => {
    expect(specLimits(problemWith({ rabiMax: 2e9 }), 1e9).warnings.map((w) => w.field)).toEqual(['rabiMax']);
    const wide = specLimits(problemWith({ rabiMax: 1e5 }), 1e9).warnings;
    expect(wide.map((w) => w.field)).toEqual(['ensemble.detuning']);
    expect(wide[0].message).toContain('2 MHz wide');
    const angle = specLimits(problemWith({ target: { gate: { axis: [1, 0, 0], angleDeg: -1000 } } }), 1e9).warnings;
    // -1000° = -1000 + 3 x 360 = 80° (modulo a full turn).
    expect(angle[0].message).toBe('-1000° is beyond ±720°: the same gate as 80°');
  });

  it('flags a sample period that is not a whole number of the export\'s periods', () => {
    // 200 ns / 120 = 1.6667 ns: 1.6667 periods of 1 GS/s; 2 ns is two.
    const odd = specLimits(problemWith({ segments: 120 }), 1e9).warnings;
    expect(odd.map((w) => w.field)).toEqual(['dt']);
    expect(odd[0].message).toBe("1.6667 ns is 1.6667 periods of the export's 1 GS/s: the instrument cannot hold each sample, the export will resample");
    expect(specLimits(problemWith({}), 1e9).warnings).toEqual([]);
  });
});

describe('a sample period no instrument has', () => {
  it('is warned about, naming the bare number\'s unit (2e-7 typed for 200 ns is 2e-7 ns)', () => {
    // 2e-16 s over the demo's 100 samples: 2e-18 s a sample, below 1 ps (common practice: no AWG samples faster).
    const { refusals, warnings } = specLimits(problemWith({ duration: 2e-16 }), 1e9);
    expect(refusals).toEqual([]);
    expect(warnings).toEqual([{ field: 'dt', message: expect.stringMatching(/^a sample period of 2e-6 ps is below any instrument's 1 ps: a bare number is in ns/) }]);
    expect(specLimits(problemWith({ duration: 2e-7 }), 1e9).warnings).toEqual([]);
  });
});

describe('inFormWords', () => {
  it('tells a library message with the form\'s label and engineering units', () => {
    expect(inFormWords({ name: 'SpecError', field: 'segments', message: 'segments: 0 is not allowed; an integer from 1 to 100000' })).toBe(
      'Samples: 0 is not allowed; an integer from 1 to 100000',
    );
    expect(inFormWords({ name: 'SpecError', field: 'rabiMax', message: 'rabiMax: -5000000 is not allowed; a number > 0 Hz' })).toBe(
      'Peak Rabi: -5 MHz is not allowed; a number > 0 MHz',
    );
    expect(inFormWords({ name: 'SpecError', field: 'ensemble.detuning.points', message: 'ensemble.detuning.points: 0 is not allowed; x' })).toBe('Detuning points: 0 is not allowed; x');
    // Bounds the library prints with their unit after them (src/core/spec-fields.ts describeRule).
    expect(inFormWords({ name: 'SpecError', field: 'ensemble.detuning.max', message: 'ensemble.detuning.max: 1000000 is not allowed; a finite number >= 5000000 (Hz)' })).toBe(
      'Detuning to: 1 MHz is not allowed; a finite number >= 5 MHz',
    );
    expect(inFormWords({ name: 'SpecError', field: 'ensemble.amplitudeError.max', message: 'ensemble.amplitudeError.max: -0.2 is not allowed; a finite number >= -0.1 (relative)' })).toBe(
      'Amplitude error to: -20 % is not allowed; a finite number >= -10 %',
    );
    expect(inFormWords({ name: 'SpecError', field: 'system.anharmonicity', message: 'system.anharmonicity: missing value is not allowed; required: a finite number (Hz)' })).toBe(
      'Anharmonicity: a value is required: a finite number in Hz, kHz, MHz or GHz',
    );
    // The keys a JSON object allows stay keys (src/core/spec-fields.ts readObject).
    expect(inFormWords({ name: 'SpecError', field: 'foo', message: 'foo: 1 is not allowed; unknown key; a design spec allows only target, duration, segments, rabiMax' })).toBe(
      'foo: 1 is not allowed; unknown key; a design spec allows only target, duration, segments, rabiMax',
    );
    // A field the form has no label for keeps the library's words.
    expect(inFormWords({ name: 'SpecError', field: 'ensemble.members', message: 'ensemble.members: [] is not allowed' })).toBe('ensemble.members: [] is not allowed');
  });
});
