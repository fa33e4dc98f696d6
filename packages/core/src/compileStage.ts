import type { Design } from './design.js';
import { compileMirrorPair } from './mirrorPair.js';
import { compileSimplePair } from './simplePair.js';
import type { Stage } from './stage.js';
import { validateDesign } from './validateDesign.js';

/** Temperatures outside which the model's constants are rarely characterised, K (common practice, no source). */
export const USUAL_TEMPERATURE_RANGE_K = [200, 450] as const;

/**
 * Validates a design (SI units) and compiles it for sampling.
 * @throws InputError naming the field when the design is invalid.
 * @example
 * const stage = compileStage(design);
 * stage.offset(Float64Array.of(1, 0, 0, 0), 0) // Vos for M1's V_T one sigma high, volts
 */
export function compileStage(design: Design): Stage {
  validateDesign(design);
  const warnings: string[] = [];
  const [tLo, tHi] = USUAL_TEMPERATURE_RANGE_K;
  if (design.temperature < tLo || design.temperature > tHi) {
    warnings.push(
      `temperature ${design.temperature.toFixed(1)} K is outside ${tLo}-${tHi} K, where matching and slope-factor data are rarely characterised`,
    );
  }
  return design.topology === 'simple' ? compileSimplePair(design, warnings) : compileMirrorPair(design, warnings);
}
