/**
 * Magnetic coupling of two inductors (`Kname L1 L2 k`, netlist.md): mutual
 * inductance M = k·√(L1·L2), each inductor's first node its dotted end.
 * The winding voltages are v1 = dφ1/dt, v2 = dφ2/dt with φ1 = L1·i1 + M·i2
 * and φ2 = M·i1 + L2·i2 (the coupled-inductor equations of circuit texts,
 * e.g. Alexander and Sadiku, Fundamentals of Electric Circuits, ch. 13).
 *
 * The inductors keep their self fluxes L·i; this element stores the two
 * mutual fluxes M·i2 (linking winding 1) and M·i1 (linking winding 2) and
 * adds their companion terms to the inductors' branch rows. The integration
 * formulas are linear in the stored quantity, so integrating the two parts
 * of φ1 apart gives exactly the terms of integrating φ1 whole. Rows are
 * scaled as each inductor scales its own ({@link branchRowScale}), which
 * needs the present coefficient a0 ({@link LoadContext.coefficients}).
 */

import type { Device, DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import { branchRowScale } from './passive.js';
import { addAt, at } from './stamp.js';
import { isKind } from './types.js';
import type { Inductor } from './types.js';

/** Magnetic coupling (K) of two inductors. It has no terminals of its own. */
export interface Coupling extends Device {
  readonly kind: 'coupling';
  /** No terminals: the coupling acts on the inductors' branch rows. */
  readonly nodes: readonly [];
  /** Lower-case flat names of the two coupled inductors, in card order. */
  readonly inductors: readonly [string, string];
  /** Coupling coefficient k, 0 < k ≤ 1 (dimensionless); settable (tolerance runs). */
  coupling: number;
  /** Mutual inductance M = k·√(L1·L2) in henries at the inductors' present values (valid after allocate). */
  readonly mutualInductance: number;
}

const NO_TOPOLOGY: Topology = { dcPaths: [], voltageDefined: [] };
const NO_CURRENTS: DeviceReport = { currents: [], power: 0 };

class CouplingImpl implements Coupling {
  readonly kind = 'coupling' as const;
  readonly nodes: readonly [] = [];
  private first: Inductor | undefined;
  private second: Inductor | undefined;
  private br1 = -1;
  private br2 = -1;
  /** State: M·i2 and its derivative (the mutual voltage in winding 1), then M·i1 and its derivative. */
  private offset = -1;
  private s12 = 0;
  private s21 = 0;

  constructor(
    readonly name: string,
    readonly inductors: readonly [string, string],
    public coupling: number,
  ) {}

  get mutualInductance(): number {
    const l1 = this.first?.inductance ?? 0;
    const l2 = this.second?.inductance ?? 0;
    return this.coupling * Math.sqrt(l1 * l2);
  }

  allocate(unknowns: UnknownAllocator): void {
    const winding = (key: string): Inductor | undefined => {
      const ref = unknowns.branchOf(key);
      if (!ref.ok) return undefined;
      if (isKind(ref.device, 'inductor')) return ref.device;
      unknowns.fail(`${this.name} couples '${ref.device.name}', which is not an inductor`);
      return undefined;
    };
    this.first = winding(this.inductors[0]);
    this.second = winding(this.inductors[1]);
    if (this.first) this.br1 = this.first.branchIndex;
    if (this.second) this.br2 = this.second.branchIndex;
    this.offset = unknowns.state(4);
  }

  bind(slots: SlotBinder): void {
    this.s12 = slots.slot(this.br1, this.br2);
    this.s21 = slots.slot(this.br2, this.br1);
  }

  setTemperature(_kelvin: number): void {}

  seedInitialCondition(state: Float64Array): boolean {
    const m = this.mutualInductance;
    state[this.offset] = m * (this.second?.initialCondition ?? 0);
    state[this.offset + 1] = 0;
    state[this.offset + 2] = m * (this.first?.initialCondition ?? 0);
    state[this.offset + 3] = 0;
    return true;
  }

  load(ctx: LoadContext): void {
    const l1 = this.first?.inductance ?? 0;
    const l2 = this.second?.inductance ?? 0;
    const m = this.coupling * Math.sqrt(l1 * l2);
    const i1 = at(ctx.x, this.br1);
    const i2 = at(ctx.x, this.br2);
    const off = this.offset;
    ctx.state[off] = m * i2;
    ctx.state[off + 2] = m * i1;
    if (ctx.mode === 'dc') {
      // Inductors are shorts at DC and the coupling adds nothing; the fluxes are kept to seed the first step.
      ctx.state[off + 1] = 0;
      ctx.state[off + 3] = 0;
      return;
    }
    const a0 = ctx.coefficients.a0;
    // Winding 1: V1 = dφ1/dt ∋ d(M·i2)/dt ≈ chargeCurrent + G·(i2_new − i2), in row br1 scaled as L1 scales it.
    ctx.integrate(off, m);
    let g = ctx.chargeConductance;
    let scale = branchRowScale(a0 * l1);
    addAt(ctx.matrix, this.s12, -g * scale);
    addAt(ctx.rhs, this.br1, (ctx.chargeCurrent - g * i2) * scale);
    ctx.integrate(off + 2, m);
    g = ctx.chargeConductance;
    scale = branchRowScale(a0 * l2);
    addAt(ctx.matrix, this.s21, -g * scale);
    addAt(ctx.rhs, this.br2, (ctx.chargeCurrent - g * i1) * scale);
  }

  loadReactive(ctx: ReactiveContext): void {
    // Same sign as the inductor's own term: V1 − jωL1·I1 − jωM·I2 = 0, and likewise for winding 2.
    const m = this.mutualInductance;
    addAt(ctx.capacitance, this.s12, -m);
    addAt(ctx.capacitance, this.s21, -m);
  }

  topology(): Topology {
    return NO_TOPOLOGY;
  }

  /** No terminals and no power of its own: the winding powers include the mutual voltages. */
  report(): DeviceReport {
    return NO_CURRENTS;
  }
}

/**
 * Creates a K coupling of the inductors whose lower-case flat names are
 * `inductors`, with coefficient `coupling` (0 < k ≤ 1). State: 4 slots.
 */
export function createCoupling(name: string, inductors: readonly [string, string], coupling: number): Coupling {
  return new CouplingImpl(name, inductors, coupling);
}
