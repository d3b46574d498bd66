// The benchmark's figures for member shares on threads (src/core/member-split.ts,
// share-threads.ts): one figure-and-gradient evaluation of a problem split in two shares,
// both on this thread against one on a helper thread (which polls for its next evaluation
// before it sleeps, as the library's does, and one that sleeps at once), rounds alternated
// in one process, over sizes around the threshold and at N = 1000 x 121 and 10000 x 25.
// The whole (unsplit) evaluation is timed alongside: what splitting costs on one thread.
// Then one-start designs on one thread and on two, qubit and transmon ladder.
// Alone: node bin/run-ts.js bench/share-bench.ts (npm run bench:shares).
import { prepareGradientJob } from '../src/core/gradient.ts';
import { evaluationSeconds, memberShares, MIN_SHARE_SECONDS, ShareBlocks, sumShares, type MemberShare } from '../src/core/member-split.ts';
import { pathToFileURL } from 'node:url';
import { design } from '../src/core/api.ts';
import { startSharePool } from '../src/core/share-threads.ts';
import { designInThreads } from '../src/core/threads.ts';
import { parseSpec } from '../src/core/spec.ts';
import type { Pulse } from '../src/core/types.ts';
import { getCore } from '../src/core/wasm.ts';
import { medianOf, timeMedian } from './timing.ts';

/** One size: medians (us) of the whole evaluation, two shares on one thread and on two, and the ratio one/two thread. */
export interface ShareFigures {
  segments: number;
  members: number;
  estimatedUs: number;
  wholeUs: number;
  oneThreadUs: number;
  twoThreadsUs: number;
  /** Two threads, the helper sleeping in Atomics.wait between evaluations (no polling). */
  twoThreadsSleepingUs: number;
  speedup: number;
  /** Shares the library uses for this problem (1: not split). */
  shares: number;
}



/** One size's figures; `points` members per side of the ensemble grid. */
async function measure(segments: number, points: number, rounds: number): Promise<ShareFigures> {
  const problem = parseSpec({
    target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: segments * 2e-9, segments, rabiMax: 1e7,
    ensemble: { detuning: { min: -2e6, max: 2e6, points }, amplitudeError: { min: -0.1, max: 0.1, points } },
  });
  const m = problem.members.length;
  const half = 4 * Math.round(m / 8);
  const shares: MemberShare[] = [{ start: 0, end: half }, { start: half, end: m }];
  const i = new Float64Array(segments), q = new Float64Array(segments);
  for (let k = 0; k < segments; k++) {
    const t = (k + 0.5) / segments;
    i[k] = 0.7e7 * Math.sin(Math.PI * t) * Math.cos(5 * t);
    q[k] = 0.5e7 * Math.sin(3 * Math.PI * t);
  }
  const pulse: Pulse = { dt: problem.dt, i, q, metadata: {} };
  const core = getCore();
  const whole = prepareGradientJob(problem.target, pulse, problem.members);
  const both = new ShareBlocks(core, problem, shares, [0, 1], segments, problem.dt);
  const pool = await startSharePool(problem, shares, 2);
  const sleeping = await startSharePool(problem, shares, 2, { spinMs: { helper: 0, collect: 0 } });
  const mine = new ShareBlocks(core, problem, shares, pool.local, segments, problem.dt);
  const gI = new Float64Array(segments), gQ = new Float64Array(segments);
  const oneThread = (): number => sumShares([both.evaluate(0, i, q), both.evaluate(1, i, q)], gI, gQ);
  const onPool = (p: typeof pool) => (): number => {
    p.post(i, q);
    const mean = sumShares(p.local.map((s) => mine.evaluate(s, i, q)), gI, gQ);
    return sumShares([{ mean, gradI: gI, gradQ: gQ }, ...p.collect()], gI, gQ);
  };
  const twoThreads = onPool(pool), twoSleeping = onPool(sleeping);
  try {
    if (oneThread() !== twoThreads() || oneThread() !== twoSleeping()) throw new Error('two threads gave another sum than one');
    const once = Math.max(1e-3, timeMedian(() => whole.run(), 3));
    const reps = Math.max(5, Math.min(400, Math.round(60 / once)));
    // Warm-up: V8 swaps in its optimised wasm code after a while.
    const warm = performance.now();
    while (performance.now() - warm < 300) { whole.run(); oneThread(); twoThreads(); twoSleeping(); }
    const w: number[] = [], one: number[] = [], two: number[] = [], sleep: number[] = [];
    for (let r = 0; r < rounds; r++) {
      w.push(timeMedian(() => whole.run(), reps));
      one.push(timeMedian(oneThread, reps));
      two.push(timeMedian(twoThreads, reps));
      sleep.push(timeMedian(twoSleeping, reps));
    }
    return {
      segments, members: m, estimatedUs: evaluationSeconds(problem) * 1e6, wholeUs: medianOf(w) * 1000, oneThreadUs: medianOf(one) * 1000, twoThreadsUs: medianOf(two) * 1000,
      twoThreadsSleepingUs: medianOf(sleep) * 1000, speedup: medianOf(one.map((x, k) => x / two[k])), shares: memberShares(problem).length,
    };
  } finally {
    pool.close();
    sleeping.close();
    mine.dispose();
    both.dispose();
    whole.dispose();
  }
}

/** A design of one start on one thread and on two (its shares routed by measured time): seconds from its first to its last iteration. */
export interface ShareDesignFigures {
  name: string;
  segments: number;
  members: number;
  iterations: number;
  /** Member shares of the problem (memberShares). */
  shares: number;
  oneThreadS: number;
  twoThreadsS: number;
  speedup: number;
  /** Of the evaluations of the same design run here with a pool of two threads, the part the route chooser gave to the pool. */
  pooledPart: number;
  samePulse: boolean;
}

/** The one-start designs timed: qubit ensembles of 1000 x 121 and 10000 x 25, and a 5-level transmon ladder. */
function designSpecs(): { name: string; spec: Record<string, unknown> }[] {
  const qubit = (segments: number, points: number, iterations: number) => ({
    target: { gate: { axis: [1, 0, 0], angleDeg: 90 } }, duration: segments * 2e-9, segments, rabiMax: 1e7,
    ensemble: { detuning: { min: -2e6, max: 2e6, points }, amplitudeError: { min: -0.1, max: 0.1, points } },
    optimizer: { starts: 1, maxIterations: iterations, stallIterations: 0 },
  });
  // An X(180) of 30 ns on 5 levels of an invented transmon, 3 x 3 members: about 1.1 ms per evaluation.
  const ladder = {
    system: { levels: 5, anharmonicity: -2.1e8 }, target: { gate: { axis: [1, 0, 0], angleDeg: 180 } }, duration: 3e-8, segments: 100, rabiMax: 8e7,
    ensemble: { detuning: { min: -2e6, max: 2e6, points: 3 }, amplitudeError: { min: -0.03, max: 0.03, points: 3 } },
    optimizer: { starts: 1, seed: 2, maxIterations: 100, stallIterations: 0 },
  };
  return [
    { name: 'qubit', spec: qubit(1000, 11, 150) },
    { name: 'qubit', spec: qubit(10000, 5, 60) },
    { name: '5 levels', spec: ladder },
  ];
}

async function designFigures(name: string, spec: Record<string, unknown>, rounds: number): Promise<ShareDesignFigures> {
  const problem = parseSpec(spec);
  // Thread start-up (tsx compiles the sources in each thread here) is left out: from the first iteration's report to the last's.
  const run = async (threads: number): Promise<{ s: number; i: Float64Array }> => {
    let first = NaN, last = NaN;
    const r = await designInThreads(spec, {
      threads, onProgress: (p) => {
        if (p.iteration === 0) first = p.elapsedS;
        last = p.elapsedS;
      },
    });
    return { s: last - first, i: r.pulse.i };
  };
  const one: number[] = [], two: number[] = [];
  let samePulse = true, reference: Float64Array | undefined;
  for (let r = 0; r < rounds; r++) {
    const a = await run(1), b = await run(2);
    one.push(a.s);
    two.push(b.s);
    reference ??= a.i;
    samePulse &&= a.i.every((x, k) => Object.is(x, b.i[k]));
  }
  // The route chooser's choices, read off a pool of this thread's own.
  const shares = memberShares(problem);
  const pool = await startSharePool(problem, shares, 2);
  let pooledPart: number;
  try {
    const r = await design(spec, { sharePool: pool });
    pooledPart = pool.posted / r.best.evaluations;
    samePulse &&= r.pulse.i.every((x, k) => Object.is(x, reference![k]));
  } finally {
    pool.close();
  }
  return {
    name, segments: problem.segments, members: problem.members.length, iterations: problem.optimizer.maxIterations, shares: shares.length,
    oneThreadS: medianOf(one), twoThreadsS: medianOf(two), speedup: medianOf(one.map((x, k) => x / two[k])), pooledPart, samePulse,
  };
}

/** The figures over the sizes, printed through `log`. */
export async function shareBenchmark(log: (text: string) => void): Promise<{ evaluations: ShareFigures[]; designs: ShareDesignFigures[] }> {
  log('member shares on threads: one figure-and-gradient evaluation, two shares on one thread against two threads (medians of 5 alternated rounds)');
  log(`segments  members  estimated us   whole us   1 thread us   2 threads us   1/2 threads   2 threads, helper sleeping us   library's shares (threshold ${MIN_SHARE_SECONDS * 1e6} us per share)`);
  const out: ShareFigures[] = [];
  for (const [segments, points] of [[100, 5], [200, 5], [400, 5], [100, 11], [800, 5], [1000, 11], [10000, 5]] as const) {
    const f = await measure(segments, points, 5);
    out.push(f);
    log(`${String(segments).padStart(8)}  ${String(f.members).padStart(7)}  ${f.estimatedUs.toFixed(0).padStart(12)}  ${f.wholeUs.toFixed(0).padStart(9)}  ${f.oneThreadUs.toFixed(0).padStart(12)}  ${f.twoThreadsUs.toFixed(0).padStart(13)}  ${f.speedup.toFixed(2).padStart(12)}   ${f.twoThreadsSleepingUs.toFixed(0).padStart(29)}   ${f.shares}`);
  }
  log('one start designed with --threads 1 and 2 (designInThreads; shares on a helper thread when measured faster), first to last iteration, medians of 3 alternated rounds');
  log('system     segments  members  shares  iterations  1 thread s  2 threads s  1/2 threads  evaluations on 2 threads  same pulse');
  const designs: ShareDesignFigures[] = [];
  for (const { name, spec } of designSpecs()) {
    const d = await designFigures(name, spec, 3);
    designs.push(d);
    log(`${d.name.padEnd(9)}  ${String(d.segments).padStart(8)}  ${String(d.members).padStart(7)}  ${String(d.shares).padStart(6)}  ${String(d.iterations).padStart(10)}  ${d.oneThreadS.toFixed(3).padStart(10)}  ${d.twoThreadsS.toFixed(3).padStart(11)}  ${d.speedup.toFixed(2).padStart(11)}  ${(100 * d.pooledPart).toFixed(0).padStart(23)} %  ${d.samePulse ? 'yes' : 'NO'}`);
  }
  return { evaluations: out, designs };
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  await shareBenchmark((text) => process.stdout.write(text + '\n'));
}
