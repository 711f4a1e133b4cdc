/**
 * The datasheet form of a `.model` card (docs/models.md, "Datasheet form"):
 * keys named after the quantities a datasheet gives (a Zener's voltage at
 * its test current and its dynamic resistance, a diode's forward voltage at
 * a current, a transistor's gain at a collector current), resolved to the
 * physical parameters of models.md by the equations below. Every equation
 * inverts the model's own large-signal equation at the datasheet's test
 * point, so that the model reproduces the datasheet value there:
 *
 * - Diode forward (Shockley, models.md): with Vj = VF − IF·RS,
 *   one point: IS = IF/(exp(Vj/(N·Vt)) − 1) with N as given (default 1);
 *   two points: N = (Vj2 − Vj1)/(Vt·ln((IF2 + IS)/(IF1 + IS))), iterated
 *   with IS from the first point; three points: RS is the root (bisection)
 *   that puts the third point on the curve through the first two.
 * - Zener breakdown (the breakdown term −IBV·exp(−(V + BV)/(NBV·Vt)) is IBV
 *   exactly at V = −BV): IBV = IZT − IS, BV = VZ − IZT·RS; the dynamic
 *   resistance r = NBV·Vt/IBV + RS at the test current gives NBV from ZZT
 *   (RS as given, default 0), or, with the knee point IZK and ZZK, both NBV
 *   and RS from the two dynamic resistances. A temperature coefficient
 *   TCVZ (V/K) or TCVZPCT (%/K) at IZT becomes TBV = TCVZ/BV (models.md:
 *   BV(T) = BV·(1 + TBV·(T − Tnom)), and at I = IBV the junction sits at −BV
 *   whatever Vt).
 * - Transistor (Ebers-Moll transport form with Early effect, models.md), in
 *   forward active operation at VCE: Ic is linear in IS at a given Vbe, so
 *   IS follows from VBE at ICVBE exactly; BF from HFE at ICHFE as
 *   BF = Icc/(Ib − Iec/BR) with Ib = ICHFE/HFE; VAF is VA, or from the
 *   output admittance at constant base current, HOE = ∂Ic/∂VCE = Icc/VAF.
 *
 * Vt is taken at Tnom (27 °C): datasheet values are read at 25 °C to 27 °C,
 * and the 2 K between them is below their own tolerances (from memory).
 */
import { TNOM, thermalVoltage } from './constants.js';
import { POSITIVE, ANY, type ValueRange } from './ranges.js';

/** One datasheet key: its name on `.model` lines, unit, meaning, the physical parameters it fixes, and its range. */
export interface SheetKey {
  /** Upper-case name as written on `.model` lines. */
  readonly name: string;
  readonly unit: string;
  /** The datasheet quantity it stands for, in the trade's words. */
  readonly doc: string;
  /** Physical parameters the key determines: giving one of them as well is a conflict. */
  readonly sets: readonly string[];
  readonly range: ValueRange;
}

const key = (name: string, unit: string, doc: string, sets: readonly string[], range: ValueRange = POSITIVE): SheetKey => ({ name, unit, doc, sets, range });

/** Datasheet keys of a `D` model: forward points, the Zener's breakdown data, its temperature coefficient. */
export const DIODE_SHEET_KEYS: readonly SheetKey[] = [
  key('VF', 'V', 'forward voltage V_F at IF', ['IS']),
  key('IF', 'A', 'forward current I_F of the VF point', []),
  key('VF2', 'V', 'forward voltage at a second current IF2', ['N']),
  key('IF2', 'A', 'forward current of the VF2 point', []),
  key('VF3', 'V', 'forward voltage at a third current IF3', ['RS']),
  key('IF3', 'A', 'forward current of the VF3 point', []),
  key('VZ', 'V', 'Zener voltage V_Z at IZT', ['BV', 'IBV']),
  key('IZT', 'A', 'Zener test current I_ZT (default 5 mA)', []),
  key('ZZT', 'Ω', 'dynamic resistance r_zj (Z_ZT) at IZT', ['NBV']),
  key('IZK', 'A', 'knee current I_ZK', []),
  key('ZZK', 'Ω', 'dynamic resistance Z_ZK at IZK', ['RS']),
  key('TCVZ', 'V/K', 'temperature coefficient of VZ at IZT, S_Z (write 2m for 2 mV/K)', ['TBV'], ANY),
  key('TCVZPCT', '%/K', 'temperature coefficient of VZ at IZT as a percentage per kelvin, α_VZ', ['TBV'], ANY),
];

/** Datasheet keys of an `NPN` or `PNP` model (magnitudes for a PNP). */
export const BJT_SHEET_KEYS: readonly SheetKey[] = [
  key('HFE', '', 'DC current gain h_FE at ICHFE and VCE', ['BF']),
  key('ICHFE', 'A', 'collector current of the h_FE point (default 10 mA)', []),
  key('VBE', 'V', 'base-emitter voltage V_BE at ICVBE and VCE', ['IS']),
  key('ICVBE', 'A', 'collector current of the V_BE point (default ICHFE, else 10 mA)', []),
  key('VCE', 'V', 'collector-emitter voltage of the h_FE and V_BE points (default 5 V)', []),
  key('VA', 'V', 'Early voltage V_A', ['VAF']),
  key('HOE', 'S', 'output admittance h_oe at ICHFE and VCE, base current held', ['VAF']),
];

/** Default Zener test current, A: the test current most small Zener datasheets use (typical datasheet value, from memory). */
export const DEFAULT_IZT = 5e-3;
/** Default collector current of the gain and V_BE points, A (a small-signal transistor's usual test current; typical datasheet value, from memory). */
export const DEFAULT_IC_TEST = 10e-3;
/** Default collector-emitter voltage of the transistor's test points, V (typical datasheet test condition, from memory). */
export const DEFAULT_VCE_TEST = 5;

/** The datasheet keys of a model kind. */
export function sheetKeys(kind: 'diode' | 'bjt'): readonly SheetKey[] {
  return kind === 'diode' ? DIODE_SHEET_KEYS : BJT_SHEET_KEYS;
}

/** A datasheet value that cannot be turned into parameters: the key to blame, what is wrong, and what would do. */
export interface SheetProblem {
  readonly key: string;
  readonly message: string;
  readonly expected: string;
}

/** The outcome of resolving a datasheet form: the physical parameters (given ones kept, sheet keys replaced), and which defaults filled what the form left open. */
export type SheetResolution =
  | { readonly ok: true; readonly params: Map<string, number>; readonly filled: readonly string[]; readonly notes: readonly SheetProblem[] }
  | { readonly ok: false; readonly problems: readonly SheetProblem[] };

const VT = thermalVoltage(TNOM);

/** Keys given without the key they belong to, and sheet keys given with a parameter they set. */
function pairingProblems(given: ReadonlyMap<string, number>, table: readonly SheetKey[], needs: readonly (readonly [string, string])[]): SheetProblem[] {
  const out: SheetProblem[] = [];
  for (const [k, partner] of needs) {
    if (given.has(k) && !given.has(partner)) out.push({ key: k, message: `${k} is given without ${partner}`, expected: `${partner} with ${k}, or neither` });
  }
  for (const s of table) {
    if (!given.has(s.name)) continue;
    for (const p of s.sets) if (given.has(p)) out.push({ key: s.name, message: `${s.name} sets ${p}, which is given as well`, expected: `either ${s.name} (the datasheet form) or ${p} (the physical parameter), not both` });
  }
  return out;
}

/** Root of an increasing-then-any continuous f on [lo, hi] by bisection, given f(lo) and f(hi) of opposite signs. */
function bisect(f: (x: number) => number, lo: number, hi: number): number {
  let flo = f(lo);
  for (let k = 0; k < 200; k++) {
    const mid = 0.5 * (lo + hi);
    const fm = f(mid);
    if (fm === 0 || hi - lo <= 1e-15 * Math.max(1, Math.abs(mid))) return mid;
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** IS and N through forward points (Vj, I) with N known: IS from the first. */
const isFrom = (vj: number, i: number, n: number): number => i / Math.expm1(vj / (n * VT));

/** N and IS through two junction points (Vj1, I1), (Vj2, I2), the IS term kept in the logarithm (fixed point; it converges at once for IS ≪ I). */
function twoPoint(vj1: number, i1: number, vj2: number, i2: number): { n: number; is: number } {
  let is = 0;
  let n = 1;
  for (let k = 0; k < 50; k++) {
    n = (vj2 - vj1) / (VT * Math.log((i2 + is) / (i1 + is)));
    const next = isFrom(vj1, i1, n);
    if (Math.abs(next - is) <= 1e-14 * next) {
      is = next;
      break;
    }
    is = next;
  }
  return { n, is };
}

/**
 * Resolves a `D` model's datasheet keys (upper-case, values in SI units)
 * into physical parameters. Keys not of the datasheet form are kept as
 * given; the result carries no datasheet key.
 */
export function resolveDiodeSheet(given: ReadonlyMap<string, number>): SheetResolution {
  const problems = pairingProblems(given, DIODE_SHEET_KEYS, [['IF', 'VF'], ['VF', 'IF'], ['VF2', 'VF'], ['VF2', 'IF2'], ['IF2', 'VF2'], ['VF3', 'VF2'], ['VF3', 'IF3'], ['IF3', 'VF3'], ['IZT', 'VZ'], ['ZZT', 'VZ'], ['IZK', 'ZZK'], ['ZZK', 'IZK'], ['ZZK', 'ZZT'], ['TCVZ', 'VZ'], ['TCVZPCT', 'VZ']]);
  if (given.has('TCVZ') && given.has('TCVZPCT')) problems.push({ key: 'TCVZPCT', message: 'TCVZ and TCVZPCT are both given', expected: 'one temperature coefficient: TCVZ in V/K or TCVZPCT in %/K' });
  if (given.has('VF3') && given.has('ZZK')) problems.push({ key: 'VF3', message: 'VF3 sets RS, which the knee point (IZK, ZZK) sets as well', expected: 'RS from the forward points or from the knee, not both' });
  if (problems.length > 0) return { ok: false, problems };
  const out = new Map([...given].filter(([k]) => !DIODE_SHEET_KEYS.some((s) => s.name === k)));
  const filled: string[] = [];
  const g = (k: string): number | undefined => given.get(k);
  // The Zener's knee fixes RS (and NBV) first: the forward points then see that RS.
  let rs = g('RS');
  let nbvFromKnee: number | undefined;
  let kneeMissed: { zzk: number; izk: number } | undefined;
  const notes: SheetProblem[] = [];
  const vz = g('VZ');
  const izt = g('IZT') ?? DEFAULT_IZT;
  if (vz !== undefined && g('IZT') === undefined) filled.push(`IZT = ${DEFAULT_IZT} A (default test current)`);
  const zzt = g('ZZT');
  const izk = g('IZK');
  const zzk = g('ZZK');
  if (izk !== undefined && zzk !== undefined && zzt !== undefined) {
    if (!(izk < izt)) return { ok: false, problems: [{ key: 'IZK', message: `the knee current IZK = ${izk} A is not below the test current ${izt} A`, expected: 'IZK < IZT' }] };
    const nbv = (zzk - zzt) / (VT * (1 / izk - 1 / izt));
    const r = zzt - (nbv * VT) / izt;
    if (!(nbv > 0)) return { ok: false, problems: [{ key: 'ZZK', message: `ZZK = ${zzk} Ω at ${izk} A and ZZT = ${zzt} Ω at ${izt} A cannot both hold: the knee would be sharper than the test point (NBV = ${nbv.toPrecision(3)})`, expected: 'ZZK > ZZT: a knee that softens at low current' }] };
    if (r >= 0) {
      nbvFromKnee = nbv;
      rs = r;
      out.set('RS', r);
    } else {
      // The breakdown term's dynamic resistance falls as 1/I: a knee softer than that (most real datasheets) cannot be met
      // with RS ≥ 0. ZZT, the value a regulator works at, is kept; the knee is met as closely as RS = 0 allows.
      kneeMissed = { zzk, izk };
    }
  }
  // Forward points.
  const points: Array<[number, number]> = [];
  for (const [v, i] of [['VF', 'IF'], ['VF2', 'IF2'], ['VF3', 'IF3']] as const) if (g(v) !== undefined) points.push([g(v)!, g(i)!]);
  for (let k = 1; k < points.length; k++) {
    if (!(points[k]![1] > points[k - 1]![1] && points[k]![0] > points[k - 1]![0])) {
      const v = k === 1 ? 'VF2' : 'VF3';
      return { ok: false, problems: [{ key: v, message: `the forward points must rise in current and in voltage (${v} at ${points[k]![1]} A after ${points[k - 1]![0]} V at ${points[k - 1]![1]} A)`, expected: 'VF < VF2 < VF3 at IF < IF2 < IF3' }] };
    }
  }
  let isResolved = g('IS');
  if (points.length === 3) {
    const [[v1, i1], [v2, i2], [v3, i3]] = points as [[number, number], [number, number], [number, number]];
    // f(RS): how far point 3 lies above the curve through points 1 and 2 with that RS; decreasing in RS.
    const f = (r: number): number => {
      const { n, is } = twoPoint(v1 - i1 * r, i1, v2 - i2 * r, i2);
      return v3 - i3 * r - n * VT * Math.log1p(i3 / is);
    };
    // Every junction voltage VF − IF·RS stays positive below the least VF/IF.
    const hi = Math.min(v1 / i1, v2 / i2, v3 / i3) * (1 - 1e-12);
    if (!(f(0) > 0)) return { ok: false, problems: [{ key: 'VF3', message: 'the third forward point lies on or below the Shockley curve through the first two: no series resistance puts it there', expected: 'VF3 above the voltage the first two points give at IF3' }] };
    if (!(f(hi) < 0) && !Number.isNaN(f(hi))) return { ok: false, problems: [{ key: 'VF3', message: 'no series resistance puts the third forward point on the curve through the first two', expected: 'forward points of one diode' }] };
    rs = bisect(f, 0, hi);
    out.set('RS', rs);
  }
  const r = rs ?? 0;
  if (points.length >= 2) {
    const [[v1, i1], [v2, i2]] = points as [[number, number], [number, number]];
    const { n, is } = twoPoint(v1 - i1 * r, i1, v2 - i2 * r, i2);
    if (!(n > 0) || !(is > 0) || !Number.isFinite(is) || !(v1 - i1 * r > 0)) {
      const withRs = r > 0 ? ` with the series resistance RS = ${Number(r.toPrecision(4))} Ω${given.has('ZZK') ? ' that the knee point (IZK, ZZK) sets' : ''} (its drop IF·RS comes off each VF)` : '';
      return { ok: false, problems: [{ key: 'VF2', message: `the two forward points give no emission coefficient and saturation current${withRs}`, expected: given.has('ZZK') ? 'forward points at currents where IF·RS stays well below VF, or no knee point' : 'two forward points of one diode' }] };
    }
    out.set('N', n);
    out.set('IS', is);
    isResolved = is;
  } else if (points.length === 1) {
    const [[v1, i1]] = points as [[number, number]];
    const n = g('N') ?? 1;
    if (g('N') === undefined) filled.push('N = 1 (default: one forward point fixes IS only)');
    const is = isFrom(v1 - i1 * r, i1, n);
    if (!(v1 - i1 * r > 0) || !(is > 0) || !Number.isFinite(is)) return { ok: false, problems: [{ key: 'VF', message: `VF = ${v1} V at ${i1} A gives no saturation current${r > 0 ? ` with RS = ${r} Ω` : ''}`, expected: 'a forward voltage above IF·RS' }] };
    out.set('IS', is);
    isResolved = is;
  }
  if (vz !== undefined) {
    const is = isResolved ?? 1e-14;
    const ibv = izt - is;
    if (!(ibv > 0)) return { ok: false, problems: [{ key: 'IZT', message: `the test current ${izt} A is not above the saturation current ${is} A`, expected: 'IZT ≫ IS' }] };
    let nbv: number;
    if (nbvFromKnee !== undefined) nbv = nbvFromKnee;
    else if (zzt !== undefined) {
      nbv = ((zzt - r) * ibv) / VT;
      if (!(nbv > 0)) return { ok: false, problems: [{ key: 'ZZT', message: `ZZT = ${zzt} Ω is not above the series resistance RS = ${r} Ω`, expected: 'ZZT > RS' }] };
      if (kneeMissed) {
        const got = (nbv * VT) / kneeMissed.izk + r;
        notes.push({ key: 'ZZK', message: `ZZK = ${kneeMissed.zzk} Ω at ${kneeMissed.izk} A is softer than the model's breakdown can be with ZZT = ${zzt} Ω at ${izt} A (its dynamic resistance falls as 1/I): ZZT is met, and the model gives ${Number(got.toPrecision(3))} Ω at IZK`, expected: 'ZZK below ZZT·IZT/IZK + RS, or no knee point' });
      }
    } else {
      nbv = g('NBV') ?? 1;
      if (g('NBV') === undefined) filled.push('NBV = 1 (default: no ZZT given, a sharp knee)');
    }
    const bv = vz - izt * r;
    if (!(bv > 0)) return { ok: false, problems: [{ key: 'VZ', message: `VZ = ${vz} V at ${izt} A leaves no breakdown voltage with RS = ${r} Ω`, expected: 'VZ > IZT·RS' }] };
    out.set('BV', bv);
    out.set('IBV', ibv);
    out.set('NBV', nbv);
    const tc = g('TCVZ') ?? (g('TCVZPCT') !== undefined ? (g('TCVZPCT')! / 100) * vz : undefined);
    if (tc !== undefined) out.set('TBV', tc / bv);
  }
  return { ok: true, params: out, filled, notes };
}

/** Collector current (A) of the transport model in forward operation at Vbe, VCE (magnitudes), and its Icc and Iec. */
function collector(p: BjtPoint, vbe: number, vce: number): { ic: number; icc: number; iec: number } {
  const vbc = vbe - vce;
  const icc = p.is * Math.expm1(vbe / (p.nf * VT));
  const iec = p.is * Math.expm1(vbc / (p.nr * VT));
  const early = 1 - (p.vaf === undefined ? 0 : vbc / p.vaf) - (p.var === undefined ? 0 : vbe / p.var);
  return { ic: (icc - iec) * early - iec / p.br, icc, iec };
}

/** The transistor parameters the test points need. */
interface BjtPoint {
  is: number;
  nf: number;
  nr: number;
  br: number;
  vaf: number | undefined;
  var: number | undefined;
}

/** Vbe (V) at which the collector current is `ic` A at `vce` V (bisection on the increasing Ic(Vbe)). */
function vbeAt(p: BjtPoint, ic: number, vce: number): number {
  return bisect((v) => collector(p, v, vce).ic - ic, 0, Math.min(vce, 3));
}

/**
 * Resolves an `NPN`/`PNP` model's datasheet keys (upper-case, SI units,
 * magnitudes) into physical parameters; keys not of the datasheet form are
 * kept as given.
 */
export function resolveBjtSheet(given: ReadonlyMap<string, number>): SheetResolution {
  const problems = pairingProblems(given, BJT_SHEET_KEYS, [['ICHFE', 'HFE'], ['ICVBE', 'VBE']]);
  if (given.has('VA') && given.has('HOE')) problems.push({ key: 'HOE', message: 'VA and HOE are both given', expected: 'the Early voltage VA or the output admittance HOE, not both' });
  if (problems.length > 0) return { ok: false, problems };
  const out = new Map([...given].filter(([k]) => !BJT_SHEET_KEYS.some((s) => s.name === k)));
  const filled: string[] = [];
  const g = (k: string): number | undefined => given.get(k);
  const vce = g('VCE') ?? DEFAULT_VCE_TEST;
  const sheetUsed = ['HFE', 'VBE', 'HOE'].some((k) => given.has(k));
  if (sheetUsed && g('VCE') === undefined) filled.push(`VCE = ${DEFAULT_VCE_TEST} V (default test voltage)`);
  const ichfe = g('ICHFE') ?? DEFAULT_IC_TEST;
  if (given.has('HFE') && g('ICHFE') === undefined) filled.push(`ICHFE = ${DEFAULT_IC_TEST} A (default test current)`);
  const icvbe = g('ICVBE') ?? (given.has('HFE') ? ichfe : DEFAULT_IC_TEST);
  if (given.has('VBE') && g('ICVBE') === undefined) filled.push(`ICVBE = ${icvbe} A (${given.has('HFE') ? 'the h_FE point' : 'default test current'})`);
  const vbe = g('VBE');
  if (vbe !== undefined && !(vbe < vce)) return { ok: false, problems: [{ key: 'VBE', message: `VBE = ${vbe} V is not below VCE = ${vce} V: the point is not in forward operation`, expected: 'VBE < VCE' }] };
  const p: BjtPoint = { is: g('IS') ?? 1e-16, nf: g('NF') ?? 1, nr: g('NR') ?? 1, br: g('BR') ?? 1, vaf: g('VA') ?? g('VAF'), var: g('VAR') };
  const hoe = g('HOE');
  let bf = g('BF') ?? 100;
  const rb = g('RB') ?? 0;
  const rc = g('RC') ?? 0;
  const re = g('RE') ?? 0;
  // The datasheet's VBE and VCE are at the terminals: the junctions see them less the drops across RB, RC and RE,
  // which depend on the currents the model gives, as HOE ties VAF to Icc at the gain point: a fixed point, reached
  // in a few rounds (one, with no terminal resistance and no HOE).
  const iterate = hoe !== undefined || rb > 0 || rc > 0 || re > 0;
  if (hoe !== undefined) p.vaf = ichfe / hoe;
  let ibv = icvbe / bf;
  let converged = !iterate;
  for (let round = 0; round < (iterate ? 100 : 1); round++) {
    const before = [p.is, bf, p.vaf ?? 0];
    if (vbe !== undefined) {
      const vbej = vbe - ibv * rb - (icvbe + ibv) * re;
      // The drops across RB and RE take the whole VBE: no junction voltage is left to give the current.
      if (!(vbej > 0.1)) {
        return { ok: false, problems: [{ key: 'VBE', message: `VBE = ${vbe} V at ${icvbe} A is less than the drop across RB and RE at that current (about ${Number((ibv * rb + (icvbe + ibv) * re).toPrecision(3))} V)`, expected: 'a VBE above IB·RB + IE·RE, or smaller RB and RE' }] };
      }
      const vcej = vce - icvbe * rc - (icvbe + ibv) * re;
      p.is = icvbe / collector({ ...p, is: 1 }, vbej, vcej).ic;
    }
    if (given.has('HFE') || hoe !== undefined) {
      const ibh = given.has('HFE') ? ichfe / g('HFE')! : ichfe / bf;
      const vcej = vce - ichfe * rc - (ichfe + ibh) * re;
      const { icc, iec } = collector(p, vbeAt(p, ichfe, vcej), vcej);
      if (given.has('HFE')) bf = icc / (ibh - iec / p.br);
      if (hoe !== undefined) {
        const next = icc / hoe;
        if (!(next > vce)) return { ok: false, problems: [{ key: 'HOE', message: `HOE = ${hoe} S at ${ichfe} A gives an Early voltage of ${next.toPrecision(3)} V, not above VCE = ${vce} V`, expected: 'an output admittance well below IC/VCE' }] };
        p.vaf = next;
      }
    }
    if (vbe !== undefined) {
      // The model's base current at the VBE point, for the next round's drops.
      const vcej = vce - icvbe * rc - (icvbe + ibv) * re;
      const { icc, iec } = collector(p, vbeAt(p, icvbe, vcej), vcej);
      ibv = icc / bf + iec / p.br;
    }
    const after = [p.is, bf, p.vaf ?? 0];
    if (after.every((x, k) => Math.abs(x - before[k]!) <= 1e-12 * Math.abs(x))) {
      converged = true;
      break;
    }
  }
  if (!converged) return { ok: false, problems: [{ key: given.has('VBE') ? 'VBE' : 'HFE', message: 'the datasheet values and the terminal resistances RB, RC, RE admit no consistent set of parameters (the fixed point does not settle to 1e-12 in 100 rounds)', expected: 'datasheet values of one transistor, with RB, RC and RE small against VBE/IB and VBE/IE' }] };
  const notes: SheetProblem[] = [];
  if (!(p.is > 0) || !Number.isFinite(p.is)) return { ok: false, problems: [{ key: 'VBE', message: `VBE = ${vbe} V at ${icvbe} A gives no saturation current`, expected: 'a base-emitter voltage of a silicon transistor (about 0.5 V to 1 V)' }] };
  if (given.has('HFE') && !(bf > 0 && Number.isFinite(bf))) return { ok: false, problems: [{ key: 'HFE', message: `HFE = ${g('HFE')} at ${ichfe} A gives no forward beta`, expected: 'a gain above 0' }] };
  if (vbe !== undefined) out.set('IS', p.is);
  if (given.has('HFE')) out.set('BF', bf);
  if (given.has('VA') || hoe !== undefined) out.set('VAF', p.vaf!);
  return { ok: true, params: out, filled, notes };
}

/** Resolves the datasheet form of a model of `kind` (see {@link resolveDiodeSheet}, {@link resolveBjtSheet}). */
export function resolveSheet(kind: 'diode' | 'bjt', given: ReadonlyMap<string, number>): SheetResolution {
  return kind === 'diode' ? resolveDiodeSheet(given) : resolveBjtSheet(given);
}
