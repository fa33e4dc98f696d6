import { groupedBudget, linearisedSigma, specLimit, varianceBudget, type Stage } from '@twinfet/core';
import { allowedFailure, chipYieldFromFailure } from '../stats/yield.js';
import { figureLaw } from './linearisedLaw.js';

interface SummaryBase {
  /** Linearised sigma of the figure, in its unit (volts for an offset or a lead). */
  readonly sigma: number;
  /** Share of the sensitivities' sigma^2 per device and parameter (sums to 1). */
  readonly budget: readonly { device: string; role: string; parameter: string; share: number; variance: number }[];
  /** The same per role and parameter: input vt, input beta, load vt, load beta. */
  readonly grouped: readonly { role: string; parameter: string; share: number; variance: number }[];
}

/** The linearised picture of a stage whose linearised figure is Gaussian: sigma, budget, Gaussian yield. */
export interface GaussianSummary extends SummaryBase {
  /** Gaussian estimate at the spec: P(|Vos| > spec) = 2 Phi(-spec/sigma) (one-sided: Phi(-spec/sigma)). */
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

/** Probabilities of a correct selection for which `leadFor` gives the lead needed. */
export const SELECTION_PROBABILITIES = [0.9, 0.99, 0.999, 0.999999, 0.999999999] as const;
/** The chip yield for which `leadFor` also gives the lead needed (over spec.instances selectors). */
export const SELECTION_CHIP_YIELD = 0.99;

/**
 * The linearised picture of a selector (the `selection` law): the per-cell sigma sigma_c, its
 * budget, and Bechhofer's probability of a correct selection at the spec.
 */
export interface SelectionSummary extends SummaryBase {
  /** Mean of the linearised figure, sigma_c E[max of k - 1 standard normals]. */
  readonly mean: number;
  /** Per-cell sigma of the effective input offset, sigma_c (the budget is of sigma_c^2). */
  readonly cellSigma: number;
  /** Bechhofer's form at the spec: P(k, spec / sigma_c). */
  readonly yield: {
    readonly spec: number;
    /** spec / sigma_c. */
    readonly tau: number;
    /** Populations compared (cells). */
    readonly populations: number;
    /** Probability of a correct selection. */
    readonly estimate: number;
    readonly failure: number;
    readonly chipInstances: number;
    readonly chipYield: number;
  };
  /** The lead each probability of a correct selection needs (Bechhofer's form, inverted). */
  readonly leadFor: readonly { readonly probability: number; readonly lead: number }[];
  /** The lead a chip yield of SELECTION_CHIP_YIELD over chipInstances selectors needs. */
  readonly chipLeadFor: { readonly chipYield: number; readonly instances: number; readonly lead: number };
}

/** The linearised (first-order) picture of a stage, in the form of its figure's law. */
export type LinearisedSummary = GaussianSummary | SelectionSummary;

/** The summary's estimate at the spec, whatever its law, for reports. */
export function linearisedEstimate(a: LinearisedSummary): {
  readonly name: string;
  readonly spec: number;
  /** spec over the law's scale (sigma, or sigma_c). */
  readonly level: number;
  readonly failure: number;
  readonly chipInstances: number;
  readonly chipYield: number;
} {
  if ('gaussian' in a) return { name: 'Gaussian', level: a.gaussian.sigmaLevel, ...a.gaussian };
  return { name: 'Bechhofer', level: a.yield.tau, ...a.yield };
}

/** Linearised sigma, variance budget and the linearised yield at `spec` (figure units). */
export function linearisedSummary(stage: Stage, spec = specLimit(stage.design)): LinearisedSummary {
  const law = figureLaw(stage);
  const scale = linearisedSigma(stage);
  const failure = law.failure(spec / scale);
  const instances = stage.design.spec.instances;
  const base = {
    sigma: law.sigma * scale,
    budget: varianceBudget(stage).map((e) => ({ device: e.device, role: e.role, parameter: e.parameter, share: e.share, variance: e.variance })),
    grouped: groupedBudget(stage),
  };
  if (law.kind === 'gaussian') {
    return {
      ...base,
      gaussian: { spec, sigmaLevel: spec / scale, failure, yield: 1 - failure, chipInstances: instances, chipYield: chipYieldFromFailure(failure, instances) },
    };
  }
  const populations = stage.linearisedLaw?.populations ?? 2;
  return {
    ...base,
    mean: law.mean * scale,
    cellSigma: scale,
    yield: { spec, tau: spec / scale, populations, estimate: 1 - failure, failure, chipInstances: instances, chipYield: chipYieldFromFailure(failure, instances) },
    leadFor: SELECTION_PROBABILITIES.map((probability) => ({ probability, lead: scale * law.level(1 - probability) })),
    chipLeadFor: { chipYield: SELECTION_CHIP_YIELD, instances, lead: scale * law.level(allowedFailure(SELECTION_CHIP_YIELD, instances)) },
  };
}
