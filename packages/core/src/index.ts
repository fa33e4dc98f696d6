export * from './errors.js';
export * from './design.js';
export * from './units.js';
export * from './thermal.js';
export * from './ekv.js';
export * from './pelgrom.js';
export * from './variables.js';
export * from './limits.js';
export type * from './stages/definition.js';
export { STAGES, TOPOLOGIES, stageDefinition, topologiesWith, lacksText } from './stages/registry.js';
export { validateDesign, specLimit, designKeys } from './validateDesign.js';
export * from './compileStage.js';
export * from './temperatureLaw.js';
export {
  conditionDesign,
  conditionDesigns,
  conditionFields,
  conditionKeys,
  conditionPath,
  conditionSummary,
  defaultDriftPair,
  namedDriftPair,
  SHIFT_KEYS,
  type ConditionFields,
  type DriftPair,
} from './conditions.js';
export * from './linearised.js';
export { MIRROR_TOLERANCE, MIRROR_MAX_ITERATIONS } from './stages/mirror.js';
export { FOLDED_TOLERANCE, FOLDED_MAX_ITERATIONS } from './stages/folded.js';
export { CURRENT_MIRROR_CAUTION } from './stages/currentMirror.js';
export { SELECTOR_TOLERANCE, SELECTOR_MAX_ITERATIONS, cellCurrents } from './stages/selector.js';
export { parseDesign, type DesignFormat, type ParseOptions } from './parse/parseDesign.js';
export { closestWord, editDistance } from './parse/didYouMean.js';
export { writeDesign, shiftedDecimal } from './parse/writeDesign.js';
export { unitSlips, SLIP_LIMIT_VOLTS, SLIP_SIGMAS, SLIP_TAIL_AMPS, SLIP_LENGTH_M } from './unitSlips.js';
