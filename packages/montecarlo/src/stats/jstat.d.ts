/**
 * Local type declarations for the parts of jstat 1.9.6 this package calls (jstat ships no
 * types). Keep this list to the functions actually used.
 */
declare module 'jstat' {
  /** The jStat namespace object (default export of the CommonJS module). */
  interface JStatStatic {
    beta: {
      /** Quantile of the Beta(alpha, beta) distribution at probability p. */
      inv(p: number, alpha: number, beta: number): number;
    };
    normal: {
      /** Cumulative distribution function of N(mean, sd) at x (used by tests as an independent Phi). */
      cdf(x: number, mean: number, sd: number): number;
    };
    chisquare: {
      /** Quantile of the chi-square distribution with dof degrees of freedom at probability p. */
      inv(p: number, dof: number): number;
    };
  }
  const jStat: JStatStatic;
  export default jStat;
}
