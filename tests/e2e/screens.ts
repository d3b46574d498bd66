// Set-up the browser tests share: the harness around a file's tests, the app opened in a
// fresh profile at a window size and colour scheme, ready to run, and screenshots of one
// state of the page in both colour schemes and at a wide and a narrow window (look at
// every one of them).
import { afterAll, beforeAll } from 'vitest';
import type { Page } from 'playwright-core';
import { runEnabled, screenshot, startHarness, visit, type Harness, type Visit } from './harness.ts';

/** Starts the harness (a build of the app, served, and Chromium) before a file's tests and closes it after them. */
export function useHarness(): () => Harness {
  let harness: Harness | undefined;
  beforeAll(async () => {
    harness = await startHarness();
  }, 180_000);
  afterAll(async () => {
    await harness?.close();
  });
  return () => {
    if (!harness) throw new Error('the harness did not start');
    return harness;
  };
}

/** How a page is looked at: colour scheme and window size, and the link it opens (`#spec=...`). */
export interface Look {
  scheme?: 'light' | 'dark';
  width?: number;
  height?: number;
  hash?: string;
  /** Cores the page believes it has (navigator.hardwareConcurrency): how many design workers it starts. */
  cores?: number;
}

/** Opens the app in a new browser context at a look, and waits until Run can be pressed. */
export async function openReady(harness: Harness, look: Look = {}): Promise<Visit> {
  const { scheme = 'light', width = 1440, height = 1000, hash = '', cores } = look;
  const context = await harness.browser.newContext({ viewport: { width, height }, colorScheme: scheme, acceptDownloads: true });
  if (cores !== undefined) await context.addInitScript((n) => Object.defineProperty(navigator, 'hardwareConcurrency', { get: () => n }), cores);
  const opened = await visit(harness, hash, context);
  await runEnabled(opened.page);
  return opened;
}

/** Screenshots (`name-scheme-width`) of the page in light and dark, 1440 and 800 px wide, each opened at `look` and set up by `show`. */
export async function screenshotsEverywhere(harness: Harness, name: string, show: (page: Page) => Promise<void>, look: Pick<Look, 'hash' | 'cores'> = {}): Promise<void> {
  for (const scheme of ['light', 'dark'] as const) {
    for (const width of [1440, 800]) {
      const { page, context } = await openReady(harness, { ...look, scheme, width });
      try {
        await show(page);
        await screenshot(page, `${name}-${scheme}-${width}`);
      } finally {
        await context.close();
      }
    }
  }
}

/** Screenshots of the page as it stands at 1440 and then 800 px wide (`name-1440`, `name-800`), each after the page settles. */
export async function screenshotWidths(page: Page, name: string, settleMs = 400): Promise<void> {
  for (const width of [1440, 800]) {
    await page.setViewportSize({ width, height: page.viewportSize()?.height ?? 1000 });
    await page.waitForTimeout(settleMs);
    await screenshot(page, `${name}-${width}`);
  }
}
