// The export panel end to end in Debian's Chromium (playwright-core): a designed pulse is
// exported with settings typed into the form, and every downloaded file equals, byte for
// byte, what the command line (src/cli/main.ts, run in this process) writes from the pulse
// JSON the page downloaded with the same settings (issue 5). Invalid fields and refused
// exports offer nothing to download. Each test leaves screenshots in test-results/.
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { CliIO } from '../../src/cli/command.ts';
import { main } from '../../src/cli/main.ts';
import { runToEnd, screenshot, skipReason, typeInto } from './harness.ts';
import { FAST_LOBE, FAST_TRANSMON, openPulse, openReady, screenshotsEverywhere, useHarness } from './screens.ts';

const reason = skipReason();
if (reason) console.warn(`browser tests skipped: ${reason}`);

/** Runs `gatesmith ARGS` in this process; fails the test with its message when it exits non-zero. */
async function cli(args: string[]): Promise<string> {
  const out: string[] = [];
  const err: string[] = [];
  const io: CliIO = { stdout: (t) => void out.push(t), stderr: (t) => void err.push(t), isTTY: false };
  const code = await main(args, io);
  expect(code, `gatesmith ${args.join(' ')}: ${err.join('')}`).toBe(0);
  return out.join('');
}

/** Clicks a download button and saves the file under `dir`; returns its suggested name, where it was saved and its bytes. */
async function downloadFrom(page: Page, testid: string, dir: string): Promise<{ name: string; path: string; bytes: Buffer }> {
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testid).click()]);
  const name = download.suggestedFilename();
  const path = join(dir, `app-${name}`);
  await download.saveAs(path);
  return { name, path, bytes: await readFile(path) };
}

/** Where two files first differ, with a little text around it, for the failure message. */
function firstDifference(a: Buffer, b: Buffer): string {
  let k = 0;
  while (k < a.length && k < b.length && a[k] === b[k]) k++;
  if (k === a.length && k === b.length) return 'identical';
  const around = (x: Buffer) => JSON.stringify(x.subarray(Math.max(0, k - 40), k + 40).toString('latin1'));
  return `byte ${k}: app ${around(a)} vs command line ${around(b)}`;
}

/** Waits until the panel has exported the current settings (the command shown includes `flags`). */
async function exported(page: Page, flags: string): Promise<void> {
  const shown = async () =>
    `state ${await page.getByTestId('export-panel').getAttribute('data-state')}, command "${await page.getByTestId('export-command').textContent().catch(() => '')}", ` +
    `refusal "${await page.getByTestId('export-refusal').textContent({ timeout: 100 }).catch(() => '')}"`;
  await page.waitForFunction(
    (want) =>
      document.querySelector('[data-testid=export-panel]')?.getAttribute('data-state') === 'ready' &&
      (document.querySelector('[data-testid=export-command]')?.textContent ?? '').includes(want),
    flags,
    { timeout: 30_000 },
  ).catch(async (error) => {
    throw new Error(`the panel did not export "${flags}": ${await shown()} (${(error as Error).message})`);
  });
}

/** Waits until the panel shows the state given (invalid, refused, ready). */
async function panelState(page: Page, state: string): Promise<void> {
  await page.waitForFunction((want) => document.querySelector('[data-testid=export-panel]')?.getAttribute('data-state') === want, state, { timeout: 30_000 });
}

describe.skipIf(reason !== null)('the export panel in Chromium', () => {
  const harness = useHarness();
  let dir: string;

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'gatesmith-e2e-export-'));
  });

  afterAll(async () => {
    if (dir) await rm(dir, { recursive: true, force: true });
  });

  it('downloads exactly the bytes the command line writes for a designed pulse, in every format', async () => {
    const v = await openReady(harness());
    const { page } = v;
    await page.getByTestId('run').click();
    expect(await runToEnd(page)).toMatch(/^done/);
    await page.keyboard.press('Alt+6');
    await panelState(page, 'ready');
    // The pulse JSON from the page's own download is what the command line reads.
    const pulseFile = await downloadFrom(page, 'export-pulse-json', dir);
    expect(pulseFile.name).toMatch(/\.pulse\.json$/);
    const pulsePath = pulseFile.path;

    // Each case: what is typed or chosen in the form, and the same settings as command-line flags.
    const cases: Array<{ name: string; set: () => Promise<void>; flags: string[]; shown: string; sidecar: boolean }> = [
      {
        name: 'npy',
        async set() {
          await typeInto(page, '#x-sample-rate', '1 GHz');
          await typeInto(page, '#x-full-scale', '12 MHz');
          await typeInto(page, '#x-granularity', '32');
          await page.locator('#x-pad').selectOption('split');
          await page.locator('#x-marker').check();
          await page.locator('#x-format').selectOption('npy');
        },
        flags: ['--format', 'npy', '--sample-rate', '1e9', '--bits', '14', '--full-scale', '12e6', '--granularity', '32', '--pad', 'split', '--marker'],
        shown: '--format npy --sample-rate 1000000000 --bits 14 --full-scale 12000000 --granularity 32 --pad split --marker',
        sidecar: true,
      },
      {
        name: 'raw, single sideband',
        async set() {
          await page.locator('#x-marker').uncheck();
          // 4 instrument samples per design sample: the demodulation for the report needs at least 2.
          await typeInto(page, '#x-sample-rate', '2 GHz');
          await page.getByLabel('one channel, single sideband').check();
          await typeInto(page, '#x-if', '125 MHz');
          await page.locator('#x-sideband').selectOption('lower');
          await page.locator('#x-mixer-sign').selectOption('-1');
          await page.locator('#x-format').selectOption('raw');
        },
        flags: ['--format', 'raw', '--sample-rate', '2e9', '--bits', '14', '--full-scale', '12e6', '--granularity', '32', '--pad', 'split'],
        shown: '--if 125000000 --sideband lower --mixer-sign -1 --out',
        sidecar: true,
      },
      {
        name: 'csv in Hz, 16 bits at 2.5 GS/s',
        async set() {
          await page.getByLabel('I and Q', { exact: true }).check();
          await page.locator('#x-bits').selectOption('16');
          await typeInto(page, '#x-sample-rate', '2.5 GHz');
          await typeInto(page, '#x-granularity', '1');
          await typeInto(page, '#x-min-length', '640');
          await typeInto(page, '#x-max-length', '1024');
          await page.locator('#x-pad').selectOption('before');
          await page.locator('#x-format').selectOption('csv');
          await page.locator('#x-units').selectOption('hz');
        },
        flags: ['--format', 'csv', '--units', 'hz', '--sample-rate', '2.5e9', '--bits', '16', '--full-scale', '1.2e7', '--min-length', '640', '--max-length', '1024', '--pad', 'before'],
        shown: '--min-length 640 --max-length 1024 --pad before --units hz',
        sidecar: false,
      },
      {
        name: 'json, resampled linearly to 2.4 GS/s',
        async set() {
          await typeInto(page, '#x-sample-rate', '2.4 GHz');
          await page.locator('#x-resample').selectOption('linear');
          await typeInto(page, '#x-min-length', '0');
          await typeInto(page, '#x-max-length', '');
          await page.locator('#x-format').selectOption('json');
        },
        flags: ['--format', 'json', '--sample-rate', '2.4e9', '--bits', '16', '--full-scale', '1.2e7', '--resample', 'linear', '--pad', 'before'],
        shown: '--format json --sample-rate 2400000000 --bits 16 --full-scale 12000000 --resample linear --pad before --out',
        sidecar: false,
      },
      {
        name: 'wav, 12 bits',
        async set() {
          await typeInto(page, '#x-sample-rate', '1 GHz');
          await page.locator('#x-resample').selectOption('hold');
          await page.locator('#x-bits').selectOption('12');
          await page.locator('#x-format').selectOption('wav');
        },
        flags: ['--format', 'wav', '--sample-rate', '1e9', '--bits', '12', '--full-scale', '1.2e7', '--pad', 'before'],
        shown: '--format wav --sample-rate 1000000000 --bits 12 --full-scale 12000000 --pad before --out',
        sidecar: false,
      },
    ];
    for (const [k, c] of cases.entries()) {
      await c.set();
      await exported(page, c.shown);
      if (c.name.includes('single sideband')) c.flags.push('--if', '1.25e8', '--sideband', 'lower', '--mixer-sign', '-1');
      const file = await downloadFrom(page, 'export-download', dir);
      const out = join(dir, `cli-${k}-${file.name}`);
      const report = await cli([...['export', pulsePath], ...c.flags, '--out', out]);
      expect(report).toContain(`wrote ${out}`);
      const written = await readFile(out);
      expect(firstDifference(file.bytes, written), `${c.name}: the downloaded bytes against the command line's`).toBe('identical');
      if (c.sidecar) {
        const description = await downloadFrom(page, 'export-download-sidecar', dir);
        expect(description.name).toBe(`${file.name}.json`);
        expect(description.bytes.equals(await readFile(`${out}.json`)), `${c.name}: the description equals the command line's`).toBe(true);
      } else {
        expect(await page.getByTestId('export-download-sidecar').count()).toBe(0);
      }
      if (k === 0) await screenshot(page, 'e2e-export-01-npy');
      if (c.name.includes('single sideband')) await screenshot(page, 'e2e-export-02-ssb');
    }

    // The panel's figures are the command line's (the same library on the same pulse and ensemble).
    const printed = JSON.parse(await cli(['export', pulsePath, ...cases[4].flags, '--out', join(dir, 'again.wav'), '--json'])) as {
      gate: { exported: { meanInfidelity: number }; design: { meanInfidelity: number } };
      peak: { code: number };
      samples: { total: number };
    };
    expect(Number(await page.getByTestId('export-mean-played').textContent())).toBe(Number(printed.gate.exported.meanInfidelity.toExponential(2)));
    expect(await page.getByTestId('export-peak-code').textContent()).toContain(`${printed.peak.code} of 2047`);
    expect(await page.getByTestId('export-length').textContent()).toContain(`${printed.samples.total} samples`);
    expect(await page.getByTestId('export-caution').textContent()).toContain("check peak power, duty cycle and the ratings of the amplifiers and lines");

    // The exported waveform's robustness map, as a pulse of the session.
    await page.getByTestId('export-show-map').click();
    await page.getByRole('heading', { name: 'Robustness' }).waitFor();
    expect(await page.locator('#pulse-picker option:checked').textContent()).toContain('exported 1 GS/s, 12 bit');
    await page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
    await screenshot(page, 'e2e-export-03-map-of-export');
    expect(v.consoleErrors).toEqual([]);
    await v.context.close();
  }, 240_000);

  it('shows an invalid field\'s message and a refused export clearly, and offers nothing to download', async () => {
    const v = await openReady(harness(), { scheme: 'dark' });
    const { page, context } = v;
    let downloads = 0;
    page.on('download', () => void downloads++);
    // An opened pulse of 100 samples of 2 ns with both quadratures, peaking at 9.2 MHz.
    const i = Array.from({ length: 100 }, (_, k) => 9e6 * Math.sin((Math.PI * (k + 0.5)) / 100));
    const q = Array.from({ length: 100 }, (_, k) => 2e6 * Math.cos((2 * Math.PI * (k + 0.5)) / 100));
    const pulse = { dt: 2e-9, i, q, metadata: { name: 'lobe' } };
    await page.getByTestId('open-pulse').setInputFiles({ name: 'lobe.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(pulse)) });
    await page.getByTestId('notice').filter({ hasText: 'Opened lobe.json' }).waitFor();
    await page.keyboard.press('Alt+6');
    await panelState(page, 'ready');
    const download = page.getByTestId('export-download');
    expect(await download.isDisabled()).toBe(false);

    // Text that does not read.
    await typeInto(page, '#x-sample-rate', 'fast');
    await panelState(page, 'invalid');
    expect(await page.locator('#x-sample-rate-error').textContent()).toContain('Sample rate: "fast" is not a number');
    expect(await download.isDisabled()).toBe(true);
    await typeInto(page, '#x-sample-rate', '1 GHz');
    await panelState(page, 'ready');

    // The library's own message (parseExportSettings), under the field it names.
    await typeInto(page, '#x-granularity', '0');
    await panelState(page, 'invalid');
    // The library's message (src/io/export/settings.ts) told with the form's label.
    expect(await page.locator('#x-granularity-error').textContent()).toBe('Granularity: 0 is not allowed; a whole number of samples >= 1 (the block size)');
    expect(await page.getByTestId('export-blocker').textContent()).toContain('Granularity: 0 is not allowed');
    expect(await download.isDisabled()).toBe(true);
    await page.getByLabel('one channel, single sideband').check();
    await typeInto(page, '#x-if', '600 MHz');
    await screenshot(page, 'e2e-export-04-invalid');
    await typeInto(page, '#x-granularity', '16');
    expect(await page.locator('#x-if-error').textContent()).toContain('IF: 600 MHz is not allowed; a frequency with 0 < f < Sample rate/2 = 500 MHz (Nyquist)');
    await page.getByLabel('I and Q', { exact: true }).check();
    await panelState(page, 'ready');

    // A peak above full scale is refused, never clipped.
    await typeInto(page, '#x-full-scale', '8 MHz');
    await panelState(page, 'refused');
    const refusal = (await page.getByTestId('export-refusal').textContent()) ?? '';
    expect(refusal).not.toContain('ExportError');
    expect(refusal).toContain('above the full scale of 8 MHz; the waveform is not written (it is never clipped)');
    // The peak in six digits at most, and the field by its label (waveform.ts prints Hz in full and "fullScale").
    expect(refusal).toMatch(/reaches \d\.\d{1,5} MHz \(pulse sample \d+\)/);
    expect(refusal).toContain('or give Full scale as the calibrated Rabi frequency');
    expect(await download.isDisabled()).toBe(true);
    expect(await page.getByTestId('export-add').isDisabled()).toBe(true);
    await screenshot(page, 'e2e-export-05-refused');

    // dt not a whole number of sample periods, without a resampling method.
    await typeInto(page, '#x-full-scale', '10 MHz');
    await typeInto(page, '#x-sample-rate', '2.4 GHz');
    await panelState(page, 'refused');
    expect(await page.getByTestId('export-refusal').textContent()).toContain('Resample: "hold" needs the design\'s dt to be a whole number of instrument sample periods');
    expect(await page.locator('#x-sample-rate-hint').textContent()).toContain('is 4.8 sample periods');
    await page.locator('#x-resample').selectOption('average');
    await panelState(page, 'ready');

    // Too long for the instrument's memory.
    await typeInto(page, '#x-max-length', '256');
    await panelState(page, 'refused');
    expect(await page.getByTestId('export-refusal').textContent()).toContain('length: the waveform needs 480 samples');
    expect(await download.isDisabled()).toBe(true);
    await typeInto(page, '#x-max-length', '');
    await panelState(page, 'ready');
    expect(downloads).toBe(0);
    await screenshot(page, 'e2e-export-06-dark-ready');
    expect(v.consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  /** Opens the fast example with its lobe, in the export view. */
  async function fastExport(page: Page): Promise<void> {
    await openPulse(page, 'lobe.json', FAST_LOBE);
    await page.keyboard.press('Alt+6');
    await exported(page, '--sample-rate 2400000000');
  }

  it('exports at the rate of the instrument the spec describes, and warns at the sample period only about a rate the user types', async () => {
    const { page, context, consoleErrors } = await openReady(harness(), { hash: `#spec=${encodeURIComponent(FAST_TRANSMON)}` });
    // The spec form says nothing about the 416.67 ps period: the export follows it.
    expect(await page.locator('#f-dt').inputValue()).toBe('416.667 ps');
    expect(await page.locator('#f-dt-warning').count()).toBe(0);
    await fastExport(page);
    expect(await page.locator('#x-sample-rate').inputValue()).toBe('2.4 GHz');
    expect(await page.locator('#x-sample-rate-hint').textContent()).toBe('1 sample per design sample of 416.667 ps');
    // Another field edited: the rate still follows the spec.
    await page.locator('#x-bits').selectOption('16');
    await exported(page, '--bits 16');
    expect(await page.getByTestId('export-command').textContent()).toContain('--sample-rate 2400000000');
    // 1 GS/s typed: the period is 0.41667 of its sample periods, which the instrument cannot hold.
    await typeInto(page, '#x-sample-rate', '1 GHz');
    await page.keyboard.press('Alt+1');
    await page.locator('#f-dt-warning').waitFor();
    expect(await page.locator('#f-dt-warning').textContent()).toContain("416.67 ps is 0.41667 periods of the export's 1 GS/s");
    // Defaults: the rate follows the spec again, and the warning goes.
    await page.keyboard.press('Alt+6');
    await page.getByRole('button', { name: 'Defaults' }).click();
    await exported(page, '--sample-rate 2400000000');
    await page.keyboard.press('Alt+1');
    await page.waitForFunction(() => document.querySelector('#f-dt-warning') === null);
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  it('labels the time axis and words a refusal without rounding noise at sample rates that do not divide the pulse evenly', async () => {
    const { page, context, consoleErrors } = await openReady(harness());
    // 80 samples over 40 µs, as the ion demo makes them: dt = 40e-6 / 80 = 5.000000000000001e-7 s in binary64.
    const dt = 40e-6 / 80;
    await openPulse(page, 'slow.json', { dt, i: Array.from({ length: 80 }, (_, k) => (k === 0 || k === 79 ? 0 : 5e4)), q: new Array(80).fill(0) });
    await page.keyboard.press('Alt+6');
    // 1.2 GS/s: 48000 periods of 1/1.2 GHz, 4.0000000000000003e-5 s; the axis ends at 40 µs.
    await typeInto(page, '#x-sample-rate', '1.2 GSa/s');
    await exported(page, '--sample-rate 1200000000');
    await page.waitForFunction(() => /\b40$/.test(document.querySelector('[data-testid=export-chart]')?.getAttribute('data-time-ticks') ?? ''));
    expect(await page.getByTestId('export-chart').getAttribute('data-time-ticks')).not.toMatch(/\d{7}/);
    await screenshot(page, 'e2e-export-08-odd-rate');
    // 7 MS/s: 3.5 periods a sample, refused for "hold" with round figures (the hint already says 3.5).
    await typeInto(page, '#x-sample-rate', '7 MHz');
    await panelState(page, 'refused');
    const refusal = (await page.getByTestId('export-refusal').textContent()) ?? '';
    expect(refusal).toContain('dt = 500 ns is 3.5 periods at Sample rate 7 MHz');
    expect(refusal).not.toMatch(/\d{7}|ExportError/);
    expect(await page.locator('#x-sample-rate-hint').textContent()).toContain('is 3.5 sample periods');
    // A rate of zero: refused in the form's units, without "in Hz".
    await typeInto(page, '#x-sample-rate', '0');
    await panelState(page, 'invalid');
    expect(await page.locator('#x-sample-rate-error').textContent()).toBe('Sample rate: 0 MHz is not allowed; a finite number > 0 MHz: the instrument sample rate');
    expect(consoleErrors).toEqual([]);
    await context.close();
  }, 120_000);

  it('looks right in light and dark, at 1440 and 800 px wide: the fast example exported at 2.4 GS/s', async () => {
    await screenshotsEverywhere(harness(), 'e2e-export-07-instrument-rate', fastExport, { hash: `#spec=${encodeURIComponent(FAST_TRANSMON)}` });
  }, 180_000);
});
