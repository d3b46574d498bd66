// The command line's progress on a pruned design (src/cli/progress.ts): the fraction done is
// counted against the iterations the design can take, so that a design whose starts all run
// to the end reads 100 %, as one without pruning does. examples/transmon-x90.json with pruning
// turned on: 5 starts to 400 iterations, then the 2 best on to 2000.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { CliIO } from '../../src/cli/command.ts';
import { iterationBudget, progressReporter } from '../../src/cli/progress.ts';
import { parseSpec } from '../../src/core/spec.ts';
import type { Progress, StartResult } from '../../src/core/types.ts';

const file = JSON.parse(readFileSync(new URL('../../examples/transmon-x90.json', import.meta.url), 'utf8'));
const demo = parseSpec({ ...file, optimizer: { ...file.optimizer, pruneAfter: 400, keepStarts: 2 } }).optimizer;

/** A terminal that keeps what was drawn, and a clock that moves 1 s a report (every report is drawn). */
function terminal(): { io: CliIO; lines: string[]; now: () => number } {
  const lines: string[] = [];
  let t = 0;
  return { io: { stdout: () => undefined, stderr: (text) => void lines.push(text), isTTY: true }, lines, now: () => (t += 1000) };
}

const report = (start: number, iteration: number): Progress => ({ start, iteration, meanInfidelity: 1e-3, objective: 1e-3, gradientNorm: 1, elapsedS: 0 });
const percentOf = (line: string) => Number(/\] +(\d+)%/.exec(line)?.[1]);

describe('progress of a pruned design', () => {
  it('counts every start to pruneAfter and the keepStarts best on to maxIterations', () => {
    expect(demo).toMatchObject({ starts: 5, maxIterations: 2000, pruneAfter: 400, keepStarts: 2 });
    // 5 x 400 + 2 x (2000 - 400) = 5200 iterations at most.
    expect(iterationBudget(demo)).toBe(5200);
    // Without pruning (or keeping every start) the budget is every start to its limit.
    expect(iterationBudget({ ...demo, pruneAfter: 0 })).toBe(10_000);
    expect(iterationBudget({ ...demo, keepStarts: 5 })).toBe(10_000);
    // A limit below the pruning point: no start goes past it.
    expect(iterationBudget({ ...demo, maxIterations: 300 })).toBe(1500);
  });

  it('reads 100 % once the kept starts reach their limit, and the share done on the way', () => {
    const { io, lines, now } = terminal();
    const reporter = progressReporter(io, demo, now);
    for (const start of [0, 1, 2, 3, 4]) reporter.update(report(start, 400));
    // Every start at the pruning point: 2000 of 5200 iterations (it read 20 % of 10 000 before).
    expect(percentOf(lines.at(-1)!)).toBe(Math.floor((100 * 2000) / 5200));
    reporter.update(report(1, 2000));
    reporter.update(report(4, 2000));
    expect(percentOf(lines.at(-1)!)).toBe(100);
    expect(lines.at(-1)).toMatch(/\[#{24}\]/);
  });

  it('counts a start that stopped early (outpaced, stalled) as done to its limit, without pruning', () => {
    const plain = { ...demo, pruneAfter: 0 };
    const { io, lines, now } = terminal();
    const reporter = progressReporter(io, plain, now);
    const ended = (start: number, iteration: number, stopReason: StartResult['stopReason']): StartResult =>
      ({ start, iterations: iteration, stopReason } as StartResult);
    for (const start of [0, 1, 2, 3, 4]) reporter.update(report(start, 900));
    // 5 x 900 of 5 x 2000 iterations.
    expect(percentOf(lines.at(-1)!)).toBe(45);
    reporter.ended(ended(0, 900, 'outpaced'));
    reporter.ended(ended(1, 900, 'stalled'));
    reporter.update(report(2, 1000));
    // 2 x 2000 + 1000 + 2 x 900 of 10 000.
    expect(percentOf(lines.at(-1)!)).toBe(68);
    // A stop by the user is not the design's end: its share stays where it was.
    reporter.ended(ended(2, 1000, 'stopped'));
    reporter.update(report(3, 900));
    expect(percentOf(lines.at(-1)!)).toBe(68);
  });
});
