// The `gatesmith` command line: dispatches to a subcommand and turns errors into exit
// codes (0 ok, 1 bad input with its message, 2 internal error with its stack).
import { readFileSync } from 'node:fs';
import { ArgumentError } from '../core/errors.ts';
import type { CliIO, Command } from './command.ts';

/** A subcommand as listed: its name and summary, and its module loaded only when it runs. */
export interface CommandEntry {
  name: string;
  summary: string;
  load: () => Promise<Command>;
}

/**
 * Every subcommand; a new one is one entry here (its summary repeated from its file, which
 * a test checks). Modules load on demand, so that --version and --help start as fast as Node.
 */
export const COMMANDS: CommandEntry[] = [
  { name: 'design', summary: 'design a robust pulse for a spec', load: async () => (await import('./design.ts')).designCommand },
  { name: 'evaluate', summary: 'figures of a pulse on a spec’s ensemble', load: async () => (await import('./evaluate.ts')).evaluateCommand },
  { name: 'composite', summary: 'build a published composite pulse (BB1, SK1, CORPSE, ...) or list them', load: async () => (await import('./composite.ts')).compositeCommand },
  { name: 'map', summary: 'robustness map of a pulse over detuning x amplitude error, with summary figures', load: async () => (await import('./map.ts')).mapCommand },
  { name: 'compare', summary: 'table of summary figures of several pulses and composites, best first', load: async () => (await import('./compare.ts')).compareCommand },
  { name: 'export', summary: 'write the quantised, padded waveform for an AWG (csv, npy, raw, wav, json)', load: async () => (await import('./export.ts')).exportCommand },
  { name: 'shortest', summary: 'the shortest duration at which a design meets a goal, with the figure against duration', load: async () => (await import('./shortest.ts')).shortestCommand },
  { name: 'batch', summary: 'run a family of designs (a manifest of variations) in shards, or collect its results', load: async () => (await import('./batch.ts')).batchCommand },
];

// Errors that mean the user's input is wrong (by name, so that errors from a worker count too).
const BAD_INPUT = new Set(['SpecError', 'PulseFormatError', 'ArgumentError', 'ExportError', 'SegmentAngleError']);
const FILE_ERRORS = new Set(['ENOENT', 'EISDIR', 'ENOTDIR', 'EACCES', 'EPERM']);

/** Runs the command line with `argv` (without node and the script); returns the exit code. */
export async function main(argv: string[], io: CliIO = processIO()): Promise<number> {
  try {
    const [first, ...rest] = argv;
    if (first === undefined) {
      io.stderr(mainHelp());
      return 1;
    }
    if (first === '--help' || first === '-h') {
      io.stdout(mainHelp());
      return 0;
    }
    if (first === '--version' || first === '-V') {
      io.stdout(`gatesmith ${version()}\n`);
      return 0;
    }
    if (first === 'help') {
      if (rest.length === 0) {
        io.stdout(mainHelp());
        return 0;
      }
      io.stdout((await findCommand(rest[0]).load()).help);
      return 0;
    }
    if (first.startsWith('-')) throw new ArgumentError(`unknown option ${first}; before a command only --help and --version are allowed`);
    return await (await findCommand(first).load()).run(rest, io);
  } catch (error) {
    return reportError(error, io);
  }
}

/** The package version, from package.json. */
export function version(): string {
  const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  return pkg.version;
}

function mainHelp(): string {
  const width = Math.max(...COMMANDS.map((c) => c.name.length));
  const list = COMMANDS.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`).join('\n');
  return `gatesmith ${version()}: design robust qubit control pulses by ensemble GRAPE.

Usage: gatesmith COMMAND [ARGS] [--json]
       gatesmith COMMAND --help    help on one command
       gatesmith --version

Commands:
${list}

Units are Hz and seconds in every file. Exit codes: 0 ok, 1 bad input, 2 internal error.
`;
}

function findCommand(name: string): CommandEntry {
  const command = COMMANDS.find((c) => c.name === name);
  if (!command) {
    throw new ArgumentError(`unknown command "${name}"; commands: ${COMMANDS.map((c) => c.name).join(', ')} (see gatesmith --help)`);
  }
  return command;
}

function reportError(error: unknown, io: CliIO): number {
  const e = error as { name?: string; message?: string; code?: string; stack?: string };
  if ((e && BAD_INPUT.has(e.name ?? '')) || (e && FILE_ERRORS.has(e.code ?? ''))) {
    io.stderr(`gatesmith: ${e.message}\n`);
    return 1;
  }
  io.stderr(`gatesmith: internal error (please report it): ${e?.stack ?? String(error)}\n`);
  return 2;
}

// The real process streams; Ctrl-C once asks the running command to stop, twice exits.
// Questions are asked only when both stdin and stderr are a terminal.
function processIO(): CliIO {
  return {
    stdout: (text) => void process.stdout.write(text),
    stderr: (text) => void process.stderr.write(text),
    isTTY: Boolean(process.stderr.isTTY),
    onInterrupt(handler) {
      let presses = 0;
      const listener = () => {
        presses++;
        if (presses === 1) handler();
        else {
          process.stderr.write('\ninterrupted again: exiting now\n');
          process.exit(130);
        }
      };
      process.on('SIGINT', listener);
      return () => void process.off('SIGINT', listener);
    },
    confirm: process.stdin.isTTY && process.stderr.isTTY ? confirmOnTerminal : undefined,
  };
}

async function confirmOnTerminal(question: string): Promise<boolean> {
  const { createInterface } = await import('node:readline/promises');
  const rl = createInterface({ input: process.stdin, output: process.stderr });
  try {
    return /^\s*y(es)?\s*$/i.test(await rl.question(question));
  } finally {
    rl.close();
  }
}
