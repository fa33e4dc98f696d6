/**
 * Sizing a pair for a target on the stage's figure (an offset, a current error): solve on the linearised model, then confirm on the exact
 * model (Monte Carlo for sigma and moderate yields, importance sampling for high-sigma yields)
 * and scale up a little until the confirmed figure meets the target with its interval.
 */
import { compileStage, formatQuantity, InputError, type Design, type InversionRegion, type Polarity, type Stage, MISMATCH_PARAMETERS, specLimit, stageDefinition } from '@twinfet/core';
import { areaSplit, equalScalingFamily, optimalSplitFamily, type AreaSplit } from './areaSplit.js';
import { normalQuantile, sigmaLevel } from '../stats/normal.js';
import { figureLaw } from '../analyses/linearisedLaw.js';
import { createExecutor, defaultWorkers, type Executor } from '../engine/pool.js';
import { checkVary, DEFAULT_MIN_DIMENSION_M, pairOf, sizableBlocks, singlePairFamily, splitVary, type SizeVary, type SizingFamily } from './resize.js';
import { seedText } from '../random/seed.js';
import { simulate } from '../analyses/simulate.js';
import { limitingTerm, solveLinearised, type LinearisedFloor, type LinearisedSolution } from './sizeLinearised.js';
import { estimateHighSigma } from '../analyses/highSigma.js';
import { largestSigma, limitingStage } from '../analyses/worstCondition.js';
import { allowedFailure, chipYieldFromFailure } from '../stats/yield.js';

/** What the sized design must achieve. */
export type SizeTarget =
  /** Sigma of the figure at most `sigma`, in the figure's unit (volts for an offset, a fraction for a current error). */
  | { readonly kind: 'sigma'; readonly sigma: number }
  /** Instance yield P(|Vos| <= spec) at least `yield`. */
  | { readonly kind: 'yield'; readonly yield: number }
  /** Chip yield over spec.instances instances at least `chipYield`. */
  | { readonly kind: 'chip-yield'; readonly chipYield: number };

/** Options of `sizeDesign`. */
export interface SizeOptions {
  readonly target: SizeTarget;
  /** What may change (default `input.w`). */
  readonly vary?: SizeVary;
  /** Limit of the figure for yields, in its unit (default: the design's spec). */
  readonly spec?: number;
  /** Monte Carlo samples per confirmation of a sigma target (default 200000); yields use at least 384/p. */
  readonly samples?: number;
  readonly seed?: string | number;
  readonly workers?: number;
  /** An executor to reuse (the caller closes it). */
  readonly executor?: Executor;
  /** Confidence level of every interval (default 0.95). */
  readonly confidence?: number;
  /** Confirmations after the first before giving up (default 8). */
  readonly maxRefinements?: number;
  readonly signal?: AbortSignal;
}

/** Failure probabilities below this are confirmed by importance sampling (plain Monte Carlo would need > ~4e6 samples). */
export const IMPORTANCE_BELOW = 1e-4;
/** Default Monte Carlo samples per confirmation of a sigma target (interval about +-0.3% at 95%). */
export const SIZE_SAMPLES = 200_000;
/** Relative half-width aimed for when confirming a yield by Monte Carlo: N = z^2 / (h^2 p). */
export const YIELD_RELATIVE_HALF_WIDTH = 0.1;
/** Relative half-width of the importance-sampling confirmation. */
export const TAIL_RELATIVE_HALF_WIDTH = 0.05;
/** Largest Monte Carlo confirmation of a yield. */
export const MAX_CONFIRM_SAMPLES = 2e7;

/** One block's geometry and operating point, SI units (MOS figures null for resistors). */
export interface PairSizing {
  readonly role: string;
  readonly polarity: Polarity | null;
  /** W and L, m. */
  readonly w: number;
  readonly l: number;
  /** Gate (or resistor body) area W L of one element, m^2. */
  readonly gateArea: number;
  readonly ic: number | null;
  readonly region: InversionRegion | null;
  /** gm/I_D, 1/V. */
  readonly gmOverId: number | null;
  /** Cox W L of one device, F, or null when the process gives no cox. */
  readonly gateCapacitance: number | null;
}

/** A design point of the sizing: geometry, operating point and linearised figures. */
export interface SizedPoint {
  /** Position along the family (area factor, or total area in m^2 for `both`). */
  readonly scale: number;
  readonly pairs: readonly PairSizing[];
  /** Linearised sigma of the figure (offset, lead), volts. */
  readonly sigmaLinearised: number;
  /** Gate area of the varied devices (every device of each varied block), m^2. */
  readonly variedArea: number;
  /** Gate area of every device of the stage, m^2. */
  readonly totalGateArea: number;
  /**
   * Linearised instance failure at the spec: Gaussian, 2 Phi(-spec / sigma) (one-sided
   * Phi(-spec / sigma)), or the stage's own law (a selector's: Bechhofer's).
   */
  readonly gaussianFailure: number;
  /** Cox W L of one input device (the capacitance each input sees), F; null without process cox. */
  readonly inputCapacitance: number | null;
  /** With conditions: the condition of largest linearised sigma, whose figures these are; else null. */
  readonly condition: string | null;
}

/** One confirmation on the exact model. */
export interface Confirmation {
  readonly method: 'monte-carlo' | 'importance-sampling';
  readonly seed: string;
  readonly samples: number;
  readonly point: SizedPoint;
  /** Monte Carlo offset sigma and its interval (Bonett 2006, allowing for non-Gaussian offsets), volts (null for importance sampling). */
  readonly sigma: number | null;
  readonly sigmaInterval: readonly [number, number] | null;
  /** Instance failure probability at the spec and its interval. */
  readonly failure: number;
  readonly failureInterval: readonly [number, number];
  /** Chip yield over spec.instances, and its interval. */
  readonly chipYield: number;
  readonly chipYieldInterval: readonly [number, number];
  /** Whether the figure meets the target by the stated rule. */
  readonly met: boolean;
  /**
   * With conditions: the condition that limits the confirmed figure (largest sigma for a sigma
   * target, lowest yield or largest failure for a yield target); else null.
   */
  readonly condition: string | null;
}

/** The result of `sizeDesign`. */
export interface SizeReport {
  readonly vary: SizeVary;
  readonly target: SizeTarget & {
    /** The linearised sigma that meets the target (the sigma itself, or spec / sigma level), volts. */
    readonly sigmaEquivalent: number;
    /** Allowed instance failure probability (yield targets), else null. */
    readonly allowedFailure: number | null;
  };
  /** The acceptance rule applied to the confirmed figure, in words. */
  readonly rule: string;
  /** |Vos| limit used for yields, volts, and instances per chip. */
  readonly spec: number;
  readonly instances: number;
  readonly confidence: number;
  readonly original: SizedPoint;
  /** The linearised solution (before any refinement on the exact model). */
  readonly linearised: SizedPoint & { readonly atMinimum: boolean };
  /** The sized design's figures. */
  readonly result: SizedPoint;
  /** The final confirmation (met) and every confirmation in order. */
  readonly confirmed: Confirmation;
  readonly confirmations: readonly Confirmation[];
  /** Kinget's rule: area x sigma^2 is constant when V_T dominates. Areas in m^2. */
  readonly areaCost: {
    readonly sigmaOriginal: number;
    readonly sigmaTarget: number;
    readonly originalArea: number;
    /** originalArea x (sigmaOriginal / sigmaTarget)^2. */
    readonly ruleArea: number;
    readonly resultArea: number;
    /** resultArea / ruleArea. */
    readonly ratio: number;
  };
  /** For `both`: the optimum split against scaling every sizable block by one factor (linearised solutions). */
  readonly split: null | {
    readonly inputCoefficient: number;
    readonly loadCoefficient: number;
    readonly inputShare: number;
    /** Per-device gate areas a_in + a_load, m^2, at the optimum and with equal scaling. */
    readonly optimum: { readonly input: number; readonly load: number; readonly total: number };
    readonly equal: { readonly input: number; readonly load: number; readonly total: number; readonly factor: number };
    /** 1 - optimum.total / equal.total. */
    readonly saving: number;
    /** Every sizable block: its coefficient C_k, optimum share and per-element areas, m^2. */
    readonly blocks: readonly { readonly block: string; readonly coefficient: number; readonly share: number; readonly optimum: number; readonly equal: number }[];
  };
  /** The sized design, SI units. */
  readonly design: Design;
  readonly notes: readonly string[];
  readonly warnings: readonly string[];
}

/** The block summary of `role` in a compiled stage. */
function pairSizing(stage: Stage, role: string): PairSizing {
  const op = stage.operatingPoint.find((o) => o.role === role);
  if (op === undefined) {
    const r = stage.resistors?.find((x) => x.role === role);
    if (r === undefined) throw new Error(`internal: no ${role} element`);
    return { role, polarity: null, w: r.w, l: r.l, gateArea: r.area, ic: null, region: null, gmOverId: null, gateCapacitance: null };
  }
  return {
    role,
    polarity: op.polarity,
    w: op.w,
    l: op.l,
    gateArea: op.gateArea,
    ic: op.ic,
    region: op.region,
    gmOverId: op.gmOverId,
    gateCapacitance: op.gateCapacitance ?? null,
  };
}

function variedRoles(design: Design, vary: SizeVary): string[] {
  return vary === 'both' ? sizableBlocks(design).map((b) => b.key) : [splitVary(vary).role];
}

/**
 * The linearised failure at `spec` for a figure of linearised `sigma`, by the figure's law
 * (Gaussian two- or one-sided, or the stage's own); the law is written in the scale
 * sigma / law.sigma.
 */
function gaussianFailure(design: Design, spec: number, sigma: number): number {
  const law = figureLaw(compileStage(design));
  return law.failure((spec * law.sigma) / sigma);
}

/** The linearised figure sigma whose failure at `spec` is p (the inverse of gaussianFailure). */
function sigmaForFailure(design: Design, spec: number, p: number): number {
  const law = figureLaw(compileStage(design));
  return (spec * law.sigma) / law.level(p);
}

/** Geometry, operating point and linearised figures of a design. */
export function sizedPoint(design: Design, vary: SizeVary, scale: number, spec: number): SizedPoint {
  const limiting = limitingStage(design);
  const stage = limiting.stage;
  const roles = sizableBlocks(design).map((b) => b.key);
  const pairs = roles.map((r) => pairSizing(stage, r));
  const sigma = limiting.sigma;
  // Elements per block, counted from the stage's variables (a selector's cells come from `cells`).
  const count = (r: string): number => new Set(stage.variables.filter((v) => v.role === r).map((v) => v.device)).size;
  const areaOf = (r: string): number => count(r) * (pairs.find((p) => p.role === r)?.gateArea ?? 0);
  return {
    scale,
    pairs,
    sigmaLinearised: sigma,
    variedArea: variedRoles(design, vary).reduce((a, r) => a + areaOf(r), 0),
    totalGateArea: roles.reduce((a, r) => a + areaOf(r), 0),
    gaussianFailure: gaussianFailure(design, spec, sigma),
    inputCapacitance: pairs[0]!.gateCapacitance,
    condition: limiting.condition,
  };
}

/** A value of the design's figure in messages: an offset in mV, a dimensionless figure in %. */
function figureValue(design: Design, x: number): string {
  const unit = stageDefinition(design.topology).figure.unit;
  if (unit === 'V') return `${Number((x * 1e3).toPrecision(4))} mV`;
  return unit === '' ? `${Number((x * 100).toPrecision(4))} %` : formatQuantity(x, unit, 4);
}

/**
 * The words for a budget term: block, parameter and the first-order coefficient in front of it
 * (the block's own words where its definition gives them, else the differential stages' forms).
 */
function termName(design: Design, role: string, parameter: string): string {
  const label = MISMATCH_PARAMETERS[parameter as keyof typeof MISMATCH_PARAMETERS]?.label ?? parameter;
  const block = stageDefinition(design.topology).blocks.find((b) => b.key === role);
  const coefficient =
    role === 'input'
      ? { vt: 'A_VT/sqrt(WL)', beta: '(I_D/gm) A_beta/sqrt(WL)', r: '(I_D/gm) A_R/sqrt(WL)' }
      : { vt: `(gm_${role}/gm_in) A_VT/sqrt(WL_${role})`, beta: `(I_D/gm_in) A_beta/sqrt(WL_${role})`, r: `(I_D/gm_in) A_R/sqrt(WL_${role})` };
  const words = block?.terms?.[parameter as keyof typeof coefficient] ?? coefficient[parameter as keyof typeof coefficient] ?? '';
  return `the ${role} ${block?.elements.length === 1 ? 'device' : 'pair'} ${label} term ${words}`.trimEnd();
}

/** Why the limiting term does not fall further along this family, in words. */
function floorReason(vary: SizeVary, f: LinearisedFloor, family: SizingFamily): string {
  const term = f.limiting;
  const design = family.at(family.range[0]);
  const name = `${termName(design, term.role, term.parameter)} (${(term.share * 100).toFixed(0)}% of sigma^2 there)`;
  const varied = variedRoles(design, vary).includes(term.role);
  // The input-referred offset divides every other block's term by gm_in, which the reasons
  // below rely on; another figure gets the reasons that hold for any first-order sum.
  const inputReferred = stageDefinition(design.topology).figure.name === 'offset';
  if (!varied) {
    const fix = `vary ${term.role}.area${sizableBlocks(design).length > 1 ? ' or both' : ''}`;
    let why: string;
    if (!inputReferred) why = `which varying ${vary} does not bring down far enough`;
    else if (vary === 'input.w') why = 'which widening the input pair lowers only until its gm/I_D saturates in weak inversion';
    else if (vary === 'input.l') why = 'which grows as the input pair is lengthened (gm_in falls at fixed bias)';
    else if (vary === 'input.area') why = 'which sizing the input pair at fixed W/L does not change';
    else why = `which sizing the ${splitVary(vary).role} does not change`;
    return `set by ${name}, ${why}; ${fix}`;
  }
  if (inputReferred && vary.endsWith('.l') && term.parameter === 'beta') {
    return `set by ${name}, which stops falling as L grows at fixed W and bias (I_D/gm rises as sqrt(L) in strong inversion); vary ${term.role}.w or ${term.role}.area`;
  }
  if (f.atMaximum) return `set by ${name} at the largest size searched (${family.limitText})`;
  return `set by ${name}; further along ${vary} sigma rises again at fixed bias; vary ${term.role}.area`;
}

/** The refusal for a target below the family's floor. */
function unreachable(option: string, targetText: string, vary: SizeVary, f: LinearisedFloor, family: SizingFamily, spec: number, yieldTarget: boolean): InputError {
  const design = family.at(family.range[0]);
  const v = (x: number): string => figureValue(design, x);
  const best = yieldTarget
    ? `the best instance yield is ${(1 - gaussianFailure(design, spec, f.floor.sigma)).toPrecision(6)} (lowest linearised sigma ${v(f.floor.sigma)} at spec ${v(spec)})`
    : `the lowest linearised sigma is ${v(f.floor.sigma)}`;
  return new InputError(option, `${targetText} cannot be met by varying ${vary}: ${best}, ${floorReason(vary, f, family)}`);
}

interface Plan {
  readonly option: string;
  readonly targetText: string;
  readonly sigmaTarget: number;
  readonly allowed: number | null;
  readonly method: 'monte-carlo' | 'importance-sampling';
  readonly samples: number;
  readonly rule: string;
}

function plan(design: Design, o: SizeOptions, spec: number, confidence: number): Plan {
  const t = o.target;
  const c = `${Math.round(confidence * 1000) / 10}%`;
  const z = normalQuantile(1 - (1 - confidence) / 2);
  if (t.kind === 'sigma') {
    const fig = stageDefinition(design.topology).figure;
    if (!(t.sigma > 0 && Number.isFinite(t.sigma))) throw new InputError('sigma', `expected a positive ${fig.label} sigma (${fig.unit === '' ? 'a fraction' : fig.unit}), got ${String(t.sigma)}`);
    return {
      option: 'sigma',
      targetText: `${fig.label} sigma ${figureValue(design, t.sigma)}`,
      sigmaTarget: t.sigma,
      allowed: null,
      method: 'monte-carlo',
      samples: o.samples ?? SIZE_SAMPLES,
      rule: `upper end of the ${c} Bonett interval of the Monte Carlo sigma <= target`,
    };
  }
  const instances = design.spec.instances;
  let p: number;
  let option: string;
  let targetText: string;
  if (t.kind === 'yield') {
    if (!(t.yield > 0 && t.yield < 1)) throw new InputError('yield', `expected a yield strictly between 0 and 1 such as 0.999, got ${String(t.yield)}`);
    p = 1 - t.yield;
    option = 'yield';
    targetText = `instance yield ${t.yield}`;
  } else {
    if (!(t.chipYield > 0 && t.chipYield < 1)) throw new InputError('chip-yield', `expected a chip yield strictly between 0 and 1 such as 0.99, got ${String(t.chipYield)}`);
    p = allowedFailure(t.chipYield, instances);
    option = 'chip-yield';
    targetText = `chip yield ${t.chipYield} over ${instances} instance${instances === 1 ? '' : 's'}`;
  }
  if (!(p > 0)) throw new InputError(option, `${targetText} allows a failure probability below double precision; give a lower target`);
  const sigmaTarget = sigmaForFailure(design, spec, p);
  if (p >= IMPORTANCE_BELOW) {
    const n = Math.ceil((z * z) / (YIELD_RELATIVE_HALF_WIDTH ** 2 * p));
    return {
      option,
      targetText,
      sigmaTarget,
      allowed: p,
      method: 'monte-carlo',
      samples: Math.min(MAX_CONFIRM_SAMPLES, Math.max(o.samples ?? SIZE_SAMPLES, n)),
      rule: `upper end of the ${c} Clopper-Pearson interval of the Monte Carlo failure probability <= allowed failure ${p.toPrecision(4)}`,
    };
  }
  return {
    option,
    targetText,
    sigmaTarget,
    allowed: p,
    method: 'importance-sampling',
    samples: 0,
    rule: `upper end of the ${c} interval of the importance-sampling failure probability <= allowed failure ${p.toPrecision(4)}`,
  };
}

/**
 * Sizes the design for a target on its figure (see the module comment), keeping the bias.
 * @throws InputError naming the target when it cannot be met, or a bad option
 * @example
 * const r = await sizeDesign(design, { target: { kind: 'sigma', sigma: 2e-3 }, vary: 'input.area' });
 * r.design.input.w // metres
 */
export async function sizeDesign(design: Design, options: SizeOptions): Promise<SizeReport> {
  design = compileStage(design).design; // validates at the edge, defaults filled in
  const vary = options.vary ?? 'input.w';
  checkVary(design, vary);
  const spec = options.spec ?? specLimit(design);
  if (!(spec > 0 && Number.isFinite(spec))) throw new InputError('spec', `expected a positive limit of the figure in its unit, got ${String(spec)}`);
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) throw new InputError('confidence', `expected a level strictly between 0 and 1 such as 0.95, got ${String(confidence)}`);
  const pl = plan(design, options, spec, confidence);
  const notes: string[] = [];

  const split = vary === 'both' ? areaSplit(design) : undefined;
  const family = split === undefined ? singlePairFamily(design, vary) : optimalSplitFamily(design, split);
  const lin = solveLinearised(family, pl.sigmaTarget);
  if (!lin.reached) throw unreachable(pl.option, pl.targetText, vary, lin, family, spec, pl.allowed !== null);
  if (lin.atMinimum) notes.push(`the target is met already at the smallest size allowed (linearised sigma ${figureValue(design, lin.sigma)}); the devices are set to that minimum`);

  const original = sizedPoint(design, vary, 1, spec);
  const linearised = { ...sizedPoint(lin.design, vary, lin.t, spec), atMinimum: lin.atMinimum };
  const { confirmations, current } = await confirmAlong(family, lin, { vary, spec, pl, confidence, seed: seedText(options.seed), options });
  const confirmed = confirmations[confirmations.length - 1]!;
  const conditionCount = design.conditions?.length ?? 0;
  if (conditionCount > 0) {
    const what = pl.allowed === null ? 'the largest sigma over the conditions' : 'the all-conditions yield (an instance passes only if it passes at every condition)';
    notes.push(`sized for ${what} at ${conditionCount} condition${conditionCount === 1 ? '' : 's'}; ${confirmed.condition ?? 'none'} limits it on the exact model, ${linearisedLimit(current.design)} on the linearised one`);
  }
  if (confirmations.length > 1) {
    notes.push(`the linearised solution was scaled up ${confirmations.length - 1} time(s) until the exact-model figure met the target with its interval`);
  }
  const result = confirmed.point;
  const sigmaOriginal = original.sigmaLinearised;
  const ruleArea = original.variedArea * (sigmaOriginal / pl.sigmaTarget) ** 2;
  const areaCost = { sigmaOriginal, sigmaTarget: pl.sigmaTarget, originalArea: original.variedArea, ruleArea, resultArea: result.variedArea, ratio: result.variedArea / ruleArea };
  notes.push(...sizingNotes(design, current.design, vary));
  const splitReport = split === undefined ? null : splitComparison(design, split, lin, pl.sigmaTarget, notes);

  return {
    vary,
    target: { ...options.target, sigmaEquivalent: pl.sigmaTarget, allowedFailure: pl.allowed },
    rule: pl.rule,
    spec,
    instances: design.spec.instances,
    confidence,
    original,
    linearised,
    result,
    confirmed,
    confirmations,
    areaCost,
    split: splitReport,
    design: current.design,
    notes,
    warnings: [...compileStage(current.design).warnings],
  };
}

/**
 * Confirms the linearised solution on the exact model, each time on a stream of its own, and
 * scales it up along the family until the confirmed figure meets the target with its interval.
 * @throws InputError on the target's option when it cannot be confirmed
 */
async function confirmAlong(
  family: SizingFamily,
  lin: LinearisedSolution,
  c: { readonly vary: SizeVary; readonly spec: number; readonly pl: Plan; readonly confidence: number; readonly seed: string; readonly options: SizeOptions },
): Promise<{ confirmations: Confirmation[]; current: LinearisedSolution }> {
  const { vary, spec, pl, confidence, seed, options } = c;
  const maxRefinements = options.maxRefinements ?? 8;
  const executor = options.executor ?? createExecutor(options.workers ?? defaultWorkers());
  const confirmations: Confirmation[] = [];
  let current = lin;
  try {
    for (let i = 0; ; i++) {
      const s = i === 0 ? seed : `${seed}/refine-${i}`;
      const conf = await confirm(current, vary, spec, pl, s, confidence, executor, options.signal);
      confirmations.push(conf);
      if (conf.met) return { confirmations, current };
      if (i >= maxRefinements) {
        throw new InputError(pl.option, `${pl.targetText} was not confirmed on the exact model after ${i + 1} confirmations (last: ${describeFigure(conf, lin.design)}); use more samples or relax the target`);
      }
      const next = refine(family, current, conf, pl);
      if (!next.reached) {
        throw new InputError(pl.option, `${pl.targetText} cannot be confirmed by varying ${vary}: the exact model needs a lower linearised sigma than ${figureValue(lin.design, next.floor.sigma)}, the lowest reachable, ${floorReason(vary, next, family)}`);
      }
      current = next;
    }
  } finally {
    if (options.executor === undefined) await executor.close();
  }
}

/** What the reader of a sizing report should know about how the sized design was reached. */
function sizingNotes(design: Design, sized: Design, vary: SizeVary): string[] {
  const notes: string[] = [];
  if (vary !== 'both' && sizableBlocks(design).length > 1) {
    const others = sizableBlocks(design).filter((b) => !variedRoles(design, vary).includes(b.key));
    const keep = others.length === 1 && others[0]!.elements.length === 2 ? 'the other pair keeps its part' : `the ${others.map((b) => b.key).join(' and ')} keep${others.length === 1 ? 's its' : ' their'} part`;
    notes.push(`the area rule assumes all of sigma^2 scales with the varied area; here ${keep}, so more area is needed than the rule says`);
  }
  if (vary.endsWith('.w') || vary.endsWith('.l')) {
    notes.push(`changing only ${vary.endsWith('.w') ? 'W' : 'L'} at fixed bias moves the inversion coefficient and gm/I_D, so the dbeta/beta and load terms change too`);
  }
  for (const role of variedRoles(design, vary)) {
    const before = pairOf(design, role);
    const after = pairOf(sized, role);
    const proc = before.polarity === undefined ? undefined : design.process[before.polarity];
    if ((after.w < before.w || after.l < before.l) && proc?.minW === undefined && proc?.minL === undefined) {
      const where = before.polarity === undefined ? 'the design gives no smallest size for resistor bodies' : `process.${before.polarity} gives no min_w/min_l`;
      notes.push(`${where}, so the ${role} pair was not made smaller than ${formatQuantity(DEFAULT_MIN_DIMENSION_M, 'm')} in W or L${before.polarity === undefined ? '' : '; add them for your process'}`);
    }
  }
  notes.push(`sized dimensions are rounded up to 4 significant digits${vary.endsWith('.area') || vary === 'both' ? ' (W/L kept to that rounding)' : ''}`);
  return notes;
}

/** For `both`: the optimum split's areas against scaling every block by one factor (linearised). */
function splitComparison(design: Design, split: AreaSplit, lin: LinearisedSolution, sigmaTarget: number, notes: string[]): SizeReport['split'] {
  const eq = solveLinearised(equalScalingFamily(design), sigmaTarget);
  if (!eq.reached) {
    const n = split.blocks.length;
    notes.push(`scaling ${n === 2 ? 'both pairs' : `all ${n} blocks`} by one factor cannot reach the target within the allowed sizes, so there is no equal-scaling comparison`);
    return null;
  }
  const blocks = split.blocks;
  const perDevice = (d: Design): Record<string, number> =>
    Object.fromEntries(
      blocks.map((b) => {
        const g = pairOf(d, b);
        return [b, g.w * g.l];
      }),
    );
  const total = (a: Record<string, number>): number => blocks.reduce((acc, b) => acc + a[b]!, 0);
  const opt = perDevice(lin.design);
  const e = perDevice(eq.design);
  return {
    inputCoefficient: split.inputCoefficient,
    loadCoefficient: split.loadCoefficient,
    inputShare: split.inputShare,
    optimum: { input: opt['input']!, load: opt['load'] ?? 0, total: total(opt) },
    equal: { input: e['input']!, load: e['load'] ?? 0, total: total(e), factor: eq.t },
    saving: 1 - total(opt) / total(e),
    blocks: blocks.map((b, k) => ({ block: b, coefficient: split.coefficients[k]!, share: split.shares[k]!, optimum: opt[b]!, equal: e[b]! })),
  };
}

/** The condition of largest linearised sigma, in words. */
function linearisedLimit(design: Design): string {
  const l = limitingStage(design);
  return `${l.condition ?? 'the design'} (linearised sigma ${figureValue(design, l.sigma)})`;
}

function describeFigure(c: Confirmation, design: Design): string {
  const v = (x: number): string => figureValue(design, x);
  if (c.sigma !== null && c.sigmaInterval !== null && c.method === 'monte-carlo') {
    return `sigma ${v(c.sigma)} [${v(c.sigmaInterval[0])}, ${v(c.sigmaInterval[1])}], failure ${c.failure.toPrecision(3)} [${c.failureInterval[0].toPrecision(3)}, ${c.failureInterval[1].toPrecision(3)}]`;
  }
  return `failure ${c.failure.toPrecision(3)} [${c.failureInterval[0].toPrecision(3)}, ${c.failureInterval[1].toPrecision(3)}]`;
}

async function confirm(
  at: LinearisedSolution,
  vary: SizeVary,
  spec: number,
  pl: Plan,
  seed: string,
  confidence: number,
  executor: Executor,
  signal: AbortSignal | undefined,
): Promise<Confirmation> {
  const point = sizedPoint(at.design, vary, at.t, spec);
  const instances = at.design.spec.instances;
  const chip = (iv: readonly [number, number]): [number, number] => [chipYieldFromFailure(iv[1], instances), chipYieldFromFailure(iv[0], instances)];
  if (pl.method === 'monte-carlo') {
    const r = await simulate(at.design, {
      samples: pl.samples,
      seed,
      confidence,
      executor,
      spec,
      keepOffsets: false,
      ...(signal === undefined ? {} : { signal }),
    });
    const fi = r.yield.failure.interval;
    // With conditions: the largest per-condition sigma, and the all-conditions failure.
    const big = largestSigma(r);
    const met = pl.allowed === null ? big.sigmaInterval[1] <= pl.sigmaTarget : fi[1] <= pl.allowed;
    return {
      method: 'monte-carlo',
      seed,
      samples: r.yield.evaluated ?? r.evaluated,
      point,
      sigma: big.sigma,
      sigmaInterval: big.sigmaInterval,
      condition: pl.allowed === null ? big.condition : (r.yield.worst ?? null),
      failure: r.yield.failure.estimate,
      failureInterval: fi,
      chipYield: chipYieldFromFailure(r.yield.failure.estimate, instances),
      chipYieldInterval: chip(fi),
      met,
    };
  }
  const r = await estimateHighSigma(at.design, {
    spec,
    seed,
    confidence,
    executor,
    relError: TAIL_RELATIVE_HALF_WIDTH,
    ...(signal === undefined ? {} : { signal }),
  });
  return {
    method: 'importance-sampling',
    seed,
    samples: r.samples,
    point,
    sigma: null,
    sigmaInterval: null,
    failure: r.failureProbability,
    failureInterval: r.interval,
    chipYield: chipYieldFromFailure(r.failureProbability, instances),
    chipYieldInterval: chip(r.interval),
    met: r.interval[1] <= pl.allowed!,
    condition: r.conditions === undefined ? null : [...r.conditions].sort((a, b) => b.failureProbability - a.failureProbability)[0]!.name,
  };
}

/**
 * The next, larger design after a confirmation that missed: the linearised sigma is lowered by
 * the ratio the exact model showed, with a margin of twice the interval's half-width so that the
 * next confirmation (an independent stream) passes with high probability.
 */
function refine(family: SizingFamily, at: LinearisedSolution, c: Confirmation, pl: Plan): LinearisedSolution | LinearisedFloor {
  let ratio: number;
  if (pl.allowed === null) {
    const s = c.sigma!;
    const h = (c.sigmaInterval![1] - s) / s;
    ratio = pl.sigmaTarget / (s * (1 + 2 * h));
  } else if (c.failure > 0) {
    // Effective sigma of the exact model: the Gaussian sigma with the same failure probability.
    const h = (c.failureInterval[1] - c.failure) / c.failure;
    const effective = 1 / sigmaLevel(c.failure);
    const wanted = 1 / sigmaLevel(pl.allowed / (1 + 2 * h));
    ratio = wanted / effective;
  } else ratio = 0.98;
  const target = Math.min(at.sigma * ratio, at.sigma * 0.999);
  const next = solveLinearised(family, target);
  if (!next.reached) return next;
  if (next.t <= at.t * 1.001) {
    // Rounding to 4 digits can leave the same design: step the scale up by at least 0.5%.
    const t = at.t * 1.005;
    if (t > family.range[1]) return { reached: false, floor: { t: at.t, design: at.design, sigma: at.sigma }, limiting: limitingTerm(at.design), atMaximum: true };
    const design = family.at(t);
    return { t, design, sigma: limitingStage(design).sigma, reached: true, atMinimum: false };
  }
  return next;
}
