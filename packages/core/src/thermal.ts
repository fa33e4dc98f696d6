/** Boltzmann constant k, J/K (exact in the 2019 SI). */
export const BOLTZMANN = 1.380649e-23;
/** Elementary charge q, C (exact in the 2019 SI). */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
/** 0 degrees Celsius in kelvin. */
export const ZERO_CELSIUS_K = 273.15;

/**
 * Thermal voltage U_T = kT/q, volts.
 * @example thermalVoltage(300) // 0.025852 (25.852 mV)
 */
export function thermalVoltage(temperatureK: number): number {
  return (BOLTZMANN * temperatureK) / ELEMENTARY_CHARGE;
}
