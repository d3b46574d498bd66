// The page in a narrow window and from the keyboard, in Chromium against the production
// build: Run and the live result on screen together at 800 px, no sideways scrolling,
// tabs by the arrow keys (WAI-ARIA Authoring Practices, "Tabs" pattern), the map's readout
// by keyboard, a visible focus on every Tab stop (WCAG 2.2, 2.4.7 Focus Visible), and text
// contrast of at least 4.5:1, or 3:1 for large text (WCAG 2.2, 1.4.3 Contrast (Minimum)),
// computed from the page's own computed styles in both colour schemes.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { runToEnd, screenshot, skipReason, type Visit } from './harness.ts';
import { FAST_LOBE, FAST_TRANSMON, openPulse, openReady, screenshotLooks, useHarness } from './screens.ts';

const reason = skipReason();

/**
 * Text elements whose contrast is below the WCAG AA minimum: the colour of each visible text
 * (and of each placeholder) against the background it is drawn on, found by walking up the
 * ancestors and blending translucent layers. WCAG 2.2 relative luminance and contrast ratio.
 */
function lowContrast(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const parse = (css: string): [number, number, number, number] => {
      const m = /rgba?\(([^)]+)\)/.exec(css);
      if (!m) return [0, 0, 0, 0];
      const parts = m[1].split(/[\s,/]+/).filter(Boolean).map(Number);
      return [parts[0], parts[1], parts[2], parts.length > 3 ? parts[3] : 1];
    };
    const over = (top: number[], bottom: number[]): [number, number, number, number] => {
      const a = top[3] + bottom[3] * (1 - top[3]);
      if (a === 0) return [0, 0, 0, 0];
      const mix = (k: number) => (top[k] * top[3] + bottom[k] * bottom[3] * (1 - top[3])) / a;
      return [mix(0), mix(1), mix(2), a];
    };
    const background = (el: Element | null): number[] => {
      const layers: number[][] = [];
      for (let e = el; e; e = e.parentElement) {
        const c = parse(getComputedStyle(e).backgroundColor);
        if (c[3] > 0) layers.push(c);
        if (c[3] >= 1) break;
      }
      let result = [255, 255, 255, 1];
      for (let k = layers.length - 1; k >= 0; k--) result = over(layers[k], result);
      return result;
    };
    const luminance = (c: number[]) => {
      const ch = (v: number) => {
        const s = v / 255;
        return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
      };
      return 0.2126 * ch(c[0]) + 0.7152 * ch(c[1]) + 0.0722 * ch(c[2]);
    };
    const ratio = (a: number[], b: number[]) => {
      const [l1, l2] = [luminance(a), luminance(b)].sort((x, y) => y - x);
      return (l1 + 0.05) / (l2 + 0.05);
    };
    const inactive = (el: Element) => el.closest(':disabled, [aria-disabled=true], fieldset:disabled') !== null;
    const failures: string[] = [];
    const check = (el: Element, colour: string, what: string) => {
      const style = getComputedStyle(el);
      const bg = background(el);
      const fg = over(parse(colour), bg);
      const size = parseFloat(style.fontSize);
      const bold = Number(style.fontWeight) >= 700;
      const large = size >= 24 || (bold && size >= 18.66);
      const r = ratio(fg, bg);
      if (r < (large ? 3 : 4.5)) failures.push(`${what} "${(el.textContent || (el as HTMLInputElement).placeholder || '').trim().slice(0, 40)}" ${r.toFixed(2)}:1 (${colour} on rgb(${bg.slice(0, 3).map(Math.round).join(', ')}))`);
    };
    for (const el of document.querySelectorAll('body *')) {
      if (el.closest('svg, canvas, .sr-only') || inactive(el)) continue;
      const rect = el.getBoundingClientRect();
      if (rect.width === 0 || rect.height === 0 || getComputedStyle(el).visibility === 'hidden') continue;
      const ownText = [...el.childNodes].some((n) => n.nodeType === Node.TEXT_NODE && n.textContent!.trim() !== '');
      const isField = el instanceof HTMLInputElement || el instanceof HTMLTextAreaElement || el instanceof HTMLSelectElement;
      if (ownText || (isField && (el as HTMLInputElement).value)) check(el, getComputedStyle(el).color, el.tagName.toLowerCase());
      if ((el instanceof HTMLInputElement || el instanceof HTMLTextAreaElement) && el.placeholder && !el.value) check(el, getComputedStyle(el, '::placeholder').color, 'placeholder');
    }
    return failures;
  });
}

/** Presses Tab through the page and reports every stop that is hidden or shows no focus (WCAG 2.4.7). */
async function invisibleStops(page: Page, limit = 160): Promise<{ stops: number; bad: string[] }> {
  await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
  const bad: string[] = [];
  let stops = 0;
  await page.evaluate(() => document.querySelectorAll('[data-tab-seen]').forEach((e) => e.removeAttribute('data-tab-seen')));
  for (let k = 0; k < limit; k++) {
    await page.keyboard.press('Tab');
    const info = await page.evaluate(() => {
      const el = document.activeElement as HTMLElement | null;
      if (!el || el === document.body) return null;
      const rect = el.getBoundingClientRect();
      const style = getComputedStyle(el);
      const clipped = style.clip !== 'auto' && style.clip !== '' ? true : el.closest('.sr-only') !== null;
      const outline = style.outlineStyle !== 'none' && parseFloat(style.outlineWidth) > 0;
      const shadow = style.boxShadow !== 'none';
      const key = `${el.tagName}#${el.id}[${el.getAttribute('aria-label') ?? el.getAttribute('name') ?? el.textContent?.trim().slice(0, 20)}]`;
      // Marked on the element itself: the walk ends when Tab comes back round to a stop already seen.
      const again = el.hasAttribute('data-tab-seen');
      el.setAttribute('data-tab-seen', '');
      return { key, again, visible: rect.width > 2 && rect.height > 2 && !clipped && style.visibility !== 'hidden' && style.opacity !== '0', focusShown: outline || shadow };
    });
    if (!info) continue;
    if (info.again) break;
    stops++;
    if (!info.visible) bad.push(`${info.key}: takes a Tab stop but is not visible`);
    else if (!info.focusShown) bad.push(`${info.key}: shows no focus`);
  }
  return { stops, bad };
}

/**
 * Fields whose help bubble covers another control of the field's own form (the spec, the
 * map's ranges, the export settings; in a view without a form, the view): each visible
 * field of the page focused in turn from the keyboard's side (focus(), no pointer), its
 * bubble's box against the boxes of the form's other fields, buttons and labelled choices.
 */
function coveredByHelp(page: Page): Promise<{ fields: number; covering: string[] }> {
  return page.evaluate(async () => {
    const frame = () => new Promise((resolve) => requestAnimationFrame(() => resolve(null)));
    type Box = { left: number; top: number; right: number; bottom: number };
    const overlap = (a: Box, b: Box) => a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
    const visible = (el: Element) => {
      const r = el.getBoundingClientRect();
      return r.width > 0 && r.height > 0;
    };
    // What the user sees of a control: within the window and within every ancestor that clips its overflow (the spec column scrolls).
    const shown = (el: Element): Box => {
      const r = el.getBoundingClientRect();
      let b: Box = { left: r.left, top: r.top, right: r.right, bottom: r.bottom };
      const cut = (c: Box) => (b = { left: Math.max(b.left, c.left), top: Math.max(b.top, c.top), right: Math.min(b.right, c.right), bottom: Math.min(b.bottom, c.bottom) });
      cut({ left: 0, top: 0, right: document.documentElement.clientWidth, bottom: document.documentElement.clientHeight });
      for (let a = el.parentElement; a && a !== document.body; a = a.parentElement) if (getComputedStyle(a).overflowY !== 'visible') cut(a.getBoundingClientRect());
      return b;
    };
    const controls = [...document.querySelectorAll('input, select, textarea, button, label')].filter(
      (el) => visible(el) && !el.closest('[data-testid=field-help], dialog') && (!(el instanceof HTMLLabelElement) || el.querySelector('input') !== null),
    );
    const fields = controls.filter((el) => ['INPUT', 'SELECT', 'TEXTAREA'].includes(el.tagName) && (el as HTMLInputElement).type !== 'file') as HTMLElement[];
    const bubble = document.querySelector('[data-testid=field-help]') as HTMLElement;
    const covering: string[] = [];
    let count = 0;
    for (const field of fields) {
      field.focus();
      await frame();
      if (getComputedStyle(bubble).display === 'none') continue;
      count++;
      const form = field.closest('form') ?? field.closest('fieldset') ?? field.closest('section, aside');
      const own = new Set<Element>([field, ...((field as HTMLInputElement).labels ?? [])]);
      const box = bubble.getBoundingClientRect();
      const hidden = controls.filter((c) => !own.has(c) && !c.contains(field) && form?.contains(c) && overlap(box, shown(c)));
      const name = (el: Element) => `${el.tagName.toLowerCase()}#${el.id || (el as HTMLInputElement).name || el.textContent?.trim().slice(0, 20)}`;
      if (hidden.length) covering.push(`${name(field)} covers ${hidden.map(name).join(', ')}`);
    }
    (document.activeElement as HTMLElement | null)?.blur();
    return { fields: count, covering };
  });
}

describe.skipIf(reason !== null)('layout and keyboard', () => {
  const harness = useHarness();
  /** Every page opened: their console errors and uncaught exceptions are checked at the end. */
  const visits: Visit[] = [];

  /** Opens the app in a 900 px high window of this width and colour scheme, ready to run. */
  async function openAt(width: number, scheme: 'light' | 'dark' = 'light'): Promise<Page> {
    const opened = await openReady(harness(), { width, height: 900, scheme });
    visits.push(opened);
    return opened.page;
  }

  it('at 800 px, Run and the live result are on screen together, and Compare does not scroll sideways', async () => {
    for (const scheme of ['light', 'dark'] as const) {
      const page = await openAt(800, scheme);
      const run = (await page.getByTestId('run').boundingBox())!;
      const chart = (await page.getByTestId('convergence-chart').boundingBox())!;
      // Both inside the 900 px high window, without scrolling.
      expect(run.y + run.height).toBeLessThan(900);
      expect(chart.y).toBeLessThan(900 - 100);
      await page.getByTestId('run').click();
      await runToEnd(page);
      await screenshot(page, `layout-800-design-${scheme}`);
      const live = (await page.getByTestId('waveform-chart').boundingBox())!;
      expect(live.y).toBeLessThan(900);
      await page.keyboard.press('Alt+4');
      await page.waitForFunction(() => document.querySelectorAll('[data-testid=compare-table] tbody tr').length >= 5, undefined, { timeout: 30_000 });
      const overflow = await page.evaluate(() => ({
        page: document.documentElement.scrollWidth - document.documentElement.clientWidth,
        // Elements of the views that scroll sideways (their content wider than their box).
        table: [...document.querySelectorAll('.views *')].filter((e) => e.scrollWidth - e.clientWidth > 1 && ['auto', 'scroll'].includes(getComputedStyle(e).overflowX)).map((e) => `${e.tagName}.${e.className}`),
      }));
      expect(overflow.page).toBeLessThanOrEqual(0);
      expect(overflow.table).toEqual([]);
      await screenshot(page, `layout-800-compare-${scheme}`);
      await page.context().close();
    }
  }, 180_000);

  it('starts the spec column level with the views at 1440 px (robustness view of a transmon), and keeps it in the window as the page scrolls', async () => {
    // A 700 px high window: the page is well over twice as high, so the column can keep to the window.
    const { page, context } = await openReady(harness(), { height: 700, hash: `#spec=${encodeURIComponent(FAST_TRANSMON)}` });
    await openPulse(page, 'lobe.json', FAST_LOBE);
    await page.keyboard.press('Alt+3');
    await page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 60_000 });
    await page.getByTestId('leakage-heatmap').waitFor();
    /** Tops of the spec column and of the views panel, in page coordinates, and the spec column's top in the window. */
    const tops = () =>
      page.evaluate(() => {
        const top = (selector: string) => document.querySelector(selector)!.getBoundingClientRect().top;
        return { spec: top('main > aside') + scrollY, views: top('main > .views') + scrollY, specInWindow: top('main > aside') };
      });
    const level = await tops();
    expect(Math.abs(level.spec - level.views)).toBeLessThanOrEqual(1);
    // Scrolled 40 px past the columns' tops: the spec stays in the window (8 px from its top), the views move on.
    const by = Math.round(level.spec) + 40;
    await page.evaluate((y) => scrollTo(0, y), by);
    const scrolled = await tops();
    expect(await page.evaluate(() => scrollY)).toBe(by);
    expect(scrolled.specInWindow).toBeCloseTo(8, 0);
    // A full-page image shows the columns as laid out, level, and leaves the column sticky after.
    await screenshot(page, 'layout-1440-robustness-scrolled');
    expect(await page.evaluate(() => getComputedStyle(document.querySelector('main > aside')!).position)).toBe('sticky');
    await context.close();
  }, 120_000);

  it('moves between tabs with the arrow keys, Home and End, as one Tab stop', async () => {
    const page = await openAt(1440);
    await page.locator('#tab-design').focus();
    const selected = () => page.evaluate(() => [document.querySelector('[role=tab][aria-selected=true]')?.id, document.activeElement?.id]);
    await page.keyboard.press('ArrowRight');
    expect(await selected()).toEqual(['tab-waveform', 'tab-waveform']);
    await page.keyboard.press('End');
    expect(await selected()).toEqual(['tab-spectrum', 'tab-spectrum']);
    await page.keyboard.press('ArrowRight');
    expect(await selected()).toEqual(['tab-design', 'tab-design']);
    await page.keyboard.press('ArrowLeft');
    expect(await selected()).toEqual(['tab-spectrum', 'tab-spectrum']);
    await page.keyboard.press('Home');
    expect(await selected()).toEqual(['tab-design', 'tab-design']);
    // Only the selected tab is in the Tab order.
    expect(await page.locator('[role=tab][tabindex="0"]').count()).toBe(1);
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('role'))).not.toBe('tab');
    await page.context().close();
  }, 120_000);

  it('reads out the map point by point from the keyboard', async () => {
    const page = await openAt(1440);
    await page.getByTestId('run').click();
    await runToEnd(page);
    await page.keyboard.press('Alt+3');
    await page.waitForFunction(() => /points in/.test(document.querySelector('[data-testid=map-status]')?.textContent ?? ''), undefined, { timeout: 30_000 });
    // Reach the map with Tab alone.
    let reached = false;
    for (let k = 0; k < 60 && !reached; k++) {
      await page.keyboard.press('Tab');
      reached = await page.evaluate(() => document.activeElement?.getAttribute('data-testid') === 'heatmap');
    }
    expect(reached).toBe(true);
    const readout = () => page.getByTestId('heatmap-readout').textContent();
    /** A value as the page prints it ("40 kHz", "-0.4 %"), in Hz or as a fraction. */
    const read = (text: string) => {
      const m = /(-?[\d.]+(?:e-?\d+)?) ?(Hz|kHz|MHz|%)/.exec(text)!;
      return Number(m[1]) * { Hz: 1, kHz: 1e3, MHz: 1e6, '%': 1e-2 }[m[2] as 'Hz'];
    };
    const at = async () => {
      const m = /^Δ = (.+?), ε = (.+?): 1 − F = \d/.exec((await readout()) ?? '');
      expect(m, (await readout()) ?? '').not.toBeNull();
      return [read(m![1]), read(m![2])];
    };
    const field = async (id: string) => read(await page.locator(id).inputValue());
    const [dMin, dMax, dN, aMin, aMax, aN] = [await field('#m-d-min'), await field('#m-d-max'), Number(await page.locator('#m-d-n').inputValue()), await field('#m-a-min'), await field('#m-a-max'), Number(await page.locator('#m-a-n').inputValue())];
    // Focus starts at the centre point of the grid (index floor(n/2) along each axis).
    const centre = [dMin + ((dMax - dMin) * Math.floor(dN / 2)) / (dN - 1), aMin + ((aMax - aMin) * Math.floor(aN / 2)) / (aN - 1)];
    const [d0, a0] = await at();
    expect(d0).toBeCloseTo(centre[0], 0);
    expect(a0).toBeCloseTo(centre[1], 6);
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowUp');
    // One grid step along each axis.
    const [d1, a1] = await at();
    expect((d1 - d0) / ((dMax - dMin) / (dN - 1))).toBeCloseTo(1, 2);
    expect((a1 - a0) / ((aMax - aMin) / (aN - 1))).toBeCloseTo(1, 2);
    await page.keyboard.press('End');
    expect((await at())[0]).toBeCloseTo(dMax, 0);
    await screenshot(page, 'layout-heatmap-keyboard');
    await page.context().close();
  }, 120_000);

  it('gives every Tab stop a visible focus, in every view', async () => {
    const page = await openAt(1440);
    await page.getByTestId('run').click();
    await runToEnd(page);
    for (let view = 1; view <= 7; view++) {
      await page.keyboard.press(`Alt+${view}`);
      await page.waitForTimeout(300);
      const { stops, bad } = await invisibleStops(page);
      expect(stops, `Tab stops in view ${view}`).toBeGreaterThan(20);
      expect(bad, `view ${view}`).toEqual([]);
    }
    await page.context().close();
  }, 180_000);

  it('meets WCAG AA contrast for text and placeholders in both colour schemes, in every view', async () => {
    for (const scheme of ['light', 'dark'] as const) {
      const page = await openAt(1440, scheme);
      await page.getByTestId('run').click();
      await runToEnd(page);
      await page.locator('details summary', { hasText: 'Spec JSON' }).click();
      for (let view = 1; view <= 7; view++) {
        await page.keyboard.press(`Alt+${view}`);
        await page.waitForTimeout(400);
        expect(await lowContrast(page), `${scheme} scheme, view ${view}`).toEqual([]);
      }
      await page.context().close();
    }
  }, 180_000);

  it('places every field\'s help where it covers no other control of the field\'s form, in every view at 1440 and 800 px', async () => {
    for (const width of [1440, 800]) {
      const page = await openAt(width);
      await page.getByTestId('run').click();
      await runToEnd(page);
      await page.locator('details summary', { hasText: 'Spec JSON' }).click();
      let fields = 0;
      for (let view = 1; view <= 7; view++) {
        await page.keyboard.press(`Alt+${view}`);
        await page.waitForTimeout(400);
        if (view === 2) await page.getByTestId('samples').locator('summary').click();
        const found = await coveredByHelp(page);
        fields += found.fields;
        expect(found.covering, `${width} px, view ${view}`).toEqual([]);
      }
      expect(fields).toBeGreaterThan(60);
      // The map's point counts: the threshold beside them stays in view while one is typed into.
      await page.keyboard.press('Alt+3');
      for (const id of ['m-d-n', 'm-a-n']) {
        await page.locator(`#${id}`).focus();
        await page.waitForTimeout(100);
        const bubble = (await page.getByTestId('field-help').boundingBox())!;
        const threshold = (await page.locator('#m-threshold').boundingBox())!;
        const apart = bubble.x + bubble.width <= threshold.x || threshold.x + threshold.width <= bubble.x || bubble.y + bubble.height <= threshold.y || threshold.y + threshold.height <= bubble.y;
        expect(apart, `${id} at ${width} px`).toBe(true);
      }
      if (width === 800) {
        // Each look (1440 and 800 px, light and dark) places the bubble afresh as the window is resized.
        await page.locator('#m-a-n').focus();
        await screenshotLooks(page, 'layout-help-map-points');
        await page.locator('#f-rabi').focus();
        await screenshotLooks(page, 'layout-help-spec');
      }
      await page.context().close();
    }
  }, 300_000);

  it('left no error in the console of any page', () => {
    expect(visits.flatMap((v) => v.consoleErrors)).toEqual([]);
  });
});
