// The views engineers asked for, in Chromium against the production build: the spectrum,
// the sample table, the ensemble on the Bloch sphere, one pulse's map against another's,
// the run's history after a reload, and help for every field. Screenshots of each view in
// light and dark at 1440 and 800 px land in test-results/.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { demoSpec } from '../../src/app/demo.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { pulsePropagator, spinorToBloch } from '../reference/oracle.ts';
import { runToEnd, screenshot, skipReason, type Visit } from './harness.ts';
import { blochPixels, openPulse, openReady, screenshotLooks, useHarness } from './screens.ts';

const reason = skipReason();

/** Waits until the Bloch canvas shows a whole picture (not a preview while turning) of `paths` paths. */
const picture = (page: Page, paths: number) =>
  page.waitForFunction(
    (paths) => {
      const c = document.querySelector<HTMLCanvasElement>('[data-testid=bloch]');
      return c?.dataset.paths === String(paths) && c.dataset.preview === 'false';
    },
    paths,
    { timeout: 60_000 },
  );

/** A pulse file's text. */
const pulseFile = (dt: number, i: number[], q: number[] = i.map(() => 0), name = 'pulse') => Buffer.from(JSON.stringify({ dt, i, q, metadata: { name } }));

describe.skipIf(reason !== null)('views in Chromium', () => {
  const harness = useHarness();
  /** Every page opened: their console errors and uncaught exceptions are checked at the end. */
  const visits: Visit[] = [];

  async function open(): Promise<Page> {
    const opened = await openReady(harness());
    visits.push(opened);
    return opened.page;
  }


  it('draws the spectrum of a rectangular pulse: a sinc whose -3 dB points sit at ±0.442/T', async () => {
    const page = await open();
    // 100 samples of 2 ns at 5 MHz: T = 200 ns, so the nulls fall every 5 MHz.
    await openPulse(page, 'rect.json', pulseFile(2e-9, new Array(100).fill(5e6)));
    await page.keyboard.press('Alt+7');
    await page.getByRole('heading', { name: 'Spectrum' }).waitFor();
    await page.waitForFunction(() => /0 dB = /.test(document.querySelector('[data-testid=spectrum-status]')?.textContent ?? ''));
    // |X(0)| = A T = 5e6 * 200e-9 = 1 turn per Hz (the pulse area).
    expect(await page.getByTestId('spectrum-status').textContent()).toContain('0 dB = 1.000 turns/Hz');
    // sinc(x) = 10^(-3/20) at x = 0.4422 (solved in tests/core/spectrum.test.ts): the -3 dB span is ±0.4422 / T = ±2.211 MHz.
    const span = (await page.getByTestId('spectrum-3db').textContent())!;
    const [from, to] = [...span.matchAll(/(-?[\d.]+) MHz/g)].map((m) => Number(m[1]));
    expect(Math.abs(from + 2.211)).toBeLessThan(0.04);
    expect(Math.abs(to - 2.211)).toBeLessThan(0.04);
    const drawn = await page.evaluate(() => {
      const c = document.querySelector('[data-testid=spectrum-chart]') as HTMLCanvasElement;
      const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
      const colours = new Set<number>();
      for (let k = 0; k < data.length; k += 4) if (data[k + 3]) colours.add((data[k] << 16) | (data[k + 1] << 8) | data[k + 2]);
      return colours.size;
    });
    expect(drawn).toBeGreaterThan(20);
    await page.locator('#s-span').selectOption('rate');
    await page.waitForTimeout(300);
    await screenshotLooks(page, 'views-spectrum');
  }, 120_000);

  it('overlays the spectrum of the drive the qubit sees through the spec\'s line', async () => {
    const page = await open();
    const spec = JSON.parse(readFileSync('examples/transmon-x90-line.json', 'utf8'));
    await page.goto(`${harness().url}#spec=${encodeURIComponent(JSON.stringify(spec))}`);
    await page.reload();
    await page.getByTestId('run').waitFor();
    await openPulse(page, 'rect.json', pulseFile(2e-9, new Array(100).fill(5e6)));
    await page.keyboard.press('Alt+7');
    await page.getByTestId('spectrum-line').waitFor({ timeout: 30_000 });
    // A line of unit gain at zero frequency keeps the pulse's area, |X(0)| (an invariant of a normalised kernel).
    expect(await page.getByTestId('spectrum-line').textContent()).toContain('through the line: 0.00 dB at its peak');
    await page.locator('#s-span').selectOption('rate');
    await page.waitForTimeout(500);
    await screenshotLooks(page, 'views-spectrum-line');
  }, 120_000);

  it('lists the samples in a table to copy, sample k starting at k dt, paged for 100 000 samples', async () => {
    const page = await open();
    await page.context().grantPermissions(['clipboard-read', 'clipboard-write'], { origin: new URL(harness().url).origin });
    await openPulse(page, 'spike.json', pulseFile(10e-9, [0, 0, 0, 0, 5e6, 0, 0, 0, 0, 0]));
    await page.keyboard.press('Alt+2');
    await page.getByTestId('samples').locator('summary').click();
    const row = (k: number) => page.locator('[data-testid=samples-table] tbody tr').nth(k).locator('td').allTextContents();
    expect(await page.locator('[data-testid=samples-table] thead th').allTextContents()).toEqual(['sample', 'start (ns)', 'I (MHz)', 'Q (MHz)', 'amplitude (MHz)', 'phase (°)']);
    // The spike is sample 4, held from 40 ns to 50 ns.
    expect(await row(4)).toEqual(['4', '40', '5', '0', '5', '0']);
    await page.getByRole('button', { name: 'Copy as TSV' }).click();
    await page.getByTestId('samples-status').filter({ hasText: 'Copied 10 samples' }).waitFor();
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    expect(copied.split('\n')[5]).toBe('4\t40\t5\t0\t5\t0');
    await screenshotLooks(page, 'views-samples');

    const n = 100_000;
    await openPulse(page, 'long.json', pulseFile(1e-9, Array.from({ length: n }, (_, k) => (k % 7) * 1e6)));
    expect(await page.getByTestId('samples-page').textContent()).toBe('page 1 of 1000');
    await page.getByRole('button', { name: 'Last' }).click();
    expect((await row(99))[0]).toBe('99999');
    // Sample 99999 starts at 99.999 µs and holds (99999 mod 7) MHz = 4 MHz.
    expect(await row(99)).toEqual(['99999', '99.999', '4', '0', '4', '0']);
    await page.locator('#samples-goto').fill('12345');
    await page.getByRole('button', { name: 'Go', exact: true }).click();
    expect(await page.getByTestId('samples-page').textContent()).toBe('page 124 of 1000');
    await page.getByRole('button', { name: 'Copy as CSV' }).click();
    await page.getByTestId('samples-status').filter({ hasText: `Copied ${n} samples as CSV` }).waitFor({ timeout: 30_000 });
    const lines = await page.evaluate(async () => (await navigator.clipboard.readText()).trimEnd().split('\n').length);
    expect(lines).toBe(n + 1);
    // The spectrum of the long pulse is computed in the worker: |X(0)| is its area, sum of (k mod 7) MHz x 1 ns.
    await page.keyboard.press('Alt+7');
    await page.waitForFunction(() => /0 dB = /.test(document.querySelector('[data-testid=spectrum-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    const area = Array.from({ length: n }, (_, k) => (k % 7) * 1e6 * 1e-9).reduce((a, b) => a + b, 0);
    expect(await page.getByTestId('spectrum-status').textContent()).toContain(`0 dB = ${area.toPrecision(4)} turns/Hz`);
  }, 120_000);

  it('brings the convergence history and the starts table back with the pulse after a reload, and from a project file', async () => {
    const page = await open();
    await page.getByTestId('run').click();
    await runToEnd(page);
    const table = () => page.getByTestId('starts-table').locator('tbody tr').allTextContents();
    const before = await table();
    expect(before).toHaveLength(5);
    const curves = () => page.evaluate(() => Number(document.querySelector('[data-points]')?.getAttribute('data-points')));
    await page.waitForFunction(() => Number(document.querySelector('[data-points]')?.getAttribute('data-points')) > 0);
    // The lowest figure of the starts table, as the table prints it (three digits).
    const bestOfTable = async () => Math.min(...(await page.locator('[data-testid=starts-table] tbody tr td:nth-child(2)').allTextContents()).map(Number));
    const best = await bestOfTable();
    await page.waitForTimeout(800); // the autosave follows edits after 400 ms
    await page.reload();
    await page.getByTestId('starts-table').waitFor({ timeout: 20_000 });
    // The same starts, figure for figure, and curves drawn again down to the same best figure.
    expect(await table()).toEqual(before);
    await page.waitForFunction(() => Number(document.querySelector('[data-points]')?.getAttribute('data-points')) > 0);
    expect(await curves()).toBeGreaterThan(5);
    // The restored curves end at the best start's figure.
    await page.waitForFunction((want) => Number(Number(document.querySelector('[data-points]')?.getAttribute('data-last-mean')).toPrecision(3)) === want, best, { timeout: 10_000 });
    expect(await bestOfTable()).toBe(best);
    expect(await page.getByTestId('restored-from').textContent()).toContain('transmon-x90 #1');
    await page.waitForTimeout(400);
    await screenshotLooks(page, 'views-restored');
    // Saved as a project and opened in a fresh browser profile: the same table again.
    const download = page.waitForEvent('download');
    await page.keyboard.press('Control+s');
    const saved = await (await download).path();
    const other = await open();
    await other.getByTestId('open-project').setInputFiles(saved!);
    await other.getByTestId('starts-table').waitFor({ timeout: 20_000 });
    expect(await other.getByTestId('starts-table').locator('tbody tr').allTextContents()).toEqual(before);
  }, 120_000);

  it('draws every member of the ensemble on the Bloch sphere at once, or a chosen few, with their figures', async () => {
    const page = await open();
    // A rectangular X(90): 100 samples of 2 ns at 1.25 MHz is a quarter turn about +x.
    const i = new Array(100).fill(1.25e6);
    await openPulse(page, 'x90.json', pulseFile(2e-9, i));
    await page.keyboard.press('Alt+5');
    await page.getByLabel('all 25 members').check();
    await page.waitForFunction(() => document.querySelector('[data-testid=bloch-facts]')?.getAttribute('data-members') === '25');
    // The same figures from the plain-TypeScript oracle: each member takes |0> to U|0>, judged by
    // (1 - r . r_target)/2 against the target point -y (docs/physics.md sections 1 and 2).
    const pulse = { dt: 2e-9, i: Float64Array.from(i), q: new Float64Array(100), metadata: {} };
    const figures = parseSpec(demoSpec()).members.map((m) => {
      const u = pulsePropagator(pulse, m);
      const r = spinorToBloch({ re: [u.ur, u.vr], im: [u.ui, u.vi] });
      return (1 + r[1]) / 2;
    });
    const worst = Math.max(...figures);
    const mean = figures.reduce((a, b) => a + b, 0) / figures.length;
    // Shown to three significant digits.
    expect(Number(await page.getByTestId('bloch-worst').textContent()) / worst).toBeCloseTo(1, 2);
    expect(Number(await page.getByTestId('bloch-mean').textContent()) / mean).toBeCloseTo(1, 2);
    const colours = () =>
      page.evaluate(() => {
        const c = document.querySelector('[data-testid=bloch]') as HTMLCanvasElement;
        const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
        const set = new Set<number>();
        for (let k = 0; k < data.length; k += 4) if (data[k + 3]) set.add((data[k] << 16) | (data[k + 1] << 8) | data[k + 2]);
        return set.size;
      });
    await picture(page, 25);
    const all = await colours();
    await screenshotLooks(page, 'views-bloch-all');
    await page.getByLabel('chosen members').check();
    await page.getByLabel('1: Δ = -1 MHz, ε = -10 %').check();
    await page.getByLabel('25: Δ = 1 MHz, ε = 10 %').check();
    await page.waitForFunction(() => document.querySelector('[data-testid=bloch-facts]')?.getAttribute('data-members') === '2');
    await picture(page, 2);
    expect(all).toBeGreaterThan(await colours());
    await screenshot(page, 'views-bloch-chosen');
  }, 120_000);

  it('draws 25 members at 100 000 samples whole, shows every n-th point while the sphere turns, then the whole picture again', async () => {
    const page = await open();
    // 200 us of a smooth drive of a few MHz: each member turns hundreds of times, millions of points in all.
    const n = 100_000;
    const i = Array.from({ length: n }, (_, k) => Math.round(4e6 * Math.sin((2 * Math.PI * 3 * k) / n) + 1e6));
    const q = Array.from({ length: n }, (_, k) => Math.round(3e6 * Math.cos((2 * Math.PI * 2 * k) / n)));
    await openPulse(page, 'long.json', pulseFile(2e-9, i, q));
    await page.keyboard.press('Alt+5');
    const canvas = page.getByTestId('bloch');
    await canvas.waitFor();
    const frames = async () => Number(await canvas.getAttribute('data-frames'));
    /** Waits for a whole picture (not a preview) after picture number `after`. */
    const whole = (after: number) =>
      page.waitForFunction(
        (after) => {
          const c = document.querySelector('[data-testid=bloch]') as HTMLCanvasElement;
          return Number(c.dataset.frames) > after && c.dataset.preview === 'false';
        },
        after,
        { timeout: 60_000 },
      );
    const pixels = () => blochPixels(page, true);
    await page.getByLabel('chosen members').check();
    await page.getByLabel('1: Δ = -1 MHz, ε = -10 %').check();
    await page.waitForFunction(() => document.querySelector('[data-testid=bloch-facts]')?.getAttribute('data-members') === '1');
    await picture(page, 1);
    const one = await pixels();
    await page.getByLabel('all 25 members').check();
    await page.waitForFunction(() => document.querySelector('[data-testid=bloch-facts]')?.getAttribute('data-members') === '25');
    await picture(page, 25);
    const all = await pixels();
    // Every member's path in its own colour of the map's scale: far more colours than one path.
    expect(all.colours).toBeGreaterThan(2 * one.colours);
    await screenshotLooks(page, 'views-bloch-long', ['light', 'dark'], 3000);
    await whole(0);
    await pixels();
    // Turning: pictures come while the mouse moves (every n-th point), and the whole picture once it stops.
    const box = (await canvas.boundingBox())!;
    const start = await frames();
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.down();
    for (let k = 1; k <= 8; k++) await page.mouse.move(box.x + box.width / 2 + 10 * k, box.y + box.height / 2 + 4 * k);
    await page.waitForFunction((start) => Number(document.querySelector<HTMLCanvasElement>('[data-testid=bloch]')!.dataset.frames) > start, start);
    const previews = await page.evaluate(() => document.querySelector<HTMLCanvasElement>('[data-testid=bloch]')!.dataset.preview);
    await page.mouse.up();
    await whole(await frames());
    expect(previews).toBe('true');
    expect((await pixels()).changed).toBeGreaterThan(1000);
    await screenshot(page, 'views-bloch-long-turned');
  }, 180_000);

  it('shows where one pulse beats another: its contour over the map, both maps side by side, and the ratio', async () => {
    const page = await open();
    await page.getByTestId('run').click();
    await runToEnd(page);
    await page.keyboard.press('Alt+4');
    await page.waitForFunction(() => document.querySelectorAll('[data-testid=compare-table] tbody tr').length >= 5, undefined, { timeout: 30_000 });
    await page.locator('[data-testid=compare-table] tbody tr', { hasText: 'BB1' }).locator('select').selectOption('robustness');
    await page.getByRole('heading', { name: 'Robustness' }).waitFor();
    const design = await page.locator('#m-against option', { hasText: 'transmon-x90' }).getAttribute('value');
    await page.locator('#m-against').selectOption(design!);
    const mapDone = () => page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    await mapDone();
    await page.waitForTimeout(1500);
    /** Pixels of the map canvas by kind: the other pulse's orange contour, and saturated blue or red. */
    const pixels = (testid: string) =>
      page.evaluate((id) => {
        const c = document.querySelector(`[data-testid=${id}]`) as HTMLCanvasElement;
        const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
        let orange = 0;
        let blue = 0;
        let red = 0;
        for (let k = 0; k < data.length; k += 4) {
          const [r, g, b] = [data[k], data[k + 1], data[k + 2]];
          if (r > 230 && g > 150 && g < 200 && b < 40) orange++;
          if (b > r + 60) blue++;
          if (r > b + 60 && g < 120) red++;
        }
        return { orange, blue, red };
      }, testid);
    expect((await pixels('heatmap')).orange).toBeGreaterThan(50);
    await screenshotLooks(page, 'views-versus-contour');
    await page.getByLabel('side by side').check();
    await page.getByTestId('heatmap-other').waitFor();
    await page.waitForTimeout(500);
    await screenshotLooks(page, 'views-versus-side');
    await page.getByLabel('ratio of infidelities').check();
    await page.waitForTimeout(500);
    const ratio = await pixels('heatmap');
    // Each pulse wins somewhere: BB1 near zero detuning along the amplitude axis, the design over its ensemble's square.
    expect(ratio.blue).toBeGreaterThan(500);
    expect(ratio.red).toBeGreaterThan(500);
    await page.getByTestId('heatmap').focus();
    await page.keyboard.press('ArrowRight');
    const text = (await page.getByTestId('heatmap-readout').textContent())!;
    const m = /1 − F = ([\d.e+-]+) \(BB1\), ([\d.e+-]+) \(transmon[^)]*\)\); (.*) better, ×([\d.e+]+)/.exec(text);
    expect(m, text).not.toBeNull();
    const [a, b] = [Number(m![1]), Number(m![2])];
    // The factor is the ratio of the two infidelities shown (to their three digits).
    expect(Number(m![4]) / Math.max(a / b, b / a)).toBeCloseTo(1, 1);
    // The better one named (either, where the two agree to the three digits shown).
    if (a !== b) expect(m![3], text).toEqual(a < b ? 'BB1' : expect.stringContaining('transmon'));
    await screenshotLooks(page, 'views-versus-ratio');
  }, 150_000);

  it('gives help for every field (meaning, unit, typical value) and opens the documentation at it', async () => {
    const page = await open();
    await page.getByTestId('run').click();
    await runToEnd(page);
    await page.locator('details summary', { hasText: 'Spec JSON' }).click();
    const missing: string[] = [];
    let checked = 0;
    for (let view = 1; view <= 7; view++) {
      await page.keyboard.press(`Alt+${view}`);
      await page.waitForTimeout(400);
      if (view === 2) await page.getByTestId('samples').locator('summary').click();
      // Every visible form control of the page, focused in turn: the help names it and gives a unit and a typical value.
      const result = await page.evaluate(async () => {
        const bad: string[] = [];
        const controls = [...document.querySelectorAll('input, select, textarea')].filter((el) => {
          const r = el.getBoundingClientRect();
          return (el as HTMLInputElement).type !== 'file' && r.width > 0 && r.height > 0 && !el.closest('dialog');
        }) as HTMLElement[];
        const helpShown = (): boolean => {
          const bubble = document.querySelector('[data-testid=field-help]') as HTMLElement;
          const text = bubble.textContent ?? '';
          return getComputedStyle(bubble).display !== 'none' && /Unit .+/.test(text) && /Typical .+/.test(text) && /More: /.test(text);
        };
        for (const el of controls) {
          // A late update of the page (the finished run's figures arriving) can take the focus
          // off the first field focused: its help is asked again, after a frame, before it counts as missing.
          let shown = false;
          for (let attempt = 0; attempt < 2 && !shown; attempt++) {
            if (attempt > 0) el.blur();
            el.focus();
            await new Promise((resolve) => setTimeout(resolve, 0));
            shown = helpShown();
            if (!shown) await new Promise((resolve) => requestAnimationFrame(() => resolve(null)));
          }
          if (!shown) bad.push(`${el.tagName}#${el.id}[${el.getAttribute('name') ?? ''}]`);
        }
        return { bad, count: controls.length };
      });
      missing.push(...result.bad);
      checked += result.count;
    }
    expect(missing).toEqual([]);
    expect(checked).toBeGreaterThan(60);
    await page.keyboard.press('Alt+1');
    await page.locator('#f-rabi').focus();
    await page.waitForTimeout(100);
    expect(await page.getByTestId('field-help').textContent()).toContain('Peak Rabi: Largest drive amplitude');
    await screenshotLooks(page, 'views-help');
    // F1 on a field opens the documentation at the section that says more.
    await page.locator('#f-rabi').focus();
    await page.keyboard.press('F1');
    const dialog = page.getByTestId('docs');
    await dialog.locator('#conventions').waitFor();
    const box = (await dialog.locator('#conventions').boundingBox())!;
    const frame = (await dialog.boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(frame.y);
    expect(box.y).toBeLessThan(frame.y + 200);
    await screenshot(page, 'views-docs-conventions');
    // Links between the pages stay in the panel.
    await dialog.locator('a[href="docs/spec.md"]').first().click();
    await dialog.locator('#the-design-spec').waitFor();
    await dialog.getByRole('tab', { name: 'Every field' }).click();
    expect(await dialog.locator('tbody tr').count()).toBeGreaterThan(60);
    await screenshotLooks(page, 'views-docs');
    await dialog.getByRole('button', { name: 'Close' }).click();
    expect(await dialog.isVisible()).toBe(false);
  }, 150_000);

  it('left no error in the console of any page', () => {
    expect(visits.flatMap((v) => v.consoleErrors)).toEqual([]);
  });
});
