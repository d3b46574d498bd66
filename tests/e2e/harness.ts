// The end-to-end harness: builds the app with Vite, serves the build on 127.0.0.1 (Vite's
// preview server, started here), and drives Debian's Chromium through playwright-core
// with a fresh profile, recording every request the page makes.
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { build, preview, type PreviewServer } from 'vite';

/** Where Debian installs Chromium (`apt-get install chromium`). */
export const CHROMIUM = '/usr/bin/chromium';
/** Screenshots of every test go here (git-ignored). */
export const SCREENSHOTS = resolve('test-results');

/** Why the browser tests cannot run here, or null when they can (CI must have Chromium). */
export function skipReason(): string | null {
  if (existsSync(CHROMIUM)) return null;
  if (process.env.CI) return null;
  return `${CHROMIUM} is missing: install it with "apt-get install chromium" to run the browser tests`;
}

/** A built app served locally, and a browser to visit it. */
export interface Harness {
  url: string;
  browser: Browser;
  outDir: string;
  close(): Promise<void>;
}

/** Builds the app into a temporary folder and serves it on 127.0.0.1 (an OS-chosen port). */
export async function startHarness(): Promise<Harness> {
  const outDir = await mkdtemp(join(tmpdir(), 'gatesmith-e2e-'));
  await build({ configFile: resolve('vite.config.ts'), logLevel: 'warn', build: { outDir, emptyOutDir: true } });
  const server: PreviewServer = await preview({
    configFile: resolve('vite.config.ts'),
    logLevel: 'warn',
    build: { outDir },
    preview: { host: '127.0.0.1', port: 0, strictPort: false, open: false },
  });
  const address = server.httpServer.address();
  if (!address || typeof address === 'string') throw new Error('the preview server has no TCP address');
  const url = `http://127.0.0.1:${address.port}/`;
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  await mkdir(SCREENSHOTS, { recursive: true });
  return {
    url,
    browser,
    outDir,
    async close() {
      await browser.close();
      await new Promise<void>((done) => server.httpServer.close(() => done()));
      await rm(outDir, { recursive: true, force: true });
    },
  };
}

/** A page in a fresh profile, with every request URL recorded. */
export interface Visit {
  context: BrowserContext;
  page: Page;
  requests: string[];
  consoleErrors: string[];
}

/** Opens the app in a new browser context (its own IndexedDB) and waits until the core is ready. */
export async function visit(harness: Harness, hash = '', context?: BrowserContext): Promise<Visit> {
  const ctx = context ?? (await harness.browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true }));
  const requests: string[] = [];
  const consoleErrors: string[] = [];
  ctx.on('request', (request) => requests.push(request.url()));
  const page = await ctx.newPage();
  page.on('console', (message) => {
    if (message.type() === 'error') consoleErrors.push(message.text());
  });
  page.on('pageerror', (error) => consoleErrors.push(String(error)));
  await page.goto(harness.url + hash);
  await page.getByTestId('run').waitFor();
  await page.waitForFunction(() => !document.querySelector('aside h2')?.textContent?.includes('loading'));
  return { context: ctx, page, requests, consoleErrors };
}

/**
 * Saves a full-page screenshot under test-results/. The spec column keeps to the window as the
 * page scrolls (CSS sticky), so an image of the whole page taken scrolled down drew it lower
 * than the views beside it; for the capture it stands where the page lays it out.
 */
export async function screenshot(page: Page, name: string): Promise<void> {
  const pin = (position: string) => page.evaluate((p) => document.querySelector<HTMLElement>('main > aside')?.style.setProperty('position', p), position);
  await pin('static');
  try {
    await page.screenshot({ path: join(SCREENSHOTS, `${name}.png`), fullPage: true });
  } finally {
    await pin('');
  }
}

/** Types into a text field as a user does (the field reads its text on every input). */
export async function typeInto(page: Page, selector: string, text: string): Promise<void> {
  const input = page.locator(selector);
  await input.fill(text);
  await input.dispatchEvent('input');
}

/**
 * Waits until the run status says the run ended and, in the design view, until the
 * convergence chart says it draws the ended run; returns the status.
 */
export async function runToEnd(page: Page, timeout = 90_000): Promise<string> {
  await page.waitForFunction(() => /^(done|stopped)/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout });
  await page.waitForFunction(() => document.querySelector('[data-testid=convergence]')?.getAttribute('data-state') !== 'live', undefined, { timeout });
  return (await page.getByTestId('run-status').textContent()) ?? '';
}

/** Waits until Run can be pressed: the core is loaded and the spec checked. */
export async function runEnabled(page: Page, timeout = 30_000): Promise<void> {
  await page.waitForFunction(() => {
    const run = document.querySelector<HTMLButtonElement>('[data-testid=run]');
    return run !== null && !run.disabled;
  }, undefined, { timeout });
}
