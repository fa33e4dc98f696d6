/**
 * A design in SI base units. `parseDesign` produces one from design-file text; library users may
 * build one directly and pass it to `compileStage`, which checks it at the edge (`validateDesign`)
 * with exactly the rules the design-file reader applies.
 *
 * The keys common to every stage type are typed here; the blocks a stage type owns (`load`,
 * `sources`, `output`, `cells`, ...) are described by its definition in `stages/` and read
 * through it, so adding a stage type changes nothing in this file.
 */

/** Device polarity; a p-device is described by magnitudes (|V_T0|, |V_GS|). */
export type Polarity = 'n' | 'p';

/** The name of a stage type, as listed by the stage registry (`simple`, `mirror`, ...). */
export type TopologyName = string;

/** Process parameters of one MOS polarity, SI units. */
export interface ProcessParams {
  /** Threshold voltage magnitude |V_T0|, volts. */
  readonly vt0: number;
  /** Slope factor n (>= 1), dimensionless. */
  readonly slope: number;
  /** Transconductance parameter KP = mu*Cox, A/V^2, at the process temperature (`process.temperature`). */
  readonly kp: number;
  /**
   * Mobility temperature exponent m of KP(T) = KP (T / T_process)^m (design-file key
   * `kp_exponent`; default -1.5 when absent, see KP_EXPONENT_DEFAULT).
   */
  readonly kpExponent?: number;
  /** Pelgrom threshold matching coefficient A_VT, V*m (5 mV*um = 5e-9 V*m). */
  readonly avt: number;
  /** Pelgrom current-factor matching coefficient A_beta, m (1 %*um = 0.01 * 1e-6 m = 1e-8 m). */
  readonly abeta: number;
  /** Correlation between one device's dV_T and dbeta/beta draws, in [-1, 1] (default 0). */
  readonly rho?: number;
  /** Optional gate capacitance per area Cox, F/m^2 (for input capacitance). */
  readonly cox?: number;
  /** Optional smallest drawn width of the process, m (design-file key `min_w`). */
  readonly minW?: number;
  /** Optional smallest drawn length of the process, m (design-file key `min_l`). */
  readonly minL?: number;
}

/** Matching of resistor bodies: per-resistor sigma(dR/R) = A_R / sqrt(2 W L). */
export interface ResistorProcess {
  /** A_R as fraction*m (0.5 %*um = 5e-9 m). */
  readonly ar: number;
}

/** The process: one entry per MOS polarity used, and resistor matching where a stage has resistors. */
export interface ProcessSet {
  /**
   * The temperature at which `kp` (and `vt0`) are given, kelvin. Absent: the design's own
   * temperature, so KP is taken as valid there (the law KP(T) then changes nothing).
   */
  readonly temperature?: number;
  readonly n?: ProcessParams;
  readonly p?: ProcessParams;
  readonly resistor?: ResistorProcess;
}

/** The geometry of a matched pair (or of every cell) of MOS devices. */
export interface DeviceGeometry {
  readonly polarity: Polarity;
  /** Gate width, m. */
  readonly w: number;
  /** Gate length, m. */
  readonly l: number;
  /** Nominal drain current of each device, A, for blocks that set their own bias. */
  readonly current?: number;
}

/** The body of a matched pair of resistors. */
export interface ResistorGeometry {
  /** Body width, m. */
  readonly w: number;
  /** Body length, m. */
  readonly l: number;
  /** Nominal resistance, ohms (optional: the offset depends only on the ratio). */
  readonly r?: number;
}

/**
 * The spec: the limit on the stage's figure under the figure's own key (`offset` for the
 * differential stages, volts) and how many independent instances one chip holds.
 */
export interface Spec {
  /** Independent instances per chip (whole number >= 1). */
  readonly instances: number;
  readonly [limit: string]: number;
}

/** A global process shift of one polarity at an operating condition. */
export interface PolarityShift {
  /** Relative change of the temperature-scaled KP: -0.1 multiplies it by 0.90. */
  readonly kp?: number;
  /** Change of |V_T0|, volts (it leaves the offset unchanged in these models). */
  readonly vt0?: number;
}

/**
 * One operating condition: the design at another temperature, bias or process corner. The
 * mismatch draws of an instance are the same at every condition; absent fields inherit the
 * design's values.
 */
export interface OperatingCondition {
  /** Unique name (`cold`, `hot-slow`). */
  readonly name: string;
  /** Temperature, kelvin. */
  readonly temperature?: number;
  /** Global process shifts per polarity. */
  readonly shift?: { readonly n?: PolarityShift; readonly p?: PolarityShift };
  /**
   * The stage's own numeric fields at this condition, by design-file key: top-level fields such
   * as `tail` (amperes) and, for a block's fields, a mapping such as `sources: { current }`.
   */
  readonly [field: string]: unknown;
}

/** A complete design in SI base units. */
export interface Design {
  readonly name: string;
  /** Temperature, kelvin. */
  readonly temperature: number;
  readonly topology: TopologyName;
  /** Tail current, amperes, for the stages that have one. */
  readonly tail?: number;
  /** The input devices (M1/M2 of a pair). Every stage type has them. */
  readonly input: DeviceGeometry;
  /** Process parameters; each polarity used by a device must be present. */
  readonly process: ProcessSet;
  readonly spec: Spec;
  /**
   * Operating conditions every instance must pass at, from the same mismatch draws (absent:
   * the design is analysed at its own temperature and bias only).
   */
  readonly conditions?: readonly OperatingCondition[];
  /** Blocks owned by the stage type, by design-file key (see the stage's definition). */
  readonly [block: string]: unknown;
}
