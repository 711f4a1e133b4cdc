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
 * Below this magnitude of the argument {@link expm1From} calls expm1; at and
 * above it, exp(x) − 1 from the exponential already computed is as accurate.
 */
export const EXPM1_DIRECT_BELOW = 4;

/**
 * safeExpm1(x) from `e` = safeExpSlope(x) (exp(x) below the limit), so that
 * a junction needs one exponential for its current and its conductance
 * wherever it conducts or blocks in earnest. For x ≥ 4 the subtraction loses
 * nothing: e − 1 ≥ 0.98·e, so the rounding of e (half an ulp, plus exp's own
 * error of under an ulp) grows by at most 2 % relative to the result, and
 * the subtraction rounds once; for x ≤ −4, 1 − e ≥ 0.98 while e ≤ 0.019
 * carries an error below an ulp of 0.019, and the subtraction rounds once.
 * So the result is within about two ulps of expm1(x) (measured: within one,
 * test/devices/junction-fast.test.ts). For |x| < 4, near zero bias, expm1
 * itself is called. (With the threshold at 1 the error bound is still about
 * three ulps, but the 1 s bridge rectifier of
 * test/core/transient/rectifier.test.ts then ended with a step below its
 * floor at 0.147 s: that run turns on differences of an ulp; see the commit.)
 * Dimensionless.
 * @param x exponent argument
 * @param e safeExpSlope(x)
 */
export function expm1From(x: number, e: number): number {
  if (x > EXP_LINEAR_LIMIT) return EXP_AT_LIMIT * (1 + (x - EXP_LINEAR_LIMIT)) - 1;
  return x >= EXPM1_DIRECT_BELOW || x <= -EXPM1_DIRECT_BELOW ? e - 1 : Math.expm1(x);
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
 * The per-model constants of the depletion charge of {@link depletion},
 * computed once per model and temperature ({@link depletionForm}) so that
 * an evaluation ({@link depletionAt}) costs one power function, or one
 * square root for M = 1/2, where it took two.
 */
export interface DepletionForm {
  /** Zero-bias capacitance CJ0, F (0: no depletion charge). */
  readonly cj0: number;
  /** Junction potential VJ, V. */
  readonly vj: number;
  /** Grading coefficient M. */
  readonly m: number;
  /** M = 1/2: (1 − V/VJ)^(1−M) below FC·VJ is √(1 − V/VJ). */
  readonly halfGrading: boolean;
  /** |1 − M| < 1e-9: the logarithmic limit of the charge. */
  readonly logLimit: boolean;
  /** CJ0·VJ, C. */
  readonly cjvj: number;
  /** 1 − M. */
  readonly oneMinusM: number;
  /** FC·VJ, V: where the linear continuation starts. */
  readonly vfc: number;
  /** (FC·VJ)², V². */
  readonly vfc2: number;
  /** The charge at FC·VJ, C. */
  readonly qfc: number;
  /** CJ0/(1 − FC)^(1 + M), F. */
  readonly cjf2: number;
  /** 1 − FC·(1 + M). */
  readonly f3: number;
  /** M/(2·VJ), 1/V. */
  readonly mOver2Vj: number;
}

/**
 * The constants of the depletion form for CJ0 (F), VJ (V, > 0) and M
 * (0 ≤ M < 1; |1 − M| < 1e-9 takes the logarithmic limit). Allocates; call
 * it when the model or the temperature changes, not per evaluation.
 */
export function depletionForm(cj0: number, vj: number, m: number): DepletionForm {
  const logLimit = Math.abs(1 - m) < 1e-9;
  const vfc = DEPLETION_FC * vj;
  const rfc = 1 - DEPLETION_FC;
  // The same expressions as the per-call code they replace, so the values above FC·VJ are unchanged bit for bit.
  const qfc = logLimit ? -cj0 * vj * Math.log(rfc) : (cj0 * vj * (1 - Math.pow(rfc, 1 - m))) / (1 - m);
  const f2 = Math.pow(rfc, 1 + m);
  return {
    cj0,
    vj,
    m,
    halfGrading: m === 0.5,
    logLimit,
    cjvj: cj0 * vj,
    oneMinusM: 1 - m,
    vfc,
    vfc2: vfc * vfc,
    qfc,
    cjf2: cj0 / f2,
    f3: 1 - DEPLETION_FC * (1 + m),
    mOver2Vj: m / (2 * vj),
  };
}

/**
 * Depletion charge of models.md: Q = CJ0·VJ·(1 − (1 − V/VJ)^(1−M))/(1 − M)
 * for V < FC·VJ, and above it the capacitance CJ0·(1 − V/VJ)^(−M) continued
 * linearly with matching value and slope (FC = 0.5; the form of Nagel 1975).
 * M = 1 uses the logarithmic limit of the same integral. Writes q (C) and
 * c = dq/dv (F) into `out`. Allocates its {@link DepletionForm}: the
 * devices' load paths call {@link depletionAt} with one made beforehand.
 * @param v junction voltage, V
 * @param cj0 zero-bias capacitance, F
 * @param vj junction potential, V (> 0)
 * @param m grading coefficient
 */
export function depletion(v: number, cj0: number, vj: number, m: number, out: ChargeOut): void {
  depletionAt(v, depletionForm(cj0, vj, m), out);
}

/**
 * {@link depletion} at junction voltage v (V) with its constants `f`. Below
 * FC·VJ, with r = 1 − V/VJ: the charge takes r^(1−M) from the power
 * function as before (so q is unchanged bit for bit), and the capacitance
 * CJ0·r^(−M) is CJ0·r^(1−M)/r (exact in real arithmetic; one rounding more,
 * the division), so one power function serves both instead of two. For
 * M = 1/2, √r is exact and cheaper still: c = CJ0/√r, and r^(1/2) = √r in
 * the charge (√ is correctly rounded, the power function within an ulp).
 * A logarithm and an exponential, exp(−M·ln r), would be cheaper than the
 * power function but err by M·|ln r| ulps, which the central difference of
 * the charge shows (test/devices/diode.test.ts); not used. Above FC·VJ the
 * evaluation is the linear continuation with the precomputed constants,
 * unchanged bit for bit. test/devices/junction-fast.test.ts states the
 * bounds observed against the power-function form of models.md. Writes q
 * (C) and c (F).
 */
export function depletionAt(v: number, f: DepletionForm, out: ChargeOut): void {
  if (f.cj0 === 0) {
    out.q = 0;
    out.c = 0;
    return;
  }
  if (v < f.vfc) {
    const r = 1 - v / f.vj;
    if (f.logLimit) {
      out.c = f.cj0 * Math.pow(r, -f.m);
      out.q = -f.cjvj * Math.log(r);
      return;
    }
    if (f.halfGrading) {
      const root = Math.sqrt(r);
      out.c = f.cj0 / root;
      out.q = (f.cjvj * (1 - root)) / f.oneMinusM;
      return;
    }
    // r^(−M) = r^(1−M)/r: one power function serves the charge and the capacitance.
    const p = Math.pow(r, f.oneMinusM);
    out.c = (f.cj0 * p) / r;
    out.q = (f.cjvj * (1 - p)) / f.oneMinusM;
    return;
  }
  out.c = f.cjf2 * (f.f3 + (f.m * v) / f.vj);
  out.q = f.qfc + f.cjf2 * (f.f3 * (v - f.vfc) + f.mOver2Vj * (v * v - f.vfc2));
}
