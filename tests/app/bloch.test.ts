// Bloch sphere geometry: rotations with the sign convention of docs/physics.md section 1, and
// the projection of the view. The path the sphere draws comes from the core
// (blochTrajectory); under detuning it must turn the way section 1 says, Delta = f_q - f_d:
// a rectangular drive (I = Omega, Q = 0) is a rotation about the axis (Omega, 0, -Delta) / W
// by 2 pi W t, W = sqrt(Omega^2 + Delta^2), the same rotation the view's `rotate` draws.
import { describe, expect, it } from 'vitest';
import { blochTrajectory } from '../../src/core/api.ts';
import type { Pulse } from '../../src/core/types.ts';
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

describe('the drawn path under detuning (Delta = qubit minus drive)', () => {
  const end = (path: Float64Array): Vec3 => [path[path.length - 3], path[path.length - 2], path[path.length - 1]];
  const rectangle = (rabiHz: number, n: number, dt: number): Pulse => ({ dt, i: new Float64Array(n).fill(rabiHz), q: new Float64Array(n), metadata: {} });

  it('with no drive, a qubit above the drive (Delta > 0) turns +x towards -y, one below it towards +y', () => {
    // A quarter turn: Delta = 1 MHz for 250 ns.
    for (const detuning of [1e6, -1e6]) {
      const path = blochTrajectory(rectangle(0, 50, 5e-9), { detuning, amplitudeError: 0, weight: 1 }, [1, 0, 0]);
      close(end(path), [0, -Math.sign(detuning), 0]);
      close(end(path), rotate([1, 0, 0], [0, 0, -detuning], 2 * Math.PI * Math.abs(detuning) * 250e-9));
    }
  });
  it('a detuned rectangle turns about (Omega, 0, -Delta) by 2 pi W t, as the view rotates', () => {
    const omega = 4e6;
    const pulse = rectangle(omega, 40, 2.5e-9);
    for (const detuning of [1.5e6, -1.5e6]) {
      const path = blochTrajectory(pulse, { detuning, amplitudeError: 0, weight: 1 }, [0, 0, 1]);
      const w = Math.hypot(omega, detuning);
      const expected = rotate([0, 0, 1], [omega / w, 0, -detuning / w], 2 * Math.PI * w * 100e-9);
      end(path).forEach((x, k) => expect(x).toBeCloseTo(expected[k], 12));
      // Every drawn point lies on that rotation's cone, not its mirror image.
      for (let k = 0; k <= 40; k++) {
        const point = rotate([0, 0, 1], [omega / w, 0, -detuning / w], 2 * Math.PI * w * k * 2.5e-9);
        for (let c = 0; c < 3; c++) expect(path[3 * k + c]).toBeCloseTo(point[c], 12);
      }
    }
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
