// How many evaluations a design needs under each stopping rule, against running every
// start to its end, over seeds of the demos. Every start is recorded once with the rules
// off (its objective and evaluation count after each iteration); a rule only cuts these
// paths short (a start's path never depends on the others), so its evaluations and best
// figure are read off exactly. The default rules are then run for real (design() in one
// loop, and on two threads) to check that they stop where the reading says.
//   npm run bench:evals                 table per demo: evaluations / baseline and best figure / baseline best, per seed
//   npm run bench:evals -- --seeds 4    fewer seeds (default 10)
//   npm run bench:evals -- --json       the same as one JSON object
import { readFileSync } from 'node:fs';
import { design, toProblem } from '../src/core/api.ts';
import { outpacedStarts } from '../src/core/best-start.ts';
import { StartRun } from '../src/core/run.ts';
import { DEFAULT_OPTIMIZER } from '../src/core/spec.ts';
import { designInThreads } from '../src/core/threads.ts';
import type { Problem } from '../src/core/types.ts';

const argv = process.argv.slice(2);
const json = argv.includes('--json');
const seedCount = argv.includes('--seeds') ? Number(argv[argv.indexOf('--seeds') + 1]) : 10;
const log = (text: string): void => {
  if (!json) process.stdout.write(text + '\n');
};

/** The demos of the app and the README, and the two fast transmon examples. */
const DEMOS = ['transmon-x90', 'ion-x180', 'transmon-x180-fast', 'transmon-x90-line'];

/** One start run to its end: objective and evaluations after each iteration (index = iteration). */
interface Path {
  objective: number[];
  evaluations: number[];
}

/** Every start of one seed. */
interface Recorded {
  seed: number;
  paths: Path[];
}

/** A spec with the given seed and every stopping rule off. */
function baselineSpec(spec: Record<string, unknown>, seed: number): Record<string, unknown> {
  const optimizer = { ...(spec.optimizer as object), seed, stallIterations: 0, pruneAfter: 0, outpaceEvery: 0 };
  return { ...spec, optimizer };
}

function record(problem: Problem): Path[] {
  const { starts, maxIterations, targetInfidelity } = problem.optimizer;
  const paths: Path[] = [];
  for (let s = 0; s < starts; s++) {
    const run = new StartRun(problem, s);
    const path: Path = { objective: [run.objective], evaluations: [run.evaluations] };
    // The design loop's own order of checks (api.ts advance), without the rules.
    while (run.iterations < maxIterations && run.infidelity > targetInfidelity && run.step() === null) {
      path.objective.push(run.objective);
      path.evaluations.push(run.evaluations);
    }
    run.dispose();
    paths.push(path);
  }
  return paths;
}

/** Where each start stops under a rule (an iteration index into its path). */
type Rule = (paths: Path[], maxIterations: number) => number[];

const last = (p: Path): number => p.objective.length - 1;

/** The stall rule (run.ts StartRun.stalled): the first iteration whose fall over the last k is at most tau relative. */
function stallStop(p: Path, k: number, tau: number): number {
  if (k === 0) return last(p);
  for (let j = k; j <= last(p); j++) if (p.objective[j - k] - p.objective[j] <= tau * p.objective[j - k]) return j;
  return last(p);
}

const stall = (k: number, tau: number): Rule => (paths) => paths.map((p) => stallStop(p, k, tau));

/** Paths cut where a per-start rule stops them, for a rule between starts to work on. */
const cut = (paths: Path[], stops: number[]): Path[] => paths.map((p, s) => ({ objective: p.objective.slice(0, stops[s] + 1), evaluations: p.evaluations.slice(0, stops[s] + 1) }));

/** Every start to `after`, then only the `keep` lowest objectives there go on (pruneAfter, keepStarts). */
const prune = (after: number, keep: number, inner: Rule): Rule => (paths, max) => {
  const own = inner(paths, max);
  const at = own.map((k) => Math.min(after, k));
  const ranked = paths.map((p, s) => s).sort((a, b) => paths[a].objective[at[a]] - paths[b].objective[at[b]] || a - b);
  const kept = new Set(ranked.slice(0, keep));
  return own.map((k, s) => (kept.has(s) ? k : at[s]));
};

/** Successive halving: every start to `first`, the better half goes on to twice that, and so on to one. */
const halving = (first: number): Rule => (paths, max) => {
  const stops = paths.map(last);
  let live = paths.map((_, s) => s);
  for (let budget = first; live.length > 1 && budget < max; budget *= 2) {
    const at = (s: number): number => Math.min(budget, last(paths[s]));
    const ranked = [...live].sort((a, b) => paths[a].objective[at(a)] - paths[b].objective[at(b)] || a - b);
    const keep = Math.ceil(live.length / 2);
    for (const s of ranked.slice(keep)) stops[s] = at(s);
    live = ranked.slice(0, keep).filter((s) => last(paths[s]) > budget);
  }
  return stops;
};

/** A start stops once continuing to the budget at its rate in log(objective) over the last `window` iterations would gain less than `gain` relative. */
const budgetRate = (window: number, gain: number): Rule => (paths, max) => paths.map((p) => {
  for (let k = window; k <= last(p); k++) {
    if ((Math.log(p.objective[k - window] / p.objective[k]) / window) * (max - k) <= gain) return k;
  }
  return last(p);
});

/** The outpacing rule (best-start.ts outpacedStarts) every `every` iterations, on paths cut by a per-start rule. */
const outpace = (every: number, factor: number, inner: Rule): Rule => (all, max) => {
  const paths = cut(all, inner(all, max));
  const stops = paths.map(last);
  const settings = { outpaceEvery: every, outpaceFactor: factor, maxIterations: max };
  for (let k = every; k < max; k += every) {
    const open = paths.map((_, s) => s).filter((s) => stops[s] > k);
    if (open.length === 0) break;
    const standings = paths.map((p, s) => (stops[s] > k
      ? { start: s, objective: p.objective[k], before: p.objective[k - every] }
      : { start: s, objective: p.objective[stops[s]] }));
    for (const s of outpacedStarts(standings, k, settings)) stops[s] = k;
  }
  return stops;
};

const off: Rule = (paths) => paths.map(last);
const d = DEFAULT_OPTIMIZER;
const defaults = outpace(d.outpaceEvery, d.outpaceFactor, stall(d.stallIterations, d.stallTolerance));

const RULES: { name: string; rule: Rule }[] = [
  { name: 'stall 100 it. < 1e-4 (the former default)', rule: stall(100, 1e-4) },
  { name: 'stall 100 it. < 1e-3', rule: stall(100, 1e-3) },
  { name: 'stall 200 it. < 1e-4', rule: stall(200, 1e-4) },
  { name: 'budget rate: gain to the budget < 1 % (100 it.)', rule: budgetRate(100, 0.01) },
  { name: 'prune at 400, keep 2, stall 100 < 1e-4', rule: prune(400, 2, stall(100, 1e-4)) },
  { name: 'prune at 200, keep 2', rule: prune(200, 2, off) },
  { name: 'successive halving from 100', rule: halving(100) },
  { name: 'successive halving from 200', rule: halving(200) },
  { name: 'outpaced every 50, x2', rule: outpace(50, 2, off) },
  { name: 'outpaced every 100, x1', rule: outpace(100, 1, off) },
  { name: 'outpaced every 100, x2', rule: outpace(100, 2, off) },
  { name: 'outpaced every 100, x2, stall 100 < 1e-4', rule: outpace(100, 2, stall(100, 1e-4)) },
  { name: `defaults: outpaced every ${d.outpaceEvery}, x${d.outpaceFactor}, stall ${d.stallIterations} < ${d.stallTolerance}`, rule: defaults },
];

const median = (v: number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

/** Total evaluations and best objective of the starts stopped at `stops`. */
function outcome(paths: Path[], stops: number[]): { evaluations: number; best: number } {
  let evaluations = 0, best = Infinity;
  paths.forEach((p, s) => {
    evaluations += p.evaluations[stops[s]];
    best = Math.min(best, p.objective[stops[s]]);
  });
  return { evaluations, best };
}

const report: Record<string, unknown> = {};
for (const name of DEMOS) {
  const spec = JSON.parse(readFileSync(new URL(`../examples/${name}.json`, import.meta.url), 'utf8')) as Record<string, unknown>;
  const seeds: Recorded[] = [];
  for (let seed = 1; seed <= seedCount; seed++) seeds.push({ seed, paths: record(toProblem(baselineSpec(spec, seed))) });
  const problem = toProblem(baselineSpec(spec, 1));
  const max = problem.optimizer.maxIterations;
  const base = seeds.map((r) => outcome(r.paths, off(r.paths, max)));
  log(`\n${name}: ${problem.optimizer.starts} starts x ${max} iterations; baseline (every start to its end) ${median(base.map((b) => b.evaluations))} evaluations (median over ${seedCount} seeds)`);
  log('evaluations / baseline, then best figure / baseline best, per seed ' + seeds.map((r) => r.seed).join(' '));
  const rows: Record<string, { evaluations: number[]; figure: number[] }> = {};
  for (const { name: ruleName, rule } of RULES) {
    const ratios = seeds.map((r, k) => {
      const o = outcome(r.paths, rule(r.paths, max));
      return { e: o.evaluations / base[k].evaluations, f: o.best / base[k].best };
    });
    const e = ratios.map((x) => x.e), f = ratios.map((x) => x.f);
    rows[ruleName] = { evaluations: e, figure: f };
    log(`  ${ruleName}`);
    log(`    evaluations ${e.map((x) => x.toFixed(2)).join(' ')}   median ${median(e).toFixed(3)}, worst ${Math.max(...e).toFixed(3)}`);
    log(`    best figure ${f.map((x) => x.toFixed(3)).join(' ')}   median ${median(f).toFixed(4)}, worst ${Math.max(...f).toFixed(4)}`);
  }
  // The defaults run for real: one loop, and two threads (the referee), on every seed.
  let agree = 0;
  for (const r of seeds) {
    const want = outcome(r.paths, defaults(r.paths, max));
    const s = { ...spec, optimizer: { ...(spec.optimizer as object), seed: r.seed, stallIterations: d.stallIterations, stallTolerance: d.stallTolerance, pruneAfter: 0, outpaceEvery: d.outpaceEvery, outpaceFactor: d.outpaceFactor } };
    const one = await design(s);
    const two = r.seed <= 2 ? await designInThreads(s, { threads: 2 }) : one;
    const total = (x: typeof one): number => x.starts.reduce((a, st) => a + st.evaluations, 0);
    if (total(one) === want.evaluations && one.best.objective === want.best && total(two) === want.evaluations && two.best.objective === want.best) agree++;
    else log(`  seed ${r.seed}: design() gave ${total(one)} evaluations and ${one.best.objective}, threads ${total(two)} and ${two.best.objective}; the paths say ${want.evaluations} and ${want.best}`);
  }
  log(`  defaults run by design() (and on two threads for seeds 1-2): the paths' evaluations and best figure on ${agree} of ${seeds.length} seeds`);
  report[name] = { baselineEvaluations: base.map((b) => b.evaluations), rules: rows, defaultsAgree: agree, seeds: seeds.length };
}
if (json) process.stdout.write(JSON.stringify(report) + '\n');
