// The problems tests/core/builds.test.ts and its probe share.
import type { Member, Target } from '../../src/core/types.ts';

const grid = (count: number, spread: number): Member[] =>
  Array.from({ length: count }, (_, j) => ({ detuning: spread * (j / (count - 1) - 0.5), amplitudeError: 0.1 * ((j % 5) / 4 - 0.5), weight: 1 + (j % 3) }));

/** Gate and state targets, few and many segments, one series term count and halvings (rabi 3e8 at 1 ns). */
export const CASES: { target: Target; segments: number; rabi: number; members: Member[] }[] = [
  { target: { kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI / 2 }, segments: 200, rabi: 1e7, members: grid(9, 4e6) },
  { target: { kind: 'state', from: [0, 0, 1], to: [0, 1, 0] }, segments: 60, rabi: 3e7, members: grid(6, 2e6) },
  { target: { kind: 'gate', axis: [0, 1, 0], angleRad: Math.PI }, segments: 30, rabi: 3e8, members: grid(5, 1e7) },
];

/** A small design every build runs in well under a second. */
export const DESIGN_SPEC = {
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7,
  segments: 60,
  rabiMax: 1e7,
  ensemble: { detuning: { min: -1e6, max: 1e6, points: 3 }, amplitudeError: { min: -0.1, max: 0.1, points: 3 } },
  optimizer: { starts: 1, seed: 3, maxIterations: 120 },
};
