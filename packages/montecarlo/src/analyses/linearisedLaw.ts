/**
 * The distribution of a stage's linearised figure, as a function of the sigma of its
 * sensitivities (the scale s = sqrt(sum_j (dx/du_j)^2)): the Gaussian two- or one-sided form by
 * default, or the law the stage names (`linearisedLaw`). Sizing, the linearised summary and the
 * sweeps read the failure probability and the figure's sigma through this table, never by asking
 * which stage it is.
 */
import { linearisedSigma, type LinearisedLaw, type Stage } from '@twinfet/core';
import { maxOfNormals, selectionSeparation, wrongSelection } from '../stats/bechhofer.js';
import { normalQuantile, normalUpperTail, sigmaLevel, twoSidedTail } from '../stats/normal.js';

/** A linearised figure's law in units of its scale s. */
export interface FigureLaw {
  /** `gaussian`, or the stage's law kind. */
  readonly kind: 'gaussian' | LinearisedLaw['kind'];
  /** Whose form the failure probability is ("Gaussian", "Bechhofer"). */
  readonly name: string;
  /** Failure probability at the limit level * s. */
  failure(level: number): number;
  /** The level (limit / s) at which the failure probability is p, 0 < p < 1. */
  level(p: number): number;
  /** Mean and sigma of the linearised figure, in units of s. */
  readonly mean: number;
  readonly sigma: number;
}

function gaussianLaw(sided: 'two' | 'one'): FigureLaw {
  // Two-sided: P(|x| > spec) = 2 Phi(-spec/sigma); one-sided: P(x > spec) = Phi(-spec/sigma).
  return sided === 'two'
    ? { kind: 'gaussian', name: 'Gaussian', failure: twoSidedTail, level: sigmaLevel, mean: 0, sigma: 1 }
    : { kind: 'gaussian', name: 'Gaussian', failure: normalUpperTail, level: (p) => normalQuantile(1 - p), mean: 0, sigma: 1 };
}

/**
 * figure = x_1 - min_{j>=2} x_j with k independent N(0, s^2): P(figure <= D) is Bechhofer's
 * P(k, D/s); mean s E[M] and variance s^2 (1 + var M), M the largest of k - 1 standard normals
 * (x_1 and the minimum are independent, and -min has the law of the max).
 */
function selectionLaw(k: number): FigureLaw {
  const m = maxOfNormals(k - 1);
  return {
    kind: 'selection',
    name: 'Bechhofer',
    failure: (level) => wrongSelection(k, level),
    level: (p) => selectionSeparation(k, p),
    mean: m.mean,
    sigma: Math.sqrt(1 + m.variance),
  };
}

const selectionCache = new Map<number, FigureLaw>();

/** The law of a compiled stage's linearised figure. */
export function figureLaw(stage: Pick<Stage, 'linearisedLaw' | 'definition'>): FigureLaw {
  const law = stage.linearisedLaw;
  if (law === undefined) return gaussianLaw(stage.definition.figure.sided);
  let found = selectionCache.get(law.populations);
  if (found === undefined) {
    found = selectionLaw(law.populations);
    selectionCache.set(law.populations, found);
  }
  return found;
}

/** The linearised figure's sigma (the sensitivities' sigma for a Gaussian figure), figure units. */
export function linearisedFigureSigma(stage: Stage): number {
  return figureLaw(stage).sigma * linearisedSigma(stage);
}
