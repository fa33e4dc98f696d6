export { main, buildProgram, EXIT } from './main.js';
export { loadDesign } from './designFile.js';
export { histogramSvg, sweepSvg, type HistogramInput, type SweepInput, type SweepPoint } from './plot.js';
export { SWEEP_FIELDS, sweepFields, sweepField, fieldValue, withField, sweepValues } from './sweepField.js';
export { collectReport, type CollectOptions } from './report/collect.js';
export { renderReport } from './report/page.js';
export type { ConditionsData, ConditionRow, DriftData, ReportData } from './report/data.js';
export type { Quantity, ReportStage, StageTransfer, TransferLaw } from './report/stages/types.js';
