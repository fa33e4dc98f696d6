/**
 * Outer limits of the values a design may hold, SI units (this project's rule; common practice,
 * no source). They are far beyond any real device, and chosen so that every derived quantity
 * (W L, I_S, IC, the sigmas, spec/sigma) stays a finite, non-zero double: without them a width of
 * 1e300 m or an A_VT of 5e-324 V*m passes "positive and finite" and yields NaN or Infinity later.
 */
export const DESIGN_LIMITS = {
  temperature: [1, 1000],
  tail: [1e-18, 1],
  length: [1e-9, 1e-2],
  slope: [1, 10],
  kp: [1e-9, 1],
  avt: [1e-12, 1e-6],
  abeta: [0, 1e-5],
  cox: [0, 1],
  offset: [0, 10],
  resistance: [1e-3, 1e12],
  ar: [0, 1e-5],
  cells: [2, 4096],
  instances: [1, 1e12],
  kpExponent: [-5, 5],
  conditions: [1, 64],
} as const satisfies Record<string, readonly [number, number]>;

/**
 * Largest per-device sigma(dbeta/beta) = A_beta / sqrt(2 W L) accepted, as a fraction (100%).
 * Beyond it the log-normal current factor spans hundreds of decades within a few sigma and
 * the offset overflows; no matching model is meant for it (this project's rule, no source).
 */
export const MAX_DEVICE_SIGMA_BETA = 1;
