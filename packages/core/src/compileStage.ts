import { conditionDesign } from './conditions.js';
import type { Design, OperatingCondition } from './design.js';
import type { FailureComponent, Stage } from './stages/definition.js';
import { stageDefinition } from './stages/registry.js';
import { designAtTemperature } from './temperatureLaw.js';
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
  // The stage module reads KP as valid at the design temperature: move it there first.
  const model = definition.compile(designAtTemperature(checked));
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

/** One operating condition compiled: the condition, its design and the stage compiled from it. */
export interface ConditionStage {
  readonly condition: OperatingCondition;
  /** The design at this condition (no conditions of its own). */
  readonly design: Design;
  /** Compiled by the design's own stage module; the same variables, in the same order, as the design's. */
  readonly stage: Stage;
}

/**
 * Compiles the design at each of its conditions (none without conditions). Every condition's
 * stage takes the same draw vector as the design's own stage. Beside `compileStage` so that the
 * workers' compile entry has both.
 * @throws InputError naming the condition's field when a condition is invalid
 */
export function compileConditions(design: Design): ConditionStage[] {
  const checked = compileStage(design);
  return (checked.design.conditions ?? []).map((condition) => {
    const d = conditionDesign(checked.design, condition);
    const stage = compileStage(d);
    if (stage.dimension !== checked.dimension) {
      throw new Error(`internal: condition ${condition.name} has ${stage.dimension} variables, the design ${checked.dimension}`);
    }
    return { condition, design: d, stage };
  });
}
