/**
 * The hot loops of a chunk at the design's operating conditions: every block of draws goes
 * through each condition's compiled stage (the same draws, so one instance keeps its mismatch
 * at every condition), and the per-condition, all-conditions and drift statistics are gathered.
 * Plain typed-array loops; nothing here knows a stage type.
 */
import type { Stage } from '@twinfet/core';
import type { ConditionChunk, ConditionsPlan, ConditionsResult } from './messages.js';
import { addPairs, emptyCoMoments } from '../stats/comoments.js';
import { addToHistogram, createHistogram } from '../stats/histogram.js';
import { addBlock, emptyMoments } from '../stats/moments.js';

/** Gathers the conditions' statistics of one chunk, block by block. */
export interface ConditionsAccumulator {
  /** Adds the samples u[0 .. n*dim) (sample `start` of the chunk onwards). */
  add(u: Float64Array, n: number, start: number): void;
  result(): ConditionsResult;
}

/**
 * An accumulator for `count` samples in blocks of at most `block`. A sample fails at a
 * condition when its figure there is above `spec` or below `lowLimit` (-spec for a two-sided
 * figure, -Infinity for a one-sided one).
 */
export function createConditionsAccumulator(
  stages: readonly Stage[],
  plan: ConditionsPlan,
  count: number,
  block: number,
  spec: number,
  lowLimit: number,
): ConditionsAccumulator {
  const k = stages.length;
  const outs = stages.map(() => new Float64Array(block));
  const scratch = new Float64Array(block);
  const moments = stages.map(() => emptyMoments());
  const high = new Float64Array(k);
  const low = new Float64Array(k);
  const bad = new Float64Array(k);
  const failing = new Float64Array(k);
  const only = new Float64Array(k);
  const flags = new Int8Array(k);
  const figures = plan.keepFigures ? stages.map(() => new Float64Array(count)) : undefined;
  let evaluatedAll = 0;
  let failuresAll = 0;
  let failuresAllHigh = 0;
  let failuresAllLow = 0;

  const drift = plan.drift;
  const driftMoments = emptyMoments();
  const pairs = emptyCoMoments();
  const driftHistogram = drift === null ? undefined : createHistogram(drift.histogram.lo, drift.histogram.hi, drift.histogram.bins);
  const driftValues = drift !== null && drift.keep ? new Float64Array(count) : undefined;
  const dx = new Float64Array(block);
  const dy = new Float64Array(block);

  const add = (u: Float64Array, n: number, start: number): void => {
    for (let c = 0; c < k; c++) {
      const out = outs[c]!;
      const nan = stages[c]!.figures(u, n, out, 0);
      figures?.[c]!.set(out.subarray(0, n), start);
      // The same steps as the design's own figures in the chunk (compact, count, add), so a
      // condition equal to the design gives the same bits.
      let src = out;
      let m = n;
      if (nan > 0) {
        bad[c]! += nan;
        m = 0;
        for (let i = 0; i < n; i++) {
          const x = out[i]!;
          if (x === x) scratch[m++] = x;
        }
        src = scratch;
      }
      let h = 0;
      let l = 0;
      for (let i = 0; i < m; i++) {
        const x = src[i]!;
        if (x > spec) h++;
        else if (x < lowLimit) l++;
      }
      high[c]! += h;
      low[c]! += l;
      addBlock(moments[c]!, src, 0, m);
    }
    // All conditions: an instance passes only if it passes at every one.
    for (let i = 0; i < n; i++) {
      let finite = true;
      for (let c = 0; c < k; c++) {
        const x = outs[c]![i]!;
        if (x !== x) { finite = false; break; }
      }
      if (!finite) continue;
      evaluatedAll++;
      let fails = 0;
      let anyHigh = false;
      let anyLow = false;
      for (let c = 0; c < k; c++) {
        const x = outs[c]![i]!;
        const f = x > spec ? 1 : x < lowLimit ? -1 : 0;
        flags[c] = f;
        if (f !== 0) {
          fails++;
          if (f > 0) anyHigh = true;
          else anyLow = true;
        }
      }
      if (fails === 0) continue;
      failuresAll++;
      if (anyHigh) failuresAllHigh++;
      if (anyLow) failuresAllLow++;
      for (let c = 0; c < k; c++) {
        if (flags[c] === 0) continue;
        failing[c]! += 1;
        if (fails === 1) only[c]! += 1;
      }
    }
    if (drift !== null) {
      const a = outs[drift.from]!;
      const b = outs[drift.to]!;
      const inv = drift.inverseSpan;
      let m = 0;
      for (let i = 0; i < n; i++) {
        const xa = a[i]!;
        const d = (b[i]! - xa) * inv;
        if (driftValues !== undefined) driftValues[start + i] = d;
        if (d !== d) continue;
        dx[m] = xa;
        dy[m] = d;
        m++;
      }
      addBlock(driftMoments, dy, 0, m);
      addPairs(pairs, dx, dy, 0, m);
      addToHistogram(driftHistogram!, dy, 0, m);
    }
  };

  const result = (): ConditionsResult => {
    const perCondition: ConditionChunk[] = stages.map((_, c) => ({
      moments: moments[c]!,
      failuresHigh: high[c]!,
      failuresLow: low[c]!,
      nonConverged: bad[c]!,
      failing: failing[c]!,
      onlyFailing: only[c]!,
      ...(figures === undefined ? {} : { figures: figures[c]! }),
    }));
    return {
      perCondition,
      evaluatedAll,
      failuresAll,
      failuresAllHigh,
      failuresAllLow,
      ...(drift === null
        ? {}
        : { drift: { moments: driftMoments, pairs, histogram: driftHistogram!, ...(driftValues === undefined ? {} : { values: driftValues }) } }),
    };
  };
  return { add, result };
}

/** Weighted sums of one importance-sampling block under "fails at some condition". */
export interface UnionSums {
  sum: number;
  sumSquares: number;
  sumHigh: number;
  sumLow: number;
  hits: number;
  nonConverged: number;
}

const unionScratch: Float64Array[] = [];

/**
 * The block u[0 .. n*dim) through every condition's stage: a sample fails when it fails at one
 * condition at least; its weight is exp(logw[i] + logScale). Adds each condition's own weighted
 * failures to `byCondition` (and their squares to `byConditionSquares`). A sample with a non-converged figure at any condition is left out
 * (counted).
 */
export function unionBlock(
  stages: readonly Stage[],
  u: Float64Array,
  n: number,
  logw: Float64Array,
  logScale: number,
  spec: number,
  lowLimit: number,
  byCondition: number[],
  byConditionSquares: number[],
): UnionSums {
  const k = stages.length;
  for (let c = 0; c < k; c++) {
    if (unionScratch[c] === undefined || unionScratch[c]!.length < n) unionScratch[c] = new Float64Array(Math.max(n, 1024));
    stages[c]!.figures(u, n, unionScratch[c]!, 0);
  }
  const r: UnionSums = { sum: 0, sumSquares: 0, sumHigh: 0, sumLow: 0, hits: 0, nonConverged: 0 };
  for (let i = 0; i < n; i++) {
    let finite = true;
    let anyHigh = false;
    let anyLow = false;
    for (let c = 0; c < k; c++) {
      const x = unionScratch[c]![i]!;
      if (x !== x) { finite = false; break; }
      if (x > spec) anyHigh = true;
      else if (x < lowLimit) anyLow = true;
    }
    if (!finite) {
      r.nonConverged++;
      continue;
    }
    if (!anyHigh && !anyLow) continue;
    const w = Math.exp(logw[i]! + logScale);
    r.hits++;
    r.sum += w;
    r.sumSquares += w * w;
    if (anyHigh) r.sumHigh += w;
    if (anyLow) r.sumLow += w;
    for (let c = 0; c < k; c++) {
      const x = unionScratch[c]![i]!;
      if (x > spec || x < lowLimit) {
        byCondition[c]! += w;
        byConditionSquares[c]! += w * w;
      }
    }
  }
  return r;
}
