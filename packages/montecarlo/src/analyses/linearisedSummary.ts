import { groupedBudget, linearisedSigma, specLimit, varianceBudget, type Stage } from '@twinfet/core';
import { normalUpperTail, twoSidedTail } from '../stats/normal.js';
import { chipYieldFromFailure } from '../stats/yield.js';

/** The linearised (first-order) picture of a stage: sigma, budget, Gaussian yield. */
export interface LinearisedSummary {
  /** Linearised offset sigma, volts. */
  readonly sigma: number;
  /** Share of sigma^2 per device and parameter (sums to 1). */
  readonly budget: readonly { device: string; role: string; parameter: string; share: number; variance: number }[];
  /** The same per role and parameter: input vt, input beta, load vt, load beta. */
  readonly grouped: readonly { role: string; parameter: string; share: number; variance: number }[];
  /** Gaussian estimate at the spec: P(|Vos| > spec) = 2 Phi(-spec/sigma). */
  readonly gaussian: {
    readonly spec: number;
    /** spec / sigma. */
    readonly sigmaLevel: number;
    readonly failure: number;
    readonly yield: number;
    readonly chipInstances: number;
    readonly chipYield: number;
  };
}

/** Linearised sigma, variance budget and the Gaussian yield at `spec` (volts). */
export function linearisedSummary(stage: Stage, spec = specLimit(stage.design)): LinearisedSummary {
  const sigma = linearisedSigma(stage);
  // Two-sided: P(|x| > spec) = 2 Phi(-spec/sigma); one-sided: P(x > spec) = Phi(-spec/sigma).
  const failure = stage.definition.figure.sided === 'two' ? twoSidedTail(spec / sigma) : normalUpperTail(spec / sigma);
  const instances = stage.design.spec.instances;
  return {
    sigma,
    budget: varianceBudget(stage).map((e) => ({ device: e.device, role: e.role, parameter: e.parameter, share: e.share, variance: e.variance })),
    grouped: groupedBudget(stage),
    gaussian: {
      spec,
      sigmaLevel: spec / sigma,
      failure,
      yield: 1 - failure,
      chipInstances: instances,
      chipYield: chipYieldFromFailure(failure, instances),
    },
  };
}
