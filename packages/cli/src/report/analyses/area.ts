/**
 * What it costs to do better: the input pair's gate area swept from a quarter to four times
 * today's (W/L kept, so the inversion level stays put), with the linearised sigma and chip
 * yield along it, Monte Carlo at five areas, the area that meets a chip-yield target, and for a
 * stage with a load the split of area between the pairs that meets the same target with the
 * least total.
 */
import { compileStage, InputError, stageDefinition, validateDesign, type Design } from '@twinfet/core';
import {
  allowedFailure,
  areaSplit,
  linearisedEstimate,
  linearisedSummary,
  sigmaLevel,
  SWEEP_SAMPLES,
  sweepDesigns,
  type Executor,
} from '@twinfet/montecarlo';

/** Area factors of the swept range and of the Monte Carlo points. */
export const AREA_RANGE = [0.25, 4] as const;
export const MONTE_CARLO_FACTORS = [0.25, 0.5, 1, 2, 4] as const;
/** Points of the linearised curve across the range. */
const CURVE_POINTS = 49;
/** The search for the area meeting the target looks this far beyond today's area each way. */
const SEARCH_FACTOR = 1e4;

/** One point of the linearised curve. */
export interface AreaPoint {
  /** Area factor against today's input pair. */
  readonly factor: number;
  /** Gate area W L of one input device, m^2. */
  readonly inputArea: number;
  /** Linearised sigma of the figure, SI. */
  readonly sigma: number;
  /** Gaussian chip yield from the linearised sigma. */
  readonly chipYield: number;
}

/** One Monte Carlo point. */
export interface AreaMonteCarloPoint {
  readonly factor: number;
  readonly inputArea: number;
  readonly samples: number;
  readonly sigma: number;
  readonly sigmaInterval: readonly [number, number];
  readonly chipYield: number;
  readonly chipYieldInterval: readonly [number, number];
}

/** The chip-yield target and what it asks of sigma. */
export interface AreaTarget {
  readonly chipYield: number;
  readonly instances: number;
  /** Allowed failure per instance, 1 - Y^(1/M). */
  readonly allowedFailure: number;
  /** spec / sigma needed: the two-sided sigma level of the allowed failure. */
  readonly sigmaLevel: number;
  /** The sigma that meets the target, spec / sigmaLevel, SI. */
  readonly sigma: number;
}

/** Where the linearised curve meets the target. */
export type AreaMeets =
  | { readonly reached: true; readonly factor: number; readonly inputArea: number; readonly inRange: boolean }
  /** Not reached even at `atFactor` times today's input area, where sigma is still `floor`: the terms the input area does not reach (the load's) remain. */
  | { readonly reached: false; readonly floor: number; readonly atFactor: number };

/**
 * The least-area split of gate (and resistor body) area between the stage's sizable blocks for
 * the sigma target, against scaling every block by one factor from today's split.
 */
export interface AreaSplitStudy {
  /** The sizable blocks, the input first, with their labels. */
  readonly blocks: readonly { readonly key: string; readonly label: string }[];
  /** Each block's share of the per-element area sum (one element of each block), today and at the optimum. */
  readonly todayShares: readonly number[];
  readonly optimumShares: readonly number[];
  /** Per-element area sums that meet the target, m^2: at the optimum, and scaling every block by one factor. */
  readonly optimumTotal: number;
  readonly equalTotal: number;
  /** 1 - optimum / equal. */
  readonly saving: number;
  /** With two blocks, the total needed at each input share, m^2; null with more. */
  readonly curve: readonly { readonly share: number; readonly total: number }[] | null;
}

/** The whole area study. */
export interface AreaStudy {
  readonly target: AreaTarget;
  readonly today: AreaPoint;
  readonly curve: readonly AreaPoint[];
  readonly monteCarlo: readonly AreaMonteCarloPoint[];
  readonly meets: AreaMeets;
  /** Null for a stage without a load. */
  readonly split: AreaSplitStudy | null;
  /** Area factors of the range that are not valid designs, and why (empty when all are). */
  readonly refused: readonly string[];
}

/** The design with the input pair's gate area times `factor`, W/L kept. */
export function scaledInput(design: Design, factor: number): Design {
  const r = Math.sqrt(factor);
  return { ...design, input: { ...design.input, w: design.input.w * r, l: design.input.l * r } };
}

function point(design: Design, factor: number, spec: number): AreaPoint {
  const d = scaledInput(design, factor);
  const s = linearisedSummary(compileStage(d), spec);
  return { factor, inputArea: d.input.w * d.input.l, sigma: s.sigma, chipYield: linearisedEstimate(s).chipYield };
}

/** Factors of the range that validate, and the first refusal of those that do not. */
function validFactors(design: Design, factors: readonly number[], refused: string[]): number[] {
  return factors.filter((k) => {
    try {
      validateDesign(scaledInput(design, k));
      return true;
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      if (refused.length === 0) refused.push(`${k.toPrecision(3)}x today's area: ${e.message}`);
      return false;
    }
  });
}

/** Options of {@link studyArea}. */
export interface AreaOptions {
  readonly spec: number;
  readonly chipYield: number;
  readonly seed: string;
  readonly confidence: number;
  readonly executor: Executor;
  readonly signal?: AbortSignal;
}

/** Runs the area study. */
export async function studyArea(design: Design, o: AreaOptions): Promise<AreaStudy> {
  const instances = design.spec.instances;
  const p = allowedFailure(o.chipYield, instances);
  const k = sigmaLevel(p);
  const target: AreaTarget = { chipYield: o.chipYield, instances, allowedFailure: p, sigmaLevel: k, sigma: o.spec / k };
  const refused: string[] = [];
  const [lo, hi] = AREA_RANGE;
  const grid = Array.from({ length: CURVE_POINTS }, (_, i) => lo * (hi / lo) ** (i / (CURVE_POINTS - 1)));
  const curve = validFactors(design, grid, refused).map((f) => point(design, f, o.spec));
  const today = point(design, 1, o.spec);
  const mcFactors = validFactors(design, MONTE_CARLO_FACTORS, refused);
  const results = await sweepDesigns(
    mcFactors.map((f) => scaledInput(design, f)),
    { samples: SWEEP_SAMPLES, seed: o.seed, confidence: o.confidence, spec: o.spec, executor: o.executor, ...(o.signal === undefined ? {} : { signal: o.signal }) },
  );
  const monteCarlo = results.map((r, i) => {
    const f = mcFactors[i]!;
    const m = r.monteCarlo;
    return { factor: f, inputArea: today.inputArea * f, samples: m.samples, sigma: m.sigma, sigmaInterval: m.sigmaInterval, chipYield: m.chipYield, chipYieldInterval: m.chipYieldInterval };
  });
  return { target, today, curve, monteCarlo, meets: meetsTarget(design, o.spec, target.sigma, today.inputArea), split: splitStudy(design, target.sigma), refused };
}

/**
 * The smallest input area whose linearised sigma meets the target, by bisection in log area
 * (sigma falls with the input area at fixed W/L: every input term scales as 1/area, the load's
 * do not move).
 */
function meetsTarget(design: Design, spec: number, sigmaTarget: number, area0: number): AreaMeets {
  const sigmaAt = (f: number): number => point(design, f, spec).sigma;
  let a = 1 / SEARCH_FACTOR;
  let b = SEARCH_FACTOR;
  const valid = (f: number): boolean => validFactors(design, [f], []).length === 1;
  while (!valid(a) && a < 1) a *= 2;
  while (!valid(b) && b > 1) b /= 2;
  if (sigmaAt(b) > sigmaTarget) {
    return { reached: false, floor: sigmaAt(b), atFactor: b };
  }
  if (sigmaAt(a) <= sigmaTarget) return { reached: true, factor: a, inputArea: a * area0, inRange: a >= AREA_RANGE[0] };
  for (let i = 0; i < 200 && b / a > 1 + 1e-10; i++) {
    const m = Math.sqrt(a * b);
    if (sigmaAt(m) <= sigmaTarget) b = m;
    else a = m;
  }
  return { reached: true, factor: b, inputArea: b * area0, inRange: b >= AREA_RANGE[0] && b <= AREA_RANGE[1] };
}

/**
 * The least-total split (the sizing module's areaSplit): with W/L kept, sigma^2 = sum_k C_k / a_k,
 * so the least sum of a_k meeting sigma_t is (sum_k sqrt C_k)^2 / sigma_t^2 with a_k in
 * proportion to sqrt C_k, against (sum_k C_k / a_k0)(sum_k a_k0) / sigma_t^2 scaling every block
 * from today's a_k0 (Pelgrom 1989; Kinget, IEEE JSSC 40(6), 2005). With two blocks the total at
 * input share s is (C_in / s + C_other / (1 - s)) / sigma_t^2.
 */
function splitStudy(design: Design, sigmaTarget: number): AreaSplitStudy | null {
  const s = areaSplit(design);
  if (s.blocks.length < 2) return null;
  const labels = new Map(stageDefinition(design.topology).blocks.map((b) => [b.key, b.label]));
  const areas = s.blocks.map((k) => {
    const g = (k === 'input' ? design.input : design[k]) as { readonly w: number; readonly l: number };
    return g.w * g.l;
  });
  const sumAreas = areas.reduce((x, y) => x + y, 0);
  const t2 = sigmaTarget * sigmaTarget;
  const C = s.coefficients;
  const optimumTotal = C.map(Math.sqrt).reduce((x, y) => x + y, 0) ** 2 / t2;
  const equalTotal = (C.reduce((x, c, k) => x + c / areas[k]!, 0) * sumAreas) / t2;
  const curve =
    C.length === 2
      ? Array.from({ length: 91 }, (_, i) => {
          const share = 0.05 + (0.9 * i) / 90;
          return { share, total: (C[0]! / share + C[1]! / (1 - share)) / t2 };
        })
      : null;
  return {
    blocks: s.blocks.map((key) => ({ key, label: labels.get(key) ?? key })),
    todayShares: areas.map((a) => a / sumAreas),
    optimumShares: s.shares,
    optimumTotal,
    equalTotal,
    saving: 1 - optimumTotal / equalTotal,
    curve,
  };
}
