import type { Design } from '@twinfet/core';
import { defaultWorkers, RUN_LIMITS } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { parseFigureOption } from './describe.js';
import { parseCount, parseFraction, parseSeed } from './options.js';

/** Options several commands share, as given on the command line. */
export interface CommonFlags {
  seed?: string;
  workers?: string;
  confidence?: string;
  json?: boolean;
  spec?: string;
}

/** Adds --seed, --workers, --confidence, --json to a command. */
export function withCommonOptions(c: Command): Command {
  return c
    .option('--seed <S>', 'seed of the random streams (default 1; printed so a run can be repeated)')
    .option('--workers <K>', `worker threads (default ${defaultWorkers()}, this machine's parallelism)`)
    .option('--confidence <C>', 'confidence level of every interval, e.g. 0.95 or 99% (default 0.95)')
    .option('--json', 'print one JSON object on stdout instead of the text report');
}

/**
 * The parsed common options. `--spec` is read later, by {@link readSpec}, once the design says
 * what its figure is (a voltage for an offset, a percentage for a current error).
 */
export function readCommon(flags: CommonFlags): { seed?: string; workers: number; confidence: number } {
  const out: { seed?: string; workers: number; confidence: number } = {
    workers: flags.workers === undefined ? defaultWorkers() : parseCount(flags.workers, '--workers', ...RUN_LIMITS.workers, '2 or 4 (threads)'),
    confidence: flags.confidence === undefined ? 0.95 : parseFraction(flags.confidence, '--confidence', '0.95'),
  };
  if (flags.seed !== undefined) out.seed = parseSeed(flags.seed);
  return out;
}

/** --spec in the unit of the design's figure ("20mV" for an offset, "1%" for a current error), when given. */
export function readSpec(flags: CommonFlags, design: Design): number | undefined {
  return flags.spec === undefined ? undefined : parseFigureOption(flags.spec, '--spec', design, 'limit');
}
