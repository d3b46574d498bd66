// What the app draws, checked against the samples it was given, in Debian's Chromium
// (playwright-core) on the production build. A piecewise-constant pulse holds sample k over
// [k dt, (k + 1) dt) (the model of docs/physics.md section 1); the charts' scales and data
// are read from the page and their pixels sampled where a sample must (and must not) be drawn.
// Each test leaves screenshots in test-results/ (light and dark, 1440 and 800 px wide).
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { screenshot, skipReason, typeInto, type Visit } from './harness.ts';
import { openPulse, openReady, screenshotsEverywhere, useHarness } from './screens.ts';

const reason = skipReason();
if (reason) console.warn(`browser tests skipped: ${reason}`);

/** A pulse of 10 samples of 10 ns whose only drive is 5 MHz on I in sample 4, i.e. over 40-50 ns. */
const SPIKE = { dt: 1e-8, i: [0, 0, 0, 0, 5e6, 0, 0, 0, 0, 0], q: new Array(10).fill(0), metadata: { name: 'spike' } };

interface Probe {
  /** Series label. */
  label: string;
  /** Position in the chart's units (the x and y axes' display units). */
  x: number;
  y: number;
}

/** The x axis of the chart on a canvas: its range and title. */
async function xAxis(page: Page, testid: string): Promise<{ min: number; max: number; title: string }> {
  return page.evaluate((id) => {
    const chart = (document.querySelector(`[data-testid=${id}]`) as unknown as { gatesmithChart: { scales: Record<string, { min: number; max: number; options: { title: { text: string } } }> } }).gatesmithChart;
    const x = chart.scales.x;
    return { min: x.min, max: x.max, title: x.options.title.text };
  }, testid);
}

/** The points of a series of the chart on a canvas (its label, or its label and a note in brackets: "start 2 (pruned)"). */
async function seriesData(page: Page, testid: string, label: string): Promise<{ x: number; y: number | null }[]> {
  return page.evaluate(
    ([id, name]) => {
      const chart = (document.querySelector(`[data-testid=${id}]`) as unknown as { gatesmithChart: { data: { datasets: { label: string; data: { x: number; y: number }[] }[] } } }).gatesmithChart;
      const set = chart.data.datasets.find((d) => d.label === name || d.label.startsWith(`${name} (`));
      return set ? set.data.map((p) => ({ x: p.x, y: Number.isFinite(p.y) ? p.y : null })) : [];
    },
    [testid, label] as const,
  );
}

/** Labels of the chart's series. */
async function seriesLabels(page: Page, testid: string): Promise<string[]> {
  return page.evaluate((id) => {
    const chart = (document.querySelector(`[data-testid=${id}]`) as unknown as { gatesmithChart: { data: { datasets: { label: string }[] } } }).gatesmithChart;
    return chart.data.datasets.map((d) => d.label);
  }, testid);
}

/** For each probe: whether a pixel of the series' colour lies within 2 px of where (x, y) is drawn. */
async function drawnAt(page: Page, testid: string, probes: Probe[]): Promise<boolean[]> {
  return page.evaluate(
    ([id, list]) => {
      type Scale = { getPixelForValue(v: number): number };
      type Set = { label: string; borderColor: string; yAxisID?: string };
      const canvas = document.querySelector(`[data-testid=${id}]`) as HTMLCanvasElement & {
        gatesmithChart: { scales: Record<string, Scale>; data: { datasets: Set[] }; currentDevicePixelRatio: number };
      };
      const chart = canvas.gatesmithChart;
      const image = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height);
      const ratio = chart.currentDevicePixelRatio;
      return list.map((probe) => {
        const set = chart.data.datasets.find((d) => d.label === probe.label)!;
        const hex = set.borderColor.slice(1, 7);
        const rgb = [0, 2, 4].map((k) => parseInt(hex.slice(k, k + 2), 16));
        const px = Math.round(chart.scales.x.getPixelForValue(probe.x) * ratio);
        const py = Math.round(chart.scales[set.yAxisID ?? 'y'].getPixelForValue(probe.y) * ratio);
        for (let dy = -2; dy <= 2; dy++) {
          for (let dx = -2; dx <= 2; dx++) {
            const at = 4 * ((py + dy) * image.width + (px + dx));
            const distance = Math.hypot(image.data[at] - rgb[0], image.data[at + 1] - rgb[1], image.data[at + 2] - rgb[2]);
            if (image.data[at + 3] > 200 && distance < 60) return true;
          }
        }
        return false;
      });
    },
    [testid, probes] as const,
  );
}

/** Waits until the chart on a canvas holds a series with this label and some points. */
async function drawn(page: Page, testid: string, label: string): Promise<void> {
  await page.waitForFunction(
    ([id, name]) => {
      const chart = (document.querySelector(`[data-testid=${id}]`) as unknown as { gatesmithChart?: { data: { datasets: { label: string; data: unknown[] }[] } } } | null)?.gatesmithChart;
      return chart?.data.datasets.some((d) => d.label === name && d.data.length > 0) ?? false;
    },
    [testid, label] as const,
    { timeout: 30_000 },
  );
  // The chart redraws on its own clock (a few times a second): let the last redraw land.
  await page.waitForTimeout(400);
}

describe.skipIf(reason !== null)('what the app draws, in Chromium', () => {
  const harness = useHarness();
  const fresh = (): Promise<Visit> => openReady(harness());

  it('draws sample k of the waveform over [k dt, (k+1) dt), on an axis that ends with the pulse', async () => {
    const { page } = await fresh();
    await openPulse(page, 'spike.json', SPIKE);
    await page.keyboard.press('Alt+2');
    await drawn(page, 'waveform-chart', 'I');
    const axis = await xAxis(page, 'waveform-chart');
    expect(axis.title).toBe('time (ns)');
    // 10 samples of 10 ns: the axis spans the pulse, 0 to 100 ns, and no further.
    expect([axis.min, axis.max]).toEqual([0, 100]);
    // The 5 MHz sample is drawn over 40-50 ns and not over 30-40 ns; zero before and after.
    const [in41, in49, in31, in39, zero35, zero55, zero5] = await drawnAt(page, 'waveform-chart', [
      { label: 'I', x: 41, y: 5 },
      { label: 'I', x: 49, y: 5 },
      { label: 'I', x: 31, y: 5 },
      { label: 'I', x: 39, y: 5 },
      { label: 'I', x: 35, y: 0 },
      { label: 'I', x: 55, y: 0 },
      { label: 'I', x: 5, y: 0 },
    ]);
    expect({ in41, in49, in31, in39 }).toEqual({ in41: true, in49: true, in31: false, in39: false });
    expect({ zero35, zero55, zero5 }).toEqual({ zero35: true, zero55: true, zero5: true });
    // The demo's bound is the disc sqrt(I^2 + Q^2) <= peak: no per-channel limit lines on I and Q.
    expect(await seriesLabels(page, 'waveform-chart')).toEqual(['I', 'Q']);
    expect(await page.getByTestId('waveform-limit-note').textContent()).toContain('√(I² + Q²)');
    await screenshot(page, 'display-01-spike-iq');

    await page.getByLabel('amplitude and phase').check();
    await drawn(page, 'waveform-chart', 'amplitude');
    const [a45, a35] = await drawnAt(page, 'waveform-chart', [
      { label: 'amplitude', x: 45, y: 5 },
      { label: 'amplitude', x: 35, y: 5 },
    ]);
    expect({ a45, a35 }).toEqual({ a45: true, a35: false });
    // The limit of the amplitude view: 10 MHz, the demo's peak Rabi frequency.
    const limit = await seriesData(page, 'waveform-chart', 'limit');
    expect(limit.map((p) => p.y)).toEqual([10, 10]);
    // A sample of zero amplitude has no phase: nothing is drawn there (a gap), only 0° over 40-50 ns.
    const phase = await seriesData(page, 'waveform-chart', 'phase');
    const defined = phase.filter((p) => p.y !== null).map((p) => ({ x: Number(p.x.toPrecision(9)), y: p.y }));
    expect(defined).toEqual([{ x: 40, y: 0 }, { x: 50, y: 0 }]);
    await screenshot(page, 'display-02-spike-polar');
  }, 120_000);

  it('draws the exported waveform with its padding before the pulse at zero', async () => {
    const { page } = await fresh();
    await openPulse(page, 'spike.json', SPIKE);
    await page.keyboard.press('Alt+6');
    // 1 GS/s: 100 samples of the design; 200 at least, padded before: 100 ns of zeros first.
    await page.locator('#x-pad').selectOption('before');
    await typeInto(page, '#x-min-length', '200');
    await page.waitForFunction(() => document.querySelector('[data-testid=export-panel]')?.getAttribute('data-state') === 'ready', undefined, { timeout: 30_000 });
    await drawn(page, 'export-chart', 'I exported');
    const axis = await xAxis(page, 'export-chart');
    expect([axis.min, axis.max]).toEqual([0, 200]);
    const [pad50, pad99, at145, at135, design145] = await drawnAt(page, 'export-chart', [
      { label: 'I exported', x: 50, y: 5 },
      { label: 'I exported', x: 99, y: 5 },
      { label: 'I exported', x: 145, y: 5 },
      { label: 'I exported', x: 135, y: 5 },
      { label: 'I design', x: 145, y: 5 },
    ]);
    expect({ pad50, pad99, at145, at135, design145 }).toEqual({ pad50: false, pad99: false, at145: true, at135: false, design145: true });
    await screenshot(page, 'display-03-export-padding');
  }, 120_000);

  it('shows, while a run goes, the figures of the pulse it draws, and every start\'s whole curve', async () => {
    const { page } = await fresh();
    // 5 starts of at most 1500 iterations each (more than a record keeps a start: it thins them).
    await typeInto(page, '#f-iterations', '1500');
    await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement).disabled);
    await page.getByTestId('run').click();
    // Sampled while the run goes: the pulse the figures are of is the pulse drawn.
    const seen: Array<{ figures: string; caption: string }> = [];
    for (let k = 0; k < 40; k++) {
      const state = await page.evaluate(() => {
        const figures = document.querySelector('[data-testid=run-figures]');
        const caption = document.querySelector('[data-testid=live-caption]');
        const status = document.querySelector('[data-testid=run-status]')?.textContent ?? '';
        const of = (e: Element | null) => (e ? `${e.getAttribute('data-start')}/${e.getAttribute('data-iteration')}` : '');
        return { figures: of(figures), caption: of(caption), done: /^(done|stopped)/.test(status) };
      });
      if (state.done) break;
      if (state.caption) seen.push({ figures: state.figures, caption: state.caption });
      await page.waitForTimeout(60);
    }
    expect(seen.length).toBeGreaterThan(0);
    for (const s of seen) expect(s.figures).toBe(s.caption);
    await page.waitForFunction(() => /^done/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 90_000 });
    await page.waitForTimeout(600);
    // Every start's curve runs from iteration 0 to the iterations the starts table gives it.
    const rows = await page.locator('table.starts tbody tr').evaluateAll((trs) =>
      trs.map((tr) => ({ start: parseInt(tr.children[0].textContent ?? '', 10), mean: tr.children[1].textContent?.trim(), iterations: Number(tr.children[2].textContent) })),
    );
    expect(rows.length).toBe(5);
    for (const row of rows) {
      const curve = await seriesData(page, 'convergence-chart', `start ${row.start}`);
      expect(curve[0].x).toBe(0);
      expect(curve.at(-1)!.x).toBe(row.iterations);
      // Every iteration is reported; a record keeps at most 600 points a start, evenly spread
      // (src/app/convergence.ts): no stretch drawn as one straight line.
      expect(curve.length).toBeGreaterThanOrEqual(Math.min(row.iterations + 1, 299));
      const gaps = curve.slice(1).map((p, k) => p.x - curve[k].x);
      expect(Math.max(...gaps)).toBeLessThanOrEqual(Math.max(1, (4 * row.iterations) / curve.length));
    }
    // The figures shown at the end are those of the best start's pulse.
    const best = await page.locator('table.starts tr.best td').first().textContent();
    const bestRow = rows.find((r) => best?.startsWith(String(r.start)))!;
    expect(await page.getByTestId('run-mean').textContent()).toBe(bestRow.mean);
    expect(await page.getByTestId('run-figures').getAttribute('data-start')).toBe(String(bestRow.start));
    await screenshot(page, 'display-04-run-figures');
  }, 150_000);

  it('makes the robustness region follow the spec until it is set by hand, and resets it', async () => {
    const { page } = await fresh();
    await openPulse(page, 'spike.json', SPIKE);
    await page.keyboard.press('Alt+3');
    // The transmon demo: +-1 MHz and +-10 % members, a region twice as wide.
    await page.waitForFunction(() => (document.querySelector('#m-d-max') as HTMLInputElement).value === '2 MHz');
    expect(await page.locator('#m-a-max').inputValue()).toBe('20 %');
    // The ion demo's +-5 kHz and Gaussian 2 % (largest Gauss-Hermite node of 5: 2.857 sigma, Abramowitz and Stegun table 25.10).
    await page.locator('#demo-picker').selectOption('ion-x180');
    await page.waitForFunction(() => (document.querySelector('#m-d-max') as HTMLInputElement).value === '10 kHz');
    expect(await page.locator('#m-a-max').inputValue()).toBe('12 %');
    expect(await page.getByTestId('region-mode').textContent()).toContain('follows the spec');
    // Set by hand: marked, kept when the spec changes, and reset on request.
    await typeInto(page, '#m-d-max', '30 kHz');
    await page.getByTestId('region-reset').waitFor();
    expect(await page.getByTestId('region-mode').textContent()).toContain('Region set by hand');
    await page.locator('#demo-picker').selectOption('transmon-x90');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '10 MHz');
    await page.waitForTimeout(300);
    expect(await page.locator('#m-d-max').inputValue()).toBe('30 kHz');
    await page.getByTestId('region-reset').click();
    await page.waitForFunction(() => (document.querySelector('#m-d-max') as HTMLInputElement).value === '2 MHz');
    await page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    await screenshot(page, 'display-05-region');
  }, 120_000);

  it('ends the axes of the cuts with the map\'s region (±12 % for the ion demo, not ±15 %)', async () => {
    const { page } = await fresh();
    await page.locator('#demo-picker').selectOption('ion-x180');
    await page.getByTestId('notice-action').waitFor();
    await openPulse(page, 'spike.json', SPIKE);
    await page.keyboard.press('Alt+3');
    // The ion demo's region: twice its ±5 kHz, and its Gaussian 2 % to the last of 5 Gauss-Hermite nodes, 2.857 sigma, doubled and rounded up: ±12 %.
    await page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    await drawn(page, 'cut-amplitude', 'spike.json');
    const amplitude = await xAxis(page, 'cut-amplitude');
    expect([amplitude.min, amplitude.max, amplitude.title]).toEqual([-12, 12, 'amplitude error ε (%)']);
    const detuning = await xAxis(page, 'cut-detuning');
    expect([detuning.min, detuning.max, detuning.title]).toEqual([-10, 10, 'detuning Δ (kHz)']);
    // The threshold line spans the same cut.
    expect((await seriesData(page, 'cut-amplitude', 'threshold')).map((p) => p.x)).toEqual([-12, 12]);
  }, 120_000);

  it('looks right in light and dark, at 1440 and 800 px wide: waveform and robustness (the design view after a run: convergence.test.ts)', async () => {
    for (const [name, key] of [['display-06-waveform', 'Alt+2'], ['display-07-robustness', 'Alt+3']] as const) {
      await screenshotsEverywhere(harness(), name, async (page) => {
        await openPulse(page, 'spike.json', SPIKE);
        await page.keyboard.press(key);
        await page.waitForTimeout(1200);
      });
    }
  }, 300_000);
});
