// Browser benchmark of the app (not a test): builds and serves the app as the end-to-end
// tests do, drives Debian's Chromium, and prints figures:
//   page load to the first interactive form (Run enabled: core loaded, spec validated),
//   Run to the first convergence point, the design's wall time, main-thread long tasks
//   during a design (PerformanceObserver 'longtask': tasks over 50 ms), Stop latency,
//   a 201 x 201 map's time to the first coarse image and to full resolution, and, at
//   100 000 samples, Stop latency and the long tasks of a run, of every view, and of
//   opening a 62 MB pulse file.
// Every browser step has a time limit: a step that fails or runs out of time is reported
// as a figure (NaN, with its reason), and the benchmark goes on.
// Usage: npm run bench:app [-- --large-only] [-- --attribute] (needs /usr/bin/chromium); `npm run bench`
// runs it too and puts its figures under the key "app". With --attribute, each 100 000-sample
// phase is traced (Chromium tracing, with the V8 sampling profiler) and every long task is
// printed with its main-thread CPU time, the events it ran and its busiest functions.
import type { Page } from 'playwright-core';
import { existsSync } from 'node:fs';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { CHROMIUM, SCREENSHOTS, skipReason, startHarness, visit, type Harness } from '../tests/e2e/harness.ts';
import { stopFigures } from './app-stop.ts';
import { longTasksOfTrace, TASK_CATEGORIES, TRACE_CATEGORIES, type LongTask } from './long-tasks.ts';

// `--large-only`: only the 100 000-sample figures, in one page (a quick look while working on them).
const LARGE_ONLY = process.argv.includes('--large-only');
// `--stop-only`: only the Stop figures at long core calls (app-stop.ts).
const STOP_ONLY = process.argv.includes('--stop-only');
// `--attribute`: trace the 100 000-sample phases and say what each long task ran.
const ATTRIBUTE = process.argv.includes('--attribute');
// Traces of an unminified build name the app's own functions.
if (ATTRIBUTE) process.env.GATESMITH_READABLE_BUILD = '1';
const REPEATS = LARGE_ONLY || STOP_ONLY ? 0 : 5;
/** Fresh pages for the 100 000-sample figures. */
const LARGE_REPEATS = STOP_ONLY ? 0 : LARGE_ONLY ? 1 : 3;
/** Fresh pages for each Stop case at long core calls. */
const STOP_REPEATS = LARGE_ONLY ? 0 : Number(process.env.GATESMITH_STOP_REPEATS ?? 3);
const LARGE_SAMPLES = 100_000;
/** Bytes of the large pulse file (as a user reported: 62 MB). */
const LARGE_FILE_BYTES = 62e6;

const median = (xs: number[]) => {
  const finite = xs.filter(Number.isFinite).sort((a, b) => a - b);
  return finite.length ? finite[Math.floor(finite.length / 2)] : NaN;
};

/** Steps that failed or ran out of time, with their reasons. */
const failures: string[] = [];

/** Runs one browser step within `timeoutMs`; on failure or timeout records why and gives `fallback`. */
async function step<T>(name: string, timeoutMs: number, fallback: T, body: () => Promise<T>): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`no result within ${timeoutMs} ms`)), timeoutMs);
  });
  try {
    return await Promise.race([body(), limit]);
  } catch (error) {
    failures.push(`${name}: ${(error as Error).message.split('\n')[0]}`);
    return fallback;
  } finally {
    clearTimeout(timer);
  }
}

async function runEnabled(page: Page, timeout = 60_000): Promise<number> {
  await page.waitForFunction(() => !(document.querySelector('[data-testid=run]') as HTMLButtonElement | null)?.disabled, undefined, { timeout });
  return page.evaluate(() => performance.now());
}

/** Clicks Run and times, inside the page, the first reported iteration and the end of the run; records long tasks meanwhile. */
async function timedRun(page: Page): Promise<{ firstPointMs: number; designMs: number; longTasks: number[] }> {
  return page.evaluate(
    () =>
      new Promise<{ firstPointMs: number; designMs: number; longTasks: number[] }>((resolve) => {
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
  );
}

/** Clicks Stop and times, inside the page, until the status says the run stopped. */
async function timedStop(page: Page): Promise<number> {
  return page.evaluate(
    () =>
      new Promise<number>((resolve) => {
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
  );
}

/** Starts recording the page's long tasks (kept in the page until `longTasks` reads them); `buffered` takes those since the page loaded too. */
async function recordLongTasks(page: Page, buffered = false): Promise<void> {
  await page.evaluate((buffered) => {
    const w = window as unknown as { __longTasks: number[]; __longTaskObserver?: PerformanceObserver };
    // One observer at a time: each earlier one still running would file every task again.
    w.__longTaskObserver?.disconnect();
    w.__longTasks = [];
    w.__longTaskObserver = new PerformanceObserver((list) => list.getEntries().forEach((e) => w.__longTasks.push(e.duration)));
    w.__longTaskObserver.observe({ type: 'longtask', buffered });
  }, buffered);
}

/** The long tasks recorded since `recordLongTasks` (ms), after a pause for the last ones to be reported. */
async function longTasks(page: Page): Promise<number[]> {
  await page.waitForTimeout(200);
  return page.evaluate(() => [...(window as unknown as { __longTasks: number[] }).__longTasks]);
}

async function setField(page: Page, selector: string, text: string): Promise<void> {
  await page.locator(selector).fill(text);
}

/** A pulse file of about `bytes` bytes (I and Q written with full double precision), written under `dir`. */
async function largePulseFile(bytes: number, dir: string): Promise<string> {
  // About 19 characters a value (sign, "0.", 17 digits, separator) and two values a sample.
  const samples = Math.floor(bytes / 40);
  const values = (phase: number) => {
    const out: string[] = new Array(samples);
    for (let k = 0; k < samples; k++) out[k] = (5e6 * Math.sin((k + phase) / 997) + 1e-3 * ((k * 7919) % 1000)).toPrecision(17);
    return out.join(',');
  };
  const path = join(dir, 'large-pulse.json');
  await writeFile(path, `{"dt":2e-9,"i":[${values(0)}],"q":[${values(311)}],"metadata":{"name":"large"}}`);
  return path;
}

/** Mouse moves of the drag that turns the Bloch sphere (30 ms apart). */
const BLOCH_DRAG_STEPS = 30;

/** The Bloch sphere with every member at 100 000 samples: the painter's time for the whole picture and for each picture shown while turning. */
interface BlochTurn {
  wholeMs: number;
  turnFrames: number;
  turnSeconds: number;
  frameMs: number[];
  settledMs: number;
}
const NO_BLOCH: BlochTurn = { wholeMs: NaN, turnFrames: 0, turnSeconds: NaN, frameMs: [], settledMs: NaN };

/** The long tasks of one phase: their durations, and what ran in them when traced. */
interface Phase {
  name: string;
  tasks: number[];
  attributed: LongTask[];
}

/** Figures at 100 000 samples in one fresh page: Stop latency and every long task of a run, the views, a reload and a large file. */
async function largeFigures(harness: Harness, file: string): Promise<{ stopMs: number; phases: Phase[]; fileMs: number; progressShown: boolean; bloch: BlochTurn }> {
  const { page, context } = await visit(harness);
  const out = { stopMs: NaN, phases: [] as Phase[], fileMs: NaN, progressShown: false, bloch: { ...NO_BLOCH } };
  /** Runs a step and files the long tasks seen during it under its name (traced with --attribute). */
  const measured = async (name: string, timeoutMs: number, body: () => Promise<void>) => {
    // Every phase is traced: the trace gives each task's main-thread CPU time, which a busy
    // machine does not stretch as it stretches wall time. --attribute adds the JS profiler.
    await harness.browser.startTracing(page, { categories: ATTRIBUTE ? TRACE_CATEGORIES : TASK_CATEGORIES });
    // Starting the trace is itself a task of the page: left out of the phase.
    await page.waitForTimeout(500);
    await recordLongTasks(page);
    await page.evaluate(() => performance.mark('gatesmith-phase'));
    await step(name, timeoutMs, undefined, body);
    const tasks = await longTasks(page);
    const trace = await harness.browser.stopTracing();
    // Kept for a closer look (Chromium's performance panel opens it).
    if (ATTRIBUTE) await writeFile(join(SCREENSHOTS, `trace-${name.replace(/[^\w]+/g, '-')}.json`), trace);
    const attributed = longTasksOfTrace(trace, 50, 'gatesmith-phase');
    out.phases.push({ name, tasks, attributed });
  };
  const view = async (key: string, ready: () => Promise<unknown>) => {
    await page.keyboard.press(key);
    await ready();
  };
  try {
    await measured('form to 100 000 samples', 60_000, async () => {
      await runEnabled(page);
      await setField(page, '#f-duration', '200 us');
      await setField(page, '#f-segments', String(LARGE_SAMPLES));
      await setField(page, '#f-iterations', '100000');
      await runEnabled(page);
    });
    let started = false;
    await measured('run (design view, live)', 90_000, async () => {
      await page.getByTestId('run').click();
      await page.waitForFunction(() => document.querySelector('[data-testid=run-status]')?.textContent === 'running', undefined, { timeout: 30_000 });
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) >= 3, undefined, { timeout: 80_000 });
      await page.waitForTimeout(1500);
      started = true;
    });
    await measured('stop and keep the pulse', 30_000, async () => {
      if (started) out.stopMs = await timedStop(page);
      await page.waitForTimeout(1000);
    });
    await measured('waveform view, amplitude, table', 30_000, async () => {
      await view('Alt+2', () => page.getByTestId('waveform-chart').waitFor({ timeout: 20_000 }));
      await page.waitForTimeout(800);
      await page.locator('input[name=wf-mode][value=polar]').check();
      await page.waitForTimeout(800);
      await page.getByTestId('samples').locator('summary').click();
      await page.getByTestId('samples').getByRole('button', { name: 'Last' }).click();
      await page.waitForFunction(() => /page 1000 of 1000/.test(document.querySelector('[data-testid=samples-page]')?.textContent ?? ''), undefined, { timeout: 20_000 });
      await page.waitForTimeout(500);
    });
    await measured('robustness view (map)', 120_000, () =>
      view('Alt+3', () => page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 110_000 })),
    );
    await measured('Bloch view, one member then all', 60_000, async () => {
      await view('Alt+5', () => page.getByTestId('bloch').waitFor({ timeout: 20_000 }));
      await page.waitForTimeout(1500);
      await page.locator('input[name=b-show][value=all]').check();
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=bloch-facts]')?.getAttribute('data-members')) > 1, undefined, { timeout: 50_000 });
      // The paths went to the painter as the figures were shown.
      const before = await page.getByTestId('bloch').getAttribute('data-frames');
      // Until the whole picture of every member is on the canvas.
      await page.waitForFunction(
        (before) => {
          const c = document.querySelector('[data-testid=bloch]') as HTMLCanvasElement | null;
          return c !== null && c.dataset.frames !== before && c.dataset.preview === 'false';
        },
        before,
        { timeout: 50_000 },
      );
      out.bloch.wholeMs = Number(await page.getByTestId('bloch').getAttribute('data-frame-ms'));
      await page.waitForTimeout(500);
    });
    await measured('Bloch view, turning all members', 60_000, async () => {
      // Every picture's painter time, as the page receives it.
      await page.evaluate(() => {
        const c = document.querySelector('[data-testid=bloch]') as HTMLCanvasElement;
        const w = window as unknown as { __frames: Array<[number, boolean, number]> };
        w.__frames = [];
        new MutationObserver(() => w.__frames.push([Number(c.dataset.frameMs), c.dataset.preview === 'true', performance.now()])).observe(c, { attributes: true, attributeFilter: ['data-frames'] });
      });
      const box = (await page.getByTestId('bloch').boundingBox())!;
      const t0 = await page.evaluate(() => performance.now());
      await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
      await page.mouse.down();
      for (let k = 1; k <= BLOCH_DRAG_STEPS; k++) {
        await page.mouse.move(box.x + box.width / 2 + 4 * k, box.y + box.height / 2 + k, { steps: 1 });
        await page.waitForTimeout(30);
      }
      await page.mouse.up();
      const t1 = await page.evaluate(() => performance.now());
      // The whole picture follows once the turning pauses.
      await page.waitForFunction((t1) => (window as unknown as { __frames: Array<[number, boolean, number]> }).__frames.some(([, p, at]) => !p && at > t1), t1, { timeout: 50_000 });
      const frames = await page.evaluate(() => (window as unknown as { __frames: Array<[number, boolean, number]> }).__frames);
      const during = frames.filter(([, , at]) => at <= t1 + 1);
      out.bloch.turnFrames = during.length;
      out.bloch.turnSeconds = (t1 - t0) / 1000;
      out.bloch.frameMs = during.map(([ms]) => ms);
      out.bloch.settledMs = frames.filter(([, p, at]) => !p && at > t1).map(([ms]) => ms)[0] ?? NaN;
      await page.waitForTimeout(300);
    });
    await measured('spectrum view', 90_000, async () => {
      await view('Alt+7', () => page.waitForFunction(() => /0 dB =/.test(document.querySelector('[data-testid=spectrum-status]')?.textContent ?? ''), undefined, { timeout: 80_000 }));
      await page.waitForTimeout(500);
    });
    await measured('export view', 90_000, async () => {
      await view('Alt+6', () =>
        page.waitForFunction(() => ['ready', 'refused', 'invalid'].includes(document.querySelector('[data-testid=export-panel]')?.getAttribute('data-state') ?? ''), undefined, { timeout: 80_000 }),
      );
      await page.waitForTimeout(500);
    });
    await measured('compare view', 90_000, () =>
      view('Alt+4', () => page.waitForFunction(() => document.querySelectorAll('[data-testid=compare-table] tbody tr').length > 1, undefined, { timeout: 80_000 })),
    );
    await measured(`${LARGE_FILE_BYTES / 1e6} MB pulse file`, 120_000, async () => {
      const t0 = await page.evaluate(() => performance.now());
      await page.getByTestId('open-pulse').setInputFiles(file);
      // Progress is shown while the file is read (watched until the file is open).
      const progress = page.getByTestId('file-progress').waitFor({ timeout: 100_000 }).then(() => (out.progressShown = true), () => undefined);
      await page.getByTestId('notice').filter({ hasText: `Opened ${basename(file)}` }).waitFor({ timeout: 110_000 });
      out.fileMs = (await page.evaluate(() => performance.now())) - t0;
      await Promise.race([progress, page.waitForTimeout(100)]);
      await page.waitForTimeout(1000);
    });
    await measured('reload (session restored)', 60_000, async () => {
      // Autosaved before the reload, as on leaving the page.
      await page.waitForTimeout(1000);
      await page.reload();
      await runEnabled(page);
      await recordLongTasks(page, true);
      await page.waitForTimeout(1500);
    });
  } finally {
    await context.close();
  }
  return out;
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
  /** Main-thread CPU time of the demo designs' wall-clock long tasks (from a trace). */
  demoCpuLongTasksMs: number[];
  /** Stop to "stopped" at 100 000 samples. */
  stopLargeMs: number;
  /** Main-thread tasks over 50 ms at 100 000 samples: a run and its Stop, every view, a 62 MB file. */
  largeLongTasksMs: number[];
  /** Main-thread CPU time of each of those tasks over 50 ms of CPU (from the trace: a busy machine stretches wall time, not this). */
  largeCpuLongTasksMs: number[];
  largeFileOpenMs: number;
  largeFileProgressShown: boolean;
  /** The Bloch sphere with every member at 100 000 samples: painter ms for the whole picture, longest painter ms of a picture while turning. */
  blochWholeMs: number;
  blochTurnLongestMs: number;
  /** Stop to the page saying so where one core call is long (app-stop.ts), by case. */
  stopCasesMs: Record<string, number>;
  /** Steps that failed or ran out of time. */
  failures: string[];
}

/** Runs the browser benchmark; `log` receives the table. Null (with the reason logged) without Chromium. */
export async function appBenchmark(log: (line: string) => void = console.log): Promise<AppFigures | null> {
  const reason = existsSync(CHROMIUM) ? null : (skipReason() ?? `${CHROMIUM} is missing`);
  if (reason) {
    log(`app benchmark not run: ${reason}`);
    return null;
  }
  failures.length = 0;
  const harness = await startHarness();
  try {
    const loads: number[] = [];
    const firstPoints: number[] = [];
    const designs: number[] = [];
    const stops: number[] = [];
    const coarse: number[] = [];
    const full: number[] = [];
    let longTasksMs: number[] = [];
    /** Main-thread CPU time of each wall-clock long task of the demo designs. */
    let demoCpuMs: number[] = [];
    for (let r = 0; r < REPEATS; r++) {
      const { page, context } = await visit(harness);
      try {
        loads.push(await step('load', 60_000, NaN, () => runEnabled(page)));
        // Traced, for each long task's main-thread CPU time (the design's workers share the two cores with the page).
        await harness.browser.startTracing(page, { categories: TASK_CATEGORIES });
        await page.waitForTimeout(500);
        await page.evaluate(() => performance.mark('gatesmith-phase'));
        const run = await step('demo design', 120_000, { firstPointMs: NaN, designMs: NaN, longTasks: [] as number[] }, () => timedRun(page));
        const designTrace = await harness.browser.stopTracing();
        demoCpuMs = demoCpuMs.concat(longTasksOfTrace(designTrace, 50, 'gatesmith-phase').map((t) => t.cpuMs));
        firstPoints.push(run.firstPointMs);
        designs.push(run.designMs);
        longTasksMs = longTasksMs.concat(run.longTasks);

        // A 201 x 201 map of the designed pulse.
        const map = await step('201 x 201 map', 120_000, { coarse: NaN, full: NaN }, async () => {
          await page.keyboard.press('Alt+3');
          await page.waitForFunction(() => document.querySelector('[data-testid=map-status]')?.getAttribute('data-full-ms'), undefined, { timeout: 60_000 });
          await setField(page, '#m-d-n', '201');
          await setField(page, '#m-a-n', '201');
          await page.waitForFunction(() => /201 × 201 points/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
          const status = page.getByTestId('map-status');
          return { coarse: Number(await status.getAttribute('data-coarse-ms')), full: Number(await status.getAttribute('data-full-ms')) };
        });
        coarse.push(map.coarse);
        full.push(map.full);

        // Stop latency on a long run.
        stops.push(
          await step('stop at 1000 samples', 90_000, NaN, async () => {
            await page.keyboard.press('Alt+1');
            await setField(page, '#f-segments', '1000');
            await setField(page, '#f-iterations', '100000');
            await runEnabled(page);
            await page.getByTestId('run').click();
            // The counter still shows the demo design's iterations until the new run reports.
            await page.waitForFunction(() => document.querySelector('[data-testid=run-status]')?.textContent === 'running', undefined, { timeout: 30_000 });
            await page.waitForFunction(() => Number(document.querySelector('[data-testid=run-iteration]')?.textContent) > 20, undefined, { timeout: 60_000 });
            return timedStop(page);
          }),
        );
      } finally {
        await context.close();
      }
    }

    const dir = await mkdtemp(join(tmpdir(), 'gatesmith-bench-'));
    const file = await largePulseFile(LARGE_FILE_BYTES, dir);
    const largeStops: number[] = [];
    let largeTasks: number[] = [];
    const fileTimes: number[] = [];
    let progressShown = true;
    const phases = new Map<string, number[][]>();
    const blochTurns: BlochTurn[] = [];
    const attributed: Array<[string, LongTask]> = [];
    for (let r = 0; r < LARGE_REPEATS; r++) {
      const large = await largeFigures(harness, file);
      largeStops.push(large.stopMs);
      fileTimes.push(large.fileMs);
      progressShown &&= large.progressShown;
      blochTurns.push(large.bloch);
      for (const phase of large.phases) {
        largeTasks = largeTasks.concat(phase.tasks);
        phases.set(phase.name, [...(phases.get(phase.name) ?? []), phase.tasks]);
        for (const task of phase.attributed) attributed.push([`${phase.name} (page ${r + 1})`, task]);
      }
    }
    await rm(dir, { recursive: true, force: true });
    const stopCases = await stopFigures(harness, STOP_REPEATS, step);

    const row = (name: string, values: number[], unit = 'ms') =>
      log(`${name.padEnd(48)} ${median(values).toFixed(1).padStart(9)} ${unit}   (runs: ${values.map((v) => v.toFixed(1)).join(', ')})`);
    const tasks = (name: string, values: number[]) =>
      log(`${name.padEnd(48)} ${String(values.filter((t) => t > 50).length).padStart(9)}      (long tasks: ${values.length}; longest ${values.length ? Math.max(...values).toFixed(0) : 0} ms)`);
    log(`gatesmith app benchmark, Chromium headless, ${REPEATS} fresh page loads (${LARGE_REPEATS} at ${LARGE_SAMPLES} samples), medians`);
    row('page load to first interactive form', loads);
    row('Run to first convergence point', firstPoints);
    row('demo design, Run to figures shown', designs);
    row('Stop to "stopped" (1000 samples x 25 members)', stops);
    row('201 x 201 map: first coarse image', coarse);
    row('201 x 201 map: full resolution', full);
    tasks('main-thread tasks over 50 ms, demo designs', longTasksMs);
    log(`${'  the same tasks over 50 ms of main-thread CPU'.padEnd(48)} ${String(demoCpuMs.filter((t) => t > 50).length).padStart(9)}      (longest ${Math.max(0, ...demoCpuMs).toFixed(0)} ms)`);
    row(`Stop to "stopped" (${LARGE_SAMPLES} samples x 25 members)`, largeStops);
    row(`open a ${LARGE_FILE_BYTES / 1e6} MB pulse file, to "Opened"`, fileTimes);
    for (const [name, values] of stopCases) row(name, values);
    log(`${'progress shown while the file is read'.padEnd(48)} ${progressShown ? 'yes' : 'no'}`);
    row(`Bloch, all members at ${LARGE_SAMPLES} samples: whole picture (painter)`, blochTurns.map((b) => b.wholeMs));
    const turnMs = blochTurns.flatMap((b) => b.frameMs);
    log(
      `${'Bloch, turning it: pictures shown'.padEnd(48)} ${blochTurns.map((b) => `${b.turnFrames} in ${b.turnSeconds.toFixed(2)} s`).join(', ')}; painter ms a picture: median ${median(turnMs).toFixed(1)}, longest ${Math.max(0, ...turnMs.filter(Number.isFinite)).toFixed(1)}`,
    );
    row('Bloch, whole picture after the turning pauses', blochTurns.map((b) => b.settledMs));
    tasks(`main-thread tasks over 50 ms at ${LARGE_SAMPLES} samples`, largeTasks);
    const cpuOver = attributed.filter(([, t]) => t.cpuMs > 50);
    log(`${`tasks over 50 ms of main-thread CPU at ${LARGE_SAMPLES} samples`.padEnd(48)} ${String(cpuOver.length).padStart(9)}      (longest ${Math.max(0, ...attributed.map(([, t]) => t.cpuMs)).toFixed(0)} ms)`);
    log(`  per phase: wall-clock long tasks (over 50 ms; longest) | the same tasks' main-thread CPU (over 50 ms; longest)`);
    for (const [name, pages] of phases) {
      const all = pages.flat();
      const cpu = attributed.filter(([n]) => n.startsWith(`${name} (page`)).map(([, t]) => t.cpuMs);
      log(
        `  ${name.padEnd(34)} wall ${String(all.filter((t) => t > 50).length).padStart(3)}; ${(all.length ? Math.max(...all) : 0).toFixed(0).padStart(4)} ms` +
          ` | CPU ${String(cpu.filter((t) => t > 50).length).padStart(3)}; ${(cpu.length ? Math.max(...cpu) : 0).toFixed(0).padStart(4)} ms`,
      );
    }
    if (ATTRIBUTE) {
      log(`long tasks at ${LARGE_SAMPLES} samples (wall / main-thread CPU ms; events; functions by samples):`);
      for (const [name, t] of attributed) {
        log(`  ${name}: ${t.wallMs.toFixed(0)} / ${t.cpuMs.toFixed(0)} ms at ${(t.atMs / 1000).toFixed(2)} s`);
        log(`    events: ${t.events.map(([e, ms]) => `${e} ${ms}`).join('; ')}`);
        log(`    functions: ${t.functions.map(([f, ms]) => `${f} ${ms.toFixed(1)}`).join('; ')}`);
      }
    }
    log(`steps that failed or ran out of time: ${failures.length ? failures.join('; ') : 'none'}`);
    const over = longTasksMs.filter((t) => t > 50);
    return {
      loadToInteractiveMs: median(loads), firstConvergencePointMs: median(firstPoints), demoDesignMs: median(designs),
      stopMs: median(stops), map201CoarseMs: median(coarse), map201FullMs: median(full), longTasksMs, longTasksOver50: over.length, demoCpuLongTasksMs: demoCpuMs,
      stopLargeMs: median(largeStops), largeLongTasksMs: largeTasks.filter((t) => t > 50), largeCpuLongTasksMs: cpuOver.map(([, t]) => t.cpuMs), largeFileOpenMs: median(fileTimes),
      largeFileProgressShown: progressShown, blochWholeMs: median(blochTurns.map((b) => b.wholeMs)), blochTurnLongestMs: Math.max(0, ...turnMs.filter(Number.isFinite)),
      stopCasesMs: Object.fromEntries([...stopCases].map(([name, values]) => [name, median(values)])), failures: [...failures],
    };
  } finally {
    await harness.close();
  }
}

if (process.argv[1]?.endsWith('app-bench.ts')) await appBenchmark();
