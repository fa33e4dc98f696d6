export { main, buildProgram, EXIT } from './main.js';
export { loadDesign, parseDesign } from './designFile.js';
export { histogramSvg, sweepSvg } from './plot.js';
