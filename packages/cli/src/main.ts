import { Command, CommanderError } from 'commander';
import { InputError, isInputError } from '@twinfet/core';
import { loadDesign } from './designFile.js';
import { warnUnitSlips } from './unitWarnings.js';
import { inspectDesign, renderInspect } from './commands/inspect.js';
import { assertFinite, processIo, printJson, type Io, NonFiniteResultError } from './output.js';
import { parseDrift, registerRun } from './commands/run.js';
import { registerTail } from './commands/tail.js';
import { registerSize } from './commands/size.js';
import { registerSweep } from './commands/sweep.js';
import { VERSION } from './version.js';
import { registerReport } from './commands/report.js';


/** Exit codes: 0 done, 1 internal error, 2 bad input, 130 interrupted. */
export const EXIT = { ok: 0, internal: 1, input: 2, interrupted: 130 } as const;

/** commander's own messages ("error: unknown option '--x'") in the project's one-line form. */
function output(io: Io) {
  return {
    writeOut: (s: string) => io.out(s.trimEnd()),
    writeErr: (s: string) => io.err(s.startsWith('error: ') ? `twinfet: ${s.slice(7).trimEnd()}; see twinfet --help` : s.trimEnd()),
  };
}

/** Builds the command tree; `io` receives everything printed. */
export function buildProgram(io: Io, setExit: (code: number) => void): Command {
  const program = new Command('twinfet')
    .description('Mismatch-limited offset and yield of MOS differential pairs (design aid; not a substitute for foundry matching data or sign-off)')
    .version(VERSION, '-V, --version', 'print the version')
    .showHelpAfterError(false)
    .configureOutput(output(io))
    .exitOverride();

  program
    .command('inspect')
    .description('operating point, linearised offset sigma, variance budget and Gaussian yield of a design')
    .argument('<design>', 'design file (YAML or JSON)')
    .option('--json', 'print one JSON object instead of tables')
    .option('--drift <A,B>', 'the two conditions of the linearised drift, e.g. cold,hot (default: the coldest and hottest that differ only in temperature)')
    .action(async (file: string, opts: { json?: boolean; drift?: string }) => {
      const drift = parseDrift(opts.drift);
      const design = await loadDesign(file);
      warnUnitSlips(io, design);
      const report = inspectDesign(design, drift);
      assertFinite(report);
      if (opts.json === true) printJson(io, report);
      else io.out(renderInspect(report));
      setExit(EXIT.ok);
    });

  registerRun(program, io, setExit);
  registerTail(program, io, setExit);
  registerSize(program, io, setExit);
  registerSweep(program, io, setExit);
  registerReport(program, io, setExit);
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
  const program = buildProgram(io, (c) => (code = c));
  try {
    await program.parseAsync([...argv], { from: 'user' });
  } catch (e) {
    return reportError(io, e);
  }
  return code;
}

