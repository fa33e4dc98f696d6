export { main, buildProgram, EXIT } from './main.js';
export { loadDesign, parseDesign } from './designFile.js';
export { histogramSvg, sweepSvg } from './plot.js';
export { designToYaml } from './designYaml.js';
export { SWEEP_FIELDS, sweepField, withField, sweepValues } from './sweepField.js';
