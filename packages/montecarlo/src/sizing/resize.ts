/**
 * Resizing one matched pair of a design: what `sizeDesign` may change, by how much, and the
 * one-parameter families of designs it searches over. Every size leaves the bias (tail current,
 * temperature) alone, so changing W or L alone moves the inversion coefficient and gm/I_D.
 */
import { InputError, lacksText, STAGES, stageDefinition, type BlockDefinition, type Design, type DeviceGeometry, type StageDefinition } from '@twinfet/core';

/**
 * What sizing may change: one dimension of one block (`input.w`, `load.l`), its gate or body
 * area at fixed W/L (`input.area`), or `both`: every sizable block at the optimum area split.
 */
export type SizeVary = string;

/** The variations a stage type accepts, in the order help texts list them. */
export function sizeVariations(def: StageDefinition): SizeVary[] {
  const blocks = def.blocks.filter((b) => b.sizable);
  const out = blocks.flatMap((b) => [`${b.key}.w`, `${b.key}.l`, `${b.key}.area`]);
  return blocks.length > 1 ? [...out, 'both'] : out;
}

/** Every variation some stage type accepts (input.w ... load.area, ..., both), for help texts. */
export const SIZE_VARIATIONS: readonly SizeVary[] = [...new Set(STAGES.flatMap(sizeVariations).filter((v) => v !== 'both')), 'both'];

/** The sizable blocks of a design's stage type. */
export function sizableBlocks(design: Design): BlockDefinition[] {
  return stageDefinition(design.topology).blocks.filter((b) => b.sizable);
}

/** Which dimension of a pair is scaled. */
export type SizeDimension = 'w' | 'l' | 'area';

/** Widest gate the search considers, m (1e4 um): a bound on the search, not a process limit (common practice, no source). */
export const MAX_WIDTH_M = 1e-2;
/** Longest gate the search considers, m (1000 um; common practice, no source). */
export const MAX_LENGTH_M = 1e-3;
/** Largest gate area per device the search considers, m^2 (1e6 um^2; common practice, no source). */
export const MAX_AREA_M2 = 1e-6;
/** Smallest W or L when the process gives no min_w/min_l, m (0.1 um; common practice, no source). */
export const DEFAULT_MIN_DIMENSION_M = 1e-7;
/** Sized dimensions are rounded up to this many significant digits, so files and reports agree exactly. */
export const SIZE_DIGITS = 4;

/**
 * `x` rounded up to `digits` significant decimal digits, returned as the double nearest that
 * decimal (the same double a design file holding the printed text parses to).
 * @example ceilSignificant(1.23401e-6, 4) // 1.235e-6
 */
export function ceilSignificant(x: number, digits: number = SIZE_DIGITS): number {
  if (!(x > 0 && Number.isFinite(x))) throw new RangeError(`ceilSignificant: x must be a positive finite number, got ${x}`);
  let e = Math.floor(Math.log10(x)) - digits + 1;
  // The guard (about 1e-12 relative) keeps a value that already has `digits` digits, seen
  // through binary rounding as 1234.0000000002, from being bumped to the next step.
  let m = Math.ceil(x / 10 ** e - 1e-9);
  if (m >= 10 ** digits) {
    // 9999.9 rounded up to 10000, or log10 rounded down just below a power of ten.
    m = Math.ceil(m / 10);
    e += 1;
  }
  return Number(`${m}e${e}`);
}

/** The block and dimension of a single-block variation. */
export function splitVary(vary: SizeVary): { role: string; dimension: SizeDimension } {
  const [role, dimension] = vary.split('.') as [string, SizeDimension];
  return { role, dimension };
}

/** The geometry of block `role` (MOS devices or resistor bodies: both have w and l). */
export interface BlockGeometry {
  readonly w: number;
  readonly l: number;
  readonly polarity?: DeviceGeometry['polarity'];
}

/** The block `role` of the design (checkVary has made sure the stage has it). */
export function pairOf(design: Design, role: string): BlockGeometry {
  const g = role === 'input' ? design.input : design[role];
  if (typeof g !== 'object' || g === null) throw new Error(`internal: block ${role} missing`);
  return g as BlockGeometry;
}

/**
 * Refuses a variation the design cannot take (a load of a simple stage), naming `option`.
 * @throws InputError on `option`
 */
export function checkVary(design: Design, vary: SizeVary, option = 'vary'): void {
  const def = stageDefinition(design.topology);
  const accepted = sizeVariations(def);
  if (accepted.includes(vary)) return;
  if (SIZE_VARIATIONS.includes(vary)) {
    const what = vary === 'both' ? `two or more sizable blocks, but this design is a ${def.topology} stage` : lacksText(def, splitVary(vary).role);
    throw new InputError(option, `${vary} needs ${what}; vary ${accepted.join(', ')}`);
  }
  throw new InputError(option, `expected one of ${accepted.join(', ')}, got ${JSON.stringify(vary)}`);
}

/** Geometry with `dimension` scaled so the gate area changes by `factor` (area: W and L by sqrt(factor)). */
export function scaleGeometry<G extends BlockGeometry>(g: G, dimension: SizeDimension, factor: number): G {
  if (dimension === 'w') return { ...g, w: ceilSignificant(g.w * factor) };
  if (dimension === 'l') return { ...g, l: ceilSignificant(g.l * factor) };
  const r = Math.sqrt(factor);
  return { ...g, w: ceilSignificant(g.w * r), l: ceilSignificant(g.l * r) };
}

/** The design with the block `role` replaced. */
export function withPair(design: Design, role: string, g: BlockGeometry): Design {
  return { ...design, [role]: g };
}

/** Allowed range of the area factor of one pair, and the limits that set it. */
export interface FactorRange {
  /** Smallest and largest area factor relative to the design's own pair. */
  readonly min: number;
  readonly max: number;
  /** Smallest W and L allowed, m (the process min_w/min_l, else {@link DEFAULT_MIN_DIMENSION_M}). */
  readonly minWidth: number;
  readonly minLength: number;
  /** True when the floor is the process's own min_w/min_l. */
  readonly processMinimum: boolean;
  /** The upper limit in words, e.g. "W up to 10 mm". */
  readonly upperText: string;
}

/**
 * Range of the area factor of the pair of `role` when `dimension` is scaled: floors at the
 * process minimum width and length (or 0.1 um), caps at {@link MAX_WIDTH_M}, {@link MAX_LENGTH_M}
 * and {@link MAX_AREA_M2}. A design above the caps keeps its own size as the upper bound; a design
 * below the process's min_w/min_l does not keep it: the range starts at the minimum.
 * @throws InputError when the dimension left alone is below the process minimum
 */
export function factorRange(design: Design, role: string, dimension: SizeDimension): FactorRange {
  const g = pairOf(design, role);
  // Resistor bodies have no process minimum here: the default floor applies.
  const proc = g.polarity === undefined ? undefined : design.process[g.polarity];
  if (g.polarity !== undefined && proc === undefined) throw new Error(`internal: process.${g.polarity} missing`);
  const minWidth = proc?.minW ?? DEFAULT_MIN_DIMENSION_M;
  const minLength = proc?.minL ?? DEFAULT_MIN_DIMENSION_M;
  const area = g.w * g.l;
  let lo: number;
  let hi: number;
  let upperText: string;
  if (dimension === 'w') {
    lo = minWidth / g.w;
    hi = Math.min(MAX_WIDTH_M / g.w, MAX_AREA_M2 / area);
    upperText = `${role}.w up to ${Math.round(Math.min(MAX_WIDTH_M, MAX_AREA_M2 / g.l) * 1e6)} um`;
  } else if (dimension === 'l') {
    lo = minLength / g.l;
    hi = Math.min(MAX_LENGTH_M / g.l, MAX_AREA_M2 / area);
    upperText = `${role}.l up to ${Math.round(Math.min(MAX_LENGTH_M, MAX_AREA_M2 / g.w) * 1e6)} um`;
  } else {
    lo = Math.max((minWidth / g.w) ** 2, (minLength / g.l) ** 2);
    hi = Math.min((MAX_WIDTH_M / g.w) ** 2, (MAX_LENGTH_M / g.l) ** 2, MAX_AREA_M2 / area);
    upperText = `${role} gate area up to ${Math.round(Math.min(hi * area, MAX_AREA_M2) * 1e12)} um^2 per device`;
  }
  const um = (x: number): string => `${Number((x * 1e6).toPrecision(4))} um`;
  const polarity = g.polarity ?? '';
  // Scaling one dimension leaves the other where it is: refuse when that one is below the
  // process minimum, since no size along this variation could be drawn.
  if (dimension === 'w' && proc?.minL !== undefined && g.l < proc.minL) {
    throw new InputError(`${role}.l`, `${um(g.l)} is below process.${polarity}.min_l = ${um(proc.minL)}, and varying ${role}.w leaves it there; set ${role}.l to at least ${um(proc.minL)}, or vary ${role}.l or ${role}.area`);
  }
  if (dimension === 'l' && proc?.minW !== undefined && g.w < proc.minW) {
    throw new InputError(`${role}.w`, `${um(g.w)} is below process.${polarity}.min_w = ${um(proc.minW)}, and varying ${role}.l leaves it there; set ${role}.w to at least ${um(proc.minW)}, or vary ${role}.w or ${role}.area`);
  }
  // Below the process's own minimum the search starts at the minimum (size never returns a
  // device that cannot be drawn); below the default floor only, the design's own size stays allowed.
  const processFloor = dimension === 'w' ? proc?.minW !== undefined : dimension === 'l' ? proc?.minL !== undefined : proc?.minW !== undefined || proc?.minL !== undefined;
  const min = processFloor ? lo : Math.min(1, lo);
  const max = Math.max(1, hi);
  if (min > max) throw new InputError(role, `${role}: the process minimum needs ${min.toPrecision(3)}x today's ${dimension === 'area' ? 'area' : dimension.toUpperCase()}, beyond the largest size searched (${upperText})`);
  return {
    min,
    max,
    minWidth,
    minLength,
    processMinimum: proc?.minW !== undefined || proc?.minL !== undefined,
    upperText,
  };
}

/** Area factors of the varied blocks at one point of a family, by block key. */
export type PairFactors = Readonly<Record<string, number>>;

/**
 * A one-parameter family of designs: `at(t)` is the design at scale t in [range[0], range[1]],
 * and a larger t never makes a varied pair smaller. The search and the refinements move along it.
 */
export interface SizingFamily {
  readonly vary: SizeVary;
  readonly range: readonly [number, number];
  at(t: number): Design;
  /** The area factor of each varied pair at t (before rounding). */
  factors(t: number): PairFactors;
  /** The upper limits in words, for refusals ("input.w up to 10000 um"). */
  readonly limitText: string;
}

/** The family of a single-pair variation: t is the area factor of that pair. */
export function singlePairFamily(design: Design, vary: SizeVary): SizingFamily {
  const { role, dimension } = splitVary(vary);
  const r = factorRange(design, role, dimension);
  const g = pairOf(design, role);
  return {
    vary,
    range: [r.min, r.max],
    at: (t) => withPair(design, role, scaleGeometry(g, dimension, clamp(t, r.min, r.max))),
    factors: (t) => ({ [role]: clamp(t, r.min, r.max) }),
    limitText: r.upperText,
  };
}

/** `x` limited to [lo, hi]. */
export function clamp(x: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, x));
}
