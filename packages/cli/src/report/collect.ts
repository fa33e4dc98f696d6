/**
 * Runs the analyses a design review wants, on one worker pool: the Monte Carlo run, the
 * high-sigma estimate when the failure probability is small, the distribution's shape, the
 * area study and the transfer curve. The result is the page's whole data.
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { compileStage, conditionFields, specLimit, stageDefinition, type Design, type OperatingCondition } from '@twinfet/core';
import { createExecutor, estimateHighSigma, simulateWithSamples, type Histogram, type RunReport } from '@twinfet/montecarlo';
import { studyArea } from './analyses/area.js';
import { distributionOfRun } from './analyses/distribution.js';
import { studyTransfer } from './analyses/transfer.js';
import type { ConditionRow, ConditionsData, ReportData } from './data.js';
import { reportStageFor } from './stages/registry.js';

/**
 * The high-sigma estimate runs when the Monte Carlo failure probability is below this: there
 * plain Monte Carlo needs more than ~4e6 samples for +-10% (z^2 / (0.1^2 p)).
 */
export const HIGH_SIGMA_BELOW = 1e-4;

/** Options of {@link collectReport}. */
export interface CollectOptions {
  readonly samples: number;
  readonly seed: string;
  readonly workers: number;
  readonly confidence: number;
  /** |figure| limit overriding the design's, SI. */
  readonly spec?: number;
  /** Chip-yield target of the area study. */
  readonly chipYield: number;
  /** The design file, as given. */
  readonly source: string;
  /** The command line that reproduces the page. */
  readonly command: readonly string[];
  readonly version: string;
  readonly signal?: AbortSignal;
  readonly onProgress?: (done: number, total: number) => void;
}

/** Runs every analysis of the report. */
export async function collectReport(design: Design, o: CollectOptions): Promise<ReportData> {
  const started = performance.now();
  const stage = compileStage(design);
  const def = reportStageFor(stage.topology);
  const spec = o.spec ?? specLimit(stage.design);
  const executor = createExecutor(o.workers);
  const signal = o.signal === undefined ? {} : { signal: o.signal };
  try {
    const outcome = await simulateWithSamples(design, {
      samples: o.samples,
      seed: o.seed,
      confidence: o.confidence,
      executor,
      ...signal,
      ...(o.onProgress === undefined ? {} : { onProgress: o.onProgress }),
      ...(o.spec === undefined ? {} : { spec: o.spec }),
    });
    let run: RunReport = outcome.report;
    const p = run.yield.failure.estimate;
    const ran = p < HIGH_SIGMA_BELOW;
    if (ran) {
      const importance = await estimateHighSigma(design, { spec, seed: o.seed, confidence: o.confidence, executor, ...signal });
      run = { ...run, importance };
    }
    const highSigma = {
      ran,
      reason: ran
        ? `the Monte Carlo failure probability ${p === 0 ? 'is 0 (no failures seen)' : `${p.toExponential(2)} is`} below ${HIGH_SIGMA_BELOW.toExponential(0)}, where ${run.evaluated} samples resolve it poorly`
        : `the Monte Carlo failure probability ${p.toExponential(2)} is at least ${HIGH_SIGMA_BELOW.toExponential(0)}: ${run.evaluated} samples resolve it directly (${run.yield.failures} failures)`,
    };
    const distribution = distributionOfRun(run, outcome.offsets);
    const area = await studyArea(design, { spec, chipYield: o.chipYield, seed: o.seed, confidence: o.confidence, executor, ...signal });
    const transfer = def === undefined ? { none: `the report has no transfer-curve definition for the ${stage.topology} stage yet` } : studyTransfer(stage, def.transfer(stage), run.seed);
    const conditions = conditionsData(stage.design, run, outcome.driftHistogram);
    const bytes = await readFile(o.source);
    return {
      meta: {
        tool: 'twinfet',
        version: o.version,
        node: process.version,
        platform: `${process.platform} ${process.arch}`,
        generated: new Date().toISOString(),
        command: o.command,
        source: o.source,
        sourceSha256: createHash('sha256').update(bytes).digest('hex'),
        seconds: (performance.now() - started) / 1000,
      },
      design: stage.design,
      stage: {
        topology: stage.topology,
        description: def === undefined ? `${stage.definition.summary}.` : def.describe(stage.design),
        figure: stage.definition.figure,
        blocks: stage.definition.blocks.map((b) => ({ key: b.key, label: b.label, kind: b.kind, elements: b.elements })),
        variables: stage.variables.map((v) => ({ device: v.device, role: v.role, parameter: v.parameter, sigma: v.sigma, rho: v.rho })),
      },
      operatingPoint: stage.operatingPoint,
      ...(stage.resistors === undefined ? {} : { resistors: stage.resistors }),
      warnings: run.warnings,
      specOverridden: o.spec !== undefined,
      run,
      highSigma,
      distribution,
      area,
      transfer,
      ...(conditions === undefined ? {} : { conditions }),
    };
  } finally {
    await executor.close();
  }
}

/** What a condition sets, in SI: its temperature, the stage's bias fields it gives, its process shifts. */
function settingsOf(design: Design, c: OperatingCondition, temperature: number): ConditionRow['settings'] {
  const f = conditionFields(stageDefinition(design.topology));
  const out: { field: string; value: number; unit: string }[] = [{ field: 'temperature', value: temperature, unit: 'K' }];
  for (const x of f.top) if (typeof c[x.key] === 'number') out.push({ field: x.key, value: c[x.key] as number, unit: x.unit });
  for (const { block, fields } of f.blocks) {
    const g = c[block.key] as Record<string, unknown> | undefined;
    for (const x of fields) if (typeof g?.[x.key] === 'number') out.push({ field: `${block.key}.${x.key}`, value: g[x.key] as number, unit: x.unit });
  }
  for (const pol of ['n', 'p'] as const) {
    const s = c.shift?.[pol];
    if (s?.kp !== undefined) out.push({ field: `shift ${pol}.kp`, value: s.kp, unit: '%' });
    if (s?.vt0 !== undefined) out.push({ field: `shift ${pol}.vt0`, value: s.vt0, unit: 'V' });
  }
  return out;
}

/** The drift histogram cut to its occupied bins (it spans +-10 linearised drift sigmas). */
function trimmed(h: Histogram): NonNullable<ConditionsData['drift']>['histogram'] {
  const counts = Array.from(h.counts);
  let first = counts.findIndex((x) => x > 0);
  let last = counts.length - 1 - [...counts].reverse().findIndex((x) => x > 0);
  if (first < 0) [first, last] = [0, counts.length - 1];
  const width = (h.hi - h.lo) / counts.length;
  return { lo: h.lo + first * width, binWidth: width, counts: counts.slice(first, last + 1) };
}

/** Section 8's data from the run (undefined without conditions). */
function conditionsData(design: Design, run: RunReport, drift: Histogram | undefined): ConditionsData | undefined {
  const list = design.conditions;
  if (run.conditions === undefined || list === undefined) return undefined;
  const m = design.spec.instances;
  const chip = (y: number): number => Math.exp(m * Math.log(y));
  return {
    rows: run.conditions.map((c, i) => ({
      name: c.name,
      settings: settingsOf(design, list[i]!, c.temperature),
      chipYield: chip(c.yield.estimate),
      chipYieldInterval: [chip(c.yield.interval[0]), chip(c.yield.interval[1])],
    })),
    ...(run.drift === null || run.drift === undefined || drift === undefined ? {} : { drift: { histogram: trimmed(drift) } }),
  };
}
