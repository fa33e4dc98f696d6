/**
 * The report's stage definitions, by stage type. A new stage type adds its module here; a
 * stage type without an entry still gets every section that needs no per-stage hook, and the
 * page says which sections it lacks.
 */
import { mirrorReportStage } from './mirror.js';
import { simpleReportStage } from './simple.js';
import type { ReportStage } from './types.js';

const STAGES: readonly ReportStage[] = [simpleReportStage, mirrorReportStage];

/** The report's definition of a stage type, or undefined when it has none yet. */
export function reportStageFor(topology: string): ReportStage | undefined {
  return STAGES.find((s) => s.topology === topology);
}
