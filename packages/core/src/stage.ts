import type { Design, DeviceGeometry, Polarity, ProcessParams, TopologyName } from './design.js';
import type { InversionRegion } from './ekv.js';
import type { DeviceName, DeviceRole, RandomVariable } from './variables.js';

/** Operating point of one device at balance with no mismatch. */
export interface DeviceOperatingPoint {
  readonly device: DeviceName;
  readonly role: DeviceRole;
  readonly polarity: Polarity;
  /** Gate width and length, m. */
  readonly w: number;
  readonly l: number;
  /** Drain current, A. */
  readonly current: number;
  /** Specific current I_S = 2 n beta U_T^2, A. */
  readonly specificCurrent: number;
  /** Inversion coefficient I_D / I_S. */
  readonly ic: number;
  readonly region: InversionRegion;
  /** gm/I_D, 1/V. */
  readonly gmOverId: number;
  /** gm, A/V. */
  readonly gm: number;
  /** V_G - V_T0 - n V_S (= V_GS - V_T0 with the source at the bulk), volts; n U_T v. */
  readonly overdrive: number;
  /** Gate area W L, m^2. */
  readonly gateArea: number;
  /** Gate capacitance Cox W L, F, when the process gives cox. */
  readonly gateCapacitance?: number;
  /** Per-device mismatch sigmas: dV_T in volts, dbeta/beta as a fraction. */
  readonly sigmaVt: number;
  readonly sigmaBeta: number;
}

/**
 * A design compiled for sampling: constants hoisted, a tight exact-offset evaluator, the
 * linearised sensitivities and the operating point. Built by `compileStage`.
 */
export interface Stage {
  readonly design: Design;
  readonly topology: TopologyName;
  /** U_T at the design temperature, V. */
  readonly thermalVoltage: number;
  /** Number of standard-normal variables per sample. */
  readonly dimension: number;
  readonly variables: readonly RandomVariable[];
  /** dVos/du at u = 0, volts per unit standard deviation, one per variable. */
  readonly sensitivities: Float64Array;
  readonly operatingPoint: readonly DeviceOperatingPoint[];
  /** Notes on where the model is outside its usual range (small devices, temperature). */
  readonly warnings: readonly string[];
  /**
   * Exact offset Vos = V_G1 - V_G2 (volts) for the draws u[base .. base + dimension).
   * Returns NaN only when the balance solve did not converge or the draws put a device beyond
   * the range of doubles (never silently wrong, never +-Infinity).
   */
  offset(u: Float64Array, base: number): number;
  /**
   * Batch form: u holds `count` samples back to back; writes out[outBase + i].
   * Returns the number of non-converged evaluations (written as NaN).
   */
  offsets(u: Float64Array, count: number, out: Float64Array, outBase: number): number;
}

/** Per-device constants shared by the topologies. */
export interface DeviceConstants {
  readonly geometry: DeviceGeometry;
  readonly process: ProcessParams;
  readonly sigmaVt: number;
  readonly sigmaBeta: number;
  /** sigma_beta * rho: weight of u_vt in the beta deviate. */
  readonly betaFromVt: number;
  /** sigma_beta * sqrt(1 - rho^2): weight of u_beta in the beta deviate. */
  readonly betaOwn: number;
  readonly specificCurrent: number;
}
