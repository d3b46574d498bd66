// Bloch sphere geometry: rotations with the sign convention of docs/physics.md section 1, and
// the projection of the view.
import { describe, expect, it } from 'vitest';
import { drag, project, rotate, targetPoint } from '../../src/app/plot/bloch.ts';
import type { Vec3 } from '../../src/core/types.ts';

const close = (a: Vec3, b: Vec3) => a.forEach((x, k) => expect(x).toBeCloseTo(b[k], 14));

describe('rotate', () => {
  it('turns right-handed: +z about +x by 90 degrees goes to -y (R_x(pi/2)|0> has Bloch vector (0, -1, 0))', () => {
    close(rotate([0, 0, 1], [1, 0, 0], Math.PI / 2), [0, -1, 0]);
    close(rotate([1, 0, 0], [0, 0, 1], Math.PI / 2), [0, 1, 0]);
    close(rotate([0, 0, 1], [0, 1, 0], Math.PI / 2), [1, 0, 0]);
  });
  it('keeps the length and normalises the axis (Rodrigues rotation formula)', () => {
    const v: Vec3 = [0.3, -0.4, 0.5];
    const r = rotate(v, [2, 2, 1], 1.234);
    expect(Math.hypot(...r)).toBeCloseTo(Math.hypot(...v), 14);
    close(rotate(v, [0, 0, 5], 2 * Math.PI), v);
  });
});

describe('targetPoint', () => {
  it('is the gate applied to the initial state, or the state target\'s own end', () => {
    close(targetPoint({ kind: 'gate', axis: [1, 0, 0], angleRad: Math.PI }, [0, 0, 1]), [0, 0, -1]);
    expect(targetPoint({ kind: 'state', from: [0, 0, 1], to: [1, 0, 0] }, [0, 0, 1])).toEqual([1, 0, 0]);
  });
});

describe('view', () => {
  it('keeps z up and projects a rotation (lengths stay within the unit disc)', () => {
    const p = project([0, 0, 1], { yaw: 0.6, pitch: 0 });
    expect(p.x).toBeCloseTo(0, 14);
    expect(p.y).toBeCloseTo(1, 14);
    for (const v of [[1, 0, 0], [0, 1, 0], [0.6, 0.8, 0]] as Vec3[]) {
      const q = project(v, { yaw: 0.3, pitch: 0.4 });
      expect(q.x ** 2 + q.y ** 2 + q.depth ** 2).toBeCloseTo(1, 14);
    }
  });
  it('turns with a drag and never tips past the poles', () => {
    const v = drag({ yaw: 0, pitch: 0 }, 100, 10000, 100);
    expect(v.yaw).toBeCloseTo(1, 14);
    expect(v.pitch).toBe(Math.PI / 2);
  });
});
