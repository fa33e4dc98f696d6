/**
 * What a stage type is: one definition object per type (the modules beside this file), listed by
 * the registry. Everything outside a stage's own module (validation, the design-file reader and
 * writer, sweeps, sizing, reports, the samples file, high-sigma design points) reads these
 * descriptions instead of asking which stage it is.
 */
import type { Design, Polarity, TopologyName } from '../design.js';
import type { InversionRegion } from '../ekv.js';
import type { Dimension } from '../units.js';
import type { MismatchParameter, RandomVariable } from '../variables.js';

/** A numeric design-file field owned by a stage (top level such as `tail`, or inside a block). */
export interface FieldDefinition {
  /** Design-file key, e.g. `tail`, `cells`, `current`, `r`. */
  readonly key: string;
  readonly dimension: Dimension;
  /** What it is, for messages ("tail current"). */
  readonly what: string;
  /** An example as written in a file (`tail: 10 uA`). */
  readonly example: string;
  /** Accepted range in SI units (this project's outer limits; see DESIGN_LIMITS). */
  readonly limits: readonly [number, number];
  /** SI unit for messages and CSV headers (`A`, `ohm`, '' for plain numbers). */
  readonly unit: string;
  readonly required: boolean;
  /** Whole numbers only. */
  readonly integer?: boolean;
}

/** How a block's polarity relates to the input devices'. */
export type PolarityRule = 'any' | 'opposite-to-input' | 'same-as-input';

/** A block of matched elements in the design file (`input`, `load`, `sources`, ...). */
export interface BlockDefinition {
  /** Design-file key. */
  readonly key: string;
  /** MOS devices (polarity, w, l) or resistor bodies (w, l). */
  readonly kind: 'mos' | 'resistor';
  /**
   * The element names, in sample order (`M1`, `M2`; `R1`, `R2`). A block whose size a field sets
   * (a selector's `cells`) lists them symbolically; count a design's elements from its stage's
   * variables.
   */
  readonly elements: readonly string[];
  /** Human label ("input pair", "mirror load"). */
  readonly label: string;
  /** MOS blocks: how the polarity relates to the input's (the input itself: `any`). */
  readonly polarity: PolarityRule;
  /** Fields beyond the geometry (`current`, `r`). */
  readonly fields: readonly FieldDefinition[];
  /** An inline example of the block, for messages. */
  readonly example: (inputPolarity: Polarity) => string;
  /** Whether `size` and `sweep` may vary its geometry (and `both` includes it). */
  readonly sizable: boolean;
  /**
   * Words for the first-order coefficient of each of its mismatch terms, for messages
   * (`(I_sources/gm_in) A_beta/sqrt(WL_sources)`); without them, the differential stages' forms.
   */
  readonly terms?: Readonly<Partial<Record<MismatchParameter, string>>>;
}

/** The figure each sample produces, and how the spec limits it. */
export interface FigureDefinition {
  /** JSON name of the figure and of its report block (`offset`). */
  readonly name: string;
  /** The spec key holding its limit (`spec.offset`). */
  readonly specKey: string;
  /** Words for reports ("offset"). */
  readonly label: string;
  /** Symbol in formulas and reports (`Vos`). */
  readonly symbol: string;
  /** SI unit for formatting (`V`), or '' for a dimensionless figure (shown in %). */
  readonly unit: string;
  /** `two`: pass when |x| <= limit; `one`: pass when x <= limit. */
  readonly sided: 'two' | 'one';
  /** How the limit is written in a design file. */
  readonly dimension: Dimension;
  readonly limits: readonly [number, number];
  /** Example of the spec line (`offset: 10 mV`). */
  readonly example: string;
  /** Words reports print beside the figure's statistics (why its distribution is skewed, ...). */
  readonly note?: string;
}

/** Operating point of one MOS device at balance with no mismatch. */
export interface DeviceOperatingPoint {
  /** Element name (`M1`). */
  readonly device: string;
  /** The block it belongs to (`input`, `load`). */
  readonly role: string;
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

/** Operating point of one resistor at balance with no mismatch. */
export interface ResistorOperatingPoint {
  readonly device: string;
  readonly role: string;
  /** Body width and length, m. */
  readonly w: number;
  readonly l: number;
  /** Body area W L, m^2. */
  readonly area: number;
  /** Nominal resistance, ohms, when given. */
  readonly resistance?: number;
  /** Current through it, A. */
  readonly current: number;
  /** Per-resistor sigma(dR/R), a fraction. */
  readonly sigmaR: number;
  /** The stage's small-signal gain gm R (input device gm times this resistance), when R is given. */
  readonly voltageGain?: number;
}

/**
 * One failure region for the high-sigma analysis: `evaluate(u) = target` is its boundary, and a
 * sample is in it beyond the target on the `side` given. A two-sided figure has two (+limit and
 * -limit); a stage whose failure is a union of other regions lists one per region.
 */
export interface FailureComponent {
  /** Label in reports (`+spec`, `-spec`). */
  readonly label: string;
  /** +1: failure where evaluate(u) > target; -1: where evaluate(u) < target. */
  readonly side: 1 | -1;
  readonly target: number;
  readonly evaluate: (u: Float64Array, base: number) => number;
}

/**
 * The distribution of a linearised figure that is not the Gaussian of its sensitivities. The
 * sensitivities then belong to one representative variable x, and `scale` below is their sigma
 * s = sqrt(sum_j (dx/du_j)^2).
 * - `selection`: the figure is x_1 - min_{j=2..k} x_j with x_1 .. x_k independent N(0, s^2),
 *   so P(figure <= D) is Bechhofer's probability of a correct selection of the best of k normal
 *   populations at separation D (Bechhofer, Ann. Math. Statist. 25(1), 1954).
 */
export interface LinearisedLaw {
  readonly kind: 'selection';
  /** k, the number of populations compared. */
  readonly populations: number;
}

/**
 * Failure regions that are images of one another under exchanging groups of variables (the
 * cells of a selector). The variables fall into dimension / groupSize groups of `groupSize`
 * consecutive variables; group 0 belongs to every region, and `failureComponents(limit)[c]` is
 * the region of group c + 1, the image of region 0 under swapping groups 1 and c + 1. Region 0's
 * design point then has every group from 2 on equal, so it can be searched in a space of
 * 3 groups and mirrored to the others.
 */
export interface FailureSymmetry {
  readonly groupSize: number;
}

/** A stage's transfer curve: one output against one input, for reports and plots. */
export interface ResponseCurve {
  /** What the output is ("winner's share of the tail"). */
  readonly label: string;
  /** What the input is, in the figure's unit (`lead`). */
  readonly input: string;
  /** The output for the draws u[base .. base + dimension) at input x (a fraction); NaN if not evaluated. */
  evaluate(u: Float64Array, base: number, x: number): number;
}

/** What a stage module's `compile` returns: constants hoisted, the hot figure functions, the linearised picture. */
export interface StageModel {
  /** U_T at the design temperature, V. */
  readonly thermalVoltage: number;
  /** The independent standard-normal variables of one sample, in sample order. */
  readonly variables: readonly RandomVariable[];
  /**
   * d(figure)/du at u = 0, one per variable (figure units per unit standard deviation); for a
   * stage with a `linearisedLaw`, those of the law's representative variable.
   */
  readonly sensitivities: Float64Array;
  /** The linearised figure's distribution when it is not Gaussian (default: Gaussian, `sided`). */
  readonly linearisedLaw?: LinearisedLaw;
  /** Set when the failure components are mirror images of one another (see FailureSymmetry). */
  readonly failureSymmetry?: FailureSymmetry;
  /** The stage's transfer curve, where it has one worth reporting. */
  readonly response?: ResponseCurve;
  readonly operatingPoint: readonly DeviceOperatingPoint[];
  /** Resistors, for stages that have them. */
  readonly resistors?: readonly ResistorOperatingPoint[];
  /** Notes where the model is stretched (small devices). */
  readonly warnings: readonly string[];
  /**
   * The exact figure for the draws u[base .. base + dimension). NaN only when the balance solve
   * did not converge or a device left the range of doubles (never silently wrong, never +-Inf).
   */
  figure(u: Float64Array, base: number): number;
  /** Batch form: `count` samples back to back into out[outBase + i]; returns how many are NaN. */
  figures(u: Float64Array, count: number, out: Float64Array, outBase: number): number;
  /** Failure regions at `limit` when they are not the figure's own sides (default: from `sided`). */
  failureComponents?(limit: number): readonly FailureComponent[];
}

/** A stage type: one object per module under `stages/`, listed in `registry.ts`. */
export interface StageDefinition {
  readonly topology: TopologyName;
  /** One line for help texts and reports. */
  readonly summary: string;
  /** Top-level numeric fields it owns (`tail`). */
  readonly fields: readonly FieldDefinition[];
  /** Its blocks, the input first. */
  readonly blocks: readonly BlockDefinition[];
  readonly figure: FigureDefinition;
  /** Rules beyond the per-field and per-block checks (throw InputError naming the field). */
  readonly validate?: (design: Design) => void;
  /** Compiles a validated design (defaults filled in). */
  readonly compile: (design: Design) => StageModel;
}

/** A compiled design: the stage's model with the design and definition it came from. */
export interface Stage extends StageModel {
  /** The validated design, with defaults filled in. */
  readonly design: Design;
  readonly definition: StageDefinition;
  readonly topology: TopologyName;
  /** Number of standard-normal variables per sample (= variables.length). */
  readonly dimension: number;
  /** The failure regions at `limit` (the stage's own, or the figure's sides). */
  failureComponents(limit: number): readonly FailureComponent[];
}
