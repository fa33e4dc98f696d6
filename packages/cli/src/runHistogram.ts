import type { RunReport } from '@twinfet/montecarlo';
import { histogramChart, type HistogramInput, type PlotFigure } from './plot.js';
import type { Chart } from './chart/chart.js';

/**
 * The bins of a run's histogram that hold data or reach the spec lines: from the smaller of the
 * sample minimum and -spec to the larger of the maximum and +spec, so the plot spans what was
 * seen and what is allowed, not the histogram's whole +-10 sigma range (an upper-only spec adds
 * no lower line).
 */
export function runBins(report: RunReport, specSides: 'two' | 'one' = 'two'): { binEdges: number[]; counts: number[] } {
  const h = report.histogram;
  const lo = Math.min(report.offset.min, specSides === 'two' ? -report.yield.spec : report.offset.min);
  const hi = Math.max(report.offset.max, report.yield.spec);
  const first = Math.max(0, Math.floor((lo - h.lo) / h.binWidth));
  const last = Math.min(h.counts.length, Math.max(first + 1, Math.ceil((hi - h.lo) / h.binWidth)));
  const counts = h.counts.slice(first, last);
  const binEdges = Array.from({ length: counts.length + 1 }, (_, i) => h.lo + (first + i) * h.binWidth);
  return { binEdges, counts };
}

/** The histogram chart of a run (the `run --plot` figure and the report's distribution figure). */
export function runHistogramChart(report: RunReport, options: { title?: string; id?: string; figure?: PlotFigure; specSides?: 'two' | 'one' } = {}): Chart {
  const input: HistogramInput = {
    ...runBins(report, options.specSides),
    samples: report.evaluated,
    mean: report.offset.mean,
    sigma: report.offset.sigma,
    spec: report.yield.spec,
    subtitle: `seed ${report.seed}`,
    ...options,
  };
  return histogramChart(input);
}
