// A pruned design in the app, in Debian's Chromium: the transmon demo (examples/transmon-x90.json)
// with pruning turned on (its optimiser given pruneAfter = 400 and keepStarts = 2, opened by a
// #spec= link) runs 5 starts to 400 iterations and goes on with the 2 best. The
// convergence chart must agree with the starts table the moment the run ends: one curve per
// start from iteration 0 to the iterations the table gives it (the probe and the finish of a
// start that went on joined), a pruned start's curve ending at 400 with a cross, and starts
// numbered from 1 everywhere, as the command line numbers them. The same after a reload.
// The same demo without pruning designs, in the app, what the library designs in Node (the same
// iterations per start, the same best start). Screenshots (light and dark, 1440 and 800 px) in test-results/.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { runToEnd, skipReason } from './harness.ts';
import { openReady, screenshotsEverywhere, useHarness } from './screens.ts';
import transmon from '../../examples/transmon-x90.json';
import { design } from '../../src/core/api.ts';

const reason = skipReason();
/** Pruning: every start to 400 iterations, then the 2 best on (the outpacing rule off, as pruning turns it off). */
const PRUNE_AFTER = 400;
const KEEP_STARTS = 2;
const PRUNED_DEMO = { ...transmon, optimizer: { ...transmon.optimizer, pruneAfter: PRUNE_AFTER, keepStarts: KEEP_STARTS } };
const HASH = `#spec=${encodeURIComponent(JSON.stringify(PRUNED_DEMO))}`;

interface Row {
  number: string;
  best: boolean;
  iterations: number;
  ended: string;
}

interface Curve {
  label: string;
  first: number;
  last: number;
  points: number;
  largestGap: number;
  /** The mark at the curve's end: its style and radius (0: none). */
  endStyle: string | undefined;
  endRadius: number;
}

/** The starts table as shown. */
function startsTable(page: Page): Promise<Row[]> {
  return page.locator('[data-testid=starts-table] tbody tr').evaluateAll((trs) =>
    trs.map((tr) => {
      const first = tr.children[0].textContent?.trim() ?? '';
      return { number: first.replace(' (best)', ''), best: first.endsWith('(best)'), iterations: Number(tr.children[2].textContent), ended: tr.children[3].textContent?.trim() ?? '' };
    }),
  );
}

/** The convergence chart's curves as drawn (read from the chart on the canvas). */
function drawnCurves(page: Page): Promise<Curve[]> {
  return page.evaluate(() => {
    // The mark at a curve's end: its dataset's endMark, drawn at the last point (ConvergenceChart.svelte).
    type Set = { label: string; data: { x: number }[]; endMark?: { style: string; radius: number } | null };
    const chart = (document.querySelector('[data-testid=convergence-chart]') as unknown as { gatesmithChart: { data: { datasets: Set[] } } }).gatesmithChart;
    return chart.data.datasets.map((d) => {
      const xs = d.data.map((p) => p.x);
      const end = xs.length - 1;
      return {
        label: d.label,
        first: xs[0],
        last: xs[end],
        points: xs.length,
        largestGap: Math.max(0, ...xs.slice(1).map((x, k) => x - xs[k])),
        endStyle: d.endMark?.style,
        endRadius: d.endMark?.radius ?? 0,
      };
    });
  });
}

/** Checks the chart against the table: every start's whole curve, pruned ones ending in a cross. */
function expectCurvesOfTable(curves: Curve[], rows: Row[]): void {
  expect(rows.map((r) => r.number)).toEqual(['1', '2', '3', '4', '5']);
  expect(rows.filter((r) => r.best)).toHaveLength(1);
  const pruned = rows.filter((r) => r.ended === 'pruned: set aside after the first iterations');
  // Every start reaches the pruning point; the 3 not kept end there.
  expect(pruned.length).toBe(5 - KEEP_STARTS);
  expect(curves.map((c) => c.label)).toEqual(rows.map((r) => `start ${r.number}${pruned.includes(r) ? ' (pruned)' : ''}`));
  rows.forEach((row, k) => {
    const curve = curves[k];
    expect(curve.first).toBe(0);
    expect(curve.last).toBe(row.iterations);
    // Joined: no stretch drawn as one straight line where the probe stage handed over to the finish.
    expect(curve.largestGap).toBeLessThanOrEqual(Math.max(1, (4 * row.iterations) / curve.points));
    if (pruned.includes(row)) {
      expect(row.iterations).toBe(PRUNE_AFTER);
      expect(curve.endStyle).toBe('crossRot');
    } else {
      expect(row.iterations).toBeGreaterThan(PRUNE_AFTER);
      expect(curve.endStyle).toBe('circle');
    }
    expect(curve.endRadius).toBeGreaterThan(0);
  });
}

describe.skipIf(reason !== null)('a pruned design in the app', () => {
  const harness = useHarness();

  for (const cores of [2, 8]) {
    it(`draws every start's whole curve the moment the run ends, numbered from 1, and again after a reload (${cores} cores, so ${Math.min(4, cores - 1)} design worker(s))`, async () => {
      const { page, context, consoleErrors } = await openReady(harness(), { cores, hash: HASH });
      await page.getByTestId('run').click();
      expect(await runToEnd(page)).toMatch(/^done/);
      const rows = await startsTable(page);
      expectCurvesOfTable(await drawnCurves(page), rows);
      const best = rows.find((r) => r.best)!;
      // The waveform's caption, the run's figures and their title name the best start as the table does.
      expect(await page.getByTestId('live-caption').textContent()).toContain(`start ${best.number}, iteration ${best.iterations}`);
      expect(await page.getByTestId('run-figures').getAttribute('data-start')).toBe(best.number);
      expect(await page.getByTestId('run-figures').getAttribute('title')).toContain(`of the pulse of start ${best.number} at iteration ${best.iterations}`);
      expect(await page.getByTestId('convergence-note').textContent()).toContain(`set aside after ${PRUNE_AFTER} iterations`);

      // After a reload the history comes back with the pulse: the same curves, marks and numbers.
      const drawn = await drawnCurves(page);
      await page.waitForTimeout(800); // the autosave follows a change after 400 ms
      await page.reload();
      await page.getByTestId('restored-from').waitFor({ timeout: 20_000 });
      await page.waitForFunction(() => document.querySelector('[data-testid=convergence]')?.getAttribute('data-state') === 'final');
      expect(await startsTable(page)).toEqual(rows);
      expect(await drawnCurves(page)).toEqual(drawn);
      expect(await page.getByTestId('live-caption').textContent()).toContain(`start ${best.number}`);
      expect(consoleErrors).toEqual([]);
      await context.close();
    }, 120_000);
  }

  it('designs what the library designs in Node for the same spec and seed: every start ends at the same iteration, the best figure the same', async () => {
    // Reference: the library called in Node on the demo's file (an independent engine: V8 in
    // Node 20 against Chromium's, whose Math.sin and Math.exp differ in the last bit).
    const inNode = await design(transmon);
    const { page, context } = await openReady(harness(), { cores: 2, hash: `#spec=${encodeURIComponent(JSON.stringify(transmon))}` });
    await page.getByTestId('run').click();
    expect(await runToEnd(page)).toMatch(/^done/);
    const rows = await startsTable(page);
    expect(rows.map((r) => r.iterations)).toEqual(inNode.starts.map((s) => s.iterations));
    expect(rows.findIndex((r) => r.best)).toBe(inNode.best.start);
    await context.close();
  }, 120_000);

  it('looks right in light and dark, at 1440 and 800 px wide', async () => {
    await screenshotsEverywhere(harness(), 'convergence-pruned', async (page) => {
      await page.getByTestId('run').click();
      await runToEnd(page);
    }, { hash: HASH });
  }, 180_000);
});
