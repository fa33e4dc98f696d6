/**
 * Runs the analyses a design review wants, on one worker pool: the Monte Carlo run, the
 * high-sigma estimate when the failure probability is small, the distribution's shape, the
 * area study and the transfer curve. The result is the page's whole data.
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { compileStage, specLimit, type Design } from '@twinfet/core';
import { createExecutor, estimateHighSigma, simulateWithSamples, type RunReport } from '@twinfet/montecarlo';
import { studyArea } from './analyses/area.js';
import { distributionOfRun } from './analyses/distribution.js';
import { studyTransfer } from './analyses/transfer.js';
import type { ReportData } from './data.js';
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
    };
  } finally {
    await executor.close();
  }
}
