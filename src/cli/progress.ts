// Progress of a design on stderr: a bar redrawn in place on a terminal, otherwise a plain
// line now and then (logs and CI keep every line, so they must stay few).
import { prunes } from '../core/best-start.ts';
import type { Progress, StartResult } from '../core/types.ts';
import type { CliIO } from './command.ts';
import { formatInfidelity } from './format.ts';

/** Redraws of the bar are at most this often (ms): a terminal cannot show more. */
const BAR_EVERY_MS = 100;
/** Plain lines are at most this often (ms), plus one when a new start begins. */
const LINE_EVERY_MS = 2000;
const BAR_WIDTH = 24;

/** Receives the design's progress reports and draws them; `finish` clears the bar. */
export interface ProgressReporter {
  update: (progress: Progress) => void;
  /** A start has ended: one that stopped early (stalled, outpaced) counts as done to its limit. */
  ended: (result: StartResult) => void;
  finish: () => void;
}

/** What the fraction done is counted against: the spec's starts, their iteration limit and its pruning. */
export interface ProgressBudget {
  starts: number;
  maxIterations: number;
  pruneAfter: number;
  keepStarts: number;
}

/**
 * Iterations a design can take at most: every start to its limit, or, when it prunes, every
 * start to pruneAfter and the keepStarts best on to the limit (a pruned design that runs
 * every start to the end reads 100 %, not the share of starts kept).
 */
export function iterationBudget(o: ProgressBudget): number {
  if (!prunes(o, o.starts)) return o.starts * o.maxIterations;
  const probe = Math.min(o.pruneAfter, o.maxIterations);
  return o.starts * probe + o.keepStarts * (o.maxIterations - probe);
}

/** A reporter for a design of the optimizer's starts, each of at most its maxIterations. */
export function progressReporter(io: CliIO, optimizer: ProgressBudget, now = () => performance.now()): ProgressReporter {
  const { starts, maxIterations } = optimizer;
  // Iterations done per start: the fraction stays right whether starts run one after
  // another or interleaved.
  const iterations = new Map<number, number>();
  let best = Infinity;
  let lastDraw = -Infinity;
  // Starts seen so far: a line marks each new one, once, whether starts run one after
  // another or interleaved on several threads.
  const seen = new Set<number>();
  let drawn = false;
  const total = iterationBudget(optimizer);

  const describe = (p: Progress): { fraction: number; percent: string; text: string } => {
    let done = 0;
    for (const it of iterations.values()) done += Math.min(it, maxIterations);
    const fraction = Math.min(1, done / total);
    const percent = `${Math.floor(fraction * 100)}%`.padStart(4);
    const text = `start ${p.start + 1}/${starts}  iteration ${p.iteration}  infidelity ${formatInfidelity(p.meanInfidelity)}  best ${formatInfidelity(best)}`;
    return { fraction, percent, text };
  };

  return {
    update(p) {
      iterations.set(p.start, p.iteration);
      if (p.meanInfidelity < best) best = p.meanInfidelity;
      const t = now();
      const newStart = !seen.has(p.start);
      seen.add(p.start);
      const info = describe(p);
      if (io.isTTY) {
        if (t - lastDraw < BAR_EVERY_MS && !newStart) return;
        const filled = Math.round(info.fraction * BAR_WIDTH);
        const bar = '#'.repeat(filled) + '-'.repeat(BAR_WIDTH - filled);
        // \x1b[K clears what a longer previous line left behind.
        io.stderr(`\r[${bar}] ${info.percent}  ${info.text}\x1b[K`);
        drawn = true;
      } else {
        if (t - lastDraw < LINE_EVERY_MS && !newStart) return;
        io.stderr(`design ${info.percent.trim()}  ${info.text}\n`);
      }
      lastDraw = t;
    },
    ended(result) {
      // Under pruning a start's budget depends on whether it is kept: its reports say enough.
      if (prunes(optimizer, starts) || result.stopReason === 'stopped') return;
      iterations.set(result.start, maxIterations);
    },
    finish() {
      if (drawn) io.stderr('\r\x1b[K');
      drawn = false;
    },
  };
}
