/**
 * How the process parameters follow temperature: KP(T) = KP (T / T_process)^m, with m the
 * mobility temperature exponent (`kp_exponent`, default -1.5; common practice, no source). The
 * slope factor, V_T0 and the matching coefficients are taken as temperature-independent (common
 * practice): in these saturation models only V_T differences and inversion levels move the
 * offset, so a common V_T shift or temperature coefficient would change nothing there.
 */
import type { Design, Polarity, ProcessParams } from './design.js';
import { InputError } from './errors.js';
import { DESIGN_LIMITS } from './limits.js';

/** Mobility temperature exponent used when a process gives none (common practice, no source). */
export const KP_EXPONENT_DEFAULT = -1.5;

/**
 * KP at `temperatureK` from its value at `processTemperatureK`: KP (T / T_process)^m.
 * Exactly `kp` when the two temperatures are equal.
 * @example kpAtTemperature(300e-6, 400, 300, -1.5) // 1.9486e-4 (A/V^2)
 */
export function kpAtTemperature(kp: number, temperatureK: number, processTemperatureK: number, exponent = KP_EXPONENT_DEFAULT): number {
  if (temperatureK === processTemperatureK) return kp;
  return kp * (temperatureK / processTemperatureK) ** exponent;
}

/**
 * The design with each polarity's KP moved from `process.temperature` to the design's own
 * temperature, ready for a stage module to compile (which reads KP as valid at the design
 * temperature). A design without `process.temperature` is returned unchanged.
 * @throws InputError on `process.<pol>.kp` when the scaled KP leaves the accepted range
 */
export function designAtTemperature(design: Design): Design {
  const t0 = design.process.temperature;
  if (t0 === undefined || t0 === design.temperature) return design;
  const scaled = (p: ProcessParams | undefined, pol: Polarity): ProcessParams | undefined => {
    if (p === undefined) return undefined;
    const kp = kpAtTemperature(p.kp, design.temperature, t0, p.kpExponent);
    const [lo, hi] = DESIGN_LIMITS.kp;
    if (!(kp >= lo && kp <= hi)) {
      throw new InputError(
        `process.${pol}.kp`,
        `KP scaled from the process temperature ${t0} K to ${design.temperature} K is ${kp.toPrecision(4)} A/V^2, outside ${lo} to ${hi} A/V^2; check process.temperature and process.${pol}.kp_exponent`,
      );
    }
    return { ...p, kp };
  };
  const n = scaled(design.process.n, 'n');
  const p = scaled(design.process.p, 'p');
  const { temperature: _t, ...rest } = design.process;
  return { ...design, process: { ...rest, ...(n === undefined ? {} : { n }), ...(p === undefined ? {} : { p }) } };
}
