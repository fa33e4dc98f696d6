import { Command, CommanderError } from 'commander';
import { InputError, isInputError } from '@twinfet/core';
import { NonFiniteResultError, processIo, type Io } from './output.js';
import { VERSION } from './version.js';

/** Exit codes: 0 done, 1 internal error, 2 bad input, 130 interrupted. */
export const EXIT = { ok: 0, internal: 1, input: 2, interrupted: 130 } as const;

/** commander's own messages ("error: unknown option '--x'") in the project's one-line form. */
function output(io: Io) {
  return {
    writeOut: (s: string) => io.out(s.trimEnd()),
    writeErr: (s: string) => io.err(s.startsWith('error: ') ? `twinfet: ${s.slice(7).trimEnd()}; see twinfet --help` : s.trimEnd()),
  };
}

type Register = (program: Command, io: Io, setExit: (code: number) => void) => void;

/**
 * The commands, each in its own module, loaded on demand: a command line loads only the module
 * of the command it names (and what that imports), so `inspect` never loads the Monte Carlo
 * statistics' dependencies nor `run` the report's, and start-up stays short.
 */
const COMMANDS: Readonly<Record<string, () => Promise<Register>>> = {
  inspect: async () => (await import('./commands/inspect.js')).registerInspect,
  run: async () => (await import('./commands/run.js')).registerRun,
  tail: async () => (await import('./commands/tail.js')).registerTail,
  size: async () => (await import('./commands/size.js')).registerSize,
  sweep: async () => (await import('./commands/sweep.js')).registerSweep,
  report: async () => (await import('./commands/report.js')).registerReport,
};

/**
 * The registrations a command line needs: the one command it names, or every command (in the
 * order `--help` lists them) when it names none, asks for help or names an unknown one (whose
 * error suggests the closest name).
 */
export async function commandsFor(argv: readonly string[]): Promise<Register[]> {
  const word = argv.find((a) => !a.startsWith('-'));
  const names = word !== undefined && Object.hasOwn(COMMANDS, word) ? [word] : Object.keys(COMMANDS);
  return Promise.all(names.map((n) => COMMANDS[n]!()));
}

/** Builds the command tree from `registrations` (see commandsFor); `io` receives everything printed. */
export function buildProgram(io: Io, setExit: (code: number) => void, registrations: readonly Register[]): Command {
  const program = new Command('twinfet')
    .description('Mismatch-limited offset and yield of MOS differential pairs (design aid; not a substitute for foundry matching data or sign-off)')
    .version(VERSION, '-V, --version', 'print the version')
    .showHelpAfterError(false)
    .configureOutput(output(io))
    .exitOverride();

  for (const register of registrations) register(program, io, setExit);
  for (const c of program.commands) c.exitOverride().configureOutput(output(io)).allowExcessArguments(true);
  // Name a stray argument ourselves: it is nearly always a unit split off its value (--spec 5 mV).
  program.hook('preAction', (_root, action) => {
    const extra = action.args.slice(action.registeredArguments.length);
    if (extra.length > 0) {
      throw new InputError(
        action.name(),
        `unexpected argument "${extra.join(' ')}" after the design file; quote a value with a space (--spec "5 mV") or write it joined (--spec 5mV)`,
      );
    }
  });
  return program;
}

/** One line for any error: input errors name the field; others are internal. */
export function reportError(io: Io, e: unknown): number {
  if (isInputError(e)) {
    io.err(`twinfet: ${e.message}`);
    return EXIT.input;
  }
  if (e instanceof CommanderError) {
    if (e.exitCode === 0) return EXIT.ok; // --help, --version
    // commander already printed its own one-line message (e.g. unknown option).
    return EXIT.input;
  }
  if (e instanceof NonFiniteResultError) {
    io.err(`twinfet: ${e.message}`);
    return EXIT.internal;
  }
  const err = e instanceof Error ? e : new Error(String(e));
  io.err(`twinfet: internal error: ${err.message}`);
  if (process.env['TWINFET_DEBUG'] === '1' && err.stack !== undefined) io.err(err.stack);
  return EXIT.internal;
}

/** Runs the command line; resolves to the exit code. */
export async function main(argv: readonly string[], io: Io = processIo): Promise<number> {
  let code: number = EXIT.ok;
  try {
    const program = buildProgram(io, (c) => (code = c), await commandsFor(argv));
    await program.parseAsync([...argv], { from: 'user' });
  } catch (e) {
    return reportError(io, e);
  }
  return code;
}

