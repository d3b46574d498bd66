// The Bloch sphere's painter: a worker of the page that draws the sphere and the paths on
// an OffscreenCanvas and sends each finished picture back as an ImageBitmap, which the page
// puts on its canvas in one copy. An ensemble's paths at 100 000 samples are millions of
// points, far too many to draw on the page's thread.
//
// Messages in: { paths, offsets } (new paths, moved), { style } (colours, target, theme,
// size), { view } (the sphere turned). Out: a PainterFrame (the picture, the painter's time
// for it, whether it shows every n-th point only, and how many paths it shows).
// A picture too large for one frame is drawn in parts on a back canvas, giving way to newer
// messages between parts; while the sphere is being turned such a scene shows every n-th point
// (PREVIEW_POINTS a frame), and the whole picture follows once the turning pauses.
import { DEFAULT_VIEW, type View } from './bloch.ts';
import { paint, PREVIEW_POINTS, sceneSize, type BlochScene } from './bloch-draw.ts';

/** A message to the painter. */
export type PainterMessage =
  | { paths: Float32Array; offsets: Int32Array }
  | { style: Omit<BlochScene, 'paths' | 'offsets'> }
  | { view: View };

/** Path length (device pixels) above which the whole picture no longer fits a frame: turning shows a preview. */
const FRAME_PIXELS = 1_000_000;
/** Path length drawn between two looks at the message queue. */
const PART_PIXELS = 300_000;
/** Quiet time after the last turn before the whole picture is drawn (ms). */
const SETTLE_MS = 150;

let scene: BlochScene = { paths: new Float32Array(0), offsets: new Int32Array(1), colours: [], target: null, theme: { text: '#222', muted: '#666', grid: '#ddd', panel: '#fff' }, size: 420, dpr: 1 };
let measured = { points: 0, pixels: 0 };
let view: View = { ...DEFAULT_VIEW };
let styled = false;
/** Bumped by every message: a drawing that sees it change gives way. */
let generation = 0;
let turning = false;
let queued = false;
let settle: ReturnType<typeof setTimeout> | undefined;

/** A finished picture for the page. */
export interface PainterFrame {
  bitmap: ImageBitmap;
  /** The painter's time for it (ms), from the message that asked for it. */
  ms: number;
  /** True while turning a large scene: every n-th point only. */
  preview: boolean;
  /** Paths in the picture. */
  paths: number;
}

const post = (frame: PainterFrame) => (self as unknown as Worker).postMessage(frame, [frame.bitmap as unknown as Transferable]);
const nextTask = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

self.onmessage = (event: MessageEvent<PainterMessage>) => {
  const message = event.data;
  if ('paths' in message) {
    scene = { ...scene, paths: message.paths, offsets: message.offsets };
    measured = sceneSize(scene);
    turning = false;
  } else if ('style' in message) {
    scene = { ...scene, ...message.style };
    measured = sceneSize(scene);
    styled = true;
    turning = false;
  } else {
    view = message.view;
    turning = true;
  }
  generation++;
  if (!queued) {
    queued = true;
    setTimeout(() => void draw(), 0);
  }
};

async function draw(): Promise<void> {
  queued = false;
  clearTimeout(settle);
  if (!styled) return;
  const mine = generation;
  const t0 = performance.now();
  const width = Math.round(scene.size * scene.dpr);
  const canvas = new OffscreenCanvas(width, width);
  const ctx = canvas.getContext('2d');
  if (!ctx) return;
  const heavy = measured.points > PREVIEW_POINTS || measured.pixels > FRAME_PIXELS;
  if (heavy && turning) {
    paint(ctx, scene, view, { stride: Math.ceil(measured.points / PREVIEW_POINTS), pixels: measured.pixels }).step();
    post({ bitmap: canvas.transferToImageBitmap(), ms: performance.now() - t0, preview: true, paths: scene.offsets.length - 1 });
    settle = setTimeout(() => {
      if (generation !== mine) return;
      turning = false;
      void draw();
    }, SETTLE_MS);
    return;
  }
  const painting = paint(ctx, scene, view, { partPixels: PART_PIXELS, pixels: measured.pixels });
  while (painting.step()) {
    // Raster what is recorded so far (the canvas defers it), then let newer messages in.
    ctx.getImageData(0, 0, 1, 1);
    await nextTask();
    if (generation !== mine) return;
  }
  post({ bitmap: canvas.transferToImageBitmap(), ms: performance.now() - t0, preview: false, paths: scene.offsets.length - 1 });
}
