// Screenshots of one state of the page in both colour schemes and at a wide and a narrow
// window, for the views' tests (look at every one of them).
import type { Browser, Page } from 'playwright-core';
import { screenshot, visit, type Harness } from './harness.ts';

/** Screenshots of the page in light and dark, 1440 and 800 px wide, after `show` sets it up in each. */
export async function screenshotsEverywhere(browser: Browser, harness: Harness, name: string, show: (page: Page) => Promise<void>): Promise<void> {
  for (const scheme of ['light', 'dark'] as const) {
    for (const width of [1440, 800]) {
      const context = await browser.newContext({ viewport: { width, height: 1000 }, colorScheme: scheme });
      try {
        const { page } = await visit(harness, '', context);
        await show(page);
        await screenshot(page, `${name}-${scheme}-${width}`);
      } finally {
        await context.close();
      }
    }
  }
}

