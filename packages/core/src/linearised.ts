import type { Stage } from './stages/definition.js';
import type { MismatchParameter } from './variables.js';

/**
 * First-order sigma of the stage's figure from the sensitivities d(figure)/du (independent unit
 * normals): sigma^2 = sum_j (d figure/du_j)^2, in the figure's unit.
 */
export function linearisedSigma(stage: Stage): number {
  let s = 0;
  for (const c of stage.sensitivities) s += c * c;
  return Math.sqrt(s);
}

/** One line of the variance budget. */
export interface BudgetEntry {
  readonly device: string;
  /** The block the element belongs to (`input`, `load`). */
  readonly role: string;
  readonly parameter: MismatchParameter;
  /** Contribution to sigma^2(Vos), V^2. */
  readonly variance: number;
  /** Fraction of the total variance, 0..1; the entries sum to 1. */
  readonly share: number;
}

/**
 * The variance budget: each variable's share of the linearised sigma^2.
 * With rho != 0 a `beta` entry is the part of the current-factor deviate independent of dV_T.
 */
export function varianceBudget(stage: Stage): BudgetEntry[] {
  let total = 0;
  for (const c of stage.sensitivities) total += c * c;
  return stage.variables.map((v, j) => {
    const variance = stage.sensitivities[j]! ** 2;
    return { device: v.device, role: v.role, parameter: v.parameter, variance, share: total > 0 ? variance / total : 0 };
  });
}

/** The budget summed per (block, parameter): input vt, input beta, load vt, load beta, ... */
export function groupedBudget(stage: Stage): { role: string; parameter: MismatchParameter; variance: number; share: number }[] {
  const out: { role: string; parameter: MismatchParameter; variance: number; share: number }[] = [];
  for (const e of varianceBudget(stage)) {
    const g = out.find((o) => o.role === e.role && o.parameter === e.parameter);
    if (g === undefined) out.push({ role: e.role, parameter: e.parameter, variance: e.variance, share: e.share });
    else { g.variance += e.variance; g.share += e.share; }
  }
  return out;
}

/**
 * Closed form for the simple stage (Pelgrom 1989; Kinget, IEEE JSSC 40(6), 2005):
 * sigma^2(Vos) = sigma^2(dV_T,pair) + (I_D/gm)^2 sigma^2(dbeta/beta,pair).
 * @param sigmaVtPair pair-difference sigma A_VT/sqrt(WL), volts
 * @param sigmaBetaPair pair-difference sigma A_beta/sqrt(WL), fraction
 * @param idOverGm I_D/gm of the input devices, volts
 * @example simpleStageSigma(1e-3, 0.002, 0.1) // 1.0198e-3
 */
export function simpleStageSigma(sigmaVtPair: number, sigmaBetaPair: number, idOverGm: number): number {
  return Math.hypot(sigmaVtPair, idOverGm * sigmaBetaPair);
}

/**
 * Closed form for the mirror stage (Kinget 2005): the simple-stage terms plus
 * (gm_load/gm_in)^2 sigma^2(dV_T,load) + (I_D/gm_in)^2 sigma^2(dbeta/beta,load). Volts.
 */
export function mirrorStageSigma(
  sigmaVtPairIn: number,
  sigmaBetaPairIn: number,
  idOverGmIn: number,
  sigmaVtPairLoad: number,
  sigmaBetaPairLoad: number,
  gmLoadOverGmIn: number,
): number {
  return Math.sqrt(
    sigmaVtPairIn ** 2 +
      (idOverGmIn * sigmaBetaPairIn) ** 2 +
      (gmLoadOverGmIn * sigmaVtPairLoad) ** 2 +
      (idOverGmIn * sigmaBetaPairLoad) ** 2,
  );
}
