// Which composite sequences meet a spec's target, and the rotation each is built for: a
// gate about an axis in the xy-plane as it is; an inversion between the poles as a 180
// degree rotation (with 90-180-90, made for it); any other state transfer as the rotation
// about an axis in the xy-plane that carries `from` to `to` (docs/analysis.md, "Composites
// for a target"). Plain arithmetic over composites.ts, no core.
import { buildComposite, compositeNames, type CompositeName } from './composites.ts';
import { ArgumentError } from './errors.ts';
import { describeTarget, isInversion } from './target-choice.ts';
import type { Pulse, Target, Vec3 } from './types.ts';

/** A rotation about the axis (cos phase, sin phase, 0), radians, angle in (0, pi] for a transfer. */
export interface EquatorialRotation {
  angleRad: number;
  phaseRad: number;
}

/** One requested sequence: built for the spec's target, or the reason it cannot be. */
export interface CompositeForTarget {
  /** The sequence's short name, e.g. "bb1". */
  composite: CompositeName;
  /** Its title, e.g. "BB1". */
  title: string;
  pulse?: Pulse;
  error?: { name: string; message: string };
}

const DEG = Math.PI / 180;
const unit = (v: readonly number[]): Vec3 => {
  const n = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / n, v[1] / n, v[2] / n];
};
const dot = (u: readonly number[], v: readonly number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];

/**
 * The rotation about an axis n in the xy-plane that carries the Bloch vector `from` to `to`.
 * A rotation keeps the component along its axis, so n . (from - to) = 0: n is z x (from - to)
 * normalised. Where from - to has no xy part (the two differ only in z), every axis in the
 * plane keeps that component; n perpendicular to from's xy part then gives the smallest
 * angle, the angle between the two vectors (x for the poles). The angle is
 * atan2(n . (from x to), from_perp . to_perp) with v_perp = v - (n . v) n, made positive by
 * turning n over. Throws an ArgumentError when from and to are the same state.
 */
export function equatorialRotation(from: Vec3, to: Vec3): EquatorialRotation {
  const r = unit(from);
  const s = unit(to);
  const d = [r[0] - s[0], r[1] - s[1], r[2] - s[2]];
  if (Math.hypot(d[0], d[1], d[2]) < 1e-12) {
    throw new ArgumentError(`target.state: from ${JSON.stringify(from)} and to ${JSON.stringify(to)} are the same state; there is no rotation to build`);
  }
  let n: Vec3;
  // However small, an xy part fixes the axis: n . (from - to) = 0 then holds exactly, and an
  // error in n's direction moves the image only in proportion to from_perp.
  if (d[0] !== 0 || d[1] !== 0) n = unit([-d[1], d[0], 0]);
  else if (Math.hypot(r[0], r[1]) > 1e-12) n = unit([-r[1], r[0], 0]);
  else n = [1, 0, 0];
  const perp = (v: Vec3) => {
    const a = dot(n, v);
    return [v[0] - a * n[0], v[1] - a * n[1], v[2] - a * n[2]];
  };
  const rxs = [r[1] * s[2] - r[2] * s[1], r[2] * s[0] - r[0] * s[2], r[0] * s[1] - r[1] * s[0]];
  let angleRad = Math.atan2(dot(n, rxs), dot(perp(r), perp(s)));
  let phaseRad = Math.atan2(n[1], n[0]);
  if (angleRad < 0) {
    angleRad = -angleRad;
    phaseRad += Math.PI;
  }
  return { angleRad, phaseRad };
}

/**
 * The rotation (degrees) composites are built for to meet a target, or an ArgumentError
 * saying why there is none: a gate about an axis in the xy-plane (a negative angle turns
 * the axis over), or a state transfer's equatorial rotation.
 */
export function compositeRotation(target: Target): { angleDeg: number; axisDeg: number } {
  if (target.kind === 'state') {
    const { angleRad, phaseRad } = equatorialRotation(target.from, target.to);
    return { angleDeg: angleRad / DEG, axisDeg: Number((phaseRad / DEG).toPrecision(12)) };
  }
  const [x, y, z] = target.axis;
  if (Math.abs(z) > 1e-9 * Math.hypot(x, y, z)) {
    throw new ArgumentError(`target.gate.axis: ${JSON.stringify(target.axis)} is not in the xy-plane; composite sequences rotate about (cos phi, sin phi, 0)`);
  }
  let angleDeg = target.angleRad / DEG;
  let axisDeg = Math.atan2(y, x) / DEG;
  // R_n(-t) = R_{-n}(t): the sequences take positive angles.
  if (angleDeg < 0) {
    angleDeg = -angleDeg;
    axisDeg += 180;
  }
  return { angleDeg, axisDeg: Number(axisDeg.toPrecision(12)) };
}

/** Whether a name is one of the sequences buildComposite knows. */
export function isCompositeName(name: string): name is CompositeName {
  return compositeNames.some((c) => c.name === name);
}

/**
 * The named sequences built to meet a target under a peak Rabi frequency (Hz) and a sample
 * time (s), in the order asked; a sequence that cannot meet it carries the reason instead.
 * Throws an ArgumentError for a name that is no sequence at all.
 */
export function compositesFor(target: Target, names: readonly string[], limits: { rabiMax: number; dt: number }): CompositeForTarget[] {
  for (const name of names) {
    if (!isCompositeName(name)) {
      throw new ArgumentError(`composites: "${name}" is not a known sequence; one of ${compositeNames.map((c) => c.name).join(', ')}`);
    }
  }
  let rotation: { angleDeg: number; axisDeg: number } | null = null;
  let refusal: Error | null = null;
  try {
    rotation = compositeRotation(target);
  } catch (error) {
    refusal = error as Error;
  }
  return (names as CompositeName[]).map((composite) => {
    const info = compositeNames.find((c) => c.name === composite)!;
    const refuse = (message: string): CompositeForTarget => ({ composite, title: info.title, error: { name: 'ArgumentError', message } });
    if (!rotation) return refuse(refusal!.message);
    if (composite === '90-180-90' && !isInversion(target)) {
      return refuse(`90-180-90 is a point-to-point inversion |0> <-> |1>, offered for an inversion target only (the spec's target is ${describeTarget(target)})`);
    }
    // Knill's ideal is a pi rotation about the axis 30 degrees below the one it is built at:
    // for a state transfer, build it 30 degrees on so that its ideal is the transfer's rotation.
    const axisDeg = composite === 'knill' && target.kind === 'state' ? rotation.axisDeg + 30 : rotation.axisDeg;
    try {
      const pulse = buildComposite(composite, { angleDeg: rotation.angleDeg, axisDeg, rabiMax: limits.rabiMax, dt: limits.dt });
      return { composite, title: info.title, pulse };
    } catch (error) {
      const e = error as Error;
      if ((error as { field?: string }).field === 'angleDeg') {
        return refuse(`${composite} takes ${info.angles}; the spec's target needs ${Number(rotation.angleDeg.toPrecision(6))} degrees`);
      }
      return { composite, title: info.title, error: { name: e.name, message: `${composite}: ${e.message}` } };
    }
  });
}
