// Shared pieces of the export tests: pulses of known shape and an evaluator over the
// plain-TypeScript reference propagator (tests/reference/oracle.ts), so that the figures
// checked here do not depend on the wasm core.
import { expect } from 'vitest';
import type { Evaluation, Member, Pulse, Target, Vec3 } from '../../../src/core/types.ts';
import type { PulseEvaluator } from '../../../src/io/export/report.ts';
import { ensembleFigure } from '../../reference/oracle.ts';

/** The x axis. */
export const X_AXIS: Vec3 = [1, 0, 0];

/** A gate target R_axis(angle). */
export function gate(angleRad: number, axis: Vec3 = X_AXIS): Target {
  return { kind: 'gate', axis, angleRad };
}

/** A constant-amplitude pulse at drive phase `phase` (rad) of `segments` samples of `dt` seconds. */
export function rectangular(rabiHz: number, segments: number, dt: number, phase = 0): Pulse {
  return {
    dt,
    i: new Float64Array(segments).fill(rabiHz * Math.cos(phase)),
    q: new Float64Array(segments).fill(rabiHz * Math.sin(phase)),
    metadata: { name: 'rectangular' },
  };
}

/** A smooth pulse with both quadratures in use (a sine lobe on I, a cosine on Q), peak amplitude below `peakHz`. */
export function shapedPulse(peakHz: number, segments: number, dt: number): Pulse {
  const i = new Float64Array(segments);
  const q = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    const x = (k + 0.5) / segments;
    i[k] = 0.8 * peakHz * Math.sin(Math.PI * x);
    q[k] = 0.5 * peakHz * Math.cos(2 * Math.PI * x);
  }
  return { dt, i, q, metadata: { name: 'shaped' } };
}

/** An evaluator by the reference propagator, shaped like the library's Evaluation. */
export function oracleEvaluator(target: Target, members: Member[]): PulseEvaluator {
  return (pulse: Pulse): Evaluation => {
    const f = ensembleFigure(target, pulse, members);
    const total = members.reduce((s, m) => s + m.weight, 0);
    return {
      members: members.map((m, j) => ({ ...m, weight: m.weight / total, infidelity: f.perMember[j] })),
      meanInfidelity: f.mean,
      worstInfidelity: f.worst,
      worstIndex: f.worstIndex,
    };
  };
}

/** A member with the given errors and weight 1. */
export function member(detuning: number, amplitudeError: number): Member {
  return { detuning, amplitudeError, weight: 1 };
}

/** The error of class `type` that `run` throws (the test fails when it throws none or another). */
export function thrown<T extends Error>(type: new (...args: never[]) => T, run: () => unknown): T {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(type);
    return error as T;
  }
  throw new Error(`expected a ${type.name}`);
}
