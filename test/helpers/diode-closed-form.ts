/**
 * Closed forms for diode circuits, for engine tests. The series
 * resistor–diode circuit has the explicit solution of Banwell and
 * Jayakumar, "Exact analytical solution for current flow through diode with
 * series resistance", Electronics Letters 36(4), 2000:
 *
 *     I = (n·Vt/R)·W((IS·R/(n·Vt))·exp((Vs + IS·R)/(n·Vt))) − IS
 *
 * with W the principal branch of Lambert's W, evaluated here by the
 * lambert-w-function package in its logarithmic form, so that arguments of
 * e^2000 (50 V on a junction's scale) do not overflow.
 */
import { lambertW0Log } from 'lambert-w-function';

/** Boltzmann constant, J/K (CODATA 2018, exact in the 2019 SI). */
export const K_B = 1.380649e-23;
/** Elementary charge, C (CODATA 2018, exact). */
export const Q_E = 1.602176634e-19;
/** Thermal voltage k·T/q, V. */
export const thermalVoltage = (kelvin: number): number => (K_B * kelvin) / Q_E;
/** 27 °C in kelvin, the nominal temperature of models.md. */
export const T_NOM = 300.15;

/**
 * W₀ of x given ln x. lambert-w-function's `lambertW0Log` is good to ~4 ulps
 * down to ln x ≈ −30 but cancels below (relative error 1e-12 at −33, and it
 * returns 0 below −36); there the Taylor series W(x) = x − x² + (3/2)x³ − …
 * (Corless et al., Adv. Comput. Math. 5, 1996, from memory) is exact in
 * double precision, its next term being (8/3)x⁴.
 */
export function lambertWOfLog(logX: number): number {
  if (logX >= -20) return lambertW0Log(logX);
  const x = Math.exp(logX);
  return x * (1 - x + 1.5 * x * x);
}

/** Solution of the series circuit: junction current (A) and junction voltage (V). */
export interface SeriesDiode {
  /** Current in the Shockley junction, IS·(exp(V/(n·Vt)) − 1), A. */
  readonly junction: number;
  /** Junction voltage, V. */
  readonly vd: number;
  /** Current drawn from the source (junction plus any parallel conductance), A. */
  readonly source: number;
}

/**
 * Source `vs` (V) through `r` (Ω) into a Shockley junction (IS in A,
 * nVt = N·Vt in V) with an optional conductance `gp` (S) across the junction.
 * The conductance is folded into the Thévenin equivalent seen by the
 * junction (Vth = vs/(1 + r·gp), Rth = r/(1 + r·gp)), which keeps the closed
 * form exact.
 */
export function seriesDiode(vs: number, r: number, is: number, nVt: number, gp = 0): SeriesDiode {
  const vth = vs / (1 + r * gp);
  const rth = r / (1 + r * gp);
  const logArg = Math.log((is * rth) / nVt) + (vth + is * rth) / nVt;
  const w = lambertWOfLog(logArg);
  const junction = (nVt / rth) * w - is;
  // V = nVt·ln((I + IS)/IS) = nVt·(ln(nVt/(Rth·IS)) + ln W): no cancellation at large Vs. Below ln x = 0,
  // ln W = ln x − W (from W·e^W = x; both terms of one sign there) keeps it exact in deep reverse bias,
  // where W itself is subnormal or zero.
  const logW = logArg >= 0 ? Math.log(w) : logArg - w;
  const vd = nVt * (Math.log(nVt / (rth * is)) + logW);
  return { junction, vd, source: junction + gp * vd };
}

/**
 * Relative error of W(x) implied by the defining identity W·e^W = x in
 * logarithmic form: since d(ln W + W) = (1 + W)·dW/W, the relative error is
 * |ln W + W − ln x|/(1 + W). For checking the reference itself.
 */
export function lambertRelativeError(logX: number): number {
  const w = lambertWOfLog(logX);
  return Math.abs(Math.log(w) + w - logX) / (1 + w);
}
