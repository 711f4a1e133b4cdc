/**
 * The device equations of models.md written out again, independently of the
 * package, for the tests to compare against. Constants are typed in from
 * CODATA 2018 (exact in the 2019 SI), not imported. Sources: Shockley, Bell
 * Syst. Tech. J. 28, 1949 (diode); Ebers and Moll, Proc. IRE 42, 1954, with
 * the Early factor of Gummel and Poon, Bell Syst. Tech. J. 49, 1970
 * (transistor); the temperature laws of IS, BV and β, the breakdown term and
 * the depletion charge with its linear continuation above FC·VJ as in
 * Massobrio and Antognetti, Semiconductor Device Modeling with SPICE, 2nd
 * ed., ch. 1 and 2 (from memory). The area scaling of CJO is railcheck's own
 * choice (models.md), so a check of it is one against the specification,
 * not against an outside source.
 */

import type { BjtModel, DiodeModel } from '@railcheck/devices';

/** Boltzmann constant, J/K (CODATA 2018, exact). */
export const K_B = 1.380649e-23;
/** Elementary charge, C (CODATA 2018, exact). */
export const Q_E = 1.602176634e-19;
/** 27 °C in kelvin. */
export const T_NOM = 27 + 273.15;

export const vt = (kelvin: number): number => (K_B * kelvin) / Q_E;
export const kelvinOf = (celsius: number): number => celsius + 273.15;

/** IS(T) of the diode (models.md). */
export function refDiodeIs(m: DiodeModel, T: number): number {
  return m.IS * (T / T_NOM) ** (m.XTI / m.N) * Math.exp((m.EG / (m.N * vt(T))) * (T / T_NOM - 1));
}

/** BV(T) (models.md). */
export function refDiodeBv(m: DiodeModel, T: number): number | undefined {
  return m.BV === undefined ? undefined : m.BV * (1 + m.TBV * (T - T_NOM));
}

/** Diode current (A) at junction voltage v, models.md, area scaling IS and IBV. Also the two terms separately. */
export function refDiodeI(v: number, m: DiodeModel, T: number, area: number): { i: number; fwd: number; bd: number } {
  const Vt = vt(T);
  const fwd = area * refDiodeIs(m, T) * (Math.exp(v / (m.N * Vt)) - 1);
  const bv = refDiodeBv(m, T);
  const bd = bv === undefined ? 0 : area * m.IBV * Math.exp(-(v + bv) / (m.NBV * Vt));
  return { i: fwd - bd, fwd, bd };
}

/**
 * Depletion capacitance (F) of models.md: CJ0·(1 − V/VJ)^(−M) below VJ/2,
 * and above it the tangent line at VJ/2 ("continued linearly").
 */
export function refDepletionC(v: number, cj0: number, vj: number, m: number): number {
  const v0 = vj / 2;
  if (v < v0) return cj0 * (1 - v / vj) ** -m;
  const c0 = cj0 * 0.5 ** -m;
  const slope = (cj0 * m) / vj / 0.5 ** (m + 1);
  return c0 + slope * (v - v0);
}

/** Depletion charge (C): the closed form of models.md below VJ/2, the integral of the tangent line above. */
export function refDepletionQ(v: number, cj0: number, vj: number, m: number): number {
  const below = (u: number): number => (cj0 * vj * (1 - (1 - u / vj) ** (1 - m))) / (1 - m);
  const v0 = vj / 2;
  if (v < v0) return below(v);
  const c0 = cj0 * 0.5 ** -m;
  const slope = (cj0 * m) / vj / 0.5 ** (m + 1);
  const d = v - v0;
  return below(v0) + c0 * d + (slope * d * d) / 2;
}

/** IS(T) of the transistor (models.md). */
export function refBjtIs(m: BjtModel, T: number): number {
  return m.IS * (T / T_NOM) ** m.XTI * Math.exp((m.EG / vt(T)) * (T / T_NOM - 1));
}

/** Ebers-Moll transport currents into c, b, e (A) at actual vbe, vbc (models.md, PNP mirrored). */
export function refBjt(
  vbe: number,
  vbc: number,
  m: BjtModel,
  T: number,
  area: number,
): { ic: number; ib: number; ie: number; icc: number; iec: number; early: number; scale: number } {
  const s = m.polarity === 'npn' ? 1 : -1;
  const be = s * vbe;
  const bc = s * vbc;
  const Vt = vt(T);
  const IS = area * refBjtIs(m, T);
  const BF = m.BF * (T / T_NOM) ** m.XTB;
  const BR = m.BR * (T / T_NOM) ** m.XTB;
  const Icc = IS * (Math.exp(be / (m.NF * Vt)) - 1);
  const Iec = IS * (Math.exp(bc / (m.NR * Vt)) - 1);
  let early = 1;
  if (m.VAF !== undefined) early -= bc / m.VAF;
  if (m.VAR !== undefined) early -= be / m.VAR;
  const It = (Icc - Iec) * early;
  const Ic = It - Iec / BR;
  const Ib = Icc / BF + Iec / BR;
  const Ie = -(Ic + Ib);
  // Conditioning scale of the sums above: magnitudes of every term that enters them.
  const scale = (Math.abs(Icc) + Math.abs(Iec) + 2 * IS) * (1 + Math.abs(early)) * (1 + 1 / BR + 1 / BF);
  return { ic: s * Ic, ib: s * Ib, ie: s * Ie, icc: Icc, iec: Iec, early, scale };
}

/** |a − b| ≤ rel·scale + abs, with a readable failure message. */
export function close(a: number, b: number, rel: number, scale: number, abs = 0): boolean {
  const ok = Math.abs(a - b) <= rel * Math.abs(scale) + abs;
  if (!ok) console.error(`close() failed: ${a} vs ${b} (diff ${a - b}, allowed ${rel * Math.abs(scale) + abs})`);
  return ok;
}

/** dI/dV of {@link refDiodeI} (S), differentiated by hand from the models.md current. */
export function refDiodeG(v: number, m: DiodeModel, T: number, area: number): number {
  const Vt = vt(T);
  const fwd = ((area * refDiodeIs(m, T)) / (m.N * Vt)) * Math.exp(v / (m.N * Vt));
  const bv = refDiodeBv(m, T);
  const bd = bv === undefined ? 0 : ((area * m.IBV) / (m.NBV * Vt)) * Math.exp(-(v + bv) / (m.NBV * Vt));
  return fwd + bd;
}
