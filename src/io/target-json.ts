// A target as people read it in output files: the spec's own form, angles in degrees
// ({"gate": {"axis", "angleDeg"}} or {"state": {"from", "to"}}), not the radians the core uses.
import type { Target, Vec3 } from '../core/types.ts';

/** A target in the spec's JSON form. */
export type TargetJson = { gate: { axis: Vec3; angleDeg: number } } | { state: { from: Vec3; to: Vec3 } };

/** The spec form of a target, its angle in degrees (rounded to 12 significant digits, so 90 stays 90). */
export function targetJson(target: Target): TargetJson {
  if (target.kind === 'state') return { state: { from: target.from, to: target.to } };
  return { gate: { axis: target.axis, angleDeg: Number(((target.angleRad * 180) / Math.PI).toPrecision(12)) } };
}
