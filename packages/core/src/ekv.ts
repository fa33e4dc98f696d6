/**
 * EKV all-region interpolation of the saturated drain current.
 * Source: Enz, Krummenacher, Vittoz, "An analytical MOS transistor model valid in all regions
 * of operation and dedicated to low-voltage and low-current applications", Analog Integrated
 * Circuits and Signal Processing 8:83-114, 1995.
 *
 * Normalised quantities: v = (V_P - V_S)/U_T, IC = I_D / I_S, I_S = 2 n beta U_T^2.
 * Every function here stays finite for IC from 1e-12 to 1e6 (expm1/log1p forms).
 */

/** Inversion region label (common practice, no source: weak < 0.1 <= moderate <= 10 < strong). */
export type InversionRegion = 'weak' | 'moderate' | 'strong';

/**
 * Normalised forward current F(v) = ln^2(1 + exp(v/2)) = IC.
 * @example ekvForward(0) // 0.480453 = (ln 2)^2
 */
export function ekvForward(v: number): number {
  const x = 0.5 * v;
  const l = x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
  return l * l;
}

/**
 * Derivative dF/dv = ln(1 + e^{v/2}) * e^{v/2} / (1 + e^{v/2}).
 */
export function ekvForwardDerivative(v: number): number {
  const x = 0.5 * v;
  if (x > 0) {
    const e = Math.exp(-x);
    return (x + Math.log1p(e)) / (1 + e);
  }
  const e = Math.exp(x);
  return (Math.log1p(e) * e) / (1 + e);
}

/**
 * Closed-form inverse of F: v = 2 ln(exp(sqrt(IC)) - 1), for IC > 0.
 * @example ekvInverse(1) // 1.082650
 */
export function ekvInverse(ic: number): number {
  return ekvInverseOfRoot(Math.sqrt(ic));
}

/**
 * The same inverse written in s = sqrt(IC): v = 2 ln(expm1(s)); above s = 1 the form
 * 2 (s + ln(1 - e^-s)) avoids the overflow of expm1 at large inversion.
 */
export function ekvInverseOfRoot(s: number): number {
  return s > 1 ? 2 * (s + Math.log1p(-Math.exp(-s))) : 2 * Math.log(Math.expm1(s));
}

/**
 * Normalised transconductance efficiency n U_T gm/I_D = (1 - exp(-sqrt IC)) / sqrt(IC).
 * Equals 1 in weak inversion and 1/sqrt(IC) in strong inversion.
 * @example normalisedGmOverId(1) // 0.632121
 */
export function normalisedGmOverId(ic: number): number {
  const s = Math.sqrt(ic);
  // Series 1 - s/2 + s^2/6 below 1e-8, where -expm1(-s)/s is exact to rounding anyway.
  return s < 1e-8 ? 1 - 0.5 * s : -Math.expm1(-s) / s;
}

/**
 * Transconductance efficiency gm/I_D, 1/V.
 * @param ic inversion coefficient
 * @param slope slope factor n
 * @param thermalVoltageV U_T in volts
 */
export function gmOverId(ic: number, slope: number, thermalVoltageV: number): number {
  return normalisedGmOverId(ic) / (slope * thermalVoltageV);
}

/**
 * Specific current I_S = 2 n beta U_T^2, amperes; beta = KP W / L.
 * @param kpAPerV2 KP = mu Cox, A/V^2
 */
export function specificCurrent(
  slope: number,
  kpAPerV2: number,
  widthM: number,
  lengthM: number,
  thermalVoltageV: number,
): number {
  return 2 * slope * ((kpAPerV2 * widthM) / lengthM) * thermalVoltageV * thermalVoltageV;
}

/** Region label for an inversion coefficient. */
export function inversionRegion(ic: number): InversionRegion {
  return ic < 0.1 ? 'weak' : ic > 10 ? 'strong' : 'moderate';
}

/**
 * Coefficients of ln(expm1(s)/s) = s/2 + sum_n B_2n s^2n / (2n (2n)!), the Bernoulli-number
 * series of ln((e^s - 1)/s) (radius 2 pi). Through n = 9 the truncation at s <= 1 is
 * |B_20| / (20 * 20!) = 1.1e-17, under double rounding.
 */
const BERNOULLI_2N = [1 / 6, -1 / 30, 1 / 42, -1 / 30, 5 / 66, -691 / 2730, 7 / 6, -3617 / 510, 43867 / 798];
const G_COEF = BERNOULLI_2N.map((b, i) => {
  const m = 2 * (i + 1);
  let fact = 1;
  for (let k = 2; k <= m; k++) fact *= k;
  return b / (m * fact);
});
const [G1, G2, G3, G4, G5, G6, G7, G8, G9] = G_COEF as [number, number, number, number, number, number, number, number, number];

/**
 * ln(expm1(s) / s) for 0 < s <= 1 by its series (no transcendental call), so that
 * v = 2 ln(s) + 2 lnExpm1OverS(s) and a difference v1 - v2 needs only ln(s1/s2).
 * Exact to rounding on (0, 1]; callers use the direct form above 1.
 */
export function lnExpm1OverS(s: number): number {
  const q = s * s;
  // Up to s = 0.3 five terms suffice: the sixth, |B_12| s^12 / (12 * 12!), is below 2.3e-17.
  if (s <= 0.3) return 0.5 * s + q * (G1 + q * (G2 + q * (G3 + q * (G4 + q * G5))));
  return 0.5 * s + q * (G1 + q * (G2 + q * (G3 + q * (G4 + q * (G5 + q * (G6 + q * (G7 + q * (G8 + q * G9))))))));
}

/**
 * v(s1^2) - v(s2^2), the difference of two EKV inverses written in s = sqrt(IC). `lnRatio` is
 * ln(s1/s2), which callers usually know without a log call; it is read only when both s are
 * <= 1 (pass NaN otherwise).
 */
export function ekvInverseDifference(s1: number, s2: number, lnRatio: number): number {
  if (s1 <= 1 && s2 <= 1) return 2 * lnRatio + 2 * (lnExpm1OverS(s1) - lnExpm1OverS(s2));
  if (s1 > 1 && s2 > 1) {
    // v = 2 (s + ln(1 - e^-s)): the two logs combine into one.
    return 2 * (s1 - s2) + 2 * Math.log(Math.expm1(-s1) / Math.expm1(-s2));
  }
  return ekvInverseOfRoot(s1) - ekvInverseOfRoot(s2);
}

/** Largest |x| for which an `ekvInverseDifferenceNear` function is used. */
export const NEAR_HALF_WIDTH = 1 / 32;
const NEAR_DEGREE = 10;

/** c_k = (s0/2 + sum_n g_n s0^{2n} (2n)^k) / k!, the x^k coefficient of ln(expm1(s)/s) at s = s0 e^x. */
function nearCoefficient(s0: number, k: number): number {
  let sum = 0.5 * s0;
  let fact = 1;
  for (let j = 2; j <= k; j++) fact *= j;
  G_COEF.forEach((g, n) => {
    const m = 2 * (n + 1);
    sum += g * s0 ** m * m ** k;
  });
  return sum / fact;
}

/**
 * The relative bound on what `ekvInverseDifferenceNear(s0)` leaves out by cutting G at degree 10:
 * (1/2) sum_{k=11}^{60} k |c_k| (1/32)^{k-1} (the terms beyond 60 are below 1e-90 of it).
 * At most 1.83e-20 for any s0 the near form accepts (largest near s0 = 0.843).
 * @example ekvNearCutBound(0.9) // 1.7358e-20
 */
export function ekvNearCutBound(s0: number): number {
  let cut = 0;
  for (let k = NEAR_DEGREE + 1; k <= 60; k++) cut += k * Math.abs(nearCoefficient(s0, k)) * NEAR_HALF_WIDTH ** (k - 1);
  return 0.5 * cut;
}

/**
 * For two sides at s_i = s0 e^{x_i} with |x_i| <= 1/32 (a pair whose current factors differ by
 * a few percent at most), v(s1^2) - v(s2^2) without a transcendental call:
 * v = 2 ln s + 2 ln(expm1(s)/s) and, with the series of lnExpm1OverS and s^{2n} = s0^{2n} e^{2n x},
 * ln(expm1(s)/s) = c_0 + G(x), G(x) = sum_{k>=1} c_k x^k, c_k = (s0/2 + sum_n g_n s0^{2n} (2n)^k) / k!
 * (g_n the coefficients of lnExpm1OverS), so v1 - v2 = 2 (x1 - x2) + 2 (G(x1) - G(x2)), G cut at
 * degree 10. The cut is bounded when this is built: G(x1) - G(x2) = (x1 - x2) sum_k c_k
 * (x1^{k-1} + ... + x2^{k-1}), so the terms left out change v1 - v2 by at most
 * (1/2) sum_{k>10} k |c_k| (1/32)^{k-1} of itself (at most 2e-20 for any s0 allowed); the function is returned only when that is below
 * 2^-60 and s0 e^{1/32} <= 1 (where lnExpm1OverS's series holds). Otherwise undefined.
 * Rounding: G(x) ~ c_1 x is small, so its error is relative to x1 - x2, not to ln(expm1(s)/s).
 * @example ekvInverseDifferenceNear(0.14)!(0.001, -0.001) // v difference for a 0.4% current-factor split
 */
export function ekvInverseDifferenceNear(s0: number): ((x1: number, x2: number) => number) | undefined {
  if (!(s0 > 0 && s0 * Math.exp(NEAR_HALF_WIDTH) <= 1)) return undefined;
  if (!(ekvNearCutBound(s0) <= 2 ** -60)) return undefined;
  const [k1, k2, k3, k4, k5, k6, k7, k8, k9, k10] = Array.from({ length: NEAR_DEGREE }, (_, i) => nearCoefficient(s0, i + 1)) as [number, number, number, number, number, number, number, number, number, number];
  // Terms paired (Estrin) so they do not wait on one another.
  const g = (x: number): number => {
    const x2 = x * x;
    const x4 = x2 * x2;
    return x * (k1 + x * k2 + x2 * (k3 + x * k4) + x4 * (k5 + x * k6 + x2 * (k7 + x * k8)) + x4 * x4 * (k9 + x * k10));
  };
  return (x1, x2) => 2 * (x1 - x2) + 2 * (g(x1) - g(x2));
}
