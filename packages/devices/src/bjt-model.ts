/**
 * Bipolar transistor equations of models.md: the Ebers-Moll transport form
 * (Ebers and Moll 1954) with the Early factor of Gummel and Poon 1970, the
 * temperature scaling of IS, BF and BR, and the junction charges.
 */

import { TNOM, thermalVoltage } from './constants.js';
import { type ChargeOut, type DepletionForm, depletionAt, depletionForm, expm1From, safeExpSlope } from './junction.js';
import type { BjtModel } from './models.js';

/** Terminal currents (A, into collector, base, emitter) and their derivatives (S) in the junction voltages. */
export interface BjtCurrents {
  ic: number;
  ib: number;
  ie: number;
  dIcDvbe: number;
  dIcDvbc: number;
  dIbDvbe: number;
  dIbDvbc: number;
  dIeDvbe: number;
  dIeDvbc: number;
  /** Forward transport current Icc (A), in the NPN frame. */
  icc: number;
  /** Reverse transport current Iec (A), in the NPN frame. */
  iec: number;
  /** dIcc/dVbe (S), in the NPN frame. */
  gcc: number;
  /** dIec/dVbc (S), in the NPN frame. */
  gec: number;
}

/** A zeroed {@link BjtCurrents} record, to be reused as an output slot. */
export function newBjtCurrents(): BjtCurrents {
  return { ic: 0, ib: 0, ie: 0, dIcDvbe: 0, dIcDvbc: 0, dIbDvbe: 0, dIbDvbc: 0, dIeDvbe: 0, dIeDvbc: 0, icc: 0, iec: 0, gcc: 0, gec: 0 };
}

/**
 * The model at `kelvin` and `area` (models.md): IS(T) = IS·(T/Tnom)^XTI·
 * exp((EG/Vt(T))·(T/Tnom − 1)), BF(T) = BF·(T/Tnom)^XTB, BR(T) likewise;
 * area multiplies IS, CJE and CJC and divides RB, RC and RE.
 * @param kelvin device temperature, K
 * @param area area factor (dimensionless), default 1
 */
export function scaleBjtModel(model: BjtModel, kelvin: number, area = 1): BjtModel {
  const ratio = kelvin / TNOM;
  const is = model.IS * Math.pow(ratio, model.XTI) * Math.exp((model.EG / thermalVoltage(kelvin)) * (ratio - 1));
  const beta = Math.pow(ratio, model.XTB);
  return {
    ...model,
    IS: is * area,
    BF: model.BF * beta,
    BR: model.BR * beta,
    CJE: model.CJE * area,
    CJC: model.CJC * area,
    RB: model.RB / area,
    RC: model.RC / area,
    RE: model.RE / area,
  };
}

/**
 * Ebers-Moll transport currents of models.md in the NPN frame, for a scaled
 * model, at internal junction voltages vbe, vbc (V) and thermal voltage vt
 * (V). Derivatives are the exact analytic ones, the Early factor's included.
 * Exponentials beyond argument 80 are continued linearly. Writes into `out`.
 */
export function evalBjtNpn(vbe: number, vbc: number, s: BjtModel, vt: number, out: BjtCurrents): void {
  const nf = s.NF * vt;
  const nr = s.NR * vt;
  const xf = vbe / nf;
  const xr = vbc / nr;
  // One exponential per junction serves its current and conductance (expm1From).
  const ef = safeExpSlope(xf);
  const er = safeExpSlope(xr);
  const icc = s.IS * expm1From(xf, ef);
  const gcc = (s.IS * ef) / nf;
  const iec = s.IS * expm1From(xr, er);
  const gec = (s.IS * er) / nr;
  const invVaf = s.VAF === undefined ? 0 : 1 / s.VAF;
  const invVar = s.VAR === undefined ? 0 : 1 / s.VAR;
  const early = 1 - vbc * invVaf - vbe * invVar;
  const d = icc - iec;
  const dItBe = gcc * early - d * invVar;
  const dItBc = -gec * early - d * invVaf;
  out.ic = d * early - iec / s.BR;
  out.dIcDvbe = dItBe;
  out.dIcDvbc = dItBc - gec / s.BR;
  out.ib = icc / s.BF + iec / s.BR;
  out.dIbDvbe = gcc / s.BF;
  out.dIbDvbc = gec / s.BR;
  out.ie = -(out.ic + out.ib);
  out.dIeDvbe = -(out.dIcDvbe + out.dIbDvbe);
  out.dIeDvbc = -(out.dIcDvbc + out.dIbDvbc);
  out.icc = icc;
  out.iec = iec;
  out.gcc = gcc;
  out.gec = gec;
}

/**
 * Junction charges of models.md in the NPN frame: Qbe = depletion(CJE, VJE,
 * MJE) + TF·Icc and Qbc = depletion(CJC, VJC, MJC) + TR·Iec, with their
 * capacitances. `cur` must hold {@link evalBjtNpn} at the same voltages.
 * `beForm` and `bcForm` are the junctions' {@link depletionForm}s, made here
 * when not given.
 */
export function evalBjtCharges(
  vbe: number,
  vbc: number,
  s: BjtModel,
  cur: BjtCurrents,
  be: ChargeOut,
  bc: ChargeOut,
  beForm: DepletionForm = depletionForm(s.CJE, s.VJE, s.MJE),
  bcForm: DepletionForm = depletionForm(s.CJC, s.VJC, s.MJC),
): void {
  depletionAt(vbe, beForm, be);
  be.q += s.TF * cur.icc;
  be.c += s.TF * cur.gcc;
  depletionAt(vbc, bcForm, bc);
  bc.q += s.TR * cur.iec;
  bc.c += s.TR * cur.gec;
}

/** +1 for NPN, −1 for PNP: the factor on every junction voltage and terminal current. */
export function polaritySign(model: BjtModel): 1 | -1 {
  return model.polarity === 'npn' ? 1 : -1;
}

/**
 * Terminal currents into collector, base and emitter (A) at the actual
 * junction voltages vbe = V(b) − V(e) and vbc = V(b) − V(c) (V), temperature
 * `kelvin` (K) and `area` (models.md; no gmin). For PNP every junction
 * voltage and current is negated, so the derivatives (S, with respect to the
 * actual vbe and vbc) equal the NPN ones at the mirrored bias. icc, iec, gcc
 * and gec stay in the NPN frame.
 */
export function bjtCurrents(vbe: number, vbc: number, model: BjtModel, kelvin: number, area: number): BjtCurrents {
  const sign = polaritySign(model);
  const out = newBjtCurrents();
  evalBjtNpn(sign * vbe, sign * vbc, scaleBjtModel(model, kelvin, area), thermalVoltage(kelvin), out);
  out.ic *= sign;
  out.ib *= sign;
  out.ie *= sign;
  return out;
}

/**
 * Junction charges (C) and capacitances (F) at the actual junction voltages
 * (V); charges are those on the base side, negated for PNP as the currents are.
 */
export function bjtCharges(vbe: number, vbc: number, model: BjtModel, kelvin: number, area: number): { be: ChargeOut; bc: ChargeOut } {
  const sign = polaritySign(model);
  const s = scaleBjtModel(model, kelvin, area);
  const cur = newBjtCurrents();
  evalBjtNpn(sign * vbe, sign * vbc, s, thermalVoltage(kelvin), cur);
  const be = { q: 0, c: 0 };
  const bc = { q: 0, c: 0 };
  evalBjtCharges(sign * vbe, sign * vbc, s, cur, be, bc);
  be.q *= sign;
  bc.q *= sign;
  return { be, bc };
}
