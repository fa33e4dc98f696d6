/**
 * What it costs to do better: the input pair's gate area swept from a quarter to four times
 * today's (W/L kept, so the inversion level stays put), with the linearised sigma and chip
 * yield along it, Monte Carlo at five areas, the area that meets a chip-yield target, and for a
 * stage with a load the split of area between the pairs that meets the same target with the
 * least total.
 */
import { compileStage, InputError, validateDesign, type Design } from '@twinfet/core';
import {
  allowedFailure,
  areaSplit,
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

/** The least-area split between the input pair and the load for the sigma target. */
export interface AreaSplitStudy {
  /** Input share of the per-device area sum (one input plus one load device), today and at the optimum. */
  readonly todayShare: number;
  readonly optimumShare: number;
  /** Per-device area sums a_in + a_load that meet the target, m^2: at the optimum, and scaling both pairs by one factor. */
  readonly optimumTotal: number;
  readonly equalTotal: number;
  /** 1 - optimum / equal. */
  readonly saving: number;
  /** The total needed at each input share, m^2. */
  readonly curve: readonly { readonly share: number; readonly total: number }[];
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
  return { factor, inputArea: d.input.w * d.input.l, sigma: s.sigma, chipYield: s.gaussian.chipYield };
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
 * The least-total split (see the sizing module): sigma^2 = A / a_in + B / a_load, so the total
 * a_in + a_load meeting sigma_t at input share s is (A / s + B / (1 - s)) / sigma_t^2, least at
 * s = sqrt(A) / (sqrt(A) + sqrt(B)).
 */
function splitStudy(design: Design, sigmaTarget: number): AreaSplitStudy | null {
  const load = design.load;
  if (load === undefined) return null;
  const s = areaSplit(design);
  const A = s.inputCoefficient;
  const B = s.loadCoefficient;
  const t2 = sigmaTarget * sigmaTarget;
  const total = (share: number): number => (A / share + B / (1 - share)) / t2;
  const ai = design.input.w * design.input.l;
  const al = load.w * load.l;
  const todayShare = ai / (ai + al);
  const curve = Array.from({ length: 91 }, (_, i) => {
    const share = 0.05 + (0.9 * i) / 90;
    return { share, total: total(share) };
  });
  const optimumTotal = total(s.inputShare);
  const equalTotal = total(todayShare);
  return { todayShare, optimumShare: s.inputShare, optimumTotal, equalTotal, saving: 1 - optimumTotal / equalTotal, curve };
}
