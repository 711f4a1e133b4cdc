/**
 * Physical constants and nominal conditions (models.md). CODATA 2018 exact
 * values: k and q are exact in the 2019 SI.
 */

/** Boltzmann constant in J/K (CODATA 2018, exact). */
export const BOLTZMANN = 1.380649e-23;

/** Elementary charge in C (CODATA 2018, exact). */
export const CHARGE = 1.602176634e-19;

/** Kelvin at 0 °C. */
export const ZERO_CELSIUS = 273.15;

/** Nominal temperature in kelvin (27 °C), at which model parameters are given. */
export const TNOM = 300.15;

/** Thermal voltage k·T/q in volts at `kelvin`. */
export function thermalVoltage(kelvin: number): number {
  return (BOLTZMANN * kelvin) / CHARGE;
}
