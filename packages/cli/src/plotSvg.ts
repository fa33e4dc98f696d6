/**
 * The plots as SVG text, for use as a library. The plotting library (vega, vega-lite) is loaded on
 * the first call only (its import takes ~200 ms), and its types stay out of this package's
 * public types.
 */
import type { HistogramInput, SweepInput } from './plotInput.js';

/**
 * SVG of an offset histogram with its Gaussian fit and the +-spec rules; values in volts.
 * @example await histogramSvg({ title: 'offset', binEdges, counts, samples: 1e5, mean: 0, sigma: 2e-3, spec: 5e-3 })
 */
export async function histogramSvg(input: HistogramInput): Promise<string> {
  return (await import('./plot.js')).histogramSvg(input);
}

/** SVG of a sweep's two stacked panels, offset sigma and failure probability against the swept field. */
export async function sweepSvg(input: SweepInput): Promise<string> {
  return (await import('./plot.js')).sweepSvg(input);
}
