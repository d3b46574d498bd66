// The engine-independent elementary functions (src/core/portable-math.ts): accurate against
// the engine's own Math.* (a reference that may differ in the last bit), handbook values, and
// the same bits in Chromium as in Node, which is what they are for.
import { readFileSync } from 'node:fs';
import ts from 'typescript';
import { chromium } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import * as pm from '../../src/core/portable-math.ts';
import { CHROMIUM, skipReason } from '../e2e/harness.ts';

type Name = 'sin' | 'cos' | 'exp' | 'log' | 'atanh' | 'tanh';
const NAMES: Name[] = ['sin', 'cos', 'exp', 'log', 'atanh', 'tanh'];

/** Arguments of each function over the ranges the design path uses and beyond (a fixed grid). */
function argumentsOf(name: Name): number[] {
  const out: number[] = [];
  for (let k = 0; k < 4001; k++) {
    const u = (k - 2000) / 2000; // -1 .. 1
    if (name === 'sin' || name === 'cos') out.push(u * 60 + 1e-3 * Math.sqrt(k));
    else if (name === 'exp') out.push(u * 700);
    else if (name === 'log') out.push(10 ** (u * 300) * (1 + 0.37 * Math.sqrt(k / 4001)));
    else if (name === 'atanh') out.push(u * 0.999);
    else out.push(u * 25);
  }
  return out;
}

describe('portable elementary functions', () => {
  it('agree with the engine\'s Math.* to a few units in the last place', () => {
    // Reference: the engine's own Math functions (ECMA-262 asks them to be close to the true
    // value, not exact); 4e-16 relative is two units in the last place.
    for (const name of NAMES) {
      let worst = 0;
      for (const x of argumentsOf(name)) {
        const want = Math[name](x), got = pm[name](x);
        if (want === 0 && got === 0) continue;
        // Near a zero of sin or cos the relative error is that of the reduced argument.
        const floor = name === 'sin' || name === 'cos' ? 1e-15 : 1e-300;
        worst = Math.max(worst, Math.abs(got - want) / Math.max(Math.abs(want), floor));
      }
      expect(worst, name).toBeLessThan(6e-16);
    }
  });

  it('give the handbook values', () => {
    // sin(double(pi)) = pi - double(pi) = 1.2246467991473532e-16 (the remainder of Math.PI;
    // recalled from memory, and the engines' Math.sin agrees).
    expect(pm.sin(Math.PI)).toBe(Math.sin(Math.PI));
    expect(pm.cos(0)).toBe(1);
    expect(pm.exp(0)).toBe(1);
    expect(pm.exp(Math.LN2)).toBe(2);
    expect(pm.log(1)).toBe(0);
    expect(pm.log(2)).toBe(Math.LN2);
    expect(pm.log(10)).toBe(Math.LN10);
    expect(pm.log(Math.E)).toBeCloseTo(1, 15);
    expect(pm.atanh(0.5)).toBeCloseTo(0.5493061443340549, 15); // ln 3 / 2
    expect(pm.tanh(1e-8)).toBe(1e-8);
    expect(pm.exp(-800)).toBe(0);
    expect(pm.exp(800)).toBe(Infinity);
    expect(pm.log(0)).toBe(-Infinity);
    expect(pm.log(5e-324)).toBe(Math.log(5e-324));
    expect(Number.isNaN(pm.log(-1))).toBe(true);
    expect(Number.isNaN(pm.sin(Infinity))).toBe(true);
  });

  it.skipIf(skipReason() !== null)('give the same bits in Chromium as in Node', async () => {
    const source = readFileSync(new URL('../../src/core/portable-math.ts', import.meta.url), 'utf8');
    const js = ts.transpileModule(source, { compilerOptions: { target: ts.ScriptTarget.ES2022, module: ts.ModuleKind.None } }).outputText
      .replace(/^export /gm, '').replace(/^Object\.defineProperty\(exports.*$/m, '');
    const browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
    try {
      const page = await browser.newPage();
      const grids = Object.fromEntries(NAMES.map((name) => [name, argumentsOf(name)]));
      const inBrowser = (await page.evaluate(
        ({ code, grids }) => {
          const fns = new Function('exports', `${code}; return { sin, cos, exp, log, atanh, tanh };`)({}) as Record<string, (x: number) => number>;
          const out: Record<string, number[]> = {};
          for (const [name, xs] of Object.entries(grids)) out[name] = xs.map((x) => fns[name](x));
          return { out };
        },
        { code: js, grids },
      )) as { out: Record<string, number[]> };
      for (const name of NAMES) {
        const here = grids[name].map((x) => pm[name](x));
        const differing = here.filter((v, k) => !Object.is(v, inBrowser.out[name][k])).length;
        expect(differing, name).toBe(0);
      }
    } finally {
      await browser.close();
    }
  }, 60_000);
});
