import { compileStage, specLimit, unitSlips, type Design } from '@twinfet/core';
import type { Io } from './output.js';

/**
 * Prints a one-line warning on stderr for each value that looks like a unit slip (see
 * `unitSlips`): the design's own spec, or the `--spec` given on the command line.
 */
export function warnUnitSlips(io: Io, design: Design, spec?: number): void {
  const stage = compileStage(design);
  const limit = spec ?? specLimit(stage.design);
  const field = spec === undefined ? `spec.${stage.definition.figure.specKey}` : '--spec';
  for (const w of unitSlips(stage, limit, field)) io.err(`twinfet: warning: ${w}`);
}
