/**
 * Linear R, C and L in modified nodal analysis (Ho, Ruehli and Brennan, IEEE
 * Trans. Circuits Syst. 22(6), 1975). C and L are charge/flux based: the
 * engine's integrator turns q = C·v and φ = L·i into companion models.
 */

import type { DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import { addAt, at, BranchSlots, injectPair, PairSlots } from './stamp.js';
import type { Capacitor, Inductor, Resistor } from './types.js';

const NO_TOPOLOGY: Topology = { dcPaths: [], voltageDefined: [] };

/**
 * The factor by which an inductor's branch row is divided through in a
 * transient step: 1/max(1, G) with G = a0·L the flux companion's
 * conductance (Ω). Dividing a row changes no solution; with G = L/h large
 * the unscaled row would win the pivot search over the KCL rows, and
 * V(p) − V(n) would then come out as the difference of two large terms,
 * losing every digit. Every element that stamps into an inductor's branch
 * row (the inductor itself, a K coupling) applies the same factor.
 * @param conductance G = a0·L, Ω (a0 in 1/s, L in henries)
 */
export function branchRowScale(conductance: number): number {
  return 1 / Math.max(1, conductance);
}

class ResistorImpl implements Resistor {
  readonly kind = 'resistor' as const;
  readonly nodes: readonly [number, number];
  private g: number;
  private ohms: number;
  private readonly pair = new PairSlots();
  private readonly topo: Topology;

  constructor(
    readonly name: string,
    a: number,
    b: number,
    ohms: number,
  ) {
    this.nodes = [a, b];
    this.ohms = ohms;
    this.g = 1 / ohms;
    this.topo = { dcPaths: [[a, b]], voltageDefined: [] };
  }

  get resistance(): number {
    return this.ohms;
  }

  set resistance(ohms: number) {
    this.ohms = ohms;
    this.g = 1 / ohms;
  }

  allocate(_unknowns: UnknownAllocator): void {}

  bind(slots: SlotBinder): void {
    this.pair.bind(slots, this.nodes[0], this.nodes[1]);
  }

  setTemperature(_kelvin: number): void {}

  load(ctx: LoadContext): void {
    this.pair.add(ctx.matrix, this.g);
  }

  loadReactive(_ctx: ReactiveContext): void {}

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array): DeviceReport {
    const v = at(x, this.nodes[0]) - at(x, this.nodes[1]);
    const i = v * this.g;
    return { currents: [['', i]], power: v * i };
  }
}

/** Creates a linear resistor of `ohms` (non-zero) between unknowns `a` and `b`. */
export function createResistor(name: string, a: number, b: number, ohms: number): Resistor {
  return new ResistorImpl(name, a, b, ohms);
}

class CapacitorImpl implements Capacitor {
  readonly kind = 'capacitor' as const;
  readonly nodes: readonly [number, number];
  private offset = -1;
  private readonly pair = new PairSlots();

  constructor(
    readonly name: string,
    a: number,
    b: number,
    public capacitance: number,
    readonly initialCondition: number | undefined,
  ) {
    this.nodes = [a, b];
  }

  allocate(unknowns: UnknownAllocator): void {
    this.offset = unknowns.state(2);
  }

  bind(slots: SlotBinder): void {
    this.pair.bind(slots, this.nodes[0], this.nodes[1]);
  }

  setTemperature(_kelvin: number): void {}

  chargeSlots(): readonly number[] {
    return [this.offset];
  }

  seedInitialCondition(state: Float64Array): boolean {
    if (this.initialCondition === undefined) return false;
    state[this.offset] = this.capacitance * this.initialCondition;
    state[this.offset + 1] = 0;
    return true;
  }

  load(ctx: LoadContext): void {
    const a = this.nodes[0];
    const b = this.nodes[1];
    const v = at(ctx.x, a) - at(ctx.x, b);
    const off = this.offset;
    ctx.state[off] = this.capacitance * v;
    if (ctx.mode === 'dc') {
      // Open at DC; the charge is still stored so the engine can seed the first time point.
      ctx.state[off + 1] = 0;
      return;
    }
    ctx.integrate(off, this.capacitance);
    const g = ctx.chargeConductance;
    this.pair.add(ctx.matrix, g);
    injectPair(ctx.rhs, a, b, ctx.chargeCurrent - g * v);
  }

  loadReactive(ctx: ReactiveContext): void {
    this.pair.add(ctx.capacitance, this.capacitance);
  }

  topology(): Topology {
    return NO_TOPOLOGY;
  }

  report(x: Float64Array, state: Float64Array): DeviceReport {
    const v = at(x, this.nodes[0]) - at(x, this.nodes[1]);
    const i = state[this.offset + 1] ?? 0;
    return { currents: [['', i]], power: v * i };
  }
}

/**
 * Creates a linear capacitor of `farads` between unknowns `a` and `b`, with
 * optional initial voltage `ic` (V) exposed as `initialCondition`.
 */
export function createCapacitor(name: string, a: number, b: number, farads: number, ic: number | undefined): Capacitor {
  return new CapacitorImpl(name, a, b, farads, ic);
}

class InductorImpl implements Inductor {
  readonly kind = 'inductor' as const;
  readonly nodes: readonly [number, number];
  branchIndex = -1;
  private offset = -1;
  private readonly incidence = new BranchSlots();
  private sBB = 0;
  private readonly topo: Topology;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    public inductance: number,
    readonly initialCondition: number | undefined,
  ) {
    this.nodes = [p, n];
    this.topo = { dcPaths: [[p, n]], voltageDefined: [[p, n]] };
  }

  allocate(unknowns: UnknownAllocator): void {
    this.branchIndex = unknowns.branch(this.name);
    this.offset = unknowns.state(2);
  }

  bind(slots: SlotBinder): void {
    const [p, n] = this.nodes;
    const br = this.branchIndex;
    this.incidence.bind(slots, p, n, br);
    this.sBB = slots.slot(br, br);
  }

  setTemperature(_kelvin: number): void {}

  chargeSlots(): readonly number[] {
    return [this.offset];
  }

  seedInitialCondition(state: Float64Array): boolean {
    if (this.initialCondition === undefined) return false;
    state[this.offset] = this.inductance * this.initialCondition;
    state[this.offset + 1] = 0;
    return true;
  }

  load(ctx: LoadContext): void {
    const m = ctx.matrix;
    const b = this.incidence;
    const i = at(ctx.x, this.branchIndex);
    const off = this.offset;
    ctx.state[off] = this.inductance * i;
    if (ctx.mode === 'dc') {
      b.add(m);
      ctx.state[off + 1] = 0;
      return;
    }
    // Branch row: V(p) − V(n) = dφ/dt ≈ chargeCurrent + G·(i_new − i), divided through by
    // max(1, G) (branchRowScale). A K coupling adds its mutual-flux terms to this row.
    ctx.integrate(off, this.inductance);
    const g = ctx.chargeConductance;
    const scale = branchRowScale(g);
    addAt(m, b.pb, 1);
    addAt(m, b.nb, -1);
    addAt(m, b.bp, scale);
    addAt(m, b.bn, -scale);
    addAt(m, this.sBB, -g * scale);
    addAt(ctx.rhs, this.branchIndex, (ctx.chargeCurrent - g * i) * scale);
  }

  loadReactive(ctx: ReactiveContext): void {
    // Same sign as the transient branch row: V(p) − V(n) − jωL·I = 0.
    addAt(ctx.capacitance, this.sBB, -this.inductance);
  }

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array): DeviceReport {
    const v = at(x, this.nodes[0]) - at(x, this.nodes[1]);
    const i = at(x, this.branchIndex);
    return { currents: [['', i]], power: v * i };
  }
}

/**
 * Creates a linear inductor of `henries` from unknown `p` to `n` with a
 * branch-current unknown, and optional initial current `ic` (A).
 */
export function createInductor(name: string, p: number, n: number, henries: number, ic: number | undefined): Inductor {
  return new InductorImpl(name, p, n, henries, ic);
}
