// The `gatesmith` command line: dispatches to a subcommand and turns errors into exit
// codes (0 ok, 1 bad input with its message, 2 internal error with its stack).
import { readFileSync } from 'node:fs';
import { ArgumentError } from '../core/errors.ts';
import type { CliIO, Command } from './command.ts';
import { designCommand } from './design.ts';
import { evaluateCommand } from './evaluate.ts';
import { compositeCommand } from './composite.ts';
import { mapCommand } from './map.ts';
import { compareCommand } from './compare.ts';
import { exportCommand } from './export.ts';

/** Every subcommand; a new one is one import and one entry here. */
export const COMMANDS: Command[] = [designCommand, evaluateCommand, compositeCommand, mapCommand, compareCommand, exportCommand];

// Errors that mean the user's input is wrong (by name, so that errors from a worker count too).
const BAD_INPUT = new Set(['SpecError', 'PulseFormatError', 'ArgumentError', 'ExportError']);
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
      io.stdout(findCommand(rest[0]).help);
      return 0;
    }
    if (first.startsWith('-')) throw new ArgumentError(`unknown option ${first}; before a command only --help and --version are allowed`);
    return await findCommand(first).run(rest, io);
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

function findCommand(name: string): Command {
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
          process.stderr.write('\ninterrupted again: exiting without saving\n');
          process.exit(130);
        }
      };
      process.on('SIGINT', listener);
      return () => void process.off('SIGINT', listener);
    },
  };
}
