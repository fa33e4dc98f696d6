/**
 * Which operating condition limits a design: the one with the largest linearised sigma, or from
 * a run, the largest Monte Carlo sigma and the lowest yield. Without conditions the design's own
 * stage is the only one (named null).
 */
import { compileConditions, compileStage, type Design, type Stage } from '@twinfet/core';
import { linearisedFigureSigma } from './linearisedLaw.js';
import type { RunReport } from './simulate.js';

/** The stage that limits a design on the linearised model, and its condition's name. */
export interface LimitingStage {
  readonly condition: string | null;
  readonly stage: Stage;
  /** Its linearised figure sigma (the law's, see linearisedLaw.ts), the figure's unit. */
  readonly sigma: number;
}

/**
 * The condition of largest linearised sigma (ties: the first listed), or the design itself when
 * it has no conditions.
 */
export function limitingStage(design: Design): LimitingStage {
  const at = compileConditions(design);
  if (at.length === 0) {
    const stage = compileStage(design);
    return { condition: null, stage, sigma: linearisedFigureSigma(stage) };
  }
  let best: LimitingStage | undefined;
  for (const c of at) {
    const sigma = linearisedFigureSigma(c.stage);
    if (best === undefined || sigma > best.sigma) best = { condition: c.condition.name, stage: c.stage, sigma };
  }
  return best!;
}

/** The run's largest Monte Carlo sigma and its interval: over the conditions when it has them. */
export function largestSigma(r: RunReport): { readonly condition: string | null; readonly sigma: number; readonly sigmaInterval: readonly [number, number] } {
  if (r.conditions === undefined || r.conditions.length === 0) return { condition: null, sigma: r.offset.sigma, sigmaInterval: r.offset.sigmaInterval };
  let best = r.conditions[0]!;
  for (const c of r.conditions.slice(1)) if (c.offset.sigmaInterval[1] > best.offset.sigmaInterval[1]) best = c;
  return { condition: best.name, sigma: best.offset.sigma, sigmaInterval: best.offset.sigmaInterval };
}
