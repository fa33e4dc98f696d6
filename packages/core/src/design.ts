/**
 * A validated design in SI base units. The CLI's design-file loader produces it; library users
 * may build one directly and pass it to `compileStage` (which checks it again at the edge).
 */

/** Device polarity; a p-device is described by magnitudes (|V_T0|, |V_GS|). */
export type Polarity = 'n' | 'p';

/** `simple`: ideal equal loads. `mirror`: five-transistor stage with a current-mirror load. */
export type TopologyName = 'simple' | 'mirror';

/** Process parameters of one polarity, SI units. */
export interface ProcessParams {
  /** Threshold voltage magnitude |V_T0|, volts. */
  readonly vt0: number;
  /** Slope factor n (>= 1), dimensionless. */
  readonly slope: number;
  /** Transconductance parameter KP = mu*Cox, A/V^2. */
  readonly kp: number;
  /** Pelgrom threshold matching coefficient A_VT, V*m (5 mV*um = 5e-9 V*m). */
  readonly avt: number;
  /** Pelgrom current-factor matching coefficient A_beta, m (1 %*um = 0.01 * 1e-6 m = 1e-8 m). */
  readonly abeta: number;
  /** Correlation between one device's dV_T and dbeta/beta draws, in [-1, 1]. */
  readonly rho: number;
  /** Optional gate capacitance per area Cox, F/m^2 (for input capacitance). */
  readonly cox?: number;
  /** Optional minimum drawn width of the process, m (for the small-device warning). */
  readonly wmin?: number;
  /** Optional minimum drawn length of the process, m (for the small-device warning). */
  readonly lmin?: number;
}

/** One matched pair's geometry. */
export interface DeviceGeometry {
  readonly polarity: Polarity;
  /** Gate width, m. */
  readonly w: number;
  /** Gate length, m. */
  readonly l: number;
}

/** The offset limit and how many instances one chip holds. */
export interface OffsetSpec {
  /** |Vos| limit, volts. */
  readonly offset: number;
  /** Independent instances per chip (whole number >= 1). */
  readonly instances: number;
}

/** A complete design in SI base units. */
export interface Design {
  readonly name: string;
  /** Temperature, kelvin. */
  readonly temperature: number;
  readonly topology: TopologyName;
  /** Tail current, amperes. */
  readonly tail: number;
  /** The input pair M1/M2. */
  readonly input: DeviceGeometry;
  /** The mirror load M3/M4: present exactly when topology is `mirror`. */
  readonly load?: DeviceGeometry;
  /** Process parameters per polarity; each polarity used by a device must be present. */
  readonly process: { readonly n?: ProcessParams; readonly p?: ProcessParams };
  readonly spec: OffsetSpec;
}
