/**
 * The report's stage definitions, by stage type. A new stage type adds its module here (the
 * tests check that every type in the core registry has one); a type without an entry still gets
 * every section that needs no per-stage hook, and the page says which it lacks.
 */
import { currentMirrorReportStage } from './currentMirror.js';
import { foldedReportStage } from './folded.js';
import { mirrorReportStage } from './mirror.js';
import { resistorReportStage } from './resistor.js';
import { simpleReportStage } from './simple.js';
import { selectorReportStage } from './selector.js';
import type { ReportStage } from './types.js';

export const REPORT_STAGES: readonly ReportStage[] = [simpleReportStage, mirrorReportStage, resistorReportStage, foldedReportStage, currentMirrorReportStage, selectorReportStage];

/** The report's definition of a stage type, or undefined when it has none yet. */
export function reportStageFor(topology: string): ReportStage | undefined {
  return REPORT_STAGES.find((s) => s.topology === topology);
}
