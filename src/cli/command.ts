// The shape of one `gatesmith` subcommand, so that main.ts can dispatch and list them.
import { parseArgs, requirePositionals } from './args.ts';
import type { ArgSpec, ParsedArgs } from './args.ts';

/** Where a command writes; tests pass collectors instead of the process streams. */
export interface CliIO {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  /** True when stderr is a terminal (progress bars are drawn only then). */
  isTTY: boolean;
  /**
   * Subscribes to the user's interrupt (Ctrl-C) and returns the unsubscribe function;
   * absent where there is none to catch. Tests pass one they can trigger.
   */
  onInterrupt?: (handler: () => void) => () => void;
  /** Asks the user a yes/no question; absent without a terminal to ask on (scripts, CI). */
  confirm?: (question: string) => Promise<boolean>;
}

/** One subcommand: its name, a one-line summary, its --help text and its body. */
export interface Command {
  name: string;
  summary: string;
  help: string;
  /** Returns the exit code: 0 ok, 1 bad input (message printed), 2 internal error. */
  run(argv: string[], io: CliIO): Promise<number>;
}

/** What `defineCommand` needs: the command's arguments, help, and a body given them parsed. */
export interface CommandDefinition {
  name: string;
  summary: string;
  args: ArgSpec;
  help: string;
  /** 'exact' (default): the positionals of `args`, checked; 'any': as given, for the body to check. */
  positionals?: 'exact' | 'any';
  /** Runs with the required positionals checked and --help already answered. */
  body(positionals: string[], flags: ParsedArgs['flags'], io: CliIO): Promise<number>;
}

/** A Command that answers --help and checks its positionals before running the body. */
export function defineCommand(def: CommandDefinition): Command {
  return {
    name: def.name,
    summary: def.summary,
    help: def.help,
    async run(argv, io) {
      const parsed = parseArgs(argv, def.args);
      if (parsed.help) {
        io.stdout(def.help);
        return 0;
      }
      const positionals = def.positionals === 'any' ? parsed.positionals : requirePositionals(parsed, def.args);
      return def.body(positionals, parsed.flags, io);
    },
  };
}
