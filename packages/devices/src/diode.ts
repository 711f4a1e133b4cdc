/**
 * Junction diode of models.md: Shockley's law (Shockley 1949) with an
 * exponential reverse-breakdown term, series resistance, depletion and
 * transit-time charge, and the temperature scaling of IS and BV.
 */

import { TNOM, thermalVoltage } from './constants.js';
import type { DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import { type ChargeOut, type DepletionForm, EXP_LINEAR_LIMIT, criticalVoltage, depletionAt, depletionForm, expm1From, pnjlim, safeExpSlope, safeExp } from './junction.js';
import type { DiodeModel } from './models.js';
import { PairSlots, at, injectPair } from './stamp.js';
import type { Diode } from './types.js';

/** Output slot of the current evaluation: current in amps, conductance dI/dV in siemens. */
export interface CurrentOut {
  i: number;
  g: number;
}

/**
 * The model at `kelvin` and `area` (models.md): IS(T) = IS·(T/Tnom)^(XTI/N)·
 * exp((EG/(N·Vt(T)))·(T/Tnom − 1)), BV(T) = BV·(1 + TBV·(T − Tnom)); area
 * multiplies IS, IBV and CJO and divides RS. Every other field is copied.
 * @param kelvin device temperature, K
 * @param area area factor (dimensionless), default 1
 */
export function scaleDiodeModel(model: DiodeModel, kelvin: number, area = 1): DiodeModel {
  const ratio = kelvin / TNOM;
  const vtN = model.N * thermalVoltage(kelvin);
  const is = model.IS * Math.pow(ratio, model.XTI / model.N) * Math.exp((model.EG / vtN) * (ratio - 1));
  const bv = model.BV === undefined ? undefined : model.BV * (1 + model.TBV * (kelvin - TNOM));
  return { ...model, IS: is * area, IBV: model.IBV * area, CJO: model.CJO * area, RS: model.RS / area, BV: bv };
}

/**
 * Junction current and conductance of models.md at junction voltage v (V)
 * for a model already scaled by {@link scaleDiodeModel}, at thermal voltage
 * vt (V): I = IS·(exp(V/(N·Vt)) − 1) − IBV·exp(−(V + BV)/(NBV·Vt)), the
 * second term only when BV is given. Exponentials beyond argument 80 are
 * continued linearly ({@link safeExp}). Writes i (A) and g = dI/dV (S).
 */
export function evalDiode(v: number, s: DiodeModel, vt: number, out: CurrentOut): void {
  junctionCurrent(v, s.IS, s.N * vt, s.BV, s.IBV, s.NBV * vt, out);
}

/**
 * {@link evalDiode} on the model's constants: IS (A), N·Vt (V), BV (V, or
 * undefined), IBV (A), NBV·Vt (V). One exponential per term serves the
 * current and the conductance; the Shockley term's exp − 1 is taken from it
 * by {@link expm1From}, which calls expm1 only near zero bias where the
 * subtraction would cancel.
 */
export function junctionCurrent(v: number, is: number, nvt: number, bv: number | undefined, ibv: number, nbv: number, out: CurrentOut): void {
  const x = v / nvt;
  const e = safeExpSlope(x);
  let i = is * expm1From(x, e);
  let g = (is * e) / nvt;
  if (bv !== undefined) {
    const xb = -(v + bv) / nbv;
    const eb = safeExpSlope(xb);
    i -= ibv * (xb <= EXP_LINEAR_LIMIT ? eb : safeExp(xb));
    g += (ibv * eb) / nbv;
  }
  out.i = i;
  out.g = g;
}

/**
 * Junction charge of models.md for a scaled model: Q = TT·I(V) plus the
 * depletion charge with CJO, VJ, M (linear-in-capacitance above VJ/2).
 * Writes q (C) and c = dQ/dV (F); `cur` must hold {@link evalDiode} at v.
 * `form` is the model's {@link depletionForm}, made here when not given.
 */
export function evalDiodeCharge(v: number, s: DiodeModel, cur: CurrentOut, out: ChargeOut, form: DepletionForm = depletionForm(s.CJO, s.VJ, s.M)): void {
  depletionAt(v, form, out);
  out.q += s.TT * cur.i;
  out.c += s.TT * cur.g;
}

/**
 * Diode current I (A) and conductance dI/dV (S) at junction voltage v (V,
 * anode minus cathode after RS), temperature `kelvin` (K) and `area`
 * (models.md; no gmin).
 */
export function diodeCurrent(v: number, model: DiodeModel, kelvin: number, area: number): CurrentOut {
  const out = { i: 0, g: 0 };
  evalDiode(v, scaleDiodeModel(model, kelvin, area), thermalVoltage(kelvin), out);
  return out;
}

/** Diode junction charge q (C) and capacitance dq/dv (F) at junction voltage v (V) (models.md). */
export function diodeCharge(v: number, model: DiodeModel, kelvin: number, area: number): ChargeOut {
  const s = scaleDiodeModel(model, kelvin, area);
  const cur = { i: 0, g: 0 };
  evalDiode(v, s, thermalVoltage(kelvin), cur);
  const out = { q: 0, c: 0 };
  evalDiodeCharge(v, s, cur, out);
  return out;
}

class DiodeImpl implements Diode {
  readonly kind = 'diode' as const;
  readonly nodes: readonly [number, number];
  private scaled: DiodeModel;
  private vt = 0;
  /** N·Vt and NBV·Vt (V) of the scaled model, and its depletion constants: once per temperature. */
  private nvt = 0;
  private nbv = 0;
  private form: DepletionForm;
  /** The junction voltage of the present load, V (read by loadCharge). */
  private vd = 0;
  private vcrit = 0;
  private vcritBv = 0;
  /** Junction anode: the internal node behind RS, else the anode itself. */
  private ja: number;
  private chargeOff = -1;
  private vOff = -1;
  private readonly hasCharge: boolean;
  private readonly junction = new PairSlots();
  private readonly series = new PairSlots();
  private readonly cur: CurrentOut = { i: 0, g: 0 };
  private readonly chg: ChargeOut = { q: 0, c: 0 };
  private topo: Topology = { dcPaths: [], voltageDefined: [] };

  constructor(
    readonly name: string,
    anode: number,
    cathode: number,
    readonly model: DiodeModel,
    readonly area: number,
  ) {
    this.nodes = [anode, cathode];
    this.ja = anode;
    this.hasCharge = model.CJO !== 0 || model.TT !== 0;
    this.scaled = model;
    this.form = depletionForm(model.CJO, model.VJ, model.M);
    this.setTemperature(TNOM);
  }

  allocate(unknowns: UnknownAllocator): void {
    const [a, k] = this.nodes;
    if (this.scaled.RS > 0) this.ja = unknowns.internalNode(`${this.name}:anode`);
    this.chargeOff = unknowns.state(2);
    this.vOff = unknowns.state(1);
    this.topo = {
      dcPaths: this.ja === a ? [[a, k]] : [[a, this.ja], [this.ja, k]],
      voltageDefined: [],
    };
  }

  chargeSlots(): readonly number[] {
    return this.hasCharge ? [this.chargeOff] : [];
  }

  bind(slots: SlotBinder): void {
    this.junction.bind(slots, this.ja, this.nodes[1]);
    if (this.ja !== this.nodes[0]) this.series.bind(slots, this.nodes[0], this.ja);
  }

  setTemperature(kelvin: number): void {
    this.scaled = scaleDiodeModel(this.model, kelvin, this.area);
    this.vt = thermalVoltage(kelvin);
    const s = this.scaled;
    this.nvt = s.N * this.vt;
    this.nbv = s.NBV * this.vt;
    this.form = depletionForm(s.CJO, s.VJ, s.M);
    this.vcrit = criticalVoltage(this.nvt, s.IS);
    this.vcritBv = criticalVoltage(this.nbv, s.IBV);
  }

  /** Nagel limiting of the junction voltage; the breakdown side is mirrored about −BV. */
  private limit(vd: number, vold: number): number {
    const s = this.scaled;
    // Mirrored about −BV below it: −(pnjlim(−(vd + BV), −(vold + BV), NBV·Vt, Vcrit,BV) + BV). One call
    // site for both sides (±1 and the offset are exact): a second one is left out of the inlining of
    // load, and its floating-point arguments and result would then be boxed on the heap at every load.
    const breakdown = s.BV !== undefined && vd < Math.min(0, -s.BV + 10 * this.nbv);
    const sign = breakdown ? -1 : 1;
    const offset = breakdown ? (s.BV ?? 0) : 0;
    const limited = pnjlim(sign * (vd + offset), sign * (vold + offset), breakdown ? this.nbv : this.nvt, breakdown ? this.vcritBv : this.vcrit);
    return sign * limited - offset;
  }

  load(ctx: LoadContext): void {
    const k = this.nodes[1];
    const vraw = at(ctx.x, this.ja) - at(ctx.x, k);
    const vd = ctx.initJunctions ? this.vcrit : this.limit(vraw, ctx.state[this.vOff] ?? 0);
    if (vd !== vraw) ctx.limited = true;
    ctx.state[this.vOff] = vd;
    const cur = this.cur;
    const s = this.scaled;
    junctionCurrent(vd, s.IS, this.nvt, s.BV, s.IBV, this.nbv, cur);
    // gmin is linear in vd, so it adds to G and cancels out of Ieq.
    this.junction.add(ctx.matrix, cur.g + ctx.gmin);
    injectPair(ctx.rhs, this.ja, k, cur.i - cur.g * vd);
    if (this.ja !== this.nodes[0]) this.series.add(ctx.matrix, 1 / this.scaled.RS);
    if (this.hasCharge || (this.model.CJO === 0 && ctx.junctionCmin > 0)) {
      this.vd = vd;
      this.loadCharge(ctx);
    }
  }

  /**
   * Charge of the junction at {@link vd}, with the transient-only minimum
   * capacitance cmin (F; docs/transient.md) when CJO is 0. The voltage comes
   * through a field, not an argument: this call is not inlined, and a
   * floating-point argument would be boxed on the heap at every load.
   */
  private loadCharge(ctx: LoadContext): void {
    const vd = this.vd;
    const cmin = this.model.CJO === 0 ? ctx.junctionCmin : 0;
    const off = this.chargeOff;
    evalDiodeCharge(vd, this.scaled, this.cur, this.chg, this.form);
    // The minimum capacitance's charge is recorded at the initial DC point too, so the first
    // step starts from a consistent charge and sees no spurious current.
    ctx.state[off] = this.chg.q + cmin * vd;
    if (ctx.mode === 'dc') {
      ctx.state[off + 1] = 0;
      return;
    }
    ctx.integrate(off, this.chg.c + cmin);
    const g = ctx.chargeConductance;
    this.junction.add(ctx.matrix, g);
    injectPair(ctx.rhs, this.ja, this.nodes[1], ctx.chargeCurrent - g * vd);
  }

  loadReactive(ctx: ReactiveContext): void {
    if (!this.hasCharge) return;
    const vd = at(ctx.x, this.ja) - at(ctx.x, this.nodes[1]);
    evalDiode(vd, this.scaled, this.vt, this.cur);
    evalDiodeCharge(vd, this.scaled, this.cur, this.chg, this.form);
    this.junction.add(ctx.capacitance, this.chg.c);
  }

  topology(): Topology {
    return this.topo;
  }

  forwardCurrent(x: Float64Array, state: Float64Array): number {
    const cur = this.cur;
    evalDiode(at(x, this.ja) - at(x, this.nodes[1]), this.scaled, this.vt, cur);
    return cur.i + (state[this.chargeOff + 1] ?? 0);
  }

  report(x: Float64Array, state: Float64Array): DeviceReport {
    const [a, k] = this.nodes;
    const i = this.forwardCurrent(x, state);
    return { currents: [['', i]], power: (at(x, a) - at(x, k)) * i };
  }
}

/**
 * Creates a diode from unknown `anode` to `cathode` with `model` (at Tnom,
 * unscaled) and `area`. RS > 0 (after area) adds an internal node. State:
 * charge and its current (2 slots), then the last junction voltage (1 slot).
 */
export function createDiode(name: string, anode: number, cathode: number, model: DiodeModel, area: number): Diode {
  return new DiodeImpl(name, anode, cathode, model, area);
}
