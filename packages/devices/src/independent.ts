/**
 * Independent voltage and current sources in modified nodal analysis (Ho,
 * Ruehli and Brennan 1975). Passive sign convention: the source current
 * enters n+ and leaves at n−, so a source delivering power reports negative
 * current and negative power.
 */

import type { DeviceReport, LoadContext, ReactiveContext, SlotBinder, Topology, UnknownAllocator } from './device.js';
import type { SourceSpec, WaveformSpec } from './sources.js';
import { addAt, at, BranchSlots } from './stamp.js';
import type { CurrentSource, VoltageSource } from './types.js';
import { waveformBreakpoints, waveformCornerCount, waveformValue } from './waveform.js';

const DEG = Math.PI / 180;

/** What both kinds of independent source share: value, waveform and AC drive. */
abstract class SourceBase {
  readonly nodes: readonly [number, number];
  dc: number;
  waveform: WaveformSpec | undefined;
  acMag: number;
  acPhaseDeg: number;
  defaultEdge = 0;

  constructor(
    readonly name: string,
    p: number,
    n: number,
    spec: SourceSpec,
  ) {
    this.nodes = [p, n];
    this.dc = spec.dc;
    this.waveform = spec.waveform;
    this.acMag = spec.acMag;
    this.acPhaseDeg = spec.acPhaseDeg;
  }

  valueAt(timeSeconds: number): number {
    return this.waveform === undefined ? this.dc : waveformValue(this.waveform, timeSeconds, this.defaultEdge);
  }

  breakpoints(fromSeconds: number, toSeconds: number, out: number[], max = Infinity): void {
    if (this.waveform !== undefined) waveformBreakpoints(this.waveform, fromSeconds, toSeconds, this.defaultEdge, out, max);
  }

  cornerCount(fromSeconds: number, toSeconds: number): number {
    return this.waveform === undefined ? 0 : waveformCornerCount(this.waveform, fromSeconds, toSeconds, this.defaultEdge);
  }

  /** The value the source has in this load: DC value, or waveform at ctx.time, times the source scale. */
  protected present(ctx: LoadContext): number {
    return (ctx.mode === 'dc' ? this.dc : this.valueAt(ctx.time)) * ctx.sourceScale;
  }

  protected acRe(): number {
    return this.acMag * Math.cos(this.acPhaseDeg * DEG);
  }

  protected acIm(): number {
    return this.acMag * Math.sin(this.acPhaseDeg * DEG);
  }

  setTemperature(_kelvin: number): void {}
}

class VoltageSourceImpl extends SourceBase implements VoltageSource {
  readonly kind = 'vsource' as const;
  branchIndex = -1;
  private readonly incidence = new BranchSlots();
  private readonly topo: Topology;

  constructor(name: string, p: number, n: number, spec: SourceSpec) {
    super(name, p, n, spec);
    this.topo = { dcPaths: [[p, n]], voltageDefined: [[p, n]] };
  }

  allocate(unknowns: UnknownAllocator): void {
    this.branchIndex = unknowns.branch(this.name);
  }

  bind(slots: SlotBinder): void {
    const [p, n] = this.nodes;
    const br = this.branchIndex;
    this.incidence.bind(slots, p, n, br);
  }

  load(ctx: LoadContext): void {
    const m = ctx.matrix;
    this.incidence.add(m);
    addAt(ctx.rhs, this.branchIndex, this.present(ctx));
  }

  loadReactive(ctx: ReactiveContext): void {
    addAt(ctx.excitationRe, this.branchIndex, this.acRe());
    addAt(ctx.excitationIm, this.branchIndex, this.acIm());
  }

  topology(): Topology {
    return this.topo;
  }

  report(x: Float64Array): DeviceReport {
    const i = at(x, this.branchIndex);
    return { currents: [['', i]], power: (at(x, this.nodes[0]) - at(x, this.nodes[1])) * i };
  }
}

/**
 * Creates an independent voltage source from unknown `p` (+) to `n` (−) with
 * a branch-current unknown: row p gets +1 and row n −1 in the branch column;
 * the branch row reads V(p) − V(n) = value.
 */
export function createVoltageSource(name: string, p: number, n: number, spec: SourceSpec): VoltageSource {
  return new VoltageSourceImpl(name, p, n, spec);
}

const OPEN: Topology = { dcPaths: [], voltageDefined: [] };

class CurrentSourceImpl extends SourceBase implements CurrentSource {
  readonly kind = 'isource' as const;
  /** The value of the last load, for the report (which is given no time). */
  private last: number;

  constructor(name: string, p: number, n: number, spec: SourceSpec) {
    super(name, p, n, spec);
    this.last = spec.dc;
  }

  allocate(_unknowns: UnknownAllocator): void {}

  bind(_slots: SlotBinder): void {}

  load(ctx: LoadContext): void {
    const i = this.present(ctx);
    this.last = i;
    addAt(ctx.rhs, this.nodes[0], -i);
    addAt(ctx.rhs, this.nodes[1], i);
  }

  loadReactive(ctx: ReactiveContext): void {
    const [p, n] = this.nodes;
    const re = this.acRe();
    const im = this.acIm();
    addAt(ctx.excitationRe, p, -re);
    addAt(ctx.excitationRe, n, re);
    addAt(ctx.excitationIm, p, -im);
    addAt(ctx.excitationIm, n, im);
  }

  topology(): Topology {
    return OPEN;
  }

  report(x: Float64Array): DeviceReport {
    const i = this.last;
    return { currents: [['', i]], power: (at(x, this.nodes[0]) - at(x, this.nodes[1])) * i };
  }
}

/**
 * Creates an independent current source whose current flows from unknown `p`
 * through the source to `n` (it draws current out of node p). The report
 * gives the value of the most recent load.
 */
export function createCurrentSource(name: string, p: number, n: number, spec: SourceSpec): CurrentSource {
  return new CurrentSourceImpl(name, p, n, spec);
}
