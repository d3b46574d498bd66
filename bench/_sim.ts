import { readFileSync } from 'node:fs';
type Trace = { objective: number[]; evaluations: number[] };
type Design = { seed: number; starts: Trace[] };
const names = process.argv.slice(2);
const maxIt: Record<string, number> = { 'transmon-x90': 2000, 'ion-x180': 1000, 'transmon-x180-fast': 1000, 'transmon-x90-line': 600 };
// rule: returns stop iteration per start
type Rule = (d: Design, max: number) => number[];
const end = (t: Trace) => t.objective.length - 1;
const stallAt = (t: Trace, K: number, tau: number, from = 0): number => {
  for (let k = Math.max(K, from); k <= end(t); k++) if (t.objective[k - K] - t.objective[k] <= tau * t.objective[k - K]) return k;
  return end(t);
};
const rules: Record<string, Rule> = {};
rules['none'] = (d) => d.starts.map(end);
for (const [K, tau] of [[100, 1e-4], [100, 1e-3]]) rules[`stall ${K} ${tau}`] = (d) => d.starts.map((t) => stallAt(t, K, tau));
// budget-aware log rate: stop when continuing at the window's rate to the budget gains < tau
for (const [K, tau] of [[100, 0.01]]) rules[`rate ${K} ${tau}`] = (d, max) => d.starts.map((t) => {
  for (let k = K; k <= end(t); k++) { const r = Math.log(t.objective[k - K] / t.objective[k]) / K; if (r * (max - k) <= tau) return k; }
  return end(t);
});
// prune at P keep n, by figure
const pruneBy = (P: number, keep: number, score: (t: Trace, k: number) => number): Rule => (d) => {
  const at = d.starts.map((t) => Math.min(P, end(t)));
  const ranked = d.starts.map((t, s) => ({ s, v: score(t, at[s]) })).sort((a, b) => a.v - b.v || a.s - b.s);
  const kept = new Set(ranked.slice(0, keep).map((r) => r.s));
  return d.starts.map((t, s) => kept.has(s) ? end(t) : at[s]);
};
for (const [P, keep] of [[400, 2]]) rules[`prune ${P} ${keep}`] = pruneBy(P, keep, (t, k) => t.objective[k]);
// halving
const halving = (B0: number, eta = 2): Rule => (d, max) => {
  let live = d.starts.map((_, s) => s);
  const stop = d.starts.map(end);
  let B = B0;
  while (live.length > 1 && B < max) {
    const at = (s: number) => Math.min(B, end(d.starts[s]));
    const ranked = [...live].sort((a, b) => d.starts[a].objective[at(a)] - d.starts[b].objective[at(b)] || a - b);
    const keep = Math.ceil(live.length / eta);
    for (const s of ranked.slice(keep)) stop[s] = at(s);
    live = ranked.slice(0, keep).filter((s) => end(d.starts[s]) > B);
    B *= eta;
  }
  return stop;
};
for (const B of [100, 200]) rules[`halving ${B}`] = halving(B);
// cannot beat the leader at its rate (lock-step, check every C iterations); optimism factor c
const outpaced = (W: number, c: number, C = 10, stall?: [number, number]): Rule => (d, max) => {
  const n = d.starts.length;
  const stop: number[] = d.starts.map((t) => stall ? stallAt(t, stall[0], stall[1]) : end(t));
  const live = new Set(d.starts.map((_, s) => s));
  for (let k = W; k <= max; k += C) {
    for (const s of [...live]) if (stop[s] <= k) live.delete(s);
    if (live.size === 0) break;
    const fig = (s: number) => d.starts[s].objective[Math.min(k, stop[s])];
    let lead = Infinity; for (let s = 0; s < n; s++) lead = Math.min(lead, fig(s));
    for (const s of live) {
      const t = d.starts[s];
      const r = Math.log(t.objective[k - W] / t.objective[k]) / W;
      const proj = t.objective[k] * Math.exp(-c * r * (max - k));
      if (proj > lead) { stop[s] = k; live.delete(s); }
    }
  }
  return stop;
};

const once = (P: number, W: number, c: number, m: number, keepMax = 99): Rule => (d, max) => {
  const n = d.starts.length;
  const at = d.starts.map((t) => Math.min(P, end(t)));
  const fig = (s: number) => d.starts[s].objective[at[s]];
  let lead = 0; for (let s = 1; s < n; s++) if (fig(s) < fig(lead)) lead = s;
  const stop = d.starts.map(end);
  const proj = d.starts.map((t, s) => { const k = at[s]; const r = Math.log(t.objective[k - W] / t.objective[k]) / W; return t.objective[k] * Math.exp(-c * r * (max - k)); });
  const kept = d.starts.map((_, s) => s).filter((s) => s === lead || proj[s] <= fig(lead) * (1 - m)).sort((a, b) => proj[a] - proj[b]).slice(0, keepMax);
  for (let s = 0; s < n; s++) if (s !== lead && !kept.includes(s) && end(d.starts[s]) > P) stop[s] = P;
  return stop;
};
const outm = (W: number, c: number, m: number, C: number, P0 = W): Rule => (d, max) => {
  const n = d.starts.length;
  const stop: number[] = d.starts.map(end);
  const live = new Set(d.starts.map((_, s) => s));
  for (let k = P0; k <= max; k += C) {
    for (const s of [...live]) if (stop[s] <= k) live.delete(s);
    if (live.size === 0) break;
    const fig = (s: number) => d.starts[s].objective[Math.min(k, stop[s])];
    let lead = 0; for (let s = 1; s < n; s++) if (fig(s) < fig(lead)) lead = s;
    for (const s of live) {
      if (s === lead) continue;
      const t = d.starts[s];
      const r = Math.log(t.objective[k - W] / t.objective[k]) / W;
      const proj = t.objective[k] * Math.exp(-c * r * (max - k));
      if (proj > fig(lead) * (1 - m)) { stop[s] = k; live.delete(s); }
    }
  }
  return stop;
};

const withStall = (r: Rule, K: number, tau: number): Rule => (d, max) => { const st = r({ ...d, starts: d.starts.map((t) => ({ objective: t.objective.slice(0, stallAt(t, K, tau) + 1), evaluations: t.evaluations.slice(0, stallAt(t, K, tau) + 1) })) }, max); return st; };

for (const [K, tau] of [[100, 1e-4], [200, 1e-4], [100, 3e-5], [100, 1e-5], [300, 1e-4]]) { rules[`stall ${K} ${tau}`] = (d) => d.starts.map((t) => stallAt(t, K, tau)); rules[`outpaced 100 x2 + stall ${K} ${tau}`] = withStall(outm(100, 2, 0, 100), K, tau); }
const med = (v: number[]) => { const s = [...v].sort((a, b) => a - b); return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2; };
for (const name of names) {
  const ds: Design[] = JSON.parse(readFileSync(`/tmp/evals/${name}.json`, 'utf8'));
  const max = maxIt[name];
  console.log(`\n${name}: evals ratio (median, worst) | figure ratio (median, worst) per rule`);
  for (const [rn, rule] of Object.entries(rules)) {
    const er: number[] = [], fr: number[] = [];
    for (const d of ds) {
      const base = d.starts.map(end);
      const stop = rule(d, max);
      const ev = (st: number[]) => st.reduce((a, k, s) => a + d.starts[s].evaluations[k], 0);
      const best = (st: number[]) => Math.min(...st.map((k, s) => d.starts[s].objective[k]));
      er.push(ev(stop) / ev(base)); fr.push(best(stop) / best(base));
    }
    console.log(`${rn.padEnd(34)} ev ${med(er).toFixed(3)} ${Math.max(...er).toFixed(3)} | fig ${med(fr).toFixed(4)} ${Math.max(...fr).toFixed(4)}  [${fr.map((x) => x.toFixed(3)).join(' ')}]`);
  }
}
