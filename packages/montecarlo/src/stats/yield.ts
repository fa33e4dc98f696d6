/**
 * Chip yield of M independent instances and the per-instance failure probability a chip
 * yield target allows: Y_chip = Y^M, p = 1 - Y_chip^(1/M).
 * Written with log1p/expm1 so that failure probabilities of 1e-12 and M of 1e9 lose no
 * digits (1 - (1 - 1e-12) would keep only four).
 */

function checkInstances(instances: number, fn: string): void {
  if (!(Number.isInteger(instances) && instances >= 1)) {
    throw new RangeError(`${fn}: instances must be a positive integer, got ${instances}`);
  }
}

function checkProbability(p: number, name: string, fn: string): void {
  if (!(p >= 0 && p <= 1)) {
    throw new RangeError(`${fn}: ${name} must be a probability in [0, 1], got ${p}`);
  }
}

/**
 * Chip yield Y^M of `instances` independent instances each passing with probability
 * `instanceYield`, computed as exp(M log1p(-(1 - Y))).
 * @example chipYield(0.999, 63) // 0.938913877703549
 */
export function chipYield(instanceYield: number, instances: number): number {
  checkProbability(instanceYield, 'instanceYield', 'chipYield');
  checkInstances(instances, 'chipYield');
  // Y - 1 is exact for Y in [0.5, 1] (Sterbenz), so log1p(Y - 1) keeps every digit of p.
  return Math.exp(instances * Math.log1p(instanceYield - 1));
}

/**
 * Chip yield from the per-instance failure probability p: (1 - p)^M = exp(M log1p(-p)).
 * Prefer this form when p is tiny (high-sigma estimates), since 1 - p would round.
 * @example chipYieldFromFailure(1e-9, 1e6) // 0.999000499833
 */
export function chipYieldFromFailure(instanceFailure: number, instances: number): number {
  checkProbability(instanceFailure, 'instanceFailure', 'chipYieldFromFailure');
  checkInstances(instances, 'chipYieldFromFailure');
  return Math.exp(instances * Math.log1p(-instanceFailure));
}

/**
 * Per-instance failure probability allowed by a chip-yield target over `instances`
 * instances: p = 1 - Y_chip^(1/M) = -expm1(log(Y_chip) / M).
 * @example allowedFailure(0.99, 63) // 1.5951641643506e-4 (3.776 sigma two-sided)
 */
export function allowedFailure(chipYieldTarget: number, instances: number): number {
  checkProbability(chipYieldTarget, 'chipYield', 'allowedFailure');
  checkInstances(instances, 'allowedFailure');
  return -Math.expm1(Math.log(chipYieldTarget) / instances);
}

/**
 * Chip failure probability 1 - (1 - p)^M for M independent instances, computed as
 * -expm1(M log1p(-p)) so that it stays accurate when p M is tiny.
 * @example chipFailure(1e-9, 1e6) // 9.999995e-4
 */
export function chipFailure(instanceFailure: number, instances: number): number {
  return -Math.expm1(instances * Math.log1p(-instanceFailure));
}
