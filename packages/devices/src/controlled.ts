/**
 * Linear controlled sources E, G, F and H, stamped as in the element tables
 * of Ho, Ruehli and Brennan, "The modified nodal approach to network
 * analysis", IEEE Trans. Circuits Syst. 22(6), 1975. Output currents follow
 * the passive convention: they enter n+ and leave at n−.
 */

import type { DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import { addAt, at, BranchSlots } from './stamp.js';
import type { Ccvs, Cccs, Vccs, Vcvs } from './types.js';

const OPEN: Topology = { dcPaths: [], voltageDefined: [] };

function branchReport(x: Float64Array, p: number, n: number, i: number): DeviceReport {
  return { currents: [['', i]], power: (at(x, p) - at(x, n)) * i };
}

class VcvsImpl implements Vcvs {
  readonly kind = 'vcvs' as const;
  readonly nodes: readonly [number, number, number, number];
  branchIndex = -1;
  private readonly out = new BranchSlots();
  private sBcp = 0;
  private sBcn = 0;
  private readonly topo: Topology;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    cp: number,
    cn: number,
    readonly gain: number,
  ) {
    this.nodes = [p, n, cp, cn];
    this.topo = { dcPaths: [[p, n]], voltageDefined: [[p, n]] };
  }

  allocate(unknowns: UnknownAllocator): void {
    this.branchIndex = unknowns.branch(this.name);
  }

  bind(slots: SlotBinder): void {
    const [p, n, cp, cn] = this.nodes;
    const br = this.branchIndex;
    this.out.bind(slots, p, n, br);
    this.sBcp = slots.slot(br, cp);
    this.sBcn = slots.slot(br, cn);
  }

  setTemperature(_kelvin: number): void {}

  load(ctx: LoadContext): void {
    // Branch row: V(p) − V(n) − gain·(V(cp) − V(cn)) = 0.
    this.out.add(ctx.matrix);
    addAt(ctx.matrix, this.sBcp, -this.gain);
    addAt(ctx.matrix, this.sBcn, this.gain);
  }

  loadReactive(_ctx: ReactiveContext): void {}

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array): DeviceReport {
    return branchReport(x, this.nodes[0], this.nodes[1], at(x, this.branchIndex));
  }
}

/** Creates E: V(p) − V(n) = gain·(V(cp) − V(cn)), with a branch-current unknown. */
export function createVcvs(name: string, p: number, n: number, cp: number, cn: number, gain: number): Vcvs {
  return new VcvsImpl(name, p, n, cp, cn, gain);
}

class VccsImpl implements Vccs {
  readonly kind = 'vccs' as const;
  readonly nodes: readonly [number, number, number, number];
  private sPcp = 0;
  private sPcn = 0;
  private sNcp = 0;
  private sNcn = 0;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    cp: number,
    cn: number,
    readonly gm: number,
  ) {
    this.nodes = [p, n, cp, cn];
  }

  allocate(_unknowns: UnknownAllocator): void {}

  bind(slots: SlotBinder): void {
    const [p, n, cp, cn] = this.nodes;
    this.sPcp = slots.slot(p, cp);
    this.sPcn = slots.slot(p, cn);
    this.sNcp = slots.slot(n, cp);
    this.sNcn = slots.slot(n, cn);
  }

  setTemperature(_kelvin: number): void {}

  load(ctx: LoadContext): void {
    const m = ctx.matrix;
    addAt(m, this.sPcp, this.gm);
    addAt(m, this.sPcn, -this.gm);
    addAt(m, this.sNcp, -this.gm);
    addAt(m, this.sNcn, this.gm);
  }

  loadReactive(_ctx: ReactiveContext): void {}

  topology(): Topology {
    return OPEN;
  }

  report(x: Float64Array): DeviceReport {
    const [p, n, cp, cn] = this.nodes;
    return branchReport(x, p, n, this.gm * (at(x, cp) - at(x, cn)));
  }
}

/** Creates G: a current gm·(V(cp) − V(cn)) entering p and leaving at n. */
export function createVccs(name: string, p: number, n: number, cp: number, cn: number, gm: number): Vccs {
  return new VccsImpl(name, p, n, cp, cn, gm);
}

class CccsImpl implements Cccs {
  readonly kind = 'cccs' as const;
  readonly nodes: readonly [number, number];
  private control = -1;
  private sPc = 0;
  private sNc = 0;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    readonly controlName: string,
    readonly gain: number,
  ) {
    this.nodes = [p, n];
  }

  allocate(unknowns: UnknownAllocator): void {
    const ref = unknowns.branchOf(this.controlName);
    if (ref.ok) this.control = ref.index;
  }

  bind(slots: SlotBinder): void {
    this.sPc = slots.slot(this.nodes[0], this.control);
    this.sNc = slots.slot(this.nodes[1], this.control);
  }

  setTemperature(_kelvin: number): void {}

  load(ctx: LoadContext): void {
    addAt(ctx.matrix, this.sPc, this.gain);
    addAt(ctx.matrix, this.sNc, -this.gain);
  }

  loadReactive(_ctx: ReactiveContext): void {}

  topology(): Topology {
    return OPEN;
  }

  report(x: Float64Array): DeviceReport {
    return branchReport(x, this.nodes[0], this.nodes[1], this.gain * at(x, this.control));
  }
}

/** Creates F: a current gain·I(control) entering p and leaving at n; `controlName` is the lower-case flat name of a voltage source. */
export function createCccs(name: string, p: number, n: number, controlName: string, gain: number): Cccs {
  return new CccsImpl(name, p, n, controlName, gain);
}

class CcvsImpl implements Ccvs {
  readonly kind = 'ccvs' as const;
  readonly nodes: readonly [number, number];
  branchIndex = -1;
  private control = -1;
  private readonly out = new BranchSlots();
  private sBc = 0;
  private readonly topo: Topology;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    readonly controlName: string,
    readonly rm: number,
  ) {
    this.nodes = [p, n];
    this.topo = { dcPaths: [[p, n]], voltageDefined: [[p, n]] };
  }

  allocate(unknowns: UnknownAllocator): void {
    this.branchIndex = unknowns.branch(this.name);
    const ref = unknowns.branchOf(this.controlName);
    if (ref.ok) this.control = ref.index;
  }

  bind(slots: SlotBinder): void {
    this.out.bind(slots, this.nodes[0], this.nodes[1], this.branchIndex);
    this.sBc = slots.slot(this.branchIndex, this.control);
  }

  setTemperature(_kelvin: number): void {}

  load(ctx: LoadContext): void {
    // Branch row: V(p) − V(n) − rm·I(control) = 0.
    this.out.add(ctx.matrix);
    addAt(ctx.matrix, this.sBc, -this.rm);
  }

  loadReactive(_ctx: ReactiveContext): void {}

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array): DeviceReport {
    return branchReport(x, this.nodes[0], this.nodes[1], at(x, this.branchIndex));
  }
}

/** Creates H: V(p) − V(n) = rm·I(control), with a branch-current unknown; `controlName` as for F. */
export function createCcvs(name: string, p: number, n: number, controlName: string, rm: number): Ccvs {
  return new CcvsImpl(name, p, n, controlName, rm);
}
