// What the app lets through, in Debian's Chromium (playwright-core) on the production build:
// work is never lost without a way back (undo, redo, partial JSON, demo, Remove), values the
// core cannot compute are refused in the form's own words before they reach it, odd ones are
// warned about without blocking, and large inputs (100 000 samples, a large pulse file) leave
// the page responsive with Stop in effect at once. Screenshots go to test-results/.
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { runEnabled, runToEnd, screenshot, skipReason, typeInto, type Visit } from './harness.ts';
import { openReady, screenshotsEverywhere, useHarness } from './screens.ts';

const reason = skipReason();
if (reason) console.warn(`browser tests skipped: ${reason}`);

const runDisabled = (page: Page) => page.waitForFunction(() => (document.querySelector('[data-testid=run]') as HTMLButtonElement).disabled, undefined, { timeout: 30_000 });
const value = (page: Page, selector: string) => page.locator(selector).inputValue();

describe.skipIf(reason !== null)('what the app lets slip, in Chromium', () => {
  const harness = useHarness();
  const fresh = (): Promise<Visit> => openReady(harness());

  it('merges a partial JSON spec, and undoes and redoes it, a demo and a removed pulse', async () => {
    const { page } = await fresh();
    await typeInto(page, '#f-rabi', '12 MHz');
    await page.waitForTimeout(1100); // a later edit is a step of its own
    // A part of a spec changes only what it names: the other fields keep their values.
    await page.locator('summary', { hasText: 'Spec JSON' }).click();
    await page.locator('#f-spec-json').fill('{"duration": 4e-7}');
    await page.getByRole('button', { name: 'Apply JSON' }).click();
    await page.waitForFunction(() => (document.querySelector('#f-duration') as HTMLInputElement).value === '400 ns');
    expect(await value(page, '#f-rabi')).toBe('12 MHz');
    expect(await value(page, '#f-segments')).toBe('100');
    expect(await value(page, '#f-detuning-max')).toBe('1 MHz');
    expect(await page.getByTestId('notice').textContent()).toContain('Changed duration from the JSON');
    await runEnabled(page);
    // Ctrl+Z (outside the JSON editor) undoes it, then the Peak Rabi edit; Ctrl+Shift+Z redoes.
    await page.locator('h1').click();
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => (document.querySelector('#f-duration') as HTMLInputElement).value === '200 ns');
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '10 MHz');
    await page.keyboard.press('Control+Shift+z');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '12 MHz');
    // Loading a demo over an edited spec is one Undo away.
    await page.locator('#demo-picker').selectOption('ion-x180');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '100 kHz');
    await page.getByTestId('notice-action').click();
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '12 MHz');
    // Remove takes a pulse away; the notice brings it back.
    await page.getByTestId('open-pulse').setInputFiles({ name: 'keep.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify({ dt: 2e-9, i: new Array(100).fill(1e6), q: new Array(100).fill(0) })) });
    await page.getByTestId('notice').filter({ hasText: 'Opened keep.json' }).waitFor();
    await page.keyboard.press('Alt+2');
    await page.getByRole('button', { name: 'Remove' }).click();
    await page.getByTestId('notice').filter({ hasText: 'Removed keep.json' }).waitFor();
    expect(await page.locator('#pulse-picker option', { hasText: 'keep.json' }).count()).toBe(0);
    await page.getByTestId('notice-action').click();
    await page.locator('#pulse-picker option', { hasText: 'keep.json' }).waitFor({ state: 'attached' });
    expect(await page.locator('#pulse-picker').inputValue()).toMatch(/^file-/);
    await screenshot(page, 'safety-01-undo');
  }, 120_000);

  it('keeps the undo history across a reload: a mistaken "Apply JSON" is still one Ctrl+Z away', async () => {
    const { page } = await fresh();
    await page.locator('summary', { hasText: 'Spec JSON' }).click();
    await page.locator('#f-spec-json').fill('{"duration": 4e-7, "rabiMax": 3e7}');
    await page.getByRole('button', { name: 'Apply JSON' }).click();
    await page.waitForFunction(() => (document.querySelector('#f-duration') as HTMLInputElement).value === '400 ns');
    // The autosave follows the edit within AUTOSAVE_DELAY_MS; reloading then keeps the history.
    await page.waitForTimeout(1500);
    await page.reload();
    await page.getByTestId('run').waitFor();
    await page.waitForFunction(() => (document.querySelector('#f-duration') as HTMLInputElement).value === '400 ns');
    await page.waitForFunction(() => !(document.querySelector('[data-testid=undo]') as HTMLButtonElement).disabled);
    await page.locator('h1').click();
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => (document.querySelector('#f-duration') as HTMLInputElement).value === '200 ns');
    expect(await value(page, '#f-rabi')).toBe('10 MHz');
    await page.keyboard.press('Control+Shift+z');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '30 MHz');
    await screenshot(page, 'safety-01b-undo-after-reload');
  }, 120_000);

  it('keeps the keyboard where it was when Ctrl+Z and Ctrl+Shift+Z redraw the form', async () => {
    const { page } = await fresh();
    const focused = () => page.evaluate(() => {
      const element = document.activeElement as HTMLInputElement | null;
      return element?.id || (element?.name ? `${element.name}=${element.value}` : element?.tagName ?? '');
    });
    // Typed, then undone from the field itself: the field keeps the focus and takes more typing.
    await page.locator('#f-rabi').click();
    await page.keyboard.press('Control+a');
    await page.keyboard.type('20 MHz');
    await page.waitForFunction(() => !(document.querySelector('[data-testid=undo]') as HTMLButtonElement).disabled);
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '10 MHz');
    expect(await focused()).toBe('f-rabi');
    await page.keyboard.press('Control+Shift+z');
    await page.waitForFunction(() => (document.querySelector('#f-rabi') as HTMLInputElement).value === '20 MHz');
    expect(await focused()).toBe('f-rabi');
    // Tab goes on to the next field, not back to the top of the page.
    await page.keyboard.press('Tab');
    expect(await focused()).toBe('f-duration');
    // A choice made with the arrow keys in a radio group, undone: the group keeps the focus.
    await page.locator('input[name="f-detuning-mode"][value="range"]').focus();
    await page.keyboard.press('ArrowRight');
    await page.waitForFunction(() => (document.querySelector('input[name="f-detuning-mode"][value="gaussian"]') as HTMLInputElement | null)?.checked === true);
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => (document.querySelector('input[name="f-detuning-mode"][value="range"]') as HTMLInputElement | null)?.checked === true);
    expect(await focused()).toMatch(/^f-detuning-mode=/);
  }, 120_000);

  it('undoes with Ctrl+Z the latest action, a removed pulse included, before older spec edits', async () => {
    const { page } = await fresh();
    const rabi = (text: string) => page.waitForFunction((t) => (document.querySelector('#f-rabi') as HTMLInputElement).value === t, text);
    const listed = () => page.locator('#pulse-picker option', { hasText: 'keep.json' }).count();
    await page.getByTestId('open-pulse').setInputFiles({ name: 'keep.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify({ dt: 2e-9, i: new Array(100).fill(1e6), q: new Array(100).fill(0) })) });
    await page.getByTestId('notice').filter({ hasText: 'Opened keep.json' }).waitFor();
    await typeInto(page, '#f-rabi', '12 MHz');
    await page.keyboard.press('Alt+2');
    await page.getByRole('button', { name: 'Remove' }).click();
    await page.getByTestId('notice').filter({ hasText: 'Removed keep.json' }).waitFor();
    // The removal came last: Ctrl+Z brings the pulse back and leaves the Peak Rabi edit alone.
    await page.locator('h1').click();
    await page.keyboard.press('Control+z');
    await page.locator('#pulse-picker option', { hasText: 'keep.json' }).waitFor({ state: 'attached' });
    expect(await page.locator('#f-rabi').inputValue()).toBe('12 MHz');
    // The next Ctrl+Z goes on to the spec edit.
    await page.keyboard.press('Control+z');
    await rabi('10 MHz');
    expect(await listed()).toBe(1);
    // A spec edit made after a removal comes first.
    await page.getByRole('button', { name: 'Remove' }).click();
    await page.getByTestId('notice').filter({ hasText: 'Removed keep.json' }).waitFor();
    await typeInto(page, '#f-rabi', '14 MHz');
    await page.locator('h1').click();
    await page.keyboard.press('Control+z');
    await rabi('10 MHz');
    expect(await listed()).toBe(0);
    // The notice still brings the pulse back.
    await page.getByTestId('notice-action').click();
    await page.locator('#pulse-picker option', { hasText: 'keep.json' }).waitFor({ state: 'attached' });
  }, 120_000);

  it('refuses what the core cannot compute, in the field\'s own words, and warns on what is odd', async () => {
    const { page } = await fresh();
    // Peak Rabi 1e30 Hz: 2e21 turns within one 2 ns sample (the core's phase is lost beyond 1e6).
    await typeInto(page, '#f-rabi', '1e30 Hz');
    await page.locator('#f-rabi-error').waitFor();
    const rabi = (await page.locator('#f-rabi-error').textContent()) ?? '';
    expect(rabi).toMatch(/^Peak Rabi: /);
    expect(rabi).toContain('turns the qubit');
    expect(rabi).not.toMatch(/rabiMax|\d Hz\b/);
    await runDisabled(page);
    expect(await page.getByTestId('run-blocker').textContent()).toContain('Peak Rabi:');
    await typeInto(page, '#f-rabi', '10 MHz');
    await runEnabled(page);
    // Duration 1e30 s (a sample period of 1e28 s).
    await typeInto(page, '#f-duration', '1e30 s');
    await page.locator('#f-duration-error').waitFor();
    expect(await page.locator('#f-duration-error').textContent()).toMatch(/^Duration: a sample period of .* turns the qubit/);
    await runDisabled(page);
    await typeInto(page, '#f-duration', '200 ns');
    await runEnabled(page);
    // An error range to 1e30 Hz of detuning.
    await typeInto(page, '#f-detuning-max', '1e30 Hz');
    await page.locator('#f-detuning-max-error').waitFor();
    expect(await page.locator('#f-detuning-max-error').textContent()).toMatch(/^Detuning to: a detuning of .* turns the qubit/);
    await runDisabled(page);
    await typeInto(page, '#f-detuning-max', '1 MHz');
    await runEnabled(page);
    // Odd but computable: said under the field, and Run stays enabled.
    await typeInto(page, '#f-rabi', '2 GHz');
    await page.locator('#f-rabi-warning').waitFor();
    expect(await page.locator('#f-rabi-warning').textContent()).toContain('above 1 GHz');
    await runEnabled(page);
    await typeInto(page, '#f-rabi', '100 kHz');
    // +-1 MHz of detuning is twenty times a 100 kHz peak Rabi frequency.
    await page.getByTestId('f-detuning-warning').waitFor();
    expect(await page.getByTestId('f-detuning-warning').textContent()).toContain('more than 10 times the peak Rabi frequency');
    await typeInto(page, '#f-angle', '1000');
    await page.locator('#f-angle-warning').waitFor();
    expect(await page.locator('#f-angle-warning').textContent()).toBe('⚠ 1000° is beyond ±720°: the same gate as 280°');
    await runEnabled(page);
    await screenshot(page, 'safety-02-limits');
    // The library's own refusals are told with the form's labels too (src/core/spec.ts says "segments: ...").
    await typeInto(page, '#f-segments', '0');
    await page.locator('#f-segments-error').waitFor();
    expect(await page.locator('#f-segments-error').textContent()).toBe('Samples: 0 is not allowed; an integer from 1 to 100000');
  }, 120_000);

  it('tells the rules between fields in the form\'s labels and units, at the field typed into', async () => {
    const { page } = await fresh();
    const said = async (selector: string) => {
      await page.locator(selector).waitFor();
      return (await page.locator(selector).textContent()) ?? '';
    };
    // A detuning range from 5 MHz to 1 MHz: the bound is in MHz, not "5000000 (Hz)".
    await typeInto(page, '#f-detuning-min', '5 MHz');
    await runDisabled(page);
    const detuning = (await page.getByTestId('run-blocker').textContent()) ?? '';
    expect(detuning).toContain('Detuning to: 1 MHz is not allowed; a finite number >= 5 MHz');
    expect(detuning).not.toMatch(/\(Hz\)|5000000/);
    await typeInto(page, '#f-detuning-min', '-1 MHz');
    await runEnabled(page);
    // An amplitude error range to -20 % below its -10 % start: in %, not "-0.1 (relative)".
    await typeInto(page, '#f-amplitudeError-max', '-20 %');
    expect(await said('#f-amplitudeError-max-error')).toBe('Amplitude error to: -20 % is not allowed; a finite number >= -10 %');
    await typeInto(page, '#f-amplitudeError-max', '10 %');
    await runEnabled(page);
    // The ladder's fields by their labels, never "system.levels" or "system.anharmonicity".
    await typeInto(page, '#f-levels', '1');
    expect(await said('#f-levels-error')).toBe('Levels: 1 is not allowed; an integer from 2 to 8');
    await typeInto(page, '#f-levels', '3');
    await runDisabled(page);
    expect(await said('#f-alpha-error')).toBe('Anharmonicity: a value is required: a finite number in Hz, kHz, MHz or GHz');
    await typeInto(page, '#f-alpha', '-200 MHz');
    await runEnabled(page);
    await typeInto(page, '#f-levels', '');
    await runDisabled(page);
    expect(await said('#f-levels-error')).toBe('Levels: a value is required: an integer from 2 to 8');
    await typeInto(page, '#f-alpha', '');
    await runEnabled(page);
    // A sample period of zero or below is refused at Sample period, and the duration is kept.
    await typeInto(page, '#f-dt', '0');
    expect(await said('#f-dt-error')).toBe('Sample period: 0 ns is not allowed; a finite number > 0 ns');
    await runDisabled(page);
    expect(await value(page, '#f-duration')).toBe('200 ns');
    expect(await page.locator('#f-duration-error').count()).toBe(0);
    await typeInto(page, '#f-dt', '-2 ns');
    expect(await said('#f-dt-error')).toBe('Sample period: -2 ns is not allowed; a finite number > 0 ns');
    await typeInto(page, '#f-dt', '2 ns');
    await runEnabled(page);
    expect(await page.locator('#f-dt-error').count()).toBe(0);
    // "2e-7" typed into Duration out of the spec JSON's habit: 2e-7 ns, warned where it was typed, not blocked.
    await typeInto(page, '#f-duration', '2e-7');
    await page.locator('#f-duration-warning').waitFor();
    expect(await page.locator('#f-duration-warning').textContent()).toBe('⚠ a sample period of 2e-6 ps is below any instrument\'s 1 ps: a bare number is in ns; write the unit, as in "200 ns" or "2e-7 s"');
    await runEnabled(page);
    await typeInto(page, '#f-duration', '2e-7 s');
    await page.waitForFunction(() => document.querySelector('#f-duration-warning') === null);
    expect(await value(page, '#f-dt')).toBe('2 ns');
    // A key the spec does not have, from the JSON editor: the keys it allows as they are typed there.
    await page.locator('summary', { hasText: 'Spec JSON' }).click();
    await page.locator('#f-spec-json').fill('{"foo": 1}');
    await page.getByRole('button', { name: 'Apply JSON' }).click();
    await runDisabled(page);
    const unknown = (await page.getByTestId('run-blocker').textContent()) ?? '';
    expect(unknown).toContain('unknown key; a design spec allows only name, description, target, duration, segments, rabiMax, ensemble');
  }, 120_000);

  it('reads sample rates in GS/s and GSa/s, refuses an absurd one clearly, and flags a sample period the instrument cannot hold', async () => {
    const { page } = await fresh();
    await page.getByTestId('run').click();
    await runToEnd(page);
    await page.keyboard.press('Alt+6');
    await typeInto(page, '#x-sample-rate', '2 GS/s');
    await page.waitForFunction(() => (document.querySelector('[data-testid=export-command]')?.textContent ?? '').includes('--sample-rate 2000000000'), undefined, { timeout: 30_000 });
    await typeInto(page, '#x-sample-rate', '2.5 GSa/s');
    await page.waitForFunction(() => (document.querySelector('[data-testid=export-command]')?.textContent ?? '').includes('--sample-rate 2500000000'), undefined, { timeout: 30_000 });
    await typeInto(page, '#x-sample-rate', '1e30 Hz');
    await page.waitForFunction(() => document.querySelector('[data-testid=export-panel]')?.getAttribute('data-state') === 'invalid', undefined, { timeout: 30_000 });
    const said = (await page.locator('[data-testid=export-panel]').textContent()) ?? '';
    expect(said).toContain('Sample rate: ');
    expect(said).toContain('at most 16777216 samples');
    expect(said).not.toContain('RangeError');
    await screenshot(page, 'safety-03-export-rate');
    await typeInto(page, '#x-sample-rate', '1 GHz');
    // 200 ns in 120 samples: 1.6667 ns, not a whole number of 1 ns periods; flagged at Samples.
    await page.keyboard.press('Alt+1');
    await typeInto(page, '#f-segments', '120');
    await page.locator('#f-segments-warning').waitFor();
    expect(await page.locator('#f-segments-warning').textContent()).toContain('1.6667 periods of the export');
    // Said once, where it was made.
    expect(await page.locator('#f-dt-warning').count()).toBe(0);
    await runEnabled(page);
    // The Time limit reads a bare number in seconds, as its hint says.
    expect(await page.locator('#f-time-hint').textContent()).toContain('seconds');
    await typeInto(page, '#f-time', '5');
    await page.locator('#f-time').dispatchEvent('change');
    expect(await value(page, '#f-time')).toBe('5 s');
  }, 120_000);

  it('keeps the page responsive at 100 000 samples and stops at once, keeping the best pulse reported', async () => {
    const { page } = await fresh();
    await typeInto(page, '#f-duration', '200 us');
    await typeInto(page, '#f-segments', '100000');
    await typeInto(page, '#f-iterations', '100000');
    await runEnabled(page);
    await page.getByTestId('run').click();
    await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 2, undefined, { timeout: 60_000 });
    // A click is handled while the design runs: the tab changes.
    await page.getByRole('tab', { name: 'Robustness' }).click({ timeout: 5_000 });
    expect(await page.getByRole('tab', { name: 'Robustness' }).getAttribute('aria-selected')).toBe('true');
    await page.getByRole('tab', { name: 'Design' }).click({ timeout: 5_000 });
    await page.getByTestId('live-caption').waitFor({ timeout: 30_000 });
    await page.getByTestId('stop').click();
    expect(await runToEnd(page, 10_000)).toBe('stopped, best pulse kept');
    await page.keyboard.press('Alt+2');
    await page.getByText('100000', { exact: true }).waitFor({ timeout: 10_000 });
    expect(await page.locator('#pulse-picker option').first().textContent()).toContain('stopped');
    // The kept pulse's figures: the worst member is known (now or shortly after).
    await page.waitForFunction(() => /\de-?\d/.test(document.querySelector('[data-testid=run-worst]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    // A new run starts on the fresh design workers.
    await typeInto(page, '#f-segments', '100');
    await typeInto(page, '#f-iterations', '50');
    await runEnabled(page);
    await page.getByTestId('run').click();
    await page.waitForFunction(() => !/^stopped/.test(document.querySelector('[data-testid=run-status]')?.textContent ?? ''), undefined, { timeout: 10_000 });
    expect(await runToEnd(page, 60_000)).toMatch(/^done/);
    await screenshot(page, 'safety-04-large-stopped');
  }, 180_000);

  it('reads a large pulse file in the worker and shows its progress', async () => {
    const { page } = await fresh();
    const dir = await mkdtemp(join(tmpdir(), 'gatesmith-e2e-large-'));
    try {
      // 400 000 samples written with 17 digits: about 16 MB.
      const n = 400_000;
      const values = (phase: number) => Array.from({ length: n }, (_, k) => (4e6 * Math.sin((k + phase) / 997)).toPrecision(17)).join(',');
      const path = join(dir, 'large.json');
      await writeFile(path, `{"dt":1e-9,"i":[${values(0)}],"q":[${values(300)}],"metadata":{"name":"large"}}`);
      await page.getByTestId('open-pulse').setInputFiles(path);
      await page.getByTestId('file-progress').waitFor({ timeout: 10_000 });
      expect(await page.getByTestId('file-progress').textContent()).toContain('large.json');
      // The page answers while the file is read: a click on a tab is handled.
      await page.getByRole('tab', { name: 'Waveform' }).click({ timeout: 5_000 });
      await page.getByTestId('notice').filter({ hasText: `Opened large.json: ${n} samples` }).waitFor({ timeout: 60_000 });
      expect(await page.getByTestId('file-progress').count()).toBe(0);
      await page.getByText(String(n), { exact: true }).waitFor({ timeout: 10_000 });
      await screenshot(page, 'safety-05-large-file');
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  }, 120_000);

  it('looks right in light and dark, at 1440 and 800 px wide', async () => {
    await screenshotsEverywhere(harness(), 'safety-06-form', async (page) => {
      await runEnabled(page);
      await page.locator('#demo-picker').selectOption('ion-x180');
      await page.getByTestId('notice-action').waitFor();
      // Two warnings (a 2 GHz drive; an angle beyond 720°) and text that does not read.
      await typeInto(page, '#f-rabi', '2 GHz');
      await typeInto(page, '#f-angle', '1000');
      await typeInto(page, '#f-seed', 'one');
      await page.locator('#f-rabi-warning').waitFor();
      await page.locator('#f-angle-warning').waitFor();
      await page.locator('#f-seed-error').waitFor();
    });
  }, 180_000);
});
