/**
 * What the plots are drawn from. Kept apart from the plotting code so that the package's public
 * types do not reach the plotting library's (vega-lite's declarations do not type-check under
 * exactOptionalPropertyTypes without skipLibCheck).
 */

/**
 * The figure a plot shows and its display unit: `scale` takes the figure's SI value to `unit`.
 * Without one, plots show an offset in millivolts.
 */
export interface PlotFigure {
  /** Words for the axis ("offset", "current error"). */
  label: string;
  /** Its symbol ("Vos", "e"). */
  symbol: string;
  /** Display unit ("mV", "%"). */
  unit: string;
  /** Factor from the SI value to the display unit (1e3 for V to mV, 100 for a fraction in %). */
  scale: number;
}

/** Histogram of a sampled figure (input-referred offsets by default), all values in its SI unit (volts for an offset). */
export interface HistogramInput {
  /** Plot title. */
  title: string;
  /** Bin edges in the figure's SI unit, increasing, length `counts.length + 1`. */
  binEdges: readonly number[];
  /** Samples in each bin. */
  counts: readonly number[];
  /** Total Monte Carlo samples (including any that fell outside the bins). */
  samples: number;
  /** Sample mean of the figure. */
  mean: number;
  /** Sample standard deviation of the figure (> 0). */
  sigma: number;
  /** Specification of the figure (> 0): rules are drawn at -spec and +spec. */
  spec: number;
  /** Extra line under the title (the sample statistics line is always shown). */
  subtitle?: string;
  /** What the values are (default: the offset in mV). */
  figure?: PlotFigure;
}

/** One point of a parameter sweep; sigmas in the figure's SI unit (volts for an offset), yields and probabilities as fractions. */
export interface SweepPoint {
  /** Swept value in the field's base unit (for example metres). */
  x: number;
  /** Sigma from the linearised mismatch model. */
  analyticSigma: number;
  /** Monte Carlo sigma. */
  mcSigma?: number;
  /** Lower end of the Monte Carlo sigma's confidence interval. */
  mcSigmaLo?: number;
  /** Upper end of the Monte Carlo sigma's confidence interval. */
  mcSigmaHi?: number;
  /** Monte Carlo yield, the fraction of samples within spec. */
  yield?: number;
  /** Lower end of the yield's confidence interval. */
  yieldLo?: number;
  /** Upper end of the yield's confidence interval. */
  yieldHi?: number;
  /** Failure probability estimated by importance sampling of the tails. */
  tailFailure?: number;
  /** Lower end of the tail estimate's confidence interval. */
  tailLo?: number;
  /** Upper end of the tail estimate's confidence interval. */
  tailHi?: number;
}

/** A sweep of one design field: offset sigma and failure probability against its value. */
export interface SweepInput {
  /** Plot title. */
  title: string;
  /** Design-file path of the swept field, for example "input.w". */
  field: string;
  /** Display unit of the swept field ("um", "uA", "K"; "" for none). */
  fieldUnit: string;
  /** Factor from the field's base unit to the display unit, for example 1e6 for m to um. */
  xScale: number;
  /** Draw the swept field on a log axis. */
  log: boolean;
  /** The swept points. */
  points: readonly SweepPoint[];
  /** Sigma target in the figure's SI unit: drawn as a horizontal rule. */
  sigmaTarget?: number;
  /** Yield target as a fraction: 1 - yieldTarget is drawn as the failure target. */
  yieldTarget?: number;
  /** What the sigmas are of (default: the offset in mV). */
  figure?: PlotFigure;
}
