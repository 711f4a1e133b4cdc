/**
 * Bipolar transistor device: the equations of bjt-model.ts stamped as a
 * Newton companion between the internal collector, base and emitter, with
 * RB, RC, RE as series resistors and Nagel limiting of both junctions.
 */

import { TNOM, thermalVoltage } from './constants.js';
import type { DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import { type ChargeOut, type DepletionForm, criticalVoltage, depletionForm, pnjlim } from './junction.js';
import type { BjtModel } from './models.js';
import { type BjtCurrents, evalBjtCharges, evalBjtNpn, newBjtCurrents, polaritySign, scaleBjtModel } from './bjt-model.js';
import { PairSlots, addAt, at, injectPair } from './stamp.js';
import type { Bjt } from './types.js';

class BjtImpl implements Bjt {
  readonly kind = 'bjt' as const;
  readonly nodes: readonly [number, number, number];
  private readonly sign: 1 | -1;
  private scaled: BjtModel;
  private vt = 0;
  /** Depletion constants of the scaled model's two junctions: once per temperature. */
  private beForm: DepletionForm;
  private bcForm: DepletionForm;
  /** Limited junction voltages of the present load, NPN frame, V (read by evaluate and loadCharges). */
  private vbe = 0;
  private vbc = 0;
  private vcritBe = 0;
  private vcritBc = 0;
  /** Internal collector, base and emitter (the terminals when the resistance is 0). */
  private ci: number;
  private bi: number;
  private ei: number;
  private chargeOff = -1;
  private vOff = -1;
  private readonly hasCharge: boolean;
  // Matrix offsets of the 3×3 block over (ci, bi, ei): row then column.
  private sCC = 0;
  private sCB = 0;
  private sCE = 0;
  private sBC = 0;
  private sBB = 0;
  private sBE = 0;
  private sEC = 0;
  private sEB = 0;
  private sEE = 0;
  private readonly pairBE = new PairSlots();
  private readonly pairBC = new PairSlots();
  private readonly rc = new PairSlots();
  private readonly rb = new PairSlots();
  private readonly re = new PairSlots();
  private readonly cur: BjtCurrents = newBjtCurrents();
  private readonly qbe: ChargeOut = { q: 0, c: 0 };
  private readonly qbc: ChargeOut = { q: 0, c: 0 };
  private topo: Topology = { dcPaths: [], voltageDefined: [] };

  constructor(
    readonly name: string,
    c: number,
    b: number,
    e: number,
    readonly model: BjtModel,
    readonly area: number,
  ) {
    this.nodes = [c, b, e];
    this.ci = c;
    this.bi = b;
    this.ei = e;
    this.sign = polaritySign(model);
    this.hasCharge = model.CJE !== 0 || model.CJC !== 0 || model.TF !== 0 || model.TR !== 0;
    this.scaled = model;
    this.beForm = depletionForm(model.CJE, model.VJE, model.MJE);
    this.bcForm = depletionForm(model.CJC, model.VJC, model.MJC);
    this.setTemperature(TNOM);
  }

  allocate(unknowns: UnknownAllocator): void {
    const [c, b, e] = this.nodes;
    const s = this.scaled;
    if (s.RC > 0) this.ci = unknowns.internalNode(`${this.name}:collector`);
    if (s.RB > 0) this.bi = unknowns.internalNode(`${this.name}:base`);
    if (s.RE > 0) this.ei = unknowns.internalNode(`${this.name}:emitter`);
    this.chargeOff = unknowns.state(4);
    this.vOff = unknowns.state(2);
    const paths: Array<readonly [number, number]> = [
      [this.bi, this.ei],
      [this.bi, this.ci],
    ];
    if (this.ci !== c) paths.push([c, this.ci]);
    if (this.bi !== b) paths.push([b, this.bi]);
    if (this.ei !== e) paths.push([e, this.ei]);
    this.topo = { dcPaths: paths, voltageDefined: [] };
  }

  chargeSlots(): readonly number[] {
    return this.hasCharge ? [this.chargeOff, this.chargeOff + 2] : [];
  }

  bind(slots: SlotBinder): void {
    const { ci, bi, ei } = this;
    this.sCC = slots.slot(ci, ci);
    this.sCB = slots.slot(ci, bi);
    this.sCE = slots.slot(ci, ei);
    this.sBC = slots.slot(bi, ci);
    this.sBB = slots.slot(bi, bi);
    this.sBE = slots.slot(bi, ei);
    this.sEC = slots.slot(ei, ci);
    this.sEB = slots.slot(ei, bi);
    this.sEE = slots.slot(ei, ei);
    this.pairBE.bind(slots, bi, ei);
    this.pairBC.bind(slots, bi, ci);
    const [c, b, e] = this.nodes;
    if (ci !== c) this.rc.bind(slots, c, ci);
    if (bi !== b) this.rb.bind(slots, b, bi);
    if (ei !== e) this.re.bind(slots, e, ei);
  }

  setTemperature(kelvin: number): void {
    this.scaled = scaleBjtModel(this.model, kelvin, this.area);
    this.vt = thermalVoltage(kelvin);
    const s = this.scaled;
    this.beForm = depletionForm(s.CJE, s.VJE, s.MJE);
    this.bcForm = depletionForm(s.CJC, s.VJC, s.MJC);
    this.vcritBe = criticalVoltage(this.scaled.NF * this.vt, this.scaled.IS);
    this.vcritBc = criticalVoltage(this.scaled.NR * this.vt, this.scaled.IS);
  }

  load(ctx: LoadContext): void {
    const x = ctx.x;
    const state = ctx.state;
    const sg = this.sign;
    const vbeRaw = sg * (at(x, this.bi) - at(x, this.ei));
    const vbcRaw = sg * (at(x, this.bi) - at(x, this.ci));
    let vbe: number;
    let vbc: number;
    if (ctx.initJunctions) {
      vbe = this.vcritBe;
      vbc = 0;
    } else {
      const s = this.scaled;
      vbe = pnjlim(vbeRaw, state[this.vOff] ?? 0, s.NF * this.vt, this.vcritBe);
      vbc = pnjlim(vbcRaw, state[this.vOff + 1] ?? 0, s.NR * this.vt, this.vcritBc);
    }
    if (vbe !== vbeRaw || vbc !== vbcRaw) ctx.limited = true;
    state[this.vOff] = vbe;
    state[this.vOff + 1] = vbc;
    const k = this.cur;
    this.vbe = vbe;
    this.vbc = vbc;
    this.evaluate();
    const m = ctx.matrix;
    const rhs = ctx.rhs;
    // The three KCL rows of the companion: each terminal current is sign·I(vbe, vbc) with
    // vbe = sign·(Vb − Ve), vbc = sign·(Vb − Vc), so the node derivatives carry sign² = 1 and only
    // the companion current takes the sign. Written out rather than called: a call this large is
    // not inlined, and its floating-point arguments would be boxed on the heap at every load.
    addAt(m, this.sCB, k.dIcDvbe + k.dIcDvbc);
    addAt(m, this.sCE, -k.dIcDvbe);
    addAt(m, this.sCC, -k.dIcDvbc);
    addAt(rhs, this.ci, -sg * (k.ic - k.dIcDvbe * vbe - k.dIcDvbc * vbc));
    addAt(m, this.sBB, k.dIbDvbe + k.dIbDvbc);
    addAt(m, this.sBE, -k.dIbDvbe);
    addAt(m, this.sBC, -k.dIbDvbc);
    addAt(rhs, this.bi, -sg * (k.ib - k.dIbDvbe * vbe - k.dIbDvbc * vbc));
    addAt(m, this.sEB, k.dIeDvbe + k.dIeDvbc);
    addAt(m, this.sEE, -k.dIeDvbe);
    addAt(m, this.sEC, -k.dIeDvbc);
    addAt(rhs, this.ei, -sg * (k.ie - k.dIeDvbe * vbe - k.dIeDvbc * vbc));
    // gmin across each junction is linear, so it has no companion current.
    this.pairBE.add(m, ctx.gmin);
    this.pairBC.add(m, ctx.gmin);
    this.loadResistors(m);
    // The junction voltages reach loadCharges through fields, for the same reason.
    if (this.hasCharge) this.loadCharges(ctx);
  }

  /**
   * The transport currents at {@link vbe} and {@link vbc} into `cur`: a call
   * of its own, with no floating-point arguments, so that evalBjtNpn is
   * inlined here rather than called from load with its voltages boxed.
   */
  private evaluate(): void {
    evalBjtNpn(this.vbe, this.vbc, this.scaled, this.vt, this.cur);
  }

  private loadResistors(m: Float64Array): void {
    const s = this.scaled;
    if (this.ci !== this.nodes[0]) this.rc.add(m, 1 / s.RC);
    if (this.bi !== this.nodes[1]) this.rb.add(m, 1 / s.RB);
    if (this.ei !== this.nodes[2]) this.re.add(m, 1 / s.RE);
  }

  /** Junction charges at {@link vbe} and {@link vbc} (NPN frame, V). */
  private loadCharges(ctx: LoadContext): void {
    const vbe = this.vbe;
    const vbc = this.vbc;
    const sg = this.sign;
    const off = this.chargeOff;
    evalBjtCharges(vbe, vbc, this.scaled, this.cur, this.qbe, this.qbc, this.beForm, this.bcForm);
    // Stored in the terminal frame: charge on the base side of each junction.
    ctx.state[off] = sg * this.qbe.q;
    ctx.state[off + 2] = sg * this.qbc.q;
    if (ctx.mode === 'dc') {
      ctx.state[off + 1] = 0;
      ctx.state[off + 3] = 0;
      return;
    }
    ctx.integrate(off, this.qbe.c);
    let g = ctx.chargeConductance;
    this.pairBE.add(ctx.matrix, g);
    injectPair(ctx.rhs, this.bi, this.ei, ctx.chargeCurrent - g * sg * vbe);
    ctx.integrate(off + 2, this.qbc.c);
    g = ctx.chargeConductance;
    this.pairBC.add(ctx.matrix, g);
    injectPair(ctx.rhs, this.bi, this.ci, ctx.chargeCurrent - g * sg * vbc);
  }

  loadReactive(ctx: ReactiveContext): void {
    if (!this.hasCharge) return;
    const sg = this.sign;
    const vbe = sg * (at(ctx.x, this.bi) - at(ctx.x, this.ei));
    const vbc = sg * (at(ctx.x, this.bi) - at(ctx.x, this.ci));
    evalBjtNpn(vbe, vbc, this.scaled, this.vt, this.cur);
    evalBjtCharges(vbe, vbc, this.scaled, this.cur, this.qbe, this.qbc, this.beForm, this.bcForm);
    this.pairBE.add(ctx.capacitance, this.qbe.c);
    this.pairBC.add(ctx.capacitance, this.qbc.c);
  }

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array, state: Float64Array): DeviceReport {
    const sg = this.sign;
    const k = newBjtCurrents();
    evalBjtNpn(sg * (at(x, this.bi) - at(x, this.ei)), sg * (at(x, this.bi) - at(x, this.ci)), this.scaled, this.vt, k);
    const ibe = this.hasCharge ? (state[this.chargeOff + 1] ?? 0) : 0;
    const ibc = this.hasCharge ? (state[this.chargeOff + 3] ?? 0) : 0;
    const ic = sg * k.ic - ibc;
    const ib = sg * k.ib + ibe + ibc;
    const ie = sg * k.ie - ibe;
    const [c, b, e] = this.nodes;
    return {
      currents: [
        ['c', ic],
        ['b', ib],
        ['e', ie],
      ],
      power: at(x, c) * ic + at(x, b) * ib + at(x, e) * ie,
    };
  }
}

/**
 * Creates a bipolar transistor on unknowns collector `c`, base `b`, emitter
 * `e` with `model` (at Tnom, unscaled) and `area`. RB, RC, RE > 0 (after
 * area) add internal nodes. State: Qbe and its current, Qbc and its current
 * (4 slots), then the last vbe and vbc in the NPN frame (2 slots).
 */
export function createBjt(name: string, c: number, b: number, e: number, model: BjtModel, area: number): Bjt {
  return new BjtImpl(name, c, b, e, model, area);
}
