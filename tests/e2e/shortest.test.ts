// The shortest run in the app, in Debian's Chromium: on a case whose answer is known it finds
// the rectangular pulse's duration rounded up to whole samples, draws every duration tried,
// and adds the winner to the pulse list. Screenshots (light and dark, 1440 and 800 px) in
// test-results/.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { skipReason, typeInto } from './harness.ts';
import { openReady, screenshotLooks, useHarness } from './screens.ts';

const reason = skipReason();

// X(90) with no ensemble, 10 MHz peak, 2 ns samples: a rectangular pulse's case.
const rectSpec = {
  name: 'x90-bare',
  target: { gate: { axis: [1, 0, 0], angleDeg: 90 } },
  duration: 2e-7, segments: 100, rabiMax: 1e7,
  optimizer: { starts: 2, seed: 3, maxIterations: 300 },
};

/**
 * The notes over the design view's empty charts (convergence, live waveform, shortest): each
 * with its text, whether it covers its chart's whole box, and whether its background is opaque
 * (so that no axis title of the empty chart runs through the text).
 */
function emptyNotes(page: Page): Promise<Array<{ text: string; covers: boolean; opaque: boolean; fits: boolean }>> {
  return page.evaluate(() =>
    [...document.querySelectorAll('#view-panel canvas')].flatMap((canvas) => {
      // The note is laid over the chart by the nearest box holding both.
      let note: Element | null = null;
      for (let box = canvas.parentElement; box && !note; box = box.parentElement) note = box.querySelector(':scope > p.empty');
      if (!note) return [];
      const n = note.getBoundingClientRect();
      const c = canvas.getBoundingClientRect();
      const alpha = /rgba\([^)]*,\s*([\d.]+)\)/.exec(getComputedStyle(note).backgroundColor)?.[1];
      return [{
        text: note.textContent?.trim() ?? '',
        covers: n.left <= c.left + 0.5 && n.top <= c.top + 0.5 && n.right >= c.right - 0.5 && n.bottom >= c.bottom - 0.5,
        opaque: alpha === undefined && getComputedStyle(note).backgroundColor !== 'transparent',
        fits: note.scrollWidth <= note.clientWidth + 1 && note.scrollHeight <= note.clientHeight + 1,
      }];
    }),
  );
}

describe.skipIf(reason !== null)('the shortest run in the app', () => {
  const harness = useHarness();

  it('lays the note of an empty chart over the whole chart, so that no axis title runs through it (800 and 1440 px)', async () => {
    for (const width of [800, 1440]) {
      const { page, context } = await openReady(harness(), { width, scheme: 'dark' });
      const notes = await emptyNotes(page);
      expect(notes.map((n) => n.text.slice(0, 20))).toEqual(['No run yet: the mean', 'Press Run (Ctrl+Ente', 'Each duration tried ']);
      for (const n of notes) expect(n, n.text).toMatchObject({ covers: true, opaque: true, fits: true });
      await context.close();
    }
  }, 120_000);

  for (const scheme of ['light', 'dark'] as const) {
    it(`finds theta / (2 pi rabiMax) rounded up to whole samples, draws the curve and adds the pulse (${scheme})`, async () => {
      const { page, context, consoleErrors } = await openReady(harness(), { scheme, hash: `#spec=${encodeURIComponent(JSON.stringify(rectSpec))}` });

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
      await screenshotLooks(page, 'e2e-shortest', [scheme]);

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
