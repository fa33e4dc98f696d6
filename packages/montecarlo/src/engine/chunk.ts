// The compile entry alone: a worker needs no design-file reader (and so no YAML parser) to start.
import { compileConditions, compileStage } from '@twinfet/core/compile';
import type { Stage } from '@twinfet/core';
import type { ChunkResult, ImportanceResult, ImportanceTask, MirroredCentres, MonteCarloResult, MonteCarloTask, ChunkTask } from './messages.js';
import { addToHistogram, createHistogram } from '../stats/histogram.js';
import { addBlock, emptyMoments } from '../stats/moments.js';
import { createConditionsAccumulator, unionBlock } from './conditionsKernel.js';
import { chunkRng } from '../random/stream.js';
import { fillStandardNormals } from '../random/ziggurat.js';

/** Samples evaluated per inner block: the block's draws stay in cache. */
const BLOCK = 1024;

/**
 * Compiled stages by design, per thread: a stage holds only constants and scratch space, so
 * reusing it changes no result, and its hot functions stay warm across chunks.
 */
const stages = new Map<string, Stage>();
const STAGE_CACHE_LIMIT = 16;

function stageFor(design: ChunkTask['design']): Stage {
  const key = JSON.stringify(design);
  let stage = stages.get(key);
  if (stage === undefined) {
    stage = compileStage(design);
    if (stages.size >= STAGE_CACHE_LIMIT) stages.delete(stages.keys().next().value!);
    stages.set(key, stage);
  }
  return stage;
}

/** The design's stage at each of its conditions, cached per thread like the design's own stage. */
const conditionSets = new Map<string, readonly Stage[]>();

export function conditionStagesFor(design: ChunkTask['design']): readonly Stage[] {
  const key = JSON.stringify(design);
  let set = conditionSets.get(key);
  if (set === undefined) {
    set = compileConditions(design).map((c) => c.stage);
    if (conditionSets.size >= STAGE_CACHE_LIMIT) conditionSets.delete(conditionSets.keys().next().value!);
    conditionSets.set(key, set);
  }
  return set;
}

/** Runs one chunk of work. Pure: the result depends on the task only. */
export function runChunk(task: ChunkTask): ChunkResult {
  const stage = stageFor(task.design);
  return task.kind === 'montecarlo' ? monteCarloKernel(stage, task) : importanceKernel(stage, task);
}

function monteCarloKernel(stage: Stage, task: MonteCarloTask): MonteCarloResult {
  const dim = stage.dimension;
  const rng = chunkRng(task.seed, 'montecarlo', task.chunk);
  const histogram = createHistogram(task.histogram.lo, task.histogram.hi, task.histogram.bins);
  const spec = task.spec;
  // A two-sided figure fails beyond +-spec; a one-sided one only above +spec.
  const lowLimit = stage.definition.figure.sided === 'two' ? -spec : -Infinity;
  const offsets = task.keepOffsets ? new Float64Array(task.count) : undefined;
  const draws = task.keepDraws ? new Float64Array(task.count * dim) : undefined;
  const blockDraws = new Float64Array(BLOCK * dim);
  const blockOut = new Float64Array(BLOCK);
  const moments = emptyMoments();
  // Failures above +spec and below the low limit, summed over the blocks.
  const failures = new Float64Array(2);
  let nonConverged = 0;
  const atConditions =
    task.conditions === undefined ? undefined : createConditionsAccumulator(conditionStagesFor(task.design), task.conditions, task.count, BLOCK, spec, lowLimit);
  for (let start = 0; start < task.count; start += BLOCK) {
    const n = Math.min(BLOCK, task.count - start);
    const u = draws === undefined ? blockDraws : draws.subarray(start * dim, (start + n) * dim);
    fillStandardNormals(rng, u, 0, n * dim);
    // The same draws at every condition, before the design's own figures are compacted below.
    atConditions?.add(u, n, start);
    const bad = stage.figures(u, n, blockOut, 0);
    // Kept offsets hold NaN where a solve failed, so rows stay aligned with the draws.
    if (offsets !== undefined) offsets.set(blockOut.subarray(0, n), start);
    // The converged values compacted to the front; the NaNs are counted, never averaged.
    nonConverged += bad;
    const m = bad > 0 ? compactNumbers(blockOut, n) : n;
    // spec > 0 >= lowLimit: a value is at most one of the two.
    countFailures(blockOut, m, spec, lowLimit, failures);
    addBlock(moments, blockOut, 0, m);
    addToHistogram(histogram, blockOut, 0, m);
  }
  return {
    kind: 'montecarlo',
    chunk: task.chunk,
    count: task.count,
    moments,
    histogram,
    failuresHigh: failures[0]!,
    failuresLow: failures[1]!,
    nonConverged,
    ...(offsets === undefined ? {} : { offsets }),
    ...(draws === undefined ? {} : { draws }),
    ...(atConditions === undefined ? {} : { conditions: atConditions.result() }),
  };
}

// The per-sample loops of a block are functions of their own, outside the kernel's block loop:
// each is optimised after a few blocks, whereas a loop inside the kernel, which runs once per
// chunk, waits for on-stack replacement in every fresh chunk and falls back to the interpreter
// where the kernel meets code it has not seen yet (its end, at the first chunks).

/** Moves the numbers of values[0..n) to the front, in order, dropping NaNs; returns how many. */
function compactNumbers(values: Float64Array, n: number): number {
  let m = 0;
  for (let i = 0; i < n; i++) {
    const x = values[i]!;
    if (x === x) values[m++] = x;
  }
  return m;
}

/**
 * Adds to into[0] how many of values[0..n) are above `high` and to into[1] how many are below
 * `low`, in one pass (a pass per limit took 1.7 ns a value against 1.3, best of 300 rounds of
 * 1024 offsets of which a few are beyond the limits).
 */
function countFailures(values: Float64Array, n: number, high: number, low: number, into: Float64Array): void {
  let above = 0;
  let below = 0;
  for (let i = 0; i < n; i++) {
    const x = values[i]!;
    if (x > high) above++;
    if (x < low) below++;
  }
  into[0]! += above;
  into[1]! += below;
}

/**
 * The importance-sampling proposal: shifts the standard-normal draw of one sample in place to a
 * centre picked at random, and returns log w, w = phi(u) / q(u) with
 * q = (1/k) sum_c phi(u - mu_c): log w = log k - logsumexp_c(mu_c . u - |mu_c|^2 / 2).
 */
type Proposal = (rng: ReturnType<typeof chunkRng>, u: Float64Array, base: number) => number;

/** Explicit centres: O(k x dimension) per sample. */
function explicitMixture(shiftList: ImportanceTask['shifts'], dim: number): Proposal {
  const k = shiftList.length;
  const shifts = new Float64Array(k * dim);
  const halfNorms = new Float64Array(k);
  shiftList.forEach((s, c) => {
    let q = 0;
    for (let j = 0; j < dim; j++) {
      shifts[c * dim + j] = s[j]!;
      q += s[j]! * s[j]!;
    }
    halfNorms[c] = 0.5 * q;
  });
  const logK = Math.log(k);
  return (rng, u, base) => {
    const c = Math.min(k - 1, Math.floor(rng.double() * k));
    for (let j = 0; j < dim; j++) u[base + j]! += shifts[c * dim + j]!;
    let best = -Infinity;
    for (let cc = 0; cc < k; cc++) {
      let dot = 0;
      for (let j = 0; j < dim; j++) dot += shifts[cc * dim + j]! * u[base + j]!;
      const a = dot - halfNorms[cc]!;
      if (a > best) best = a;
    }
    let acc = 0;
    for (let cc = 0; cc < k; cc++) {
      let dot = 0;
      for (let j = 0; j < dim; j++) dot += shifts[cc * dim + j]! * u[base + j]!;
      acc += Math.exp(dot - halfNorms[cc]! - best);
    }
    return logK - best - Math.log(acc);
  };
}

/**
 * Mirror-image centres (FailureSymmetry): centre c (c = 1 .. G-1) is `fixed` on group 0, `own`
 * on group c and `rest` elsewhere, so mu_c . u = fixed . u_0 + rest . T + (own - rest) . u_c with
 * T the sum of groups 1 .. G-1, and every |mu_c| is the same: O(dimension) per sample.
 */
function mirroredMixture(m: MirroredCentres, dim: number): Proposal {
  const parts = mirroredParts(m, dim);
  return (rng, u, base) => {
    parts.shift(rng, u, base);
    return parts.logWeight(u, base);
  };
}

/** A mirrored mixture in two steps: shift a draw to one of its centres; log w of a shifted draw. */
interface MirroredParts {
  shift(rng: ReturnType<typeof chunkRng>, u: Float64Array, base: number): void;
  logWeight(u: Float64Array, base: number): number;
}

function mirroredParts(m: MirroredCentres, dim: number): MirroredParts {
  const w = m.groupSize;
  const groups = m.groups;
  if (groups * w !== dim) throw new Error(`internal: mirrored mixture of ${groups} groups of ${w} in ${dim} variables`);
  const k = groups - 1;
  const fixed = Float64Array.from(m.fixed);
  const own = Float64Array.from(m.own);
  const rest = Float64Array.from(m.rest);
  const diff = new Float64Array(w);
  let norm = 0;
  for (let i = 0; i < w; i++) {
    diff[i] = own[i]! - rest[i]!;
    norm += fixed[i]! * fixed[i]! + own[i]! * own[i]! + (groups - 2) * rest[i]! * rest[i]!;
  }
  const half = 0.5 * norm;
  const logK = Math.log(k);
  const total = new Float64Array(w);
  return {
    shift(rng, u, base) {
      const c = 1 + Math.min(k - 1, Math.floor(rng.double() * k));
      for (let i = 0; i < w; i++) u[base + i]! += fixed[i]!;
      for (let g = 1; g < groups; g++) {
        const src = g === c ? own : rest;
        const off = base + g * w;
        for (let i = 0; i < w; i++) u[off + i]! += src[i]!;
      }
    },
    logWeight(u, base) {
      let a = 0;
      total.fill(0);
      for (let i = 0; i < w; i++) a += fixed[i]! * u[base + i]!;
      let best = -Infinity;
      for (let g = 1; g < groups; g++) {
        const off = base + g * w;
        let b = 0;
        for (let i = 0; i < w; i++) {
          const x = u[off + i]!;
          total[i]! += x;
          b += diff[i]! * x;
        }
        if (b > best) best = b;
      }
      for (let i = 0; i < w; i++) a += rest[i]! * total[i]!;
      let acc = 0;
      for (let g = 1; g < groups; g++) {
        const off = base + g * w;
        let b = 0;
        for (let i = 0; i < w; i++) b += diff[i]! * u[off + i]!;
        acc += Math.exp(b - best);
      }
      return logK - (a - half + best) - Math.log(acc);
    },
  };
}

/**
 * The equal mixture of S mirrored mixtures (one per operating condition): pick a set, shift to
 * one of its centres; q / phi = (1/S) sum_s q_s / phi, so log w = log S - logsumexp_s(-log w_s).
 */
function mirroredSetsMixture(sets: readonly MirroredCentres[], dim: number): Proposal {
  const parts = sets.map((m) => mirroredParts(m, dim));
  const count = parts.length;
  const logS = Math.log(count);
  const minus = new Float64Array(count);
  return (rng, u, base) => {
    const s = Math.min(count - 1, Math.floor(rng.double() * count));
    parts[s]!.shift(rng, u, base);
    let best = -Infinity;
    for (let t = 0; t < count; t++) {
      const x = -parts[t]!.logWeight(u, base);
      minus[t] = x;
      if (x > best) best = x;
    }
    let acc = 0;
    for (let t = 0; t < count; t++) acc += Math.exp(minus[t]! - best);
    return logS - best - Math.log(acc);
  };
}

function importanceKernel(stage: Stage, task: ImportanceTask): ImportanceResult {
  const dim = stage.dimension;
  const rng = chunkRng(task.seed, 'importance', task.chunk);
  const propose =
    task.mirroredSets !== undefined
      ? mirroredSetsMixture(task.mirroredSets, dim)
      : task.mirrored === undefined
        ? explicitMixture(task.shifts, dim)
        : mirroredMixture(task.mirrored, dim);
  const logScale = task.logScale;
  const spec = task.spec;
  const lowLimit = stage.definition.figure.sided === 'two' ? -spec : -Infinity;
  const u = new Float64Array(BLOCK * dim);
  const out = new Float64Array(BLOCK);
  const union = task.union === true ? conditionStagesFor(task.design) : undefined;
  const logw = new Float64Array(BLOCK);
  let sum = 0;
  let sumSquares = 0;
  let sumHigh = 0;
  let sumLow = 0;
  let hits = 0;
  let nonConverged = 0;
  const byCondition = union === undefined ? undefined : new Array<number>(union.length).fill(0);
  const byConditionSquares = union === undefined ? undefined : new Array<number>(union.length).fill(0);
  for (let start = 0; start < task.count; start += BLOCK) {
    const n = Math.min(BLOCK, task.count - start);
    fillStandardNormals(rng, u, 0, n * dim);
    for (let i = 0; i < n; i++) logw[i] = propose(rng, u, i * dim);
    if (union !== undefined) {
      const r = unionBlock(union, u, n, logw, logScale, spec, lowLimit, byCondition!, byConditionSquares!);
      sum += r.sum;
      sumSquares += r.sumSquares;
      sumHigh += r.sumHigh;
      sumLow += r.sumLow;
      hits += r.hits;
      nonConverged += r.nonConverged;
      continue;
    }
    nonConverged += stage.figures(u, n, out, 0);
    for (let i = 0; i < n; i++) {
      const x = out[i]!;
      if (x !== x) continue;
      if (x > spec || x < lowLimit) {
        const w = Math.exp(logw[i]! + logScale);
        hits++;
        sum += w;
        sumSquares += w * w;
        if (x > spec) sumHigh += w;
        else sumLow += w;
      }
    }
  }
  return {
    kind: 'importance',
    chunk: task.chunk,
    count: task.count,
    sum,
    sumSquares,
    sumHigh,
    sumLow,
    hits,
    nonConverged,
    ...(byCondition === undefined || byConditionSquares === undefined ? {} : { byCondition, byConditionSquares }),
  };
}
