/**
 * Sizing on the linearised model: the smallest scale along a family whose first-order offset
 * sigma meets a target, or, when none does, the lowest sigma the family reaches and the term
 * that sets it.
 *
 * The family is searched on a log grid and the first crossing refined by bisection, rather than
 * bisected over the whole range, because sigma need not fall monotonically: lengthening the input
 * pair at fixed bias raises I_D/gm, and in a mirror stage that raises the load terms.
 */
import { groupedBudget, type Design, type MismatchParameter } from '@twinfet/core';
import { limitingStage } from '../analyses/worstCondition.js';
import type { SizingFamily } from './resize.js';

/** Grid points per decade of the scale (the floor is located to about 6% in scale). */
export const GRID_PER_DECADE = 40;
/** Bisection stops when the bracket is this narrow relative to its ends. */
export const BISECTION_RELATIVE_WIDTH = 1e-9;

/** A point of a family with its linearised sigma. */
export interface FamilyPoint {
  readonly t: number;
  readonly design: Design;
  /** Linearised sigma of the figure, volts (the law's figure sigma: see linearisedLaw.ts; with conditions: the largest over them). */
  readonly sigma: number;
}

/** The smallest scale meeting the target. */
export interface LinearisedSolution extends FamilyPoint {
  readonly reached: true;
  /** True when the target is met already at the smallest allowed size. */
  readonly atMinimum: boolean;
}

/** The largest share of sigma^2 at a point: the term that limits it. */
export interface LimitingTerm {
  readonly role: string;
  readonly parameter: MismatchParameter;
  /** Fraction of sigma^2, 0..1. */
  readonly share: number;
}

/** No scale in the range meets the target: the lowest sigma found and what sets it. */
export interface LinearisedFloor {
  readonly reached: false;
  /** The point of lowest linearised sigma on the grid. */
  readonly floor: FamilyPoint;
  readonly limiting: LimitingTerm;
  /** True when the floor sits at the top of the range (more area would help, but is not allowed). */
  readonly atMaximum: boolean;
}

/** Linearised sigma of a family at t, volts (with conditions: at the condition where it is largest). */
export function familySigma(family: SizingFamily, t: number): FamilyPoint {
  const design = family.at(t);
  return { t, design, sigma: limitingStage(design).sigma };
}

/** The term with the largest share of the linearised sigma^2 of a design (at its limiting condition). */
export function limitingTerm(design: Design): LimitingTerm {
  const groups = groupedBudget(limitingStage(design).stage);
  let best = groups[0];
  for (const g of groups) if (best === undefined || g.share > best.share) best = g;
  if (best === undefined) throw new Error('internal: empty variance budget');
  return { role: best.role, parameter: best.parameter, share: best.share };
}

/**
 * The smallest t in the family's range with linearised sigma <= `sigmaTargetV`, or the floor.
 * @param sigmaTargetV offset sigma target, volts (> 0)
 */
export function solveLinearised(family: SizingFamily, sigmaTargetV: number): LinearisedSolution | LinearisedFloor {
  if (!(sigmaTargetV > 0 && Number.isFinite(sigmaTargetV))) throw new RangeError(`solveLinearised: target must be positive, got ${sigmaTargetV}`);
  const [lo, hi] = family.range;
  const decades = Math.log10(hi / lo);
  const steps = Math.max(1, Math.ceil(decades * GRID_PER_DECADE));
  let prev: FamilyPoint | undefined;
  let lowest: FamilyPoint | undefined;
  for (let i = 0; i <= steps; i++) {
    const t = i === steps ? hi : lo * (hi / lo) ** (i / steps);
    const p = familySigma(family, t);
    if (p.sigma <= sigmaTargetV) {
      if (prev === undefined) return { ...p, reached: true, atMinimum: true };
      return { ...bisect(family, prev.t, p, sigmaTargetV), reached: true, atMinimum: false };
    }
    if (lowest === undefined || p.sigma < lowest.sigma) lowest = p;
    prev = p;
  }
  if (lowest === undefined) throw new Error('internal: empty search grid');
  return { reached: false, floor: lowest, limiting: limitingTerm(lowest.design), atMaximum: lowest.t >= hi * (1 - 1e-12) };
}

/** Bisection in log t between a failing t and a passing point; returns the passing end. */
function bisect(family: SizingFamily, failT: number, pass: FamilyPoint, target: number): FamilyPoint {
  let a = failT;
  let b = pass;
  for (let k = 0; k < 200 && b.t - a > BISECTION_RELATIVE_WIDTH * b.t; k++) {
    const p = familySigma(family, Math.sqrt(a * b.t));
    if (p.sigma <= target) b = p;
    else a = p.t;
  }
  return b;
}
