// The threshold half-widths on a ladder (src/core/threshold-width.ts): the slope bounds of
// sqrt(infidelity) derived in docs/transmon.md ("Half-widths on a ladder") checked against
// finite differences on a fine grid (they must never be exceeded, and the qubit's bound is
// exceeded on a ladder), and every interval checked against an independent brute-force
// scan of the figure along the axis, for DRAG pulses on 3 and 5 levels and for the qubit.
import { describe, expect, it } from 'vitest';
import { evaluateMembers } from '../../src/core/api.ts';
import { dragPulse } from '../../src/core/drag.ts';
import { ArgumentError } from '../../src/core/errors.ts';
import { ladderDriveNorm, slopeBounds, thresholdInterval, type WidthAxis } from '../../src/core/threshold-width.ts';
import type { LadderSystem, Member, Pulse, Target } from '../../src/core/types.ts';

const X180: Target = { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI };
const IDENTITY: Target = { kind: 'gate', axis: [0, 0, 1], angleRad: 0 };
const ALPHA = -2e8;
const LIMITS = { duration: 2e-8, segments: 40, rabiMax: 1e9 };

/**
 * DRAG X(180), 20 ns, 40 samples (Motzoi et al. 2009, docs/transmon.md): beta 1/2 (phase
 * error removed; 6e-5 to 7e-5 on 3 and 5 levels) or 0 (the plain envelope, exact on the qubit).
 */
const drag = (envelope: 'gaussian' | 'cosine', beta = 0.5): Pulse => dragPulse(X180, LIMITS, ALPHA, { envelope, amplitudeScale: 1, beta, driveDetuning: 0 });

/**
 * A resonant push for T/2 and the same pull back on a nearly harmonic ladder: a coherent
 * excursion to mean level beta^2 and back (displacement by beta, then -beta), where the
 * detuning acts on every level the state visits, so the qubit's slope bound pi T is exceeded.
 */
function excursion(beta: number): Pulse {
  const n = 20, dt = 1e-9;
  const rabi = beta / Math.PI / ((n * dt) / 2);
  return { dt, i: Float64Array.from({ length: n }, (_, k) => (k < n / 2 ? rabi : -rabi)), q: new Float64Array(n), metadata: {} };
}

const memberAt = (axis: WidthAxis, x: number): Member => ({ detuning: 0, amplitudeError: 0, anharmonicityError: 0, weight: 1, [axis]: x });

/** sqrt(infidelity) at each point of an axis. */
function rootFigure(target: Target, pulse: Pulse, axis: WidthAxis, xs: readonly number[], system?: LadderSystem): number[] {
  return evaluateMembers(target, pulse, xs.map((x) => memberAt(axis, x)), undefined, system).members.map((m) => Math.sqrt(m.infidelity));
}

/** Largest |g(x_{k+1}) - g(x_k)| / h over a uniform grid: a lower estimate of the largest slope. */
function largestSlope(target: Target, pulse: Pulse, axis: WidthAxis, lo: number, hi: number, points: number, system?: LadderSystem): number {
  const h = (hi - lo) / (points - 1);
  const xs = Array.from({ length: points }, (_, k) => lo + k * h);
  const g = rootFigure(target, pulse, axis, xs, system);
  let slope = 0;
  for (let k = 1; k < points; k++) slope = Math.max(slope, Math.abs(g[k] - g[k - 1]) / h);
  return slope;
}

/** The first point at or above the threshold on a uniform outward scan of `points` steps of h (independent of the search). */
function scanFirstCrossing(target: Target, pulse: Pulse, axis: WidthAxis, sign: 1 | -1, h: number, points: number, threshold: number, system?: LadderSystem): number {
  const xs = Array.from({ length: points }, (_, k) => sign * (k + 1) * h);
  const g = rootFigure(target, pulse, axis, xs, system);
  const k = g.findIndex((v) => !(v * v < threshold));
  return k < 0 ? Infinity : (k + 1) * h;
}

/** Each side of the interval lies within one scan step below the scan's first crossing. */
function expectMatchesScan(target: Target, pulse: Pulse, axis: WidthAxis, threshold: number, system?: LadderSystem): void {
  const interval = thresholdInterval(target, pulse, axis, threshold, system);
  expect(interval.reachedLimit, `${axis}: a crossing on both sides`).toBe(false);
  for (const [sign, side] of [[1, interval.upper], [-1, -interval.lower]] as const) {
    expect(side, `${axis} side ${sign}`).toBeGreaterThan(0);
    // 4000 steps over 1.25 times the side: the step is 3e-4 of the side.
    const h = (1.25 * side) / 4000;
    const scanned = scanFirstCrossing(target, pulse, axis, sign, h, 4000, threshold, system);
    expect(scanned, `${axis} side ${sign}: the scan crosses at or after the search`).toBeGreaterThanOrEqual(side * (1 - 1e-6));
    expect(scanned - side, `${axis} side ${sign}: within one step of the scan`).toBeLessThanOrEqual(h * (1 + 1e-6));
  }
}

describe('slope bounds of sqrt(infidelity) on a ladder (docs/transmon.md)', () => {
  // Source: the characteristic polynomial of the truncated a + a^dag is He_d (three-term
  // recurrence); its largest roots are tabulated (Abramowitz & Stegun table 25.10 gives the
  // physicists' H_d roots, times sqrt 2 here; values recalled from memory: 1.2247449,
  // 2.0201829 for d = 3, 5), and on two levels a + a^dag is sigma_x, of norm 1.
  it('the drive term a + a^dag has the norm sqrt 2 times the largest Hermite root', () => {
    expect(ladderDriveNorm(2)).toBe(1);
    expect(ladderDriveNorm(3)).toBeCloseTo(Math.sqrt(3), 14);
    expect(ladderDriveNorm(5)).toBeCloseTo(Math.SQRT2 * 2.0201828704561, 11);
  });

  it('on two levels are the qubit bounds pi T and pi A (docs/analysis.md)', () => {
    const pulse = drag('cosine');
    const qubit = slopeBounds(pulse);
    expect(slopeBounds(pulse, { levels: 2, anharmonicity: ALPHA })).toEqual(qubit);
    expect(qubit.detuning).toBeCloseTo(Math.PI * 2e-8, 20);
    expect(qubit.anharmonicityError).toBe(0);
  });

  // Source: finite differences on a fine grid (a lower estimate of the largest slope) must
  // stay below each bound; the coherent excursion shows the qubit's pi T is not a bound on a
  // ladder (the detuning acts on every visited level, n up to d - 1).
  it.each([
    [3, 1],
    [5, 1.5],
    [8, 2],
  ])('an excursion on %i levels: the detuning slope exceeds the qubit bound and stays below the ladder bound', (levels, beta) => {
    const pulse = excursion(beta);
    const system = { levels, anharmonicity: 1e3 };
    const slope = largestSlope(IDENTITY, pulse, 'detuning', -1e8, 1e8, 4001, system);
    expect(slope).toBeGreaterThan(1.3 * slopeBounds(pulse).detuning);
    expect(slope).toBeLessThan(slopeBounds(pulse, system).detuning);
  });

  it.each([3, 5])('DRAG on %i levels: every axis stays below its bound', (levels) => {
    const system = { levels, anharmonicity: ALPHA };
    const pulse = drag('gaussian');
    const bounds = slopeBounds(pulse, system);
    expect(largestSlope(X180, pulse, 'detuning', -1e9, 1e9, 4001, system)).toBeLessThan(bounds.detuning);
    expect(largestSlope(X180, pulse, 'amplitudeError', -0.99, 3, 4001, system)).toBeLessThan(bounds.amplitudeError);
    expect(largestSlope(X180, pulse, 'anharmonicityError', -1e9, 1e9, 4001, system)).toBeLessThan(bounds.anharmonicityError);
  });
});

describe('threshold intervals against a brute-force scan', () => {
  it.each([
    ['gaussian', 3],
    ['cosine', 3],
    ['gaussian', 5],
    ['cosine', 5],
  ] as const)('DRAG %s on %i levels: detuning, amplitude error and anharmonicity error', (envelope, levels) => {
    const system = { levels, anharmonicity: ALPHA };
    const pulse = drag(envelope);
    for (const axis of ['detuning', 'amplitudeError', 'anharmonicityError'] as const) expectMatchesScan(X180, pulse, axis, 1e-3, system);
  });

  it('the excursion on 8 levels, where the qubit bound fails: detuning', () => {
    expectMatchesScan(IDENTITY, excursion(2), 'detuning', 1e-2, { levels: 8, anharmonicity: 1e3 });
  });

  it('the qubit: Gaussian and cosine X(180) on two levels, both axes', () => {
    for (const envelope of ['gaussian', 'cosine'] as const) {
      const pulse = drag(envelope, 0);
      for (const axis of ['detuning', 'amplitudeError'] as const) expectMatchesScan(X180, pulse, axis, 1e-4);
    }
  });

  it('refuses the anharmonicity axis without a ladder, naming it', () => {
    expect(() => thresholdInterval(X180, drag('cosine'), 'anharmonicityError', 1e-4)).toThrow(ArgumentError);
    expect(() => thresholdInterval(X180, drag('cosine'), 'anharmonicityError', 1e-4)).toThrow(/^axis: "anharmonicityError" is not allowed without a ladder/);
  });
});
