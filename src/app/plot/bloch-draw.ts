// Drawing the Bloch sphere and an ensemble's paths on a 2D canvas context. It runs in the
// painter worker (bloch-painter.ts) on an OffscreenCanvas, so that long paths never hold
// the page's thread; nothing here touches the DOM.
import type { Vec3 } from '../../core/types.ts';
import { project, type View } from './bloch.ts';

/** The sphere's radius as a fraction of the canvas's side. */
export const SPHERE_RADIUS = 0.38;

/** The theme's colours the sphere uses (read on the page: a worker has no style sheets). */
export interface SphereColours {
  text: string;
  muted: string;
  grid: string;
  /** The panel behind the canvas: a rim around a label keeps it readable over the paths. */
  panel: string;
}

/** What the canvas shows, apart from the view: every member's path, its colour, the target point. */
export interface BlochScene {
  /** Every path's points one after the other, 3 values per point. */
  paths: Float32Array;
  /** Path m is points offsets[m] to offsets[m + 1] - 1. */
  offsets: Int32Array;
  /** One CSS colour per path. */
  colours: string[];
  target: Vec3 | null;
  theme: SphereColours;
  /** Side of the canvas in CSS pixels, and device pixels per CSS pixel. */
  size: number;
  dpr: number;
}

/** Total drawn length (device pixels) up to which paths keep their wide strokes; longer sets are drawn one device pixel wide. */
export const WIDE_STROKE_PIXELS = 20_000;
/** Points drawn in a frame while the sphere is turned: a larger set shows every n-th point until the turning pauses. */
export const PREVIEW_POINTS = 10_000;

/** Points and length on screen (device pixels, an upper bound in any view) of a scene's paths. */
export function sceneSize(scene: BlochScene): { points: number; pixels: number } {
  const { paths, offsets } = scene;
  const scale = scene.size * SPHERE_RADIUS * scene.dpr;
  let length = 0;
  for (let m = 0; m + 1 < offsets.length; m++) {
    for (let k = offsets[m]; k + 1 < offsets[m + 1]; k++) {
      const dx = paths[3 * k + 3] - paths[3 * k], dy = paths[3 * k + 4] - paths[3 * k + 1], dz = paths[3 * k + 5] - paths[3 * k + 2];
      length += Math.sqrt(dx * dx + dy * dy + dz * dz);
    }
  }
  return { points: offsets[offsets.length - 1] ?? 0, pixels: length * scale };
}

/** Line width (CSS pixels) of the paths: wide for a few short paths, one device pixel for long sets (the canvas's fast hairline). */
export function pathWidth(scene: BlochScene, pixels: number): number {
  if (pixels > WIDE_STROKE_PIXELS) return 1 / scene.dpr;
  return scene.offsets.length - 1 > 3 ? 1.3 : 2;
}

/** A drawing in steps: the sphere first, then the paths in parts (`steps`), then the marks and the labels above them. */
export interface Painting {
  /** Draws the next part; false once everything is drawn. */
  step(): boolean;
}

/** How to paint: `stride` > 1 draws every stride-th point of each path (a preview while turning); `partPixels`: about how much path length (device pixels) one step draws; `pixels`: the scene's length (sceneSize), when known. */
export interface PaintOptions {
  stride?: number;
  partPixels?: number;
  pixels?: number;
}

/** Starts drawing `scene` in `view` on `ctx` (cleared first, scaled by the device pixel ratio). */
export function paint(ctx: OffscreenCanvasRenderingContext2D | CanvasRenderingContext2D, scene: BlochScene, view: View, options: PaintOptions = {}): Painting {
  const stride = options.stride ?? 1;
  const partPixels = options.partPixels ?? Infinity;
  const { size, dpr, theme: colours, paths, offsets } = scene;
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  ctx.clearRect(0, 0, size, size);
  const r = size * SPHERE_RADIUS;
  const cx = size / 2;
  const cy = size / 2;
  const at = (v: Vec3) => {
    const p = project(v, view);
    return { x: cx + r * p.x, y: cy - r * p.y, depth: p.depth };
  };
  drawFrame(ctx, at, cx, cy, r, colours);

  const count = offsets.length - 1;
  const pixels = options.pixels ?? sceneSize(scene).pixels;
  const width = stride > 1 ? 1 / dpr : pathWidth(scene, pixels);
  // The view's projection as plain numbers: millions of points may go through it.
  const cyaw = Math.cos(view.yaw), syaw = Math.sin(view.yaw), cp = Math.cos(view.pitch), sp = Math.sin(view.pitch);
  let longest = 0;
  for (let m = 0; m < count; m++) longest = Math.max(longest, offsets[m + 1] - offsets[m]);
  const screen = new Float32Array(3 * Math.ceil(longest / stride + 1));
  const project3 = (m: number): number => {
    const from = offsets[m], to = offsets[m + 1];
    let n = 0;
    for (let k = from; k < to; k += stride) n = put(n, k);
    if (to - from > 1 && (to - 1 - from) % stride !== 0) n = put(n, to - 1);
    return n;
  };
  function put(n: number, k: number): number {
    const x = paths[3 * k], y = paths[3 * k + 1], z = paths[3 * k + 2];
    const rx = cyaw * y - syaw * x, ry = cyaw * x + syaw * y;
    screen[3 * n] = cx + r * rx;
    screen[3 * n + 1] = cy - r * (z * cp - ry * sp);
    screen[3 * n + 2] = ry * cp + z * sp;
    return n + 1;
  }
  // Each path in two strokes, the part behind the sphere faint and the part in front solid,
  // every path's back before any path's front; runs of segments on one side are one sub-path.
  const strokes: Array<{ m: number; behind: boolean }> = [];
  for (const behind of [true, false]) for (let m = 0; m < count; m++) strokes.push({ m, behind });
  const perPixel = Math.max(1, pixels) / Math.max(1, 2 * count);
  let next = 0;
  const marks = () => {
    ctx.globalAlpha = 1;
    const first = [...Array(count).keys()].find((m) => offsets[m + 1] - offsets[m] >= 2);
    if (first !== undefined) {
      const k = offsets[first];
      const s = at([paths[3 * k], paths[3 * k + 1], paths[3 * k + 2]]);
      ctx.fillStyle = scene.colours[first];
      ctx.beginPath();
      ctx.arc(s.x, s.y, 5, 0, 2 * Math.PI);
      ctx.fill();
    }
    for (let m = 0; m < count; m++) {
      if (offsets[m + 1] - offsets[m] < 2) continue;
      const k = offsets[m + 1] - 1;
      const e = at([paths[3 * k], paths[3 * k + 1], paths[3 * k + 2]]);
      ctx.fillStyle = colours.text;
      ctx.fillRect(e.x - 4, e.y - 4, 8, 8);
      ctx.fillStyle = scene.colours[m];
      ctx.fillRect(e.x - 2.5, e.y - 2.5, 5, 5);
    }
    // Labels and the target's ring last: many members' paths would hide them.
    drawLabels(ctx, at, colours, scene.target);
  };
  return {
    step(): boolean {
      if (next > strokes.length) return false;
      let drawn = 0;
      while (next < strokes.length && drawn < partPixels) {
        const { m, behind } = strokes[next++];
        const n = project3(m);
        drawn += perPixel;
        if (n < 2) continue;
        ctx.strokeStyle = scene.colours[m];
        ctx.lineWidth = width;
        ctx.globalAlpha = behind ? 0.35 : 1;
        ctx.beginPath();
        let open = false;
        for (let k = 0; k + 1 < n; k++) {
          if (screen[3 * k + 2] + screen[3 * k + 5] < 0 !== behind) {
            open = false;
            continue;
          }
          if (!open) ctx.moveTo(screen[3 * k], screen[3 * k + 1]);
          ctx.lineTo(screen[3 * k + 3], screen[3 * k + 4]);
          open = true;
        }
        ctx.stroke();
      }
      if (next < strokes.length) return true;
      marks();
      next++;
      return false;
    },
  };
}

/** The sphere's outline, equator and meridians (dashed behind), and the axes. */
function drawFrame(
  ctx: OffscreenCanvasRenderingContext2D | CanvasRenderingContext2D,
  at: (v: Vec3) => { x: number; y: number; depth: number },
  cx: number,
  cy: number,
  r: number,
  colours: SphereColours,
): void {
  ctx.strokeStyle = colours.muted;
  ctx.lineWidth = 1.2;
  ctx.beginPath();
  ctx.arc(cx, cy, r, 0, 2 * Math.PI);
  ctx.stroke();

  const circle = (point: (t: number) => Vec3) => {
    for (let k = 0; k < 96; k++) {
      const a = at(point((2 * Math.PI * k) / 96));
      const b = at(point((2 * Math.PI * (k + 1)) / 96));
      ctx.setLineDash(a.depth + b.depth < 0 ? [3, 4] : []);
      ctx.globalAlpha = a.depth + b.depth < 0 ? 0.45 : 0.8;
      ctx.beginPath();
      ctx.moveTo(a.x, a.y);
      ctx.lineTo(b.x, b.y);
      ctx.stroke();
    }
    ctx.setLineDash([]);
    ctx.globalAlpha = 1;
  };
  ctx.strokeStyle = colours.grid;
  ctx.lineWidth = 1;
  circle((t) => [Math.cos(t), Math.sin(t), 0]);
  circle((t) => [Math.cos(t), 0, Math.sin(t)]);
  circle((t) => [0, Math.cos(t), Math.sin(t)]);

  for (const [v] of AXES) {
    const o = at([0, 0, 0]);
    const e = at(v);
    ctx.strokeStyle = colours.muted;
    ctx.globalAlpha = e.depth < 0 ? 0.4 : 0.9;
    ctx.beginPath();
    ctx.moveTo(o.x, o.y);
    ctx.lineTo(e.x, e.y);
    ctx.stroke();
  }
  ctx.globalAlpha = 1;
}

/** The axes' ends and their labels. */
const AXES: [Vec3, string][] = [
  [[1, 0, 0], 'x'],
  [[0, 1, 0], 'y'],
  [[0, 0, 1], '|0⟩ z'],
  [[0, 0, -1], '|1⟩'],
  [[-1, 0, 0], '−x'],
  [[0, -1, 0], '−y'],
];

/** The axes' labels and the target's ring with its label, drawn over the paths. */
function drawLabels(
  ctx: OffscreenCanvasRenderingContext2D | CanvasRenderingContext2D,
  at: (v: Vec3) => { x: number; y: number; depth: number },
  colours: SphereColours,
  target: Vec3 | null,
): void {
  ctx.font = '13px system-ui, sans-serif';
  ctx.textAlign = 'center';
  ctx.textBaseline = 'middle';
  ctx.fillStyle = colours.text;
  for (const [v, label] of AXES) {
    const l = at([v[0] * 1.16, v[1] * 1.16, v[2] * 1.16]);
    ctx.globalAlpha = at(v).depth < 0 ? 0.4 : 0.9;
    ctx.fillText(label, l.x, l.y);
  }

  if (target) {
    const t = at(target);
    ctx.strokeStyle = '#d55e00';
    ctx.lineWidth = 2.5;
    ctx.globalAlpha = t.depth < 0 ? 0.55 : 1;
    ctx.beginPath();
    ctx.arc(t.x, t.y, 9, 0, 2 * Math.PI);
    ctx.stroke();
    // The label whole, on a rim of the panel's colour, over the paths' ends around the target.
    ctx.globalAlpha = 1;
    ctx.strokeStyle = colours.panel;
    ctx.lineWidth = 3;
    ctx.lineJoin = 'round';
    ctx.strokeText('target', t.x + 30, t.y - 12);
    ctx.fillStyle = '#d55e00';
    ctx.fillText('target', t.x + 30, t.y - 12);
  }
}
