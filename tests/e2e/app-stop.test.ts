// Stop where one core call is long, and small defects of the form, in Debian's Chromium:
// Stop during the first iteration of a big ladder design ends it at once keeping nothing;
// Stop after reports keeps the best pulse and fills in its worst member after; a mouse click
// into a field does not cover the page with its help (the "?" beside it does, and the
// keyboard's focus does); the drive through a Gaussian line says why it starts before the
// first sample, by the amount docs/physics.md gives. Screenshots in test-results/.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { runToEnd, screenshot, skipReason } from './harness.ts';
import { openReady, screenshotLooks, useHarness } from './screens.ts';

const reason = skipReason();

/** A ladder spec of `levels` levels, `segments` samples of 2 ns and 5 x 5 members. */
function ladderSpec(levels: number, segments: number): Record<string, unknown> {
  return {
    name: `ladder-${segments}`,
    system: { levels, anharmonicity: -2.05e8 },
    target: { gate: { axis: [1, 0, 0], angleDeg: 180 } },
    duration: segments * 2e-9,
    segments,
    rabiMax: 2e7,
    ensemble: { detuning: { min: -1e5, max: 1e5, points: 5 }, amplitudeError: { min: -0.02, max: 0.02, points: 5 } },
    optimizer: { starts: 2, seed: 1, maxIterations: 100_000 },
  };
}

const hashOf = (spec: unknown) => `#spec=${encodeURIComponent(JSON.stringify(spec))}`;
const text = async (page: Page, testid: string) => ((await page.getByTestId(testid).textContent()) ?? '').replace(/\s+/g, ' ').trim();

describe.skipIf(reason !== null)('Stop and the form', () => {
  const harness = useHarness();

  it('ends a ladder design inside its first iteration at once, keeping nothing', async () => {
    // 8 levels x 20 000 samples x 25 members: one evaluation is about 2 s (src/core/cost.ts), and the
    // first iteration takes several; Stop comes well inside it.
    const { page, context, consoleErrors } = await openReady(harness(), { hash: hashOf(ladderSpec(8, 20_000)) });
    const listed = await page.locator('#pulse-picker option').count();
    await page.getByTestId('run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid=run-status]')?.textContent === 'running');
    await page.getByTestId('stop').click();
    await page.waitForFunction(() => /^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    // Before, Stop waited for the iteration to end and kept its pulse.
    expect(await text(page, 'run-status')).toBe('stopped before any pulse');
    expect(await text(page, 'run-iteration')).toBe('0');
    // The design view says so too, not "No run yet".
    const view = ((await page.locator('#view-panel').textContent()) ?? '').replace(/\s+/g, ' ');
    expect(view).toContain('Stopped before any pulse');
    expect(view).toContain('the run was stopped before any start reported a pulse');
    expect(view).not.toContain('No run yet');
    expect(await page.locator('#pulse-picker option').count()).toBe(listed);
    // Run again at once: fresh design workers took the ended ones' place.
    expect(await page.getByTestId('run').isDisabled()).toBe(false);
    await screenshotLooks(page, 'stop-nothing-kept');
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  it('keeps the best reported pulse of a ladder design at Stop and fills in its worst member after', async () => {
    const { page, context, consoleErrors } = await openReady(harness(), { hash: hashOf(ladderSpec(5, 1000)) });
    await page.getByTestId('run').click();
    await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 2, undefined, { timeout: 60_000 });
    await page.getByTestId('stop').click();
    await page.waitForFunction(() => /^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    expect(await text(page, 'run-status')).toBe('stopped, best pulse kept');
    // The worst member is asked of the analysis worker after Stop: a figure, not "–", once it answers.
    await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-worst]')?.textContent) > 0, undefined, { timeout: 30_000 });
    const mean = Number(await text(page, 'run-mean'));
    const worst = Number(await text(page, 'run-worst'));
    expect(worst).toBeGreaterThanOrEqual(mean);
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  it('opens a field\'s help from the keyboard or its "?", not on a mouse click into the field', async () => {
    const { page, context, consoleErrors } = await openReady(harness());
    await page.getByTestId('run').click();
    await runToEnd(page);
    await page.keyboard.press('Alt+5');
    const radio = page.locator('input[name=b-show][value=all]');
    await radio.waitFor();
    await radio.click();
    await page.waitForTimeout(100);
    const bubble = page.getByTestId('field-help');
    // Before, the bubble opened here and covered the Bloch view's figures.
    expect(await bubble.isVisible()).toBe(false);
    const ask = page.getByTestId('field-help-ask');
    await ask.waitFor();
    // The "?" sits on the top right corner of the clicked radio's label.
    const label = (await radio.locator('xpath=ancestor::label').boundingBox())!;
    const box = (await ask.boundingBox())!;
    expect(Math.abs(box.x + box.width / 2 - (label.x + label.width))).toBeLessThanOrEqual(2);
    expect(Math.abs(box.y + box.height / 2 - label.y)).toBeLessThanOrEqual(4);
    await screenshot(page, 'stop-form-help-ask');
    await ask.click();
    await bubble.waitFor();
    expect(await bubble.textContent()).toMatch(/Unit .+Typical .+More: /);
    // The field kept the focus: Tab goes on from it, and the keyboard's focus shows the help.
    await page.keyboard.press('Tab');
    await page.waitForTimeout(100);
    const focused = await page.evaluate(() => document.activeElement?.tagName);
    if (focused === 'INPUT' || focused === 'SELECT') expect(await bubble.isVisible()).toBe(true);
    // A select clicked with the mouse: no bubble over the page either.
    await page.keyboard.press('Alt+1');
    await page.locator('#f-line').click();
    await page.keyboard.press('Escape');
    await page.waitForTimeout(100);
    expect(await bubble.isVisible()).toBe(false);
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  it('shows every list\'s choice whole at 800 px, in every view', async () => {
    const { page, context, consoleErrors } = await openReady(harness(), { width: 800 });
    await page.locator('#f-line').selectOption('gaussian');
    await page.locator('#f-line-bound').selectOption('both');
    await page.locator('#f-line').selectOption('none');
    await page.getByTestId('run').click();
    await runToEnd(page, 120_000);
    const cut: string[] = [];
    for (let view = 1; view <= 7; view++) {
      await page.keyboard.press(`Alt+${view}`);
      await page.waitForTimeout(600);
      // The chosen option's text as the select's own font draws it, with its padding and arrow (about 20 px), against its width.
      cut.push(
        ...(await page.evaluate(() => {
          const ink = document.createElement('canvas').getContext('2d')!;
          return [...document.querySelectorAll('select')].flatMap((s) => {
            const box = s.getBoundingClientRect();
            if (box.width === 0) return [];
            const style = getComputedStyle(s);
            ink.font = `${style.fontWeight} ${style.fontSize} ${style.fontFamily}`;
            const text = s.selectedOptions[0]?.textContent ?? '';
            const needs = ink.measureText(text).width + parseFloat(style.paddingLeft) + parseFloat(style.paddingRight) + 20;
            return needs > box.width || box.right > document.documentElement.clientWidth ? [`#${s.id} "${text}": ${Math.round(needs)} px in ${Math.round(box.width)}`] : [];
          });
        })),
      );
    }
    // Before: #f-bound, #f-line and the pulse picker were cut ("disc: √(I² + Q", "none: the qu").
    expect([...new Set(cut)]).toEqual([]);
    await page.keyboard.press('Alt+2');
    await screenshotLooks(page, 'stop-form-selects', ['light', 'dark']);
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 240_000);

  it('says how long before the first sample the drive through a centred Gaussian line starts', async () => {
    const { page, context, consoleErrors } = await openReady(harness());
    await page.locator('#f-line').selectOption('gaussian');
    // Source: docs/physics.md, "Tails and the simulated window" and "Delay": the Gaussian of -3 dB
    // bandwidth fc has sigma = sqrt(ln 2) / (2 pi fc) and is kept to 7.0345 sigma on each side, so
    // the drive starts lead = ceil(7.0345 sigma / delta - 1/2) fine steps delta before the first
    // sample. The demo: 300 MHz, 2 ns samples over 8 fine steps (delta = 0.25 ns): 7.0345 sigma = 3.107 ns, 12 steps, 3 ns.
    const sigma = Math.sqrt(Math.LN2) / (2 * Math.PI * 3e8);
    const delta = 2e-9 / 8;
    const lead = Math.ceil((7.0345 * sigma) / delta - 0.5) * delta;
    expect(lead).toBeCloseTo(3e-9, 15);
    await page.getByTestId('line-lead').waitFor();
    expect(await text(page, 'line-lead')).toContain('starts 3 ns before the first sample');
    await page.getByTestId('run').click();
    await runToEnd(page, 120_000);
    await page.keyboard.press('Alt+2');
    await page.getByTestId('drive-note').waitFor();
    expect((await text(page, 'drive-note')).replace(/\s+/g, ' ')).toContain('It starts 3 ns before the first sample: the line\'s response is centred on each sample');
    // The time axis starts where that drive starts, and ends where its trailing tail ends: the
    // kernel is symmetric (the same 7.0345 sigma on each side), so lead after the last sample's end.
    await page.waitForFunction(() => document.querySelector<HTMLCanvasElement>('[data-testid=waveform-chart]')?.dataset.timeSpan?.startsWith('-'));
    const [from, to] = (await page.getByTestId('waveform-chart').getAttribute('data-time-span'))!.split(' ').map(Number);
    expect(from).toBeCloseTo(-lead, 15);
    expect(to).toBeCloseTo(200e-9 + lead, 15);
    // A delay of the lead's length: the drive starts at the first sample, and neither note shows.
    await page.keyboard.press('Alt+1');
    await page.locator('#f-line-delay').fill('3 ns');
    await page.waitForFunction(() => !document.querySelector('[data-testid=line-lead]'));
    await page.keyboard.press('Alt+1');
    await page.locator('#f-line-delay').fill('');
    await page.keyboard.press('Alt+2');
    await page.waitForTimeout(800);
    await screenshotLooks(page, 'stop-form-line-lead');
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 240_000);
});
