// Set-up the browser tests share: the harness around a file's tests, the app opened in a
// fresh profile at a window size and colour scheme, ready to run, and screenshots of one
// state of the page in both colour schemes and at a wide and a narrow window (look at
// every one of them).
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll } from 'vitest';
import type { Page } from 'playwright-core';
import { runEnabled, screenshot, startHarness, visit, type Harness, type Visit } from './harness.ts';

/** examples/transmon-x180-fast.json: 48 samples in 20 ns, "at the 2.4 GS/s of the lab's waveform generator". */
export const FAST_TRANSMON = readFileSync(new URL('../../examples/transmon-x180-fast.json', import.meta.url), 'utf8');

/** A pulse of the fast example's 48 samples of 416.67 ps: a cosine lobe on I, 50 MHz at its peak. */
export const FAST_LOBE = {
  dt: 2e-8 / 48,
  i: Array.from({ length: 48 }, (_, k) => 2.5e7 * (1 - Math.cos((2 * Math.PI * (k + 0.5)) / 48))),
  q: new Array<number>(48).fill(0),
  metadata: { name: 'lobe' },
};

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

/** Opens a pulse file (a pulse object, or a file's bytes) through the page's file input and waits until it is listed. */
export async function openPulse(page: Page, name: string, pulse: unknown): Promise<void> {
  const buffer = Buffer.isBuffer(pulse) ? pulse : Buffer.from(JSON.stringify(pulse));
  await page.getByTestId('open-pulse').setInputFiles({ name, mimeType: 'application/json', buffer });
  await page.getByTestId('notice').filter({ hasText: `Opened ${name}` }).waitFor({ timeout: 30_000 });
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

/**
 * Screenshots (`name-scheme-width`) of the page as it stands, resized to 1440 and then 800 px
 * wide and shown in each colour scheme (emulated), each after the page settles; the page is
 * left at 1440 px.
 */
export async function screenshotLooks(page: Page, name: string, schemes: readonly ('light' | 'dark')[] = ['light', 'dark'], settleMs = 450): Promise<void> {
  const height = page.viewportSize()?.height ?? 1000;
  for (const width of [1440, 800]) {
    await page.setViewportSize({ width, height });
    for (const scheme of schemes) {
      await page.emulateMedia({ colorScheme: scheme });
      await page.waitForTimeout(settleMs);
      await screenshot(page, `${name}-${scheme}-${width}`);
    }
  }
  await page.setViewportSize({ width: 1440, height });
}

/**
 * The Bloch canvas's pixels, compared with those of the call before (kept in the page, so
 * that no picture crosses to the test): how many bytes changed, and how many colours it
 * shows (of the drawn pixels only when `drawnOnly`, not the transparent background).
 */
export function blochPixels(page: Page, drawnOnly = false): Promise<{ colours: number; changed: number }> {
  return page.evaluate((drawnOnly) => {
    const c = document.querySelector('[data-testid=bloch]') as HTMLCanvasElement;
    const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
    const w = window as unknown as { __bloch?: Uint8ClampedArray };
    let changed = 0;
    if (w.__bloch) for (let k = 0; k < data.length; k++) if (data[k] !== w.__bloch[k]) changed++;
    w.__bloch = data;
    const colours = new Set<number>();
    for (let k = 0; k < data.length; k += 4) if (!drawnOnly || data[k + 3]) colours.add((data[k] << 16) | (data[k + 1] << 8) | data[k + 2]);
    return { colours: colours.size, changed };
  }, drawnOnly);
}
