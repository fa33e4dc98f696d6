/**
 * Resizing one matched pair of a design: what `sizeDesign` may change, by how much, and the
 * one-parameter families of designs it searches over. Every size leaves the bias (tail current,
 * temperature) alone, so changing W or L alone moves the inversion coefficient and gm/I_D.
 */
import { InputError, type Design, type DeviceGeometry, type DeviceRole } from '@twinfet/core';

/** What sizing may change: one dimension of one pair, both at fixed W/L (`area`), or both pairs. */
export type SizeVary = 'input.w' | 'input.l' | 'input.area' | 'load.w' | 'load.l' | 'load.area' | 'both';

/** Every accepted `SizeVary`, in the order the help text lists them. */
export const SIZE_VARIATIONS: readonly SizeVary[] = ['input.w', 'input.l', 'input.area', 'load.w', 'load.l', 'load.area', 'both'];

/** Which dimension of a pair is scaled. */
export type SizeDimension = 'w' | 'l' | 'area';

/** Widest gate the search considers, m (1e4 um): a bound on the search, not a process limit (common practice, no source). */
export const MAX_WIDTH_M = 1e-2;
/** Longest gate the search considers, m (1000 um; common practice, no source). */
export const MAX_LENGTH_M = 1e-3;
/** Largest gate area per device the search considers, m^2 (1e6 um^2; common practice, no source). */
export const MAX_AREA_M2 = 1e-6;
/** Smallest W or L when the process gives no wmin/lmin, m (0.1 um; common practice, no source). */
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

/** The role and dimension of a single-pair variation. */
export function splitVary(vary: Exclude<SizeVary, 'both'>): { role: DeviceRole; dimension: SizeDimension } {
  const [role, dimension] = vary.split('.') as [DeviceRole, SizeDimension];
  return { role, dimension };
}

/** The pair of `role` in the design (the load exists only in a mirror stage). */
export function pairOf(design: Design, role: DeviceRole): DeviceGeometry {
  if (role === 'input') return design.input;
  if (design.load === undefined) throw new Error('internal: load requested of a simple stage');
  return design.load;
}

/**
 * Refuses a variation the design cannot take (a load of a simple stage), naming `option`.
 * @throws InputError on `option`
 */
export function checkVary(design: Design, vary: SizeVary, option = 'vary'): void {
  if (!SIZE_VARIATIONS.includes(vary)) {
    throw new InputError(option, `expected one of ${SIZE_VARIATIONS.join(', ')}, got ${JSON.stringify(vary)}`);
  }
  if ((vary === 'both' || vary.startsWith('load.')) && design.topology !== 'mirror') {
    throw new InputError(option, `${vary} needs a mirror load, but this design is a simple stage (ideal loads); vary input.w, input.l or input.area`);
  }
}

/** Geometry with `dimension` scaled so the gate area changes by `factor` (area: W and L by sqrt(factor)). */
export function scaleGeometry(g: DeviceGeometry, dimension: SizeDimension, factor: number): DeviceGeometry {
  if (dimension === 'w') return { ...g, w: ceilSignificant(g.w * factor) };
  if (dimension === 'l') return { ...g, l: ceilSignificant(g.l * factor) };
  const r = Math.sqrt(factor);
  return { ...g, w: ceilSignificant(g.w * r), l: ceilSignificant(g.l * r) };
}

/** The design with the pair of `role` replaced. */
export function withPair(design: Design, role: DeviceRole, g: DeviceGeometry): Design {
  return role === 'input' ? { ...design, input: g } : { ...design, load: g };
}

/** Allowed range of the area factor of one pair, and the limits that set it. */
export interface FactorRange {
  /** Smallest and largest area factor relative to the design's own pair. */
  readonly min: number;
  readonly max: number;
  /** Smallest W and L allowed, m (the process wmin/lmin, else {@link DEFAULT_MIN_DIMENSION_M}). */
  readonly minWidth: number;
  readonly minLength: number;
  /** True when the floor is the process's own wmin/lmin. */
  readonly processMinimum: boolean;
  /** The upper limit in words, e.g. "W up to 10 mm". */
  readonly upperText: string;
}

/**
 * Range of the area factor of the pair of `role` when `dimension` is scaled: floors at the
 * process minimum width and length (or 0.1 um), caps at {@link MAX_WIDTH_M}, {@link MAX_LENGTH_M}
 * and {@link MAX_AREA_M2}. A design already outside these bounds keeps its own size as the bound.
 */
export function factorRange(design: Design, role: DeviceRole, dimension: SizeDimension): FactorRange {
  const g = pairOf(design, role);
  const proc = design.process[g.polarity];
  if (proc === undefined) throw new Error(`internal: process.${g.polarity} missing`);
  const minWidth = proc.wmin ?? DEFAULT_MIN_DIMENSION_M;
  const minLength = proc.lmin ?? DEFAULT_MIN_DIMENSION_M;
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
  return {
    min: Math.min(1, lo),
    max: Math.max(1, hi),
    minWidth,
    minLength,
    processMinimum: proc.wmin !== undefined || proc.lmin !== undefined,
    upperText,
  };
}

/** Area factors of the pairs at one point of a family (load only when it is varied). */
export interface PairFactors {
  readonly input?: number;
  readonly load?: number;
}

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
export function singlePairFamily(design: Design, vary: Exclude<SizeVary, 'both'>): SizingFamily {
  const { role, dimension } = splitVary(vary);
  const r = factorRange(design, role, dimension);
  const g = pairOf(design, role);
  return {
    vary,
    range: [r.min, r.max],
    at: (t) => withPair(design, role, scaleGeometry(g, dimension, clamp(t, r.min, r.max))),
    factors: (t) => (role === 'input' ? { input: clamp(t, r.min, r.max) } : { load: clamp(t, r.min, r.max) }),
    limitText: r.upperText,
  };
}

/** `x` limited to [lo, hi]. */
export function clamp(x: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, x));
}
