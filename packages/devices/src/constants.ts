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

/**
 * Minimum junction capacitance in farads (1 pF), placed in transient analysis
 * only across a diode junction whose model has CJO = 0. Without it a floating
 * node between switched-off junctions is held only by gmin (1e-12 S) and
 * Newton on the update test alone cannot follow the switching (with the
 * transient's contraction test it can, in the bridge of docs/transient.md;
 * the capacitance stays). A small capacitance across every junction is the
 * usual remedy (K. S. Kundert's 1995 book on circuit simulators in practice,
 * ch. on transient convergence — from memory; the value is common practice,
 * no source). Its effect is quantified in docs/transient.md.
 */
export const JUNCTION_CMIN = 1e-12;
