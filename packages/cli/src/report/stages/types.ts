/**
 * What the design-review report needs to know about a stage type beyond what the core stage
 * definition gives every analysis (its blocks, figure and summary). Adding a stage type to the
 * report is one module exporting a {@link ReportStage} and one line in ./registry.ts; nothing
 * else in the report asks which stage it is.
 */
import type { Design, Stage } from '@twinfet/core';

/** A quantity on an axis or in a table: its name, symbol and SI unit ('%' for a fraction shown in percent). */
export interface Quantity {
  /** Words, e.g. "differential input". */
  readonly name: string;
  /** Symbol, e.g. "Vid". */
  readonly symbol: string;
  /** SI unit, e.g. "V"; '%' for a fraction shown in percent, '' for a plain number. */
  readonly unit: string;
}

/** A textbook law drawn beside the transfer curve where it applies. */
export interface TransferLaw {
  /** Its name, e.g. "weak-inversion tanh law". */
  readonly name: string;
  /** The formula in words, e.g. "I_B tanh(Vid / (2 n U_T))". */
  readonly formula: string;
  /** Where it is published. */
  readonly source: string;
  /** The law's output at input x (SI units). */
  at(x: number): number;
}

/**
 * The transfer curve of one stage under mismatch (report section 7): the stage's output
 * against its input, per sampled instance. The report draws the nominal curve, percentile bands
 * over a few hundred instances, the law where it applies, and the spread of the slope at each
 * instance's balance point.
 */
export interface StageTransfer {
  /** The swept input, e.g. differential input Vid = V_G1 - V_G2 in volts. */
  readonly input: Quantity;
  /** The output drawn, e.g. output current in amperes. */
  readonly output: Quantity;
  /**
   * For a stage balanced by its input: the output at balance (0 for a differential current),
   * where each instance crosses at its figure, and the slope there (transconductance Gm, A/V).
   * A stage without a balance point (a current mirror) leaves both out.
   */
  readonly balance?: { readonly output: number; readonly slope: Quantity };
  /** Input range of the whole curve (the nominal transition and the instances' spread), SI. */
  readonly span: readonly [number, number];
  /** Input range of the close-up around balance, SI. */
  readonly zoom: readonly [number, number];
  /**
   * Output of one instance, whose standard-normal draws are u[base .. base + stage.dimension)
   * (the layout of Stage.variables), at each input xs[i], written to out[i]. NaN where the
   * instance has no solution there, never a silently wrong number.
   */
  evaluate(u: Float64Array, base: number, xs: Float64Array, out: Float64Array): void;
  /** The law drawn for comparison, or a sentence saying why none is drawn. */
  readonly law: TransferLaw | { readonly none: string };
}

/** The report's per-stage definitions. */
export interface ReportStage {
  /** The stage type (Design.topology, as the core registry names it). */
  readonly topology: string;
  /** One or two sentences describing the topology and its devices, for section 1. */
  describe(design: Design): string;
  /** The transfer curve of a compiled stage of this type. */
  transfer(stage: Stage): StageTransfer;
}
