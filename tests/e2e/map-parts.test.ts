// A long map and the run beside it, in Debian's Chromium: the analysis worker computes a map in
// parts of bounded core time, so Run pressed during a long ladder map checks its spec and starts
// designing before the map ends; and while a long compare keeps the analysis worker busy, Run's
// check goes to a designer (events in order, no timing). Screenshots in test-results/.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { skipReason } from './harness.ts';
import { openReady, screenshotLooks, useHarness } from './screens.ts';

const reason = skipReason();

/** A 5-level transmon (the invented lab's -205 MHz ladder), 2000 samples of 2 ns, 5 x 5 members. */
const LADDER = {
  name: 'ladder-map',
  system: { levels: 5, anharmonicity: -2.05e8 },
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } },
  duration: 4e-6,
  segments: 2000,
  rabiMax: 2e7,
  ensemble: { detuning: { min: -1e5, max: 1e5, points: 5 }, amplitudeError: { min: -0.02, max: 0.02, points: 5 } },
  optimizer: { starts: 2, seed: 1, maxIterations: 100_000 },
};

const status = (page: Page) => page.evaluate(() => document.querySelector('[data-testid=run-status]')?.textContent ?? '');

describe.skipIf(reason !== null)('a long map beside a run', () => {
  const harness = useHarness();

  /** The ladder spec opened from a link, and a pulse of it: its design stopped after the first report. */
  async function ladderPulse() {
    const opened = await openReady(harness(), { hash: `#spec=${encodeURIComponent(JSON.stringify(LADDER))}` });
    const { page } = opened;
    await page.getByTestId('run').click();
    await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 1, undefined, { timeout: 120_000 });
    await page.getByTestId('stop').click();
    await page.waitForFunction(() => /^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    return opened;
  }

  it('starts designing during a long ladder map before the map ends', async () => {
    const { page, context, consoleErrors } = await ladderPulse();
    // A pulse to map.
    expect(await status(page)).toBe('stopped, best pulse kept');
    // 81 x 81 points of 2000 samples on 5 levels: about 16 s of core time (src/core/cost.ts), in
    // parts of about 50 ms each.
    await page.keyboard.press('Alt+3');
    await page.locator('#m-d-n').fill('81');
    await page.locator('#m-a-n').fill('81');
    await page.waitForFunction(() => /full resolution/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
    // In the page: the order of the run's first iteration and the map's end.
    await page.evaluate(() => {
      const events: string[] = ((window as unknown as { events: string[] }).events = []);
      const note = () => {
        const iteration = Number(document.querySelector('[data-testid=run-iteration]')?.textContent);
        if (iteration >= 1 && !events.includes('iteration')) events.push('iteration');
        if (document.querySelector('[data-testid=map-status]')?.getAttribute('data-full-ms') && !events.includes('map')) events.push('map');
      };
      new MutationObserver(note).observe(document.body, { subtree: true, childList: true, characterData: true, attributes: true });
      (document.querySelector('[data-testid=run]') as HTMLButtonElement).click();
    });
    await page.waitForFunction(() => (window as unknown as { events: string[] }).events.length > 0, undefined, { timeout: 240_000 });
    // Before, the spec's check waited for the analysis worker's half of the map, and the designers
    // for their own half: the first iteration came after the map.
    expect(await page.evaluate(() => (window as unknown as { events: string[] }).events)).toEqual(['iteration']);
    expect(await page.getByTestId('map-status').textContent()).toContain('computing full resolution');
    await screenshotLooks(page, 'map-parts-run-beside-map');
    await page.getByTestId('stop').click();
    await page.waitForFunction(() => /^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 600_000);

  it('starts designing while a long compare keeps the analysis worker busy, before the compare ends', async () => {
    const { page, context, consoleErrors } = await ladderPulse();
    // The compare view's table: the pulse, the composites and DRAG calibrated on 5 levels, one
    // call on the analysis worker of several times a design's first iteration.
    await page.keyboard.press('Alt+4');
    await page.waitForTimeout(300);
    await page.evaluate(() => {
      const events: string[] = ((window as unknown as { events: string[] }).events = []);
      const note = () => {
        const iteration = Number(document.querySelector('[data-testid=run-iteration]')?.textContent);
        if (iteration >= 1 && !events.includes('iteration')) events.push('iteration');
        if (document.querySelectorAll('[data-testid=compare-table] tbody tr').length > 1 && !events.includes('compare')) events.push('compare');
      };
      new MutationObserver(note).observe(document.body, { subtree: true, childList: true, characterData: true, attributes: true });
      (document.querySelector('[data-testid=run]') as HTMLButtonElement).click();
    });
    await page.waitForFunction(() => (window as unknown as { events: string[] }).events.length > 0, undefined, { timeout: 240_000 });
    // Before, the run's spec check waited on the analysis worker for the whole compare.
    expect(await page.evaluate(() => (window as unknown as { events: string[] }).events)).toEqual(['iteration']);
    await screenshotLooks(page, 'map-parts-run-beside-compare');
    await page.getByTestId('stop').click();
    await page.waitForFunction(() => /^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    // The compare still ends, with its rows.
    await page.waitForFunction(() => document.querySelectorAll('[data-testid=compare-table] tbody tr').length > 1, undefined, { timeout: 240_000 });
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 600_000);
});
