import { currentFactorDeviation } from './pelgrom.js';

/**
 * Mismatch parameter of one element: a MOS device's threshold shift, its current factor's
 * relative deviation, or a resistor's relative deviation.
 */
export type MismatchParameter = 'vt' | 'beta' | 'r';

/** How each parameter is named and shown (samples-file columns, reports). */
export const MISMATCH_PARAMETERS: Readonly<Record<MismatchParameter, { readonly suffix: string; readonly label: string; readonly column: string }>> = {
  vt: { suffix: 'dVT', label: 'dV_T', column: 'dVT_V' },
  beta: { suffix: 'dbeta', label: 'dbeta/beta', column: 'dbeta_rel' },
  r: { suffix: 'dR', label: 'dR/R', column: 'dR_rel' },
};

/**
 * One independent standard-normal variable u of the sampled space, named by the stage
 * (`M1.dVT`, `M1.dbeta`, `R1.dR`). With rho = 0, a device's `vt` variable is dV_T / sigma(dV_T)
 * and its `beta` variable ln(beta_i/beta) / sigma(dbeta/beta); with rho != 0 the current-factor
 * deviate is rho u_vt + sqrt(1 - rho^2) u_beta, so u_beta is its part independent of dV_T.
 * A resistor's `r` variable is ln(R_i/R) / sigma(dR/R).
 */
export interface RandomVariable {
  /** `<element>.<dVT|dbeta|dR>`. */
  readonly name: string;
  /** Element name (`M1`, `R2`). */
  readonly device: string;
  /** The block it belongs to (`input`, `load`). */
  readonly role: string;
  readonly parameter: MismatchParameter;
  /** Per-element sigma: volts for vt, a fraction for beta and r. */
  readonly sigma: number;
  /** The device's correlation rho between its dV_T and dbeta/beta deviates (0 for resistors). */
  readonly rho: number;
}

/**
 * The physical deviation variable `j` stands for at the draws u[base ..]: dV_T in volts, or
 * dbeta/beta (dR/R) as a fraction. A beta variable is paired with its device's vt variable.
 */
export function variableDeviation(variables: readonly RandomVariable[], u: ArrayLike<number>, base: number, j: number): number {
  const v = variables[j]!;
  const uj = u[base + j]!;
  if (v.parameter === 'vt') return v.sigma * uj;
  if (v.parameter === 'r') return Math.expm1(v.sigma * uj);
  const k = variables.findIndex((x) => x.device === v.device && x.parameter === 'vt');
  return currentFactorDeviation(v.sigma, v.rho, k < 0 ? 0 : u[base + k]!, uj);
}
