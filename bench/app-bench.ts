// Browser benchmark of the app (not a test): builds and serves the app as the end-to-end
// tests do, drives Debian's Chromium, and prints figures:
//   page load to the first interactive form (Run enabled: core loaded, spec validated),
//   Run to the first convergence point, the design's wall time, main-thread long tasks
//   during a design (PerformanceObserver 'longtask': tasks over 50 ms), Stop latency,
//   and a 201 x 201 map's time to the first coarse image and to full resolution.
// Usage: npm run bench:app (needs /usr/bin/chromium); `npm run bench` runs it too and
// puts its figures under the key "app".
import type { Page } from 'playwright-core';
import { existsSync } from 'node:fs';
import { CHROMIUM, skipReason, startHarness, visit } from '../tests/e2e/harness.ts';

const REPEATS = 5;
/** Longest wait of an in-page measurement (ms); past it the figure is NaN, never a hang. */
const STEP_TIMEOUT_MS = 120_000;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function runEnabled(page: Page): Promise<number> {
  await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement | null)?.disabled, undefined, { timeout: 60_000 });
  return page.evaluate(() => performance.now());
}

/** Clicks Run and times, inside the page, the first reported iteration and the end of the run; records long tasks meanwhile. */
async function timedRun(page: Page): Promise<{ firstPointMs: number; designMs: number; longTasks: number[] }> {
  return page.evaluate(
    (timeoutMs) =>
      new Promise<{ firstPointMs: number; designMs: number; longTasks: number[] }>((resolve) => {
        setTimeout(() => resolve({ firstPointMs: NaN, designMs: NaN, longTasks: [] }), timeoutMs);
        const longTasks: number[] = [];
        const observer = new PerformanceObserver((list) => list.getEntries().forEach((e) => longTasks.push(e.duration)));
        observer.observe({ type: 'longtask', buffered: false });
        const iteration = document.querySelector('[data-testid=run-iteration]')!;
        const status = document.querySelector('[data-testid=run-status]')!;
        const t0 = performance.now();
        let firstPointMs = NaN;
        const watch = new MutationObserver(() => {
          if (Number.isNaN(firstPointMs) && Number(iteration.textContent) > 0) firstPointMs = performance.now() - t0;
          if (/^(done|stopped)/.test(status.textContent ?? '')) {
            watch.disconnect();
            // Let a last long task, if any, be reported.
            setTimeout(() => {
              observer.disconnect();
              resolve({ firstPointMs, designMs: performance.now() - t0, longTasks });
            }, 100);
          }
        });
        watch.observe(document.body, { subtree: true, characterData: true, childList: true });
        (document.querySelector('[data-testid=run]') as HTMLButtonElement).click();
      }),
    STEP_TIMEOUT_MS,
  );
}

async function setField(page: Page, selector: string, text: string): Promise<void> {
  await page.locator(selector).fill(text);
}

/** Medians of the app's figures (ms), and every long task seen during the designs. */
export interface AppFigures {
  loadToInteractiveMs: number;
  firstConvergencePointMs: number;
  demoDesignMs: number;
  stopMs: number;
  map201CoarseMs: number;
  map201FullMs: number;
  longTasksMs: number[];
  longTasksOver50: number;
}

/** Runs the browser benchmark; `log` receives the table. Null (with the reason logged) without Chromium. */
export async function appBenchmark(log: (line: string) => void = console.log): Promise<AppFigures | null> {
  const reason = existsSync(CHROMIUM) ? null : (skipReason() ?? `${CHROMIUM} is missing`);
  if (reason) {
    log(`app benchmark not run: ${reason}`);
    return null;
  }
  const harness = await startHarness();
  try {
    const loads: number[] = [];
    const firstPoints: number[] = [];
    const designs: number[] = [];
    const stops: number[] = [];
    const coarse: number[] = [];
    const full: number[] = [];
    let longTasks: number[] = [];
    for (let r = 0; r < REPEATS; r++) {
      const { page, context } = await visit(harness);
      loads.push(await runEnabled(page));
      const run = await timedRun(page);
      firstPoints.push(run.firstPointMs);
      designs.push(run.designMs);
      longTasks = longTasks.concat(run.longTasks);

      // A 201 x 201 map of the designed pulse.
      await page.keyboard.press('Alt+3');
      await page.waitForFunction(() => document.querySelector('[data-testid=map-status]')?.getAttribute('data-full-ms'), undefined, { timeout: 60_000 });
      await setField(page, '#m-d-n', '201');
      await setField(page, '#m-a-n', '201');
      await page.waitForFunction(() => /201 × 201 points/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
      const status = page.getByTestId('map-status');
      coarse.push(Number(await status.getAttribute('data-coarse-ms')));
      full.push(Number(await status.getAttribute('data-full-ms')));

      // Stop latency on a long run.
      await page.keyboard.press('Alt+1');
      await setField(page, '#f-segments', '1000');
      await setField(page, '#f-iterations', '100000');
      await runEnabled(page);
      await page.getByTestId('run').click();
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) > 20, undefined, { timeout: 60_000 });
      stops.push(
        await page.evaluate(
          (timeoutMs) =>
            new Promise<number>((resolve) => {
              setTimeout(() => resolve(NaN), timeoutMs);
              const status = document.querySelector('[data-testid=run-status]')!;
              const t0 = performance.now();
              const watch = new MutationObserver(() => {
                if (/^stopped/.test(status.textContent ?? '')) {
                  watch.disconnect();
                  resolve(performance.now() - t0);
                }
              });
              watch.observe(status, { subtree: true, characterData: true, childList: true });
              (document.querySelector('[data-testid=stop]') as HTMLButtonElement).click();
            }),
          STEP_TIMEOUT_MS,
        ),
      );
      await context.close();
    }
    const row = (name: string, values: number[], unit = 'ms') => log(`${name.padEnd(44)} ${median(values).toFixed(1).padStart(9)} ${unit}   (runs: ${values.map((v) => v.toFixed(1)).join(', ')})`);
    log(`gatesmith app benchmark, Chromium headless, ${REPEATS} fresh page loads, medians`);
    row('page load to first interactive form', loads);
    row('Run to first convergence point', firstPoints);
    row('demo design, Run to figures shown', designs);
    row('Stop to "stopped" (1000 samples x 25 members)', stops);
    row('201 x 201 map: first coarse image', coarse);
    row('201 x 201 map: full resolution', full);
    const over = longTasks.filter((t) => t > 50);
    log(
      `${'main-thread long tasks during designs'.padEnd(44)} ${String(longTasks.length).padStart(9)}      (over 50 ms: ${over.length}; longest ${longTasks.length ? Math.max(...longTasks).toFixed(0) : 0} ms)`,
    );
    return {
      loadToInteractiveMs: median(loads), firstConvergencePointMs: median(firstPoints), demoDesignMs: median(designs),
      stopMs: median(stops), map201CoarseMs: median(coarse), map201FullMs: median(full), longTasksMs: longTasks, longTasksOver50: over.length,
    };
  } finally {
    await harness.close();
  }
}

if (process.argv[1]?.endsWith('app-bench.ts')) await appBenchmark();
