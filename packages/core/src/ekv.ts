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
