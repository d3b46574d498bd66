// The shortest run in the app, in Debian's Chromium: on a case whose answer is known it finds
// the rectangular pulse's duration rounded up to whole samples, draws every duration tried,
// and adds the winner to the pulse list. Screenshots (light and dark, 1440 and 800 px) in
// test-results/.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { screenshot, skipReason, startHarness, typeInto, visit, type Harness } from './harness.ts';

const reason = skipReason();

// X(90) with no ensemble, 10 MHz peak, 2 ns samples: a rectangular pulse's case.
const rectSpec = {
  name: 'x90-bare',
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  optimizer: { starts: 2, seed: 3, maxIterations: 300 },
};

describe.skipIf(reason !== null)('the shortest run in the app', () => {
  let harness: Harness;
  beforeAll(async () => {
    harness = await startHarness();
  }, 180_000);
  afterAll(async () => {
    await harness?.close();
  });

  for (const scheme of ['light', 'dark'] as const) {
    it(`finds theta / (2 pi rabiMax) rounded up to whole samples, draws the curve and adds the pulse (${scheme})`, async () => {
      const context = await harness.browser.newContext({ viewport: { width: 1440, height: 1000 }, colorScheme: scheme });
      const { page, consoleErrors } = await visit(harness, `#spec=${encodeURIComponent(JSON.stringify(rectSpec))}`, context);
      await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement).disabled);

      // A goal out of range is named in the user's words and blocks the run.
      await typeInto(page, '#f-goal-mean', '2');
      await page.getByText('goal mean infidelity: "2" is not allowed; an infidelity above 0 and at most 1').waitFor();
      expect(await page.getByTestId('shortest-run').isDisabled()).toBe(true);
      await typeInto(page, '#f-goal-worst', 'abc');
      await page.getByText('goal worst infidelity: "abc" is not allowed').waitFor();
      await typeInto(page, '#f-goal-worst', '');
      await typeInto(page, '#f-goal-mean', '1e-9');
      await page.waitForFunction(() => !(document.querySelector('[data-testid=shortest-run]') as HTMLButtonElement).disabled);

      await page.getByTestId('shortest-run').click();
      await page.waitForFunction(() => /^Shortest:/.test(document.querySelector('[data-testid=shortest-status]')?.textContent?.trim() ?? ''), undefined, { timeout: 90_000 });
      const status = (await page.getByTestId('shortest-status').textContent())!.replace(/\s+/g, ' ').trim();
      // docs/physics.md section 1: a resonant constant drive turns by 2 pi Omega t, so
      // (pi/2) / (2 pi 10 MHz) = 25 ns = 12.5 samples of 2 ns -> 13 samples, 26 ns.
      expect(status).toMatch(/^Shortest: 26 ns \(13 samples\)/);
      expect(status).toContain('a rectangular pulse of the same angle takes 25 ns');
      // The chart drew every duration tried, 12 samples (fails) and 13 (meets) among them.
      await page.waitForFunction(() => (document.querySelector('[data-tried]') as HTMLElement).dataset.tried !== '');
      const tried = (await page.locator('[data-tried]').getAttribute('data-tried'))!.split(',').map(Number);
      expect(tried).toContain(12);
      expect(tried).toContain(13);
      expect(tried).toContain(100); // the search starts at the spec's own length
      expect(tried).toEqual([...tried].sort((a, b) => a - b));
      await page.waitForTimeout(400);
      await screenshot(page, `e2e-shortest-${scheme}-1440`);
      await page.setViewportSize({ width: 800, height: 1000 });
      await page.waitForTimeout(400);
      await screenshot(page, `e2e-shortest-${scheme}-800`);

      // The winner is in the pulse list, its name saying its duration.
      await page.keyboard.press('Alt+2');
      const options = await page.locator('#pulse-picker option').allTextContents();
      expect(options).toHaveLength(1);
      expect(options[0]).toMatch(/^x90-bare shortest 26 ns \(13 samples\) · mean /);
      expect(consoleErrors).toEqual([]);
      await context.close();
    }, 180_000);
  }
});
