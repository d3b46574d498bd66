// Stop at the sizes where one core call is long (part of `npm run bench:app`): a 5-level
// ladder design of 10 000 samples x 25 members, where one evaluation takes about 0.3 s, Stop
// pressed before its first iteration ends and again after pulses were reported; the
// shortest-duration search on the same ladder; Stop while a large map keeps the workers busy;
// Run pressed while a large map computes, to the run's first convergence point; and a map
// opened while a compare keeps the analysis worker busy, to its first image. Each
// figure is the click to the page saying so, timed inside the page.
import type { Page } from 'playwright-core';
import type { Harness } from '../tests/e2e/harness.ts';
import { visit } from '../tests/e2e/harness.ts';

/** A 5-level transmon (the invented lab's -205 MHz ladder), 10 000 samples of 2 ns, 5 x 5 members. */
export const LADDER_STOP_SPEC = {
  name: 'ladder-10k',
  system: { levels: 5, anharmonicity: -2.05e8 },
  target: { gate: { axis: [1, 0, 0], angleDeg: 180 } },
  duration: 2e-5,
  segments: 10_000,
  rabiMax: 2e7,
  ensemble: { detuning: { min: -1e5, max: 1e5, points: 5 }, amplitudeError: { min: -0.02, max: 0.02, points: 5 } },
  optimizer: { starts: 2, seed: 1, maxIterations: 100_000 },
};

/** Clicks `button` and times, inside the page, until `status` matches `done` (a regular expression's source). */
async function timedClick(page: Page, button: string, status: string, done: string): Promise<number> {
  return page.evaluate(
    ([button, status, done]) =>
      new Promise<number>((resolve) => {
        const shown = document.querySelector(`[data-testid=${status}]`)!;
        const pattern = new RegExp(done);
        const t0 = performance.now();
        const watch = new MutationObserver(() => {
          if (pattern.test(shown.textContent ?? '')) {
            watch.disconnect();
            resolve(performance.now() - t0);
          }
        });
        watch.observe(shown, { subtree: true, characterData: true, childList: true });
        (document.querySelector(`[data-testid=${button}]`) as HTMLButtonElement).click();
      }),
    [button, status, done] as const,
  );
}

async function running(page: Page): Promise<void> {
  await page.getByTestId('run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid=run-status]')?.textContent === 'running', undefined, { timeout: 30_000 });
}

/** One figure per case (ms), in one fresh page each. */
export interface StopCase {
  name: string;
  run: (page: Page) => Promise<number>;
}

export const STOP_CASES: StopCase[] = [
  {
    name: 'Stop, 5-level ladder 10000 x 25, first iteration',
    run: async (page) => {
      await running(page);
      // Inside the first iteration: its first evaluations take about 0.3 s each.
      await page.waitForTimeout(300);
      return timedClick(page, 'stop', 'run-status', '^stopped');
    },
  },
  {
    name: 'Stop, 5-level ladder 10000 x 25, pulses reported',
    run: async (page) => {
      await running(page);
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 2, undefined, { timeout: 120_000 });
      return timedClick(page, 'stop', 'run-status', '^stopped');
    },
  },
  {
    name: 'Stop, shortest search on that ladder',
    run: async (page) => {
      await page.locator('#f-goal-mean').fill('1e-12');
      await page.getByTestId('shortest-run').click();
      await page.waitForFunction(() => /^Searching/.test(document.querySelector('[data-testid=shortest-status]')?.textContent?.trim() ?? ''), undefined, { timeout: 30_000 });
      await page.waitForTimeout(1000);
      return timedClick(page, 'shortest-stop', 'shortest-status', '^\\s*(Shortest|Stopped|No duration)');
    },
  },
  {
    name: 'Stop, ladder design while a 61 x 61 map runs',
    run: async (page) => {
      await mapRunning(page);
      await running(page);
      await page.waitForTimeout(300);
      return timedClick(page, 'stop', 'run-status', '^stopped');
    },
  },
  {
    name: 'Run, no map, to first point (beside the next)',
    run: async (page) => {
      // The same ladder's first iteration when no map runs: what the next figure adds to.
      await mapRunning(page, false);
      return timedClick(page, 'run', 'run-iteration', '^[1-9]');
    },
  },
  {
    name: 'Run during a 61 x 61 ladder map, to first point',
    run: async (page) => {
      await mapRunning(page);
      // The spec's check waits for the analysis worker's current part of the map, the designers
      // for theirs; then the first iteration.
      return timedClick(page, 'run', 'run-iteration', '^[1-9]');
    },
  },
  {
    name: 'Run while a compare runs, to first point',
    run: async (page) => {
      await mapRunning(page, false);
      await page.keyboard.press('Alt+4');
      await page.waitForTimeout(300);
      await page.keyboard.press('Alt+1');
      return timedClick(page, 'run', 'run-iteration', '^[1-9]');
    },
  },
  {
    name: 'Map, no compare, to the coarse image',
    run: async (page) => {
      await mapRunning(page, false);
      return coarseImage(page);
    },
  },
  {
    name: 'Map while a compare runs, to the coarse image',
    run: async (page) => {
      await mapRunning(page, false);
      // The compare view's table (the composites and DRAG calibrated on the ladder: one long
      // call on the analysis worker), left at once for the map.
      await page.keyboard.press('Alt+4');
      await page.waitForTimeout(300);
      return coarseImage(page);
    },
  },
];

/** Opens the map's view and gives the view's own time from its request to the coarse image (ms). */
async function coarseImage(page: Page): Promise<number> {
  await page.keyboard.press('Alt+3');
  const handle = await page.waitForFunction(() => document.querySelector('[data-testid=map-status]')?.getAttribute('data-coarse-ms') || null, undefined, { timeout: 240_000 });
  return Number(await handle.jsonValue());
}

/**
 * A 61 x 61 map of the ladder's pulse computing at full resolution (about 45 s of core time by
 * src/core/cost.ts), the page left on the map: leaving it drops the map.
 */
async function mapRunning(page: Page, map = true): Promise<void> {
  // A pulse to map: the design stopped after its first reports.
  await running(page);
  await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 1, undefined, { timeout: 120_000 });
  await timedClick(page, 'stop', 'run-status', '^stopped');
  // The map's view computes its map once open: the figure without a map stays on the design.
  if (!map) return;
  await page.keyboard.press('Alt+3');
  await page.locator('#m-d-n').fill('61');
  await page.locator('#m-a-n').fill('61');
  await page.waitForFunction(() => /full resolution/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
  await page.waitForTimeout(1000);
}

/** Runs every case `repeats` times, each in a fresh page opened on the ladder spec; figures by case. */
export async function stopFigures(harness: Harness, repeats: number, step: <T>(name: string, timeoutMs: number, fallback: T, body: () => Promise<T>) => Promise<T>): Promise<Map<string, number[]>> {
  const figures = new Map<string, number[]>();
  for (let r = 0; r < repeats; r++) {
    // GATESMITH_STOP_CASES: a regular expression choosing cases by name.
    const chosen = new RegExp(process.env.GATESMITH_STOP_CASES ?? '');
    for (const c of STOP_CASES.filter((c) => chosen.test(c.name))) {
      const { page, context } = await visit(harness, `#spec=${encodeURIComponent(JSON.stringify(LADDER_STOP_SPEC))}`);
      try {
        await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement | null)?.disabled, undefined, { timeout: 60_000 });
        const ms = await step(c.name, 300_000, NaN, () => c.run(page));
        figures.set(c.name, [...(figures.get(c.name) ?? []), ms]);
        if (process.env.GATESMITH_BENCH_VERBOSE) console.error(`${c.name}: ${ms.toFixed(1)} ms`);
      } finally {
        await context.close();
      }
    }
  }
  return figures;
}
