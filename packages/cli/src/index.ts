export { main, buildProgram, EXIT } from './main.js';
export { loadDesign } from './designFile.js';
export { histogramSvg, sweepSvg } from './plot.js';
export { SWEEP_FIELDS, sweepFields, sweepField, fieldValue, withField, sweepValues } from './sweepField.js';
