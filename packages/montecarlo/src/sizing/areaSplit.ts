/**
 * Sizing every sizable block together: the split of area between them that meets a sigma target
 * with the least total area.
 *
 * With W/L of each block kept, the inversion coefficients and gm ratios stay put, so every term
 * of the linearised variance scales with 1/area of its own block (Pelgrom 1989; Kinget, IEEE JSSC
 * 40(6), 2005): sigma^2 = sum_k C_k / a_k, a_k = W L per element of block k. Minimising sum a_k
 * subject to sigma^2 = target^2 (a Lagrange multiplier) gives a_k proportional to sqrt(C_k), and a
 * total of (sum_k sqrt C_k)^2 / target^2, against (sum_k C_k/a_k0)(sum_k a_k0) / target^2 when all
 * blocks are scaled by one factor. For two blocks: a_in / a_load = sqrt(C_in) / sqrt(C_load).
 */
import { varianceBudget, type Design } from '@twinfet/core';
import { limitingStage } from '../analyses/worstCondition.js';
import { clamp, factorRange, pairOf, sizableBlocks, scaleGeometry, type FactorRange, type SizingFamily } from './resize.js';

/** The variance coefficients of the blocks and the optimum shares of area. */
export interface AreaSplit {
  /** The sizable blocks, in the stage's order (the input first). */
  readonly blocks: readonly string[];
  /** C_k: block k's part of sigma^2 times its per-element area, (figure unit)^2 m^2. */
  readonly coefficients: readonly number[];
  /** Block k's share of the total per-element area at the optimum: sqrt(C_k) / sum_j sqrt(C_j). */
  readonly shares: readonly number[];
  /** C of the input block and of the load block (the two-block case), V^2 m^2. */
  readonly inputCoefficient: number;
  readonly loadCoefficient: number;
  /** The input block's share at the optimum. */
  readonly inputShare: number;
}

/**
 * The coefficients C_k of a design with two or more sizable blocks, from its linearised budget
 * (with conditions: at the condition of largest linearised sigma).
 */
export function areaSplit(design: Design): AreaSplit {
  const blocks = sizableBlocks(design).map((b) => b.key);
  const variance = new Map<string, number>(blocks.map((b) => [b, 0]));
  for (const e of varianceBudget(limitingStage(design).stage)) variance.set(e.role, (variance.get(e.role) ?? 0) + e.variance);
  const coefficients = blocks.map((b) => {
    const g = pairOf(design, b);
    return variance.get(b)! * g.w * g.l;
  });
  const roots = coefficients.map(Math.sqrt);
  const sum = roots.reduce((a, x) => a + x, 0);
  const shares = roots.map((r) => r / sum);
  const at = (key: string): number => {
    const i = blocks.indexOf(key);
    return i < 0 ? 0 : coefficients[i]!;
  };
  return {
    blocks,
    coefficients,
    shares,
    inputCoefficient: at('input'),
    loadCoefficient: at('load'),
    inputShare: shares[0]!,
  };
}

/** A family over all sizable blocks, block k at area factor `k(t, k)`, each clamped to its own range. */
function blocksFamily(design: Design, range: readonly [number, number], factor: (t: number, k: number) => number, ranges: readonly FactorRange[]): SizingFamily {
  const blocks = sizableBlocks(design).map((b) => b.key);
  const factors = (t: number): Record<string, number> =>
    Object.fromEntries(blocks.map((b, k) => [b, clamp(factor(t, k), ranges[k]!.min, ranges[k]!.max)]));
  return {
    vary: 'both',
    range,
    at: (t) => {
      const f = factors(t);
      let d = design;
      for (const b of blocks) d = { ...d, [b]: scaleGeometry(pairOf(design, b), 'area', f[b]!) };
      return d;
    },
    factors,
    limitText: ranges.map((r) => r.upperText).join(' and '),
  };
}

/**
 * Every sizable block at the optimum split: t is the total per-element area sum_k a_k (m^2),
 * a_k = t * share_k, W/L of each kept. A block that reaches its own floor or cap stays there while
 * the others keep growing (the constrained optimum).
 */
export function optimalSplitFamily(design: Design, split: AreaSplit = areaSplit(design)): SizingFamily {
  const ranges = split.blocks.map((b) => factorRange(design, b, 'area'));
  const areas = split.blocks.map((b) => {
    const g = pairOf(design, b);
    return g.w * g.l;
  });
  const s = split.shares;
  const lo = Math.min(...ranges.map((r, k) => (r.min * areas[k]!) / s[k]!));
  const hi = Math.max(...ranges.map((r, k) => (r.max * areas[k]!) / s[k]!));
  return blocksFamily(design, [lo, hi], (t, k) => (t * s[k]!) / areas[k]!, ranges);
}

/** Every sizable block scaled by one area factor t (W/L kept): the comparison for the optimum split. */
export function equalScalingFamily(design: Design): SizingFamily {
  const ranges = sizableBlocks(design).map((b) => factorRange(design, b.key, 'area'));
  const range = [Math.min(...ranges.map((r) => r.min)), Math.max(...ranges.map((r) => r.max))] as const;
  return blocksFamily(design, range, (t) => t, ranges);
}
