/**
 * Sizing the input pair and the mirror load together: the split of gate area between them that
 * meets a sigma target with the least total area.
 *
 * With W/L of each pair kept, the inversion coefficients and gm ratios stay put, so every term of
 * the linearised variance scales with 1/area of its own pair (Pelgrom 1989; Kinget, IEEE JSSC
 * 40(6), 2005): sigma^2 = A / a_in + B / a_load, a = W L per device. Minimising a_in + a_load
 * subject to sigma^2 = target^2 (a Lagrange multiplier) gives a_in / a_load = sqrt(A) / sqrt(B)
 * and a total of (sqrt A + sqrt B)^2 / target^2, against (A/a_in0 + B/a_load0)(a_in0 + a_load0) /
 * target^2 when both pairs are scaled by one factor.
 */
import { compileStage, varianceBudget, type Design } from '@twinfet/core';
import { clamp, factorRange, pairOf, scaleGeometry, type SizingFamily } from './resize.js';

/** The variance coefficients of the two pairs and the optimum share of area. */
export interface AreaSplit {
  /** A: the input pair's part of sigma^2 times its per-device gate area, V^2 m^2. */
  readonly inputCoefficient: number;
  /** B: the load pair's part of sigma^2 times its per-device gate area, V^2 m^2. */
  readonly loadCoefficient: number;
  /** Input share of the total per-device gate area at the optimum: sqrt(A) / (sqrt(A) + sqrt(B)). */
  readonly inputShare: number;
}

/**
 * The coefficients A and B of a mirror stage from its linearised variance budget.
 * @throws Error (internal) for a simple stage: the caller refuses `both` first.
 */
export function areaSplit(design: Design): AreaSplit {
  const load = design.load;
  if (load === undefined) throw new Error('internal: areaSplit needs a mirror stage');
  let vin = 0;
  let vload = 0;
  for (const e of varianceBudget(compileStage(design))) {
    if (e.role === 'input') vin += e.variance;
    else vload += e.variance;
  }
  const a = vin * design.input.w * design.input.l;
  const b = vload * load.w * load.l;
  return { inputCoefficient: a, loadCoefficient: b, inputShare: Math.sqrt(a) / (Math.sqrt(a) + Math.sqrt(b)) };
}

/** A family over both pairs, each at area factor `k(t)`, clamped to its own allowed range. */
function twoPairFamily(
  design: Design,
  range: readonly [number, number],
  kIn: (t: number) => number,
  kLoad: (t: number) => number,
  limitText: string,
): SizingFamily {
  const ri = factorRange(design, 'input', 'area');
  const rl = factorRange(design, 'load', 'area');
  const gi = design.input;
  const gl = pairOf(design, 'load');
  const factors = (t: number) => ({ input: clamp(kIn(t), ri.min, ri.max), load: clamp(kLoad(t), rl.min, rl.max) });
  return {
    vary: 'both',
    range,
    at: (t) => {
      const f = factors(t);
      return { ...design, input: scaleGeometry(gi, 'area', f.input), load: scaleGeometry(gl, 'area', f.load) };
    },
    factors,
    limitText,
  };
}

/**
 * Both pairs sized at the optimum split: t is the total per-device gate area a_in + a_load (m^2),
 * a_in = t * share, a_load = t * (1 - share), W/L of each kept. A pair that reaches its own
 * floor or cap stays there while the other keeps growing (the constrained optimum).
 */
export function optimalSplitFamily(design: Design, split: AreaSplit = areaSplit(design)): SizingFamily {
  const ri = factorRange(design, 'input', 'area');
  const rl = factorRange(design, 'load', 'area');
  const ai = design.input.w * design.input.l;
  const gl = pairOf(design, 'load');
  const al = gl.w * gl.l;
  const s = split.inputShare;
  const range = [Math.min((ri.min * ai) / s, (rl.min * al) / (1 - s)), Math.max((ri.max * ai) / s, (rl.max * al) / (1 - s))] as const;
  return twoPairFamily(design, range, (t) => (t * s) / ai, (t) => (t * (1 - s)) / al, `${ri.upperText} and ${rl.upperText}`);
}

/** Both pairs scaled by one area factor t (W/L kept): the comparison for the optimum split. */
export function equalScalingFamily(design: Design): SizingFamily {
  const ri = factorRange(design, 'input', 'area');
  const rl = factorRange(design, 'load', 'area');
  const range = [Math.min(ri.min, rl.min), Math.max(ri.max, rl.max)] as const;
  return twoPairFamily(design, range, (t) => t, (t) => t, `${ri.upperText} and ${rl.upperText}`);
}
