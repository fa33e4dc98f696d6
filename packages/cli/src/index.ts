export { main, buildProgram, EXIT } from './main.js';
export { loadDesign } from './designFile.js';
export { histogramSvg, sweepSvg } from './plotSvg.js';
export type { HistogramInput, PlotFigure, SweepInput, SweepPoint } from './plotInput.js';
export { SWEEP_FIELDS, sweepFields, sweepField, fieldValue, withField, sweepValues } from './sweepField.js';
