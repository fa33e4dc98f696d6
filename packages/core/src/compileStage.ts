import type { Design } from './design.js';
import type { FailureComponent, Stage } from './stages/definition.js';
import { stageDefinition } from './stages/registry.js';
import { validateDesign } from './validateDesign.js';

/** Temperatures outside which the model's constants are rarely characterised, K (common practice, no source). */
export const USUAL_TEMPERATURE_RANGE_K = [200, 450] as const;

/**
 * Validates a design (SI units) and compiles it for sampling through its stage type's definition.
 * @throws InputError naming the field when the design is invalid.
 * @example
 * const stage = compileStage(design);
 * stage.figure(Float64Array.of(1, 0, 0, 0), 0) // Vos for M1's V_T one sigma high, volts
 */
export function compileStage(design: Design): Stage {
  const checked = validateDesign(design);
  const definition = stageDefinition(checked.topology);
  const model = definition.compile(checked);
  const warnings: string[] = [];
  const [tLo, tHi] = USUAL_TEMPERATURE_RANGE_K;
  if (checked.temperature < tLo || checked.temperature > tHi) {
    warnings.push(
      `temperature ${checked.temperature.toFixed(1)} K is outside ${tLo}-${tHi} K, where matching and slope-factor data are rarely characterised`,
    );
  }
  const own = model.failureComponents;
  const evaluate = model.figure;
  const sides = (limit: number): readonly FailureComponent[] =>
    definition.figure.sided === 'two'
      ? [
          { label: '+spec', side: 1, target: limit, evaluate },
          { label: '-spec', side: -1, target: -limit, evaluate },
        ]
      : [{ label: '+spec', side: 1, target: limit, evaluate }];
  return {
    ...model,
    design: checked,
    definition,
    topology: definition.topology,
    dimension: model.variables.length,
    warnings: [...warnings, ...model.warnings],
    failureComponents: own === undefined ? sides : (limit) => own.call(model, limit),
  };
}
