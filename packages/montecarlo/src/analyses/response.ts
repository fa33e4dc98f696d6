/**
 * A stage's transfer curve under mismatch (the winner's share of a selector's tail against the
 * lead): the nominal curve and its spread over seeded samples. Small and in-thread: a few
 * thousand solves, on their own random stream (`response`), so a run's other numbers do not move.
 */
import type { Stage } from '@twinfet/core';
import { chunkRng } from '../random/stream.js';
import { fillStandardNormals } from '../random/ziggurat.js';
import { exactQuantile } from '../stats/histogram.js';

/** Samples of the spread at one input (the spec), and of the plot's envelope. */
export const RESPONSE_SAMPLES = 2000;
/** Quantile levels of the spread at the spec, and the envelope's bands. */
export const RESPONSE_LEVELS = [0.01, 0.1, 0.5, 0.9, 0.99] as const;

/** The curve's output at one input: nominal, and its spread over the samples. */
export interface ResponseSummary {
  /** What the output is, and what the input is. */
  readonly label: string;
  readonly input: string;
  /** The input value, in the figure's unit. */
  readonly at: number;
  /** The output without mismatch (a fraction). */
  readonly nominal: number;
  readonly samples: number;
  /** Samples that were evaluated (a failed solve is left out and counted here). */
  readonly evaluated: number;
  readonly mean: number;
  readonly sigma: number;
  readonly quantiles: readonly { readonly p: number; readonly value: number }[];
  readonly seed: string;
}

/** The curve over a grid of inputs: nominal and percentile bands. */
export interface ResponseEnvelope {
  readonly label: string;
  readonly input: string;
  readonly x: readonly number[];
  readonly nominal: readonly number[];
  /** One band per level in RESPONSE_LEVELS: the output's quantile at each x. */
  readonly bands: readonly { readonly p: number; readonly values: readonly number[] }[];
  readonly samples: number;
  readonly seed: string;
}

/**
 * The outputs of every sample at each input of `xs`: one row of sorted values (NaNs dropped) per
 * input. The draws are made one sample at a time from one stream, so memory stays O(dimension)
 * whatever the cell count.
 */
function outputs(stage: Stage, xs: readonly number[], samples: number, seed: string): Float64Array[] {
  const curve = stage.response!;
  const rng = chunkRng(seed, 'response', 0);
  const u = new Float64Array(stage.dimension);
  const rows = xs.map(() => new Float64Array(samples));
  const counts = xs.map(() => 0);
  for (let i = 0; i < samples; i++) {
    fillStandardNormals(rng, u, 0, u.length);
    xs.forEach((x, k) => {
      const y = curve.evaluate(u, 0, x);
      if (y === y) rows[k]![counts[k]!++] = y;
    });
  }
  return rows.map((r, k) => r.subarray(0, counts[k]!).sort());
}

/**
 * The stage's response at input `x`: nominal and spread (undefined for a stage without one).
 * @param x input value in the figure's unit (the lead, volts)
 */
export function responseAt(stage: Stage, x: number, seed: string, samples = RESPONSE_SAMPLES): ResponseSummary | undefined {
  const curve = stage.response;
  if (curve === undefined) return undefined;
  const sorted = outputs(stage, [x], samples, seed)[0]!;
  if (sorted.length === 0) return undefined; // no sample could be evaluated: nothing to report
  let mean = 0;
  for (const y of sorted) mean += y;
  mean /= Math.max(1, sorted.length);
  let m2 = 0;
  for (const y of sorted) m2 += (y - mean) ** 2;
  return {
    label: curve.label,
    input: curve.input,
    at: x,
    nominal: curve.evaluate(new Float64Array(stage.dimension), 0, x),
    samples,
    evaluated: sorted.length,
    mean,
    sigma: Math.sqrt(m2 / Math.max(1, sorted.length - 1)),
    quantiles: RESPONSE_LEVELS.map((p) => ({ p, value: exactQuantile(sorted, p) })),
    seed,
  };
}

/** The nominal curve and the percentile bands over the grid `xs` (figure units). */
export function responseEnvelope(stage: Stage, xs: readonly number[], seed: string, samples = RESPONSE_SAMPLES): ResponseEnvelope | undefined {
  const curve = stage.response;
  if (curve === undefined) return undefined;
  const zero = new Float64Array(stage.dimension);
  const sortedAt = outputs(stage, xs, samples, seed);
  if (sortedAt.some((s) => s.length === 0)) return undefined;
  return {
    label: curve.label,
    input: curve.input,
    x: [...xs],
    nominal: xs.map((x) => curve.evaluate(zero, 0, x)),
    bands: RESPONSE_LEVELS.map((p) => ({ p, values: sortedAt.map((s) => exactQuantile(s, p)) })),
    samples,
    seed,
  };
}
