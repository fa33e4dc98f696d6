/**
 * Pelgrom's area law for random mismatch.
 * Source: Pelgrom, Duinmaijer, Welbers, "Matching properties of MOS transistors",
 * IEEE JSSC 24(5):1433-1440, 1989: the DIFFERENCE of a pair has sigma = A / sqrt(W L).
 *
 * Project convention: each device of a pair gets an independent draw with the per-device
 * sigma A / sqrt(2 W L), so that the pair difference has Pelgrom's A / sqrt(W L).
 */

/**
 * Per-device threshold sigma, volts: A_VT / sqrt(2 W L).
 * @param avtVm A_VT in V*m (5 mV*um = 5e-9 V*m)
 * @example deviceSigmaVt(5e-9, 1e-6, 1e-6) // 3.5355e-3 (a 1 um x 1 um pair differs by 5 mV)
 */
export function deviceSigmaVt(avtVm: number, widthM: number, lengthM: number): number {
  return avtVm / Math.sqrt(2 * widthM * lengthM);
}

/**
 * Per-device current-factor sigma, as a fraction: A_beta / sqrt(2 W L).
 * @param abetaM A_beta as fraction*m (1 %*um = 1e-8 m)
 */
export function deviceSigmaBeta(abetaM: number, widthM: number, lengthM: number): number {
  return abetaM / Math.sqrt(2 * widthM * lengthM);
}

/** Pair-difference sigma A / sqrt(W L) (Pelgrom 1989), same units as the coefficient. */
export function pairSigma(coefficient: number, widthM: number, lengthM: number): number {
  return coefficient / Math.sqrt(widthM * lengthM);
}

/**
 * Current-factor rule: beta_i = beta * exp(sigma_beta * z), z ~ N(0, 1), with
 * z = rho u_vt + sqrt(1 - rho^2) u_beta from the device's two independent unit normals.
 * A log-normal factor with median beta matches the Gaussian dbeta/beta = sigma_beta z to first
 * order, and can never make beta <= 0 or NaN however small the device (sigma_beta of 30% or more).
 * The log-normal choice is this project's (common practice, no source). The hot loops inline
 * the same expression; this is the form for reports: dbeta/beta = exp(sigma_beta z) - 1.
 * @example currentFactorDeviation(0.01, 0, 0, 1) // 0.01005 (one sigma of 1%)
 */
export function currentFactorDeviation(sigmaBeta: number, rho: number, uVt: number, uBeta: number): number {
  return Math.expm1(sigmaBeta * (rho * uVt + Math.sqrt(1 - rho * rho) * uBeta));
}
