// The line in the app, in Debian's Chromium: chosen in the hardware limits, its
// oversampling checked by the library's own rule, the qubit's drive drawn over the
// waveform, and the comparison with each pulse also without the line. Screenshots in
// test-results/.
import { describe, expect, it } from 'vitest';
import { runEnabled, runToEnd, screenshot, skipReason, typeInto } from './harness.ts';
import { openReady, useHarness } from './screens.ts';

const reason = skipReason();

describe.skipIf(reason !== null)('the line in the app', () => {
  const harness = useHarness();

  it('designs through a 300 MHz Gaussian line, draws the drive the qubit sees and compares with and without the line', async () => {
    const { page, consoleErrors } = await openReady(harness());
    await page.locator('#f-line').selectOption('gaussian');
    expect(await page.locator('#f-line-bw').inputValue()).toBe('300 MHz');
    // Source: the spec's rule for line.oversample (an integer from 1 to 64), in the library's words.
    await typeInto(page, '#f-line-os', '0');
    await page.getByText('line.oversample: 0 is not allowed; an integer from 1 to 64').first().waitFor();
    expect(await page.getByTestId('run').isDisabled()).toBe(true);
    await typeInto(page, '#f-line-os', '4');
    await typeInto(page, '#f-iterations', '150');
    await runEnabled(page);
    await page.getByTestId('run').click();
    expect(await runToEnd(page, 120_000)).toMatch(/^done/);

    await page.keyboard.press('Alt+2');
    await page.getByText("Thin dashed: the drive the qubit sees through the spec's line").waitFor();
    // 2 ns samples over 4 fine steps: the drive's step is 0.5 ns.
    expect(await page.getByText("the spec's line, on steps of 500 ps").count()).toBe(1);
    await page.waitForTimeout(800); // charts redraw a few times a second
    await screenshot(page, 'e2e-line-01-waveform');

    await page.keyboard.press('Alt+4');
    await page.getByLabel(/also show each pulse without the line/).check();
    await page.getByRole('columnheader', { name: 'mean, no line' }).waitFor({ timeout: 60_000 });
    const cells = await page.locator('[data-testid=compare-table] tbody tr').first().locator('td.mono').allTextContents();
    // mean, worst, then the same without the line: both numbers.
    expect(Number(cells[2])).toBeGreaterThan(0);
    expect(Number(cells[0])).toBeGreaterThan(0);
    await screenshot(page, 'e2e-line-02-compare');
    expect(consoleErrors).toEqual([]);
  }, 240_000);
});
