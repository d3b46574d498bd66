// How a design runs from the command line: progress on worker threads prints like the
// one-thread path (a line per new start and every two seconds off a terminal, not a line per
// iteration); a design that would take long is announced and waits for --yes, a time limit
// or the user's answer; and Ctrl-C on the installed command (compiled, on a problem whose
// iterations are long) stops it, writes the best pulse so far and reports it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readPulse } from '../../src/io/pulse.ts';
import { run } from './run.ts';

const ROOT = new URL('../../', import.meta.url).pathname;
const TRANSMON = join(ROOT, 'examples/transmon-x90.json');
const SPEC = JSON.parse(readFileSync(TRANSMON, 'utf8'));
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'gatesmith-design-run-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const write = (name: string, spec: unknown): string => {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(spec));
  return path;
};

// 2000 segments x 25 members x 4 starts x 100000 iterations: hours at any speed of this core.
// No stall rule, no pruning and no outpacing (starts one after another): the first start runs until the time limit ends it, on any machine.
const LONG = { ...SPEC, segments: 2000, duration: 4e-6, optimizer: { ...SPEC.optimizer, starts: 4, maxIterations: 100000, stallIterations: 0, pruneAfter: 0, outpaceEvery: 0 } };

describe('progress on threads', () => {
  it('two threads print one line per new start plus one every two seconds, as one thread does', async () => {
    const r = await run(['design', TRANSMON, '--threads', '2', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const lines = r.stderr.split('\n').filter((l) => l.startsWith('design '));
    const elapsed = JSON.parse(r.stdout).elapsedS as number;
    expect(lines.length).toBeLessThanOrEqual(5 + Math.ceil(elapsed / 2) + 1);
    for (let s = 1; s <= 5; s++) expect(lines.filter((l) => l.includes(`start ${s}/5  iteration 0 `))).toHaveLength(1);
  });
});

describe('a long design is announced before it starts', () => {
  it('without a terminal it is not started: exit 1, the estimate, and how to run it anyway', async () => {
    const r = await run(['design', write('long.json', LONG)]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/this design may take up to about [\d.]+ (min|h) here: 4 starts x up to 100000 iterations of 2000 segments x 25 members/);
    expect(r.stderr).toContain('give --yes to run it anyway, or --time-limit S to bound it');
    expect(r.stderr).not.toMatch(/^design /m); // no progress: it never started
  });

  it('on a terminal the user is asked; "no" does not start it', async () => {
    const questions: string[] = [];
    const r = await run(['design', write('long2.json', LONG)], { confirm: async (q) => (questions.push(q), false) });
    expect(r.code).toBe(1);
    expect(questions).toHaveLength(1);
    expect(questions[0]).toContain('Run it?');
    expect(r.stderr).toContain('design: not started');
  });

  it('--yes runs it (here it stops at once: the target infidelity is met by any pulse)', async () => {
    const easy = write('long-easy.json', { ...LONG, optimizer: { ...LONG.optimizer, targetInfidelity: 0.999 } });
    const r = await run(['design', easy, '--yes', '--threads', '1', '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).best.stopReason).toBe('target-reached');
  });

  it('--time-limit runs it and bounds it', async () => {
    const r = await run(['design', write('long3.json', LONG), '--time-limit', '0.3', '--threads', '1', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.best.stopReason).toBe('time-limit');
    expect(json.starts).toHaveLength(1);
    // The spec's own optimizer.timeLimit is a bound too.
    const bounded = write('long4.json', { ...LONG, optimizer: { ...LONG.optimizer, timeLimit: 0.3 } });
    const s = await run(['design', bounded, '--threads', '1', '--json']);
    expect(s.code, s.stderr).toBe(0);
    expect(JSON.parse(s.stdout).best.stopReason).toBe('time-limit');
  });
});

describe('Ctrl-C on the installed command', () => {
  it('SIGINT during a design whose iterations are long stops it, writes the best pulse so far and reports it', async () => {
    // 20000 segments x 121 members: tens of ms per iteration, run in a worker thread.
    const big = write('big.json', {
      ...SPEC, segments: 20000, duration: 2e-5, rabiMax: 1e6,
      ensemble: { detuning: { min: -1e5, max: 1e5, points: 11 }, amplitudeError: { min: -0.1, max: 0.1, points: 11 } },
      optimizer: { ...SPEC.optimizer, starts: 2, maxIterations: 100000 },
    });
    const out = join(dir, 'big.pulse.json');
    const child = spawn(process.execPath, [join(ROOT, 'bin/gatesmith.js'), 'design', big, '--yes', '--out', out, '--json'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (b) => (stdout += b));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    await new Promise<void>((resolve) => {
      child.stderr.on('data', (b) => {
        stderr += b;
        // A few iterations in: the second plain progress line comes after two seconds.
        if (stderr.split('\n').filter((l) => l.startsWith('design ')).length >= 3) resolve();
      });
    });
    child.kill('SIGINT');
    const code = await exited;
    expect(code, stderr).toBe(0);
    expect(stderr).toContain('interrupted: stopping now, keeping the best pulse so far');
    expect(stderr).toMatch(/best pulse so far \(start \d, iteration \d+, mean infidelity [\d.e-]+\) written to/);
    const json = JSON.parse(stdout);
    expect(json.interrupted).toBe(true);
    expect(json.best.stopReason).toBe('stopped');
    expect(existsSync(out)).toBe(true);
    const pulse = readPulse(readFileSync(out, 'utf8'));
    expect(pulse.i).toHaveLength(20000);
    expect(pulse.metadata.figures?.meanInfidelity).toBe(json.meanInfidelity);
    for (let k = 0; k < pulse.i.length; k++) expect(Math.hypot(pulse.i[k], pulse.q[k])).toBeLessThanOrEqual(1e6 * (1 + 1e-12));
  });
});
