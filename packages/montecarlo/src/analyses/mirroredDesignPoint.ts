/**
 * The design point of mirror-image failure regions (a stage's FailureSymmetry): region 0 is left
 * unchanged by any exchange of groups 2 .. G-1 of the variables, so (the design point being
 * unique) its design point has those groups equal. It is searched in that subspace, of three
 * groups, with the shared group scaled by sqrt(G - 2) so that the subspace's coordinates are
 * standard normal in the same norm, and the other regions' points are its mirror images
 * (groups 1 and c swapped). The search costs 3 groups' worth of gradients, whatever G is.
 */
import type { FailureComponent, Stage } from '@twinfet/core';
import { gradientAtZero, searchDesignPoint, type DesignPoint } from './designPoint.js';

/** Region 0's design point and the three group vectors that describe every region's. */
export interface MirroredDesignPoint {
  /** Region 0's design point in the full space. */
  readonly point: DesignPoint;
  readonly groupSize: number;
  readonly groups: number;
  /** The coordinates of group 0 (shared by every region), of the region's own group, and of each other group. */
  readonly fixed: readonly number[];
  readonly own: readonly number[];
  readonly rest: readonly number[];
}

export function findMirroredDesignPoint(stage: Stage, component: FailureComponent, groupSize: number): MirroredDesignPoint {
  const dim = stage.dimension;
  const w = groupSize;
  const groups = dim / w;
  if (!(Number.isInteger(groups) && groups >= 2)) throw new Error(`internal: ${dim} variables do not fall into groups of ${w}`);
  const others = groups - 2;
  const scale = others > 0 ? 1 / Math.sqrt(others) : 0;
  const reducedDim = (others > 0 ? 3 : 2) * w;
  const full = new Float64Array(dim);
  const embed = (v: Float64Array, base: number): Float64Array => {
    for (let i = 0; i < 2 * w; i++) full[i] = v[base + i]!;
    for (let g = 2; g < groups; g++) for (let i = 0; i < w; i++) full[g * w + i] = scale * v[base + 2 * w + i]!;
    return full;
  };
  const reduced: FailureComponent = { ...component, evaluate: (v, base) => component.evaluate(embed(v, base), 0) };
  const p = searchDesignPoint(reducedDim, reduced, gradientAtZero(reduced.evaluate, reducedDim));
  const u = Array.from(embed(Float64Array.from(p.u), 0));
  return {
    point: { ...p, u },
    groupSize: w,
    groups,
    fixed: u.slice(0, w),
    own: u.slice(w, 2 * w),
    rest: others > 0 ? u.slice(2 * w, 3 * w) : new Array<number>(w).fill(0),
  };
}
