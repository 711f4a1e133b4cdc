/**
 * A tiny stand-in for the engine, for device tests: allocates unknowns, binds
 * slots into a small dense matrix, builds a LoadContext (backward-Euler
 * integration with a fixed step) and reads the stamps back. Nothing here is
 * taken from the engine: it follows only the contract in device.ts.
 */

import type { Device, LoadContext, ReactiveContext, SlotBinder, UnknownAllocator } from '@railcheck/devices';

export interface HarnessOptions {
  /** Backward-Euler step in seconds for transient loads (default 1e-6). */
  readonly step?: number;
  /** gmin in siemens (default 0, so stamps are the bare equations). */
  readonly gmin?: number;
}

export class DeviceHarness {
  readonly size: number;
  readonly labels: string[] = [];
  readonly branchOf = new Map<string, number>();
  readonly stateSize: number;
  readonly matrix: Float64Array;
  readonly rhs: Float64Array;
  readonly x: Float64Array;
  readonly state: Float64Array;
  readonly statePrev: Float64Array;
  readonly capacitance: Float64Array;
  readonly excitationRe: Float64Array;
  readonly excitationIm: Float64Array;
  readonly ctx: LoadContext;
  readonly reactive: ReactiveContext;
  step: number;

  /**
   * @param nodeCount external unknowns 0..nodeCount−1 (0 = ground)
   * @param devices voltage sources are allocated first so F and H can find their branches
   */
  constructor(
    nodeCount: number,
    readonly devices: readonly Device[],
    opts: HarnessOptions = {},
  ) {
    for (let i = 0; i < nodeCount; i++) this.labels.push(i === 0 ? 'gnd' : `n${i}`);
    let stateCount = 0;
    let current = '';
    const alloc: UnknownAllocator = {
      internalNode: (label) => this.labels.push(label) - 1,
      branch: (label) => {
        const idx = this.labels.push(`I(${label})`) - 1;
        if (!this.branchOf.has(current)) this.branchOf.set(current, idx);
        return idx;
      },
      state: (count) => {
        const off = stateCount;
        stateCount += count;
        return off;
      },
      branchOf: (name) => {
        const idx = this.branchOf.get(name);
        const device = devices.find((d) => d.name.toLowerCase() === name);
        if (idx === undefined || !device) throw new Error(`harness: no branch for ${name}`);
        return { ok: true, index: idx, device };
      },
      fail: (message) => {
        throw new Error(`harness: ${message}`);
      },
    };
    const late = (d: Device): boolean => d.kind === 'coupling';
    const ordered = [...devices.filter((d) => d.kind === 'vsource'), ...devices.filter((d) => d.kind !== 'vsource' && !late(d)), ...devices.filter(late)];
    for (const d of ordered) {
      current = d.name.toLowerCase();
      d.allocate(alloc);
    }
    this.size = this.labels.length;
    this.stateSize = stateCount;
    const n = this.size;
    const binder: SlotBinder = { slot: (r, c) => r * n + c };
    for (const d of devices) d.bind(binder);
    this.matrix = new Float64Array(n * n);
    this.capacitance = new Float64Array(n * n);
    this.rhs = new Float64Array(n);
    this.excitationRe = new Float64Array(n);
    this.excitationIm = new Float64Array(n);
    this.x = new Float64Array(n);
    this.state = new Float64Array(Math.max(1, stateCount));
    this.statePrev = new Float64Array(Math.max(1, stateCount));
    this.step = opts.step ?? 1e-6;
    const h = this;
    this.ctx = {
      matrix: this.matrix,
      rhs: this.rhs,
      x: this.x,
      state: this.state,
      statePrev: this.statePrev,
      mode: 'dc',
      sourceScale: 1,
      gmin: opts.gmin ?? 0,
      junctionCmin: 0,
      time: 0,
      initJunctions: false,
      limited: false,
      chargeCurrent: 0,
      chargeConductance: 0,
      get coefficients() {
        return { a0: 1 / h.step, a1: 0 };
      },
      integrate(offset: number, cap: number): void {
        const i = ((h.state[offset] ?? 0) - (h.statePrev[offset] ?? 0)) / h.step;
        h.state[offset + 1] = i;
        this.chargeCurrent = i;
        this.chargeConductance = cap / h.step;
      },
    };
    this.reactive = { capacitance: this.capacitance, excitationRe: this.excitationRe, excitationIm: this.excitationIm, x: this.x };
  }

  /** Sets the solution vector; entry 0 (ground) stays 0. */
  setX(values: Readonly<Record<number, number>>): void {
    this.x.fill(0);
    for (const [k, v] of Object.entries(values)) this.x[Number(k)] = v;
    this.x[0] = 0;
  }

  /** Clears matrix and rhs, then loads every device once. */
  load(): void {
    this.matrix.fill(0);
    this.rhs.fill(0);
    this.ctx.limited = false;
    for (const d of this.devices) d.load(this.ctx);
  }

  /** Loads until no device limits (so stamps are at x itself); returns the number of loads. */
  settle(maxLoads = 500): number {
    for (let k = 1; k <= maxLoads; k++) {
      this.load();
      if (!this.ctx.limited) return k;
    }
    throw new Error('harness: junction limiting did not settle');
  }

  /** Clears the reactive stores and loads every device's reactive stamps. */
  loadReactive(): void {
    this.capacitance.fill(0);
    this.excitationRe.fill(0);
    this.excitationIm.fill(0);
    for (const d of this.devices) d.loadReactive(this.reactive);
  }

  /** Matrix entry (row, col) of the last load. */
  entry(r: number, c: number): number {
    return this.matrix[r * this.size + c] ?? 0;
  }

  /** Capacitance entry (row, col) of the last reactive load. */
  cap(r: number, c: number): number {
    return this.capacitance[r * this.size + c] ?? 0;
  }

  /**
   * Residual M·x − rhs of the last load at the present x: for a node row,
   * the current the devices draw out of that node (A); for a branch row,
   * the branch equation's residual.
   */
  residual(): Float64Array {
    const n = this.size;
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = -(this.rhs[i] ?? 0);
      for (let j = 0; j < n; j++) s += (this.matrix[i * n + j] ?? 0) * (this.x[j] ?? 0);
      r[i] = s;
    }
    return r;
  }

  /** Rows and columns 1..n−1 of the matrix (ground removed), as nested arrays. */
  reducedMatrix(): number[][] {
    const out: number[][] = [];
    for (let i = 1; i < this.size; i++) {
      const row: number[] = [];
      for (let j = 1; j < this.size; j++) row.push(this.entry(i, j));
      out.push(row);
    }
    return out;
  }

  /** rhs without the ground entry. */
  reducedRhs(): number[] {
    return Array.from(this.rhs.subarray(1));
  }
}

/** Seed for fast-check, printed once per file so a failure can be replayed with FC_SEED. */
export function fcSeed(file: string): number {
  const seed = Number(process.env['FC_SEED'] ?? Date.now() % 2 ** 31);
  console.log(`[fast-check] ${file}: seed ${seed} (replay with FC_SEED=${seed})`);
  return seed;
}
