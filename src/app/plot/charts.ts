// chart.js set up once for the page: only the parts the views use, no animation (charts
// redraw live), colours from the page's theme, and a colour-blind-safe series palette.
import {
  Chart,
  Decimation,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  LogarithmicScale,
  PointElement,
  Tooltip,
} from 'chart.js';
import type { Plugin, TooltipItem } from 'chart.js';
import { engineeringUnit, formatFigure, type Quantity } from '../units.ts';

Chart.register(LineController, LineElement, PointElement, LinearScale, LogarithmicScale, Tooltip, Legend, Decimation);
Chart.defaults.animation = false;
Chart.defaults.responsive = true;
Chart.defaults.maintainAspectRatio = false;

/** Okabe and Ito's palette (Color Universal Design, 2002), distinguishable with common colour-vision deficiencies. */
export const PALETTE = ['#0072b2', '#e69f00', '#009e73', '#cc79a7', '#56b4e9', '#d55e00', '#f0e442', '#999999'];

/** A series colour by index. */
export function seriesColour(k: number): string {
  return PALETTE[k % PALETTE.length];
}

/** Colours of the page's theme. */
export interface ThemeColours {
  text: string;
  muted: string;
  grid: string;
  /** Background of the panels the charts sit on. */
  panel: string;
  i: string;
  q: string;
  limit: string;
}

let cached: ThemeColours | null = null;
// Reading computed styles forces a style pass: read them once per colour scheme, not per
// redraw. When the scheme changes, every chart on the page takes the new text and grid colours.
if (typeof matchMedia === 'function') {
  matchMedia('(prefers-color-scheme: dark)').addEventListener('change', () => {
    cached = null;
    for (const chart of Object.values(Chart.instances)) retheme(chart as Chart);
  });
}

/** Gives a chart the theme's text, tick, grid and legend colours (series colours are set when drawn). */
export function retheme(chart: Chart, colours = theme()): void {
  const options = chart.options as { color?: string; scales?: Record<string, { ticks?: { color?: string }; grid?: { color?: string }; title?: { color?: string } }>; plugins?: { legend?: { labels?: { color?: string } } } };
  options.color = colours.text;
  for (const scale of Object.values(options.scales ?? {})) {
    if (scale.ticks) scale.ticks.color = colours.muted;
    if (scale.grid) scale.grid.color = colours.grid;
    if (scale.title) scale.title.color = colours.text;
  }
  if (options.plugins?.legend?.labels) options.plugins.legend.labels.color = colours.text;
  chart.update('none');
}

/** The page's theme colours as chart.js wants them. */
export function theme(): ThemeColours {
  if (cached) return cached;
  cached = readTheme();
  return cached;
}

function readTheme(): ThemeColours {
  const css = getComputedStyle(document.documentElement);
  const read = (name: string, fallback: string) => css.getPropertyValue(name).trim() || fallback;
  return {
    text: read('--text', '#222'),
    muted: read('--muted', '#666'),
    grid: read('--grid', 'rgba(0,0,0,0.1)'),
    panel: read('--panel', '#fff'),
    i: read('--series-i', '#0072b2'),
    q: read('--series-q', '#d55e00'),
    limit: read('--limit', '#777'),
  };
}

/** The unit a set of values is best printed in ("ns", "MHz"), from its largest magnitude. */
export function displayUnit(largest: number, quantity: Quantity): { symbol: string; scale: number } {
  const unit = engineeringUnit(Math.abs(largest) || 1, quantity);
  return unit ? { symbol: unit.symbol, scale: 10 ** unit.exponent } : { symbol: '', scale: 1 };
}

/**
 * Replaces the datasets' points, keeping the dataset objects (and so chart.js's controllers
 * and element caches) when the set of curves is unchanged: rebuilding them on every redraw
 * costs tens of milliseconds on a software-rendered page.
 */
export function setDatasets(chart: Chart<'line'>, next: Array<{ label: string; data: { x: number; y: number }[] } & Record<string, unknown>>): void {
  const current = chart.data.datasets;
  const same = current.length === next.length && current.every((d, k) => d.label === next[k].label);
  if (!same) {
    chart.data.datasets = next as never;
    return;
  }
  next.forEach((d, k) => Object.assign(current[k], d));
}

const queue: Array<() => void> = [];
let frameRequested = false;

function runOne(): void {
  frameRequested = false;
  const job = queue.shift();
  job?.();
  if (queue.length) {
    frameRequested = true;
    requestAnimationFrame(runOne);
  }
}

/**
 * Runs `draw` in an animation frame of its own: two charts redrawing in the same frame
 * would add up to one long task, so the page draws at most one chart per frame.
 */
export function drawInFrame(draw: () => void): void {
  if (!queue.includes(draw)) queue.push(draw);
  if (!frameRequested) {
    frameRequested = true;
    requestAnimationFrame(runOne);
  }
}

/**
 * Redraws a chart on its own clock: while data streams in, at most once every `gapMs` (about
 * four a second: live enough to watch, cheap enough to leave the page responsive); asked
 * `soon`, in the next frame, so that the last state of a run is never left a redraw behind.
 */
export class Redraw {
  private pending = false;
  private last = 0;
  private timer: ReturnType<typeof setTimeout> | null = null;

  constructor(
    private readonly draw: () => void,
    private readonly gapMs = 250,
  ) {}

  /** Asks for a redraw: after the gap, or `soon` (the next frame). */
  request(soon = false): void {
    if (soon && this.timer !== null) {
      clearTimeout(this.timer);
      this.timer = null;
      drawInFrame(this.run);
      return;
    }
    if (this.pending) return;
    this.pending = true;
    if (soon) {
      drawInFrame(this.run);
      return;
    }
    this.timer = setTimeout(() => {
      this.timer = null;
      drawInFrame(this.run);
    }, Math.max(0, this.gapMs - (performance.now() - this.last)));
  }

  private readonly run = (): void => {
    this.pending = false;
    this.last = performance.now();
    this.draw();
  };
}

/** Tick and grid colours of the theme for one axis. */
export function axisStyle(colours = theme()): { ticks: { color: string }; grid: { color: string } } {
  return { ticks: { color: colours.muted }, grid: { color: colours.grid } };
}

/** An axis title in the theme's colour. */
export function axisTitle(text: string, colours = theme()): { display: true; text: string; color: string } {
  return { display: true, text, color: colours.text };
}

/** Legend labels in the theme's colour, drawn as short lines. */
export function legendLabels(colours = theme()): { color: string; boxWidth: number; boxHeight: number } {
  return { color: colours.text, boxWidth: 14, boxHeight: 2 };
}

/** What differs between the page's line charts. */
export interface LineChartSpec {
  xTitle: string;
  yTitle: string;
  yType?: 'linear' | 'logarithmic';
  /** Extra y-axis settings (limits, tick callback). */
  y?: Record<string, unknown>;
  /** Further axes by id (a second y axis). */
  scales?: Record<string, unknown>;
  interaction: { mode: 'index' | 'nearest'; intersect: boolean; axis?: 'x' };
  /** Hides legend entries by their text. */
  legendFilter?: (text: string) => boolean;
  tooltip?: Record<string, unknown>;
  /** Thins long curves to a few points per pixel column. */
  decimate?: boolean;
  /** Called with the x-axis value under the pointer as it moves over the chart. */
  onHover?: (x: number) => void;
  /** The chart's own drawing steps (chart.js inline plugins). */
  plugins?: Plugin<'line'>[];
}

/** The property of a chart's canvas that holds the chart: the page's tests read its scales and data there. */
export const CHART_PROPERTY = 'gatesmithChart';

/** A themed line chart over x/y points (no parsing, no animation), empty until datasets are set. */
export function lineChart(canvas: HTMLCanvasElement, spec: LineChartSpec): Chart<'line'> {
  const colours = theme();
  const filter = spec.legendFilter;
  const chart = new Chart(canvas, {
    type: 'line',
    data: { datasets: [] },
    plugins: spec.plugins ?? [],
    options: {
      color: colours.text,
      parsing: false,
      normalized: true,
      interaction: spec.interaction,
      ...(spec.onHover ? { onHover: (event: { x: number | null }, _: unknown, chart: Chart) => spec.onHover!(chart.scales.x.getValueForPixel(event.x ?? NaN) ?? NaN) } : {}),
      scales: {
        x: { type: 'linear', ...axisStyle(colours), title: axisTitle(spec.xTitle, colours) },
        y: { type: spec.yType ?? 'linear', ...axisStyle(colours), title: axisTitle(spec.yTitle, colours), ...spec.y },
        ...spec.scales,
      },
      plugins: {
        legend: { labels: { ...legendLabels(colours), ...(filter ? { filter: (item: { text: string }) => filter(item.text) } : {}) } },
        tooltip: spec.tooltip ?? {},
        ...(spec.decimate ? { decimation: { enabled: true, algorithm: 'min-max' as const } } : {}),
      },
    } as never,
  });
  Object.defineProperty(canvas, CHART_PROPERTY, { value: chart, configurable: true });
  return chart;
}

/** Decade ticks of a log axis, printed as 1e-4 rather than 0.0001. */
export function logTick(value: number | string): string {
  const v = Number(value);
  const exponent = Math.log10(v);
  return Math.abs(exponent - Math.round(exponent)) < 1e-9 ? `1e${Math.round(exponent)}` : '';
}

/** A y axis of infidelity 1 − F on a log scale up to 1, with decade ticks, for `lineChart`. */
export function infidelityAxis(yTitle: string, colours = theme()): Pick<LineChartSpec, 'yTitle' | 'yType' | 'y'> {
  return { yTitle, yType: 'logarithmic', y: { max: 1, ticks: { color: colours.muted, callback: logTick, autoSkip: true } } };
}

/** Tooltips that read a point of an infidelity chart: "series: 1.2e-4" and where it is (`at(x)`). */
export function infidelityTooltip(at: (x: number) => string): Record<string, unknown> {
  return {
    callbacks: {
      label: (item: TooltipItem<'line'>) => {
        const point = item.raw as { x: number; y: number };
        return `${item.dataset.label}: ${formatFigure(point.y)} ${at(point.x)}`;
      },
    },
  };
}

/** One curve of a cut chart: values along an error axis (Hz or relative) and their infidelities. */
export interface CutSeries {
  label: string;
  colour: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Dashed (a ladder's leakage beside the infidelity of the same pulse). */
  dashed?: boolean;
}

/** A pulse's cut along one axis as chart series: its infidelity and, on a ladder, its leakage dashed in the same colour. */
export function cutSeriesOf(label: string, colour: string, x: ArrayLike<number>, infidelity: ArrayLike<number>, leakage?: ArrayLike<number>): CutSeries[] {
  const series: CutSeries[] = [{ label: leakage ? `${label}: 1 − F` : label, colour, x, y: infidelity }];
  if (leakage) series.push({ label: `${label}: leakage L`, colour, x, y: leakage, dashed: true });
  return series;
}

export { Chart };
