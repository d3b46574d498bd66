// Geometry of the Bloch sphere view: rotating vectors (where the target sends the initial
// state), turning the sphere by dragging, and projecting onto the canvas.
import type { Target, Vec3 } from '../../core/types.ts';

/** v rotated by `angle` (radians, right-handed) about the unit axis n (Rodrigues' formula). */
export function rotate(v: Vec3, n: Vec3, angle: number): Vec3 {
  const norm = Math.hypot(n[0], n[1], n[2]);
  const [x, y, z] = [n[0] / norm, n[1] / norm, n[2] / norm];
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  const dot = x * v[0] + y * v[1] + z * v[2];
  const cross: Vec3 = [y * v[2] - z * v[1], z * v[0] - x * v[2], x * v[1] - y * v[0]];
  return [
    v[0] * c + cross[0] * s + x * dot * (1 - c),
    v[1] * c + cross[1] * s + y * dot * (1 - c),
    v[2] * c + cross[2] * s + z * dot * (1 - c),
  ];
}

/**
 * Where the target sends a Bloch vector: R_n(theta) = exp(-i theta n.s/2) turns it by
 * +theta about n (docs/physics.md section 1); a state target names its own end point.
 */
export function targetPoint(target: Target, from: Vec3): Vec3 {
  if (target.kind === 'state') return target.to;
  return rotate(from, target.axis, target.angleRad);
}

/** A view of the sphere: turned by `yaw` about z, then tipped by `pitch` towards the viewer. */
export interface View {
  yaw: number;
  pitch: number;
}

/** The default view: x towards the lower left, y to the right, z up (the textbook picture). */
export const DEFAULT_VIEW: View = { yaw: 0.6, pitch: 0.35 };

/** Screen coordinates (right, up) and depth (towards the viewer) of a vector in a view. */
export function project(v: Vec3, view: View): { x: number; y: number; depth: number } {
  const cy = Math.cos(view.yaw);
  const sy = Math.sin(view.yaw);
  // Turn about z: x' to the viewer's right as yaw grows.
  const rx = cy * v[1] - sy * v[0];
  const ry = cy * v[0] + sy * v[1];
  const cp = Math.cos(view.pitch);
  const sp = Math.sin(view.pitch);
  // Looking along -ry (ry towards the viewer), tipped down by pitch.
  return { x: rx, y: v[2] * cp - ry * sp, depth: ry * cp + v[2] * sp };
}

/** A view after dragging by (dx, dy) pixels on a sphere drawn with radius `radius` pixels. */
export function drag(view: View, dx: number, dy: number, radius: number): View {
  const pitch = Math.max(-Math.PI / 2, Math.min(Math.PI / 2, view.pitch + dy / radius));
  return { yaw: view.yaw + dx / radius, pitch };
}
