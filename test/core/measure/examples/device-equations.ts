/**
 * The published large-signal device equations, written out again for the
 * tests (models.md): the Shockley diode with its reverse-breakdown term and
 * series RS, and the Ebers-Moll transport form with the Early factor
 * (Ebers and Moll 1954; Gummel and Poon 1970 for the Early term). CODATA
 * 2018 exact constants; every example runs at Tnom = 27 °C, so no
 * temperature scaling enters. Parameter defaults are those of docs/models.md.
 * The root finder is plain bisection on doubles (it cannot diverge and it
 * runs to the last representable bracket, far tighter than any check).
 */

/** Boltzmann constant, J/K (CODATA 2018, exact). */
export const K_BOLTZMANN = 1.380649e-23;
/** Elementary charge, C (CODATA 2018, exact). */
export const Q_ELECTRON = 1.602176634e-19;
/** Nominal temperature 27 °C, K. */
export const T_NOMINAL = 300.15;
/** Thermal voltage at Tnom, V. */
export const VT = (K_BOLTZMANN * T_NOMINAL) / Q_ELECTRON;

/**
 * Root of f on [lo, hi] by bisection (Burden and Faires, Numerical
 * Analysis, §2.1). f(lo) and f(hi) must differ in sign; halves until the
 * midpoint is no longer distinct from an end.
 */
export function bisect(f: (x: number) => number, lo: number, hi: number): number {
  let flo = f(lo);
  const fhi = f(hi);
  if (flo === 0) return lo;
  if (fhi === 0) return hi;
  if (Math.sign(flo) === Math.sign(fhi)) throw new Error(`bisect: no sign change on [${lo}, ${hi}] (${flo}, ${fhi})`);
  for (let k = 0; k < 400; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    const fm = f(mid);
    if (fm === 0) return mid;
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Diode parameters with the docs/models.md defaults filled in. */
export interface DiodeParams {
  readonly IS: number;
  readonly N: number;
  readonly RS: number;
  readonly BV: number | undefined;
  readonly IBV: number;
  readonly NBV: number;
}

/** Diode parameters from a model card (docs/models.md defaults: IS 1e-14, N 1, RS 0, IBV 1e-3, NBV 1). */
export function diodeParams(m: ReadonlyMap<string, number>): DiodeParams {
  return { IS: m.get('IS') ?? 1e-14, N: m.get('N') ?? 1, RS: m.get('RS') ?? 0, BV: m.get('BV'), IBV: m.get('IBV') ?? 1e-3, NBV: m.get('NBV') ?? 1 };
}

/** Junction current (A) at junction voltage vj (V, anode minus cathode): models.md "Diode". */
export function diodeJunction(p: DiodeParams, vj: number): number {
  const forward = p.IS * Math.expm1(vj / (p.N * VT));
  const breakdown = p.BV === undefined ? 0 : p.IBV * Math.exp(-(vj + p.BV) / (p.NBV * VT));
  return forward - breakdown;
}

/** Terminal current (A, anode to cathode) at terminal voltage v (V): the junction in series with RS. */
export function diodeCurrent(p: DiodeParams, v: number): number {
  if (p.RS === 0) return diodeJunction(p, v);
  // vj + RS·I(vj) = v; the left side increases with vj.
  const vj = bisect((x) => x + p.RS * diodeJunction(p, x) - v, Math.min(v, 0) - 1e-3, Math.max(v, 0) + 1e-3);
  return (v - vj) / p.RS;
}

/** NPN parameters with the docs/models.md defaults (IS 1e-16, BF 100, BR 1, NF 1, NR 1, no VAF/VAR, RB/RE 0). */
export interface NpnParams {
  readonly IS: number;
  readonly BF: number;
  readonly BR: number;
  readonly NF: number;
  readonly NR: number;
  readonly VAF: number | undefined;
  readonly VAR: number | undefined;
  readonly RB: number;
  readonly RE: number;
}

export function npnParams(m: ReadonlyMap<string, number>): NpnParams {
  if ((m.get('RC') ?? 0) !== 0) throw new Error('RC is not handled by the test solver');
  return {
    IS: m.get('IS') ?? 1e-16, BF: m.get('BF') ?? 100, BR: m.get('BR') ?? 1, NF: m.get('NF') ?? 1, NR: m.get('NR') ?? 1,
    VAF: m.get('VAF'), VAR: m.get('VAR'), RB: m.get('RB') ?? 0, RE: m.get('RE') ?? 0,
  };
}

/** Collector and base currents (A) at internal junction voltages (V): models.md "Bipolar transistor". */
export function ebersMoll(p: NpnParams, vbe: number, vbc: number): { ic: number; ib: number } {
  const icc = p.IS * Math.expm1(vbe / (p.NF * VT));
  const iec = p.IS * Math.expm1(vbc / (p.NR * VT));
  const early = 1 - (p.VAF === undefined ? 0 : vbc / p.VAF) - (p.VAR === undefined ? 0 : vbe / p.VAR);
  const it = (icc - iec) * early;
  return { ic: it - iec / p.BR, ib: icc / p.BF + iec / p.BR };
}

/** Terminal currents of an NPN whose emitter current is known. */
export interface FollowerJunction {
  /** Internal base-emitter voltage, V. */
  readonly vbe: number;
  readonly ic: number;
  readonly ib: number;
  /** Base terminal voltage, V (internal base plus Ib·RB). */
  readonly vb: number;
}

/**
 * The NPN with collector at `vc` and emitter terminal at `ve` carrying the
 * emitter current `ie` (A, out of the emitter): solves the internal Vbe
 * (the emitter current rises with it while Vc > Ve) and returns the base
 * terminal voltage that this takes, RB and RE included.
 */
export function npnAtEmitterCurrent(p: NpnParams, vc: number, ve: number, ie: number): FollowerJunction {
  const veInt = ve + ie * p.RE;
  const vbe = bisect((x) => {
    const { ic, ib } = ebersMoll(p, x, x + veInt - vc);
    return ic + ib - ie;
  }, -1, 2);
  const { ic, ib } = ebersMoll(p, vbe, vbe + veInt - vc);
  return { vbe, ic, ib, vb: veInt + vbe + ib * p.RB };
}
