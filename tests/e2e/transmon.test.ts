// A transmon spec in the app, in Debian's Chromium: the robustness map and its leakage map
// (beside it at 1440 px) read the library's values on the spec's ladder, the cuts carry the
// leakage too, the populations of every level against time keep their sum, and the panel's
// subspace-average leakage is the map's value at the member. Screenshots (light and dark,
// 1440 and 800 px) in test-results/.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { robustnessMap } from '../../src/core/api.ts';
import { parseSpec } from '../../src/core/spec.ts';
import { formatFigure } from '../../src/app/units.ts';
import { screenshot, skipReason, typeInto } from './harness.ts';
import { openPulse, openReady, useHarness } from './screens.ts';

const reason = skipReason();
const spec = JSON.parse(readFileSync(new URL('../../examples/transmon-x180-fast.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const problem = parseSpec(spec);

/** A cosine X(180) over the spec's 48 samples of 20 ns (peak 50 MHz, no DRAG): it leaks on the -205 MHz ladder. */
function cosinePulse(): { dt: number; i: number[]; q: number[]; metadata: Record<string, unknown> } {
  const n = problem.segments, dt = problem.dt;
  const i = Array.from({ length: n }, (_, k) => (1 / (2 * n * dt)) * (1 - Math.cos((2 * Math.PI * (k + 0.5)) / n)));
  return { dt, i, q: new Array<number>(n).fill(0), metadata: { name: 'cosine X(180)' } };
}

/** Points at the centre of a heatmap's plot area (margins of src/app/plot/Heatmap.svelte) and returns the readout. */
async function readCentre(page: Page, testid: string): Promise<string> {
  await page.getByTestId(testid).scrollIntoViewIfNeeded();
  const box = (await page.getByTestId(testid).boundingBox())!;
  const plotW = box.width - 64 - 92, plotH = box.height - 12 - 46;
  await page.mouse.move(box.x + 64 + plotW / 2, box.y + 12 + plotH / 2);
  const readout = page.getByTestId(`${testid}-readout`);
  await page.waitForFunction((id) => /ε = /.test(document.querySelector(`[data-testid=${id}-readout]`)?.textContent ?? ''), testid);
  return (await readout.textContent()) ?? '';
}

describe.skipIf(reason !== null)('a transmon spec in the app', () => {
  const harness = useHarness();

  for (const [scheme, width] of [['light', 1440], ['dark', 800], ['dark', 1440], ['light', 800]] as const) {
    it(`maps infidelity and leakage on the ladder and plots the populations (${scheme}, ${width} px)`, async () => {
      const { page, context, consoleErrors } = await openReady(harness(), { width, scheme, hash: `#spec=${encodeURIComponent(JSON.stringify(spec))}` });
      await page.waitForFunction(() => (document.querySelector('#f-levels') as HTMLInputElement | null)?.value === '6');
      await openPulse(page, 'cosine.json', cosinePulse());
      expect(await page.getByTestId('notice').textContent()).toContain('Opened cosine.json: 48 samples');

      // An odd grid symmetric about zero: the centre cell is Δ = 0, ε = 0.
      await page.keyboard.press('Alt+3');
      await typeInto(page, '#m-d-min', '-20 MHz');
      await typeInto(page, '#m-d-max', '20 MHz');
      await typeInto(page, '#m-d-n', '21');
      await typeInto(page, '#m-a-min', '-10 %');
      await typeInto(page, '#m-a-max', '10 %');
      await typeInto(page, '#m-a-n', '21');
      await page.waitForFunction(() => /21 × 21 points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
      await page.getByTestId('leakage-heatmap').waitFor();
      // Source: the library's robustnessMap on the spec's system (src/core/api.ts), computed here in Node.
      const zero = { min: 0, max: 0, points: 1 };
      const direct = robustnessMap(problem.target, { ...cosinePulse(), i: Float64Array.from(cosinePulse().i), q: new Float64Array(problem.segments) }, zero, zero, undefined, problem.system);
      const twoLevel = robustnessMap(problem.target, { ...cosinePulse(), i: Float64Array.from(cosinePulse().i), q: new Float64Array(problem.segments) }, zero, zero);
      const infidelityText = await readCentre(page, 'heatmap');
      expect(infidelityText).toContain(`1 − F = ${formatFigure(direct.infidelity[0])}`);
      expect(formatFigure(direct.infidelity[0])).not.toBe(formatFigure(twoLevel.infidelity[0]));
      const leakageText = await readCentre(page, 'leakage-heatmap');
      expect(leakageText).toContain(`L = ${formatFigure(direct.leakage![0])}`);
      expect(direct.leakage![0]).toBeGreaterThan(1e-5);
      // Beside the infidelity map at 1440 px: same row, to its right.
      const mapBox = (await page.getByTestId('heatmap').boundingBox())!;
      const leakBox = (await page.getByTestId('leakage-heatmap').boundingBox())!;
      if (width === 1440) {
        expect(Math.abs(leakBox.y - mapBox.y)).toBeLessThan(2);
        expect(leakBox.x).toBeGreaterThanOrEqual(mapBox.x + mapBox.width);
      }
      // The cuts show the leakage along each axis on a ladder.
      for (const id of ['cut-detuning', 'cut-amplitude']) {
        expect(await page.getByTestId(id).locator('xpath=..').getAttribute('aria-label')).toMatch(/^Infidelity and leakage along /);
      }
      // The last field's help bubble would cover the maps' titles in the screenshot.
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      await page.getByTestId('heatmap').scrollIntoViewIfNeeded();
      await page.waitForTimeout(300);
      await screenshot(page, `e2e-transmon-01-maps-${scheme}-${width}`);
      await page.getByTestId('cut-detuning').scrollIntoViewIfNeeded();
      await page.waitForTimeout(300);
      await screenshot(page, `e2e-transmon-04-cuts-${scheme}-${width}`);

      // Populations of every level for the chosen member (no error), from |0>.
      await page.keyboard.press('Alt+5');
      const chart = page.getByTestId('populations-chart');
      await page.waitForFunction(() => document.querySelector('[data-testid=populations-chart]')?.getAttribute('data-norm-deviation') !== '');
      // Conservation: a unitary keeps the norm, so the plotted populations sum to 1 at every point.
      expect(Number(await chart.getAttribute('data-norm-deviation'))).toBeLessThan(1e-9);
      expect(Number(await chart.getAttribute('data-points'))).toBe(problem.segments + 1);
      expect(await page.getByTestId('populations-final').textContent()).toMatch(/\|5⟩ .* leakage of this initial state \(levels 2 and up\)/);
      // The member without error: its subspace average is the leakage map's value there (Δ = 0, ε = 0).
      await page.selectOption('#b-member', '-1');
      await page.waitForFunction((text) => document.querySelector('[data-testid=populations-average]')?.textContent?.includes(text), `L = 1 − Tr(M†M)/2: ${formatFigure(direct.leakage![0])}`);
      expect(await page.getByTestId('populations-average').textContent()).toContain('(the leakage map shows L)');
      await page.waitForTimeout(300);
      await screenshot(page, `e2e-transmon-02-populations-${scheme}-${width}`);
      // The linear axis too: the same points, the same sums.
      await page.getByTestId('populations-log').uncheck();
      await page.waitForTimeout(300);
      expect(Number(await chart.getAttribute('data-norm-deviation'))).toBeLessThan(1e-9);
      await screenshot(page, `e2e-transmon-03-populations-linear-${scheme}-${width}`);
      expect(consoleErrors).toEqual([]);
      await context.close();
    }, 180_000);
  }
});
