/** Which device of the stage: M1/M2 the input pair, M3/M4 the mirror load (M3 the diode). */
export type DeviceName = 'M1' | 'M2' | 'M3' | 'M4';
/** Role of a device in the stage. */
export type DeviceRole = 'input' | 'load';
/** Mismatch parameter: threshold voltage shift, or the current factor's relative deviation. */
export type MismatchParameter = 'vt' | 'beta';

/**
 * One independent standard-normal variable u of the sampled space.
 * With rho = 0, the `vt` variable of a device is its dV_T / sigma(dV_T) and its `beta` variable
 * is ln(beta_i/beta) / sigma(dbeta/beta). With rho != 0 the beta deviate is
 * rho u_vt + sqrt(1 - rho^2) u_beta, so u_beta is its part independent of dV_T.
 */
export interface RandomVariable {
  readonly device: DeviceName;
  readonly role: DeviceRole;
  readonly parameter: MismatchParameter;
  /** Per-device sigma: volts for vt, a fraction for beta. */
  readonly sigma: number;
  /** The device's correlation rho between its dV_T and dbeta/beta deviates. */
  readonly rho: number;
}

/** Layout of one sample: device-major, [vt, beta] per device, in device order M1, M2, (M3, M4). */
export const VARIABLES_PER_DEVICE = 2;
