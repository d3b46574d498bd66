// The Bloch sphere's drawing order (bloch-draw.ts): the labels and the target's ring come after
// every member's path, so that a large ensemble's paths do not hide them (the canvas paints
// in call order: a later fill or stroke covers an earlier one, HTML Canvas 2D, "drawing model").
import { describe, expect, it } from 'vitest';
import { paint, type BlochScene } from '../../src/app/plot/bloch-draw.ts';
import type { Vec3 } from '../../src/core/types.ts';

/** A 2D context that records its drawing calls, each with the colours and alpha in force. */
function recorder(): { ctx: CanvasRenderingContext2D; calls: Array<{ call: string; args: unknown[]; stroke: string; fill: string; alpha: number }> } {
  const calls: Array<{ call: string; args: unknown[]; stroke: string; fill: string; alpha: number }> = [];
  const state: Record<string | symbol, unknown> = { strokeStyle: '', fillStyle: '', globalAlpha: 1 };
  const ctx = new Proxy(state, {
    get: (target, key) =>
      key in target ? target[key] : (...args: unknown[]) => calls.push({ call: String(key), args, stroke: String(target.strokeStyle), fill: String(target.fillStyle), alpha: Number(target.globalAlpha) }),
    set: (target, key, value) => {
      target[key] = value;
      return true;
    },
  });
  return { ctx: ctx as unknown as CanvasRenderingContext2D, calls };
}

describe('the Bloch sphere drawing', () => {
  it('draws the axis labels and the target ring and label above every member path (25 members)', () => {
    // 25 paths from +z over the sphere to the target -y, each a great-circle quarter turn about x.
    const members = 25, points = 40;
    const paths = new Float32Array(3 * members * points);
    const offsets = new Int32Array(members + 1);
    for (let m = 0; m < members; m++) {
      offsets[m + 1] = (m + 1) * points;
      for (let k = 0; k < points; k++) {
        const a = ((Math.PI / 2) * k) / (points - 1) * (0.9 + (0.2 * m) / members);
        paths.set([0, -Math.sin(a), Math.cos(a)], 3 * (m * points + k));
      }
    }
    const colours = Array.from({ length: members }, (_, m) => `rgb(${m}, 100, 200)`);
    const target: Vec3 = [0, -1, 0];
    const scene: BlochScene = { paths, offsets, colours, target, theme: { text: '#111', muted: '#777', grid: '#ccc', panel: '#fff' }, size: 400, dpr: 1 };
    const { ctx, calls } = recorder();
    const painting = paint(ctx, scene, { yaw: 0.6, pitch: 0.35 }, { partPixels: 50 });
    while (painting.step());
    const last = (test: (c: (typeof calls)[number]) => boolean) => calls.reduce((found, c, k) => (test(c) ? k : found), -1);
    const lastPath = last((c) => c.call === 'stroke' && colours.includes(c.stroke));
    expect(lastPath).toBeGreaterThan(0);
    const targetLabel = calls.findIndex((c) => c.call === 'fillText' && c.args[0] === 'target');
    // Whole (not faded with a target behind the sphere), on a rim of the panel's colour.
    expect(calls[targetLabel].alpha).toBe(1);
    expect(calls.some((c, k) => c.call === 'strokeText' && c.args[0] === 'target' && c.stroke === '#fff' && k > lastPath && k < targetLabel)).toBe(true);
    const targetRing = calls.findIndex((c) => c.call === 'stroke' && c.stroke === '#d55e00');
    const axisLabels = calls.filter((c) => c.call === 'fillText' && c.args[0] !== 'target').map((c) => calls.indexOf(c));
    expect(targetLabel).toBeGreaterThan(lastPath);
    expect(targetRing).toBeGreaterThan(lastPath);
    expect(axisLabels).toHaveLength(6);
    for (const k of axisLabels) expect(k).toBeGreaterThan(lastPath);
    // The paths' end marks stay under the labels as well.
    const lastMark = last((c) => c.call === 'fillRect');
    expect(targetLabel).toBeGreaterThan(lastMark);
  });
});
