/**
 * Helpers shared by the pn-junction devices: overflow-safe exponentials,
 * Nagel's junction-voltage limiting and the depletion-charge form of
 * models.md.
 */

/**
 * Exponent argument beyond which {@link safeExp} continues linearly. At 80 a
 * junction with IS = 1e-14 A would carry about 5.5e20 A, far outside any real
 * bias, so the equations are exact wherever a circuit can actually operate;
 * the continuation only keeps Newton's stray iterates finite.
 */
export const EXP_LINEAR_LIMIT = 80;

const EXP_AT_LIMIT = Math.exp(EXP_LINEAR_LIMIT);

/**
 * exp(x) for x ≤ {@link EXP_LINEAR_LIMIT}, continued beyond it by the tangent
 * line (matching value and slope), so the result never overflows for any
 * argument a finite junction voltage produces. Dimensionless.
 */
export function safeExp(x: number): number {
  return x <= EXP_LINEAR_LIMIT ? Math.exp(x) : EXP_AT_LIMIT * (1 + (x - EXP_LINEAR_LIMIT));
}

/** Derivative of {@link safeExp} with respect to its argument. Dimensionless. */
export function safeExpSlope(x: number): number {
  return x <= EXP_LINEAR_LIMIT ? Math.exp(x) : EXP_AT_LIMIT;
}

/**
 * safeExp(x) − 1, computed with expm1 below the limit so that the Shockley
 * term keeps full relative precision near zero bias. Dimensionless.
 */
export function safeExpm1(x: number): number {
  return x <= EXP_LINEAR_LIMIT ? Math.expm1(x) : EXP_AT_LIMIT * (1 + (x - EXP_LINEAR_LIMIT)) - 1;
}

/**
 * Critical voltage of a junction in volts, the voltage above which Newton
 * steps are limited: Vcrit = nVt·ln(nVt/(√2·IS)), the point of minimum radius
 * of curvature of the exponential (Nagel 1975, UCB/ERL M520).
 * @param nVt emission coefficient times thermal voltage, V
 * @param is saturation current, A
 */
export function criticalVoltage(nVt: number, is: number): number {
  return nVt * Math.log(nVt / (Math.SQRT2 * is));
}

/**
 * Junction-voltage limiting of Nagel 1975 (UCB/ERL M520): when
 * the new iterate is above Vcrit and moved by more than 2·nVt, the step is
 * replaced by a logarithmic one so that the exponential current changes at
 * most linearly. Returns the voltage to evaluate the junction at, in volts.
 * @param vnew proposed junction voltage, V
 * @param vold junction voltage of the previous iterate, V
 * @param vt emission coefficient times thermal voltage, V
 * @param vcrit critical voltage from {@link criticalVoltage}, V
 */
export function pnjlim(vnew: number, vold: number, vt: number, vcrit: number): number {
  if (vnew > vcrit && Math.abs(vnew - vold) > 2 * vt) {
    if (vold > 0) {
      const arg = 1 + (vnew - vold) / vt;
      return arg > 0 ? vold + vt * Math.log(arg) : vcrit;
    }
    return vt * Math.log(vnew / vt);
  }
  return vnew;
}

/** Fraction of the junction potential above which depletion capacitance is continued linearly (the FC = 0.5 form). */
export const DEPLETION_FC = 0.5;

/** Output slot of the charge evaluations: charge in coulombs, capacitance dq/dv in farads. */
export interface ChargeOut {
  q: number;
  c: number;
}

/**
 * Depletion charge of models.md: Q = CJ0·VJ·(1 − (1 − V/VJ)^(1−M))/(1 − M)
 * for V < FC·VJ, and above it the capacitance CJ0·(1 − V/VJ)^(−M) continued
 * linearly with matching value and slope (FC = 0.5; the form of Nagel 1975).
 * M = 1 uses the logarithmic limit of the same integral. Writes q (C) and
 * c = dq/dv (F) into `out`.
 * @param v junction voltage, V
 * @param cj0 zero-bias capacitance, F
 * @param vj junction potential, V (> 0)
 * @param m grading coefficient
 */
export function depletion(v: number, cj0: number, vj: number, m: number, out: ChargeOut): void {
  if (cj0 === 0) {
    out.q = 0;
    out.c = 0;
    return;
  }
  const vfc = DEPLETION_FC * vj;
  if (v < vfc) {
    const r = 1 - v / vj;
    out.c = cj0 * Math.pow(r, -m);
    out.q = Math.abs(1 - m) < 1e-9 ? -cj0 * vj * Math.log(r) : (cj0 * vj * (1 - Math.pow(r, 1 - m))) / (1 - m);
    return;
  }
  const rfc = 1 - DEPLETION_FC;
  const qfc = Math.abs(1 - m) < 1e-9 ? -cj0 * vj * Math.log(rfc) : (cj0 * vj * (1 - Math.pow(rfc, 1 - m))) / (1 - m);
  const f2 = Math.pow(rfc, 1 + m);
  const f3 = 1 - DEPLETION_FC * (1 + m);
  out.c = (cj0 / f2) * (f3 + (m * v) / vj);
  out.q = qfc + (cj0 / f2) * (f3 * (v - vfc) + (m / (2 * vj)) * (v * v - vfc * vfc));
}
