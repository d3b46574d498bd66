// The optimiser's Arithmetic field in Chromium (playwright-core, production build): it
// writes optimizer.arithmetic into the spec, a design runs on it, and the field is drawn
// in both colour schemes at 1440 and 800 px (screenshots in test-results/).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { runToEnd, SCREENSHOTS, skipReason, startHarness, visit, type Harness } from './harness.ts';

const reason = skipReason();
if (reason) console.warn(`browser tests skipped: ${reason}`);

describe.skipIf(reason !== null)('the Arithmetic field', () => {
  let harness: Harness;
  beforeAll(async () => {
    harness = await startHarness();
  }, 180_000);
  afterAll(async () => {
    await harness?.close();
  });

  it('sets optimizer.arithmetic, back to the default when portable is chosen, and the design runs', async () => {
    const { page } = await visit(harness);
    await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement).disabled, undefined, { timeout: 30_000 });
    // Chromium validates relaxed SIMD, so the fused build is loaded and runs.
    expect(await page.evaluate(() => WebAssembly.validate(new Uint8Array([0, 97, 115, 109, 1, 0, 0, 0, 1, 8, 1, 96, 3, 123, 123, 123, 1, 123, 3, 2, 1, 0, 10, 13, 1, 11, 0, 32, 0, 32, 1, 32, 2, 253, 135, 2, 11])))).toBe(true);
    expect(await page.locator('#f-arithmetic').inputValue()).toBe('portable');
    await page.locator('#f-arithmetic').selectOption('fused');
    await page.locator('summary', { hasText: 'Spec JSON' }).click();
    await page.waitForFunction(() => /"arithmetic": "fused"/.test((document.querySelector('#f-spec-json') as HTMLTextAreaElement).value));
    await page.getByTestId('run').click();
    expect(await runToEnd(page)).toMatch(/^done/);
    await page.locator('#f-arithmetic').selectOption('portable');
    await page.waitForFunction(() => !/"arithmetic"/.test((document.querySelector('#f-spec-json') as HTMLTextAreaElement).value));
    await page.close();
  }, 180_000);

  it('looks right in light and dark, at 1440 and 800 px wide', async () => {
    // The optimiser section alone: a full-page picture shows the spec panel from its top.
    for (const scheme of ['light', 'dark'] as const) {
      for (const width of [1440, 800]) {
        const context = await harness.browser.newContext({ viewport: { width, height: 1000 }, colorScheme: scheme });
        try {
          const { page } = await visit(harness, '', context);
          await page.locator('#f-arithmetic').selectOption('fused');
          const section = page.locator('section[aria-labelledby=h-optimizer]');
          await section.scrollIntoViewIfNeeded();
          await page.waitForTimeout(300);
          await section.screenshot({ path: join(SCREENSHOTS, `arithmetic-01-optimiser-${scheme}-${width}.png`) });
        } finally {
          await context.close();
        }
      }
    }
  }, 180_000);
});
