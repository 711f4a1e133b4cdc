/**
 * A supply stage as a bench sees it: a compiled circuit of the bench's
 * own, its input source, its output (against a reference node), its feed
 * and its load, and the one way its devices are set: {@link applyDrive}
 * sets everything a solve depends on (input DC value and waveform, every
 * source's small-signal drive, the load) before every solve, so no solve
 * depends on what an earlier one left behind.
 */
import { isKind, type LoadContext, type IndependentSource, type Resistor, type WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatSupply } from '../elaborate/flat.js';
import { continueAlong, lerp } from '../engine/continuation.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from '../analysis/dc.js';
import { formatSI } from '../units.js';
import { hasStressRatings, StressMeter } from '../analysis/stress.js';

/**
 * The stage's load: a current source (value in A) or a resistor (value in
 * Ω), with its value as compiled. A load current is the current the load
 * draws from the rail (out of `out` on a positive rail, into it on a
 * negative one), however the current source's card is written; the
 * source's value is `direction` × that current.
 */
export type StageLoad =
  | { readonly kind: 'current'; readonly name: string; readonly device: IndependentSource; readonly nominal: number; readonly direction: 1 | -1; /** The source's own waveform as compiled. */ readonly waveform: WaveformSpec | undefined }
  | { readonly kind: 'resistor'; readonly name: string; readonly device: Resistor; readonly nominal: number };

/** A stage on a circuit that belongs to one bench. */
export interface Stage {
  /** The bench's own compiled circuit (never the caller's). */
  readonly compiled: CompiledCircuit;
  readonly supply: FlatSupply;
  /** The input voltage source. */
  readonly input: IndependentSource;
  /** The input's DC value as compiled, V. */
  readonly inputDc: number;
  /** The input's waveform as compiled (a `sin` for a sine-fed stage). */
  readonly inputWaveform: WaveformSpec | undefined;
  readonly load: StageLoad | undefined;
  /** Unknown indices of out, ref and feed (0 = ground). */
  readonly outIndex: number;
  readonly refIndex: number;
  readonly feedIndex: number | undefined;
  /** Watches part stress over every solve of the bench (analysis/stress.ts) when the netlist asks for a stress figure or rates a part beyond `pmax`; undefined otherwise. */
  readonly meter: StressMeter | undefined;
  /** Temperature every device of the circuit is set to, °C (the figure temperature); a measurement that sets other temperatures puts this one back. */
  readonly celsius: number;
}

/** Collects a stage's waveforms point by point (bench.ts, StageWaveform): input source voltage, feed and output. */
export class WaveRecorder {
  readonly time: number[] = [];
  readonly input: number[] = [];
  readonly feed: number[] | undefined;
  readonly output: number[] = [];
  private readonly inPlus: number;
  private readonly inMinus: number;

  constructor(private readonly stage: Stage) {
    this.feed = stage.feedIndex === undefined ? undefined : [];
    const nodes = stage.input.nodes;
    this.inPlus = nodes[0];
    this.inMinus = nodes[1];
  }

  /** What was recorded, as plain arrays. */
  result(): { time: number[]; input: number[]; feed: number[] | undefined; output: number[] } {
    return { time: this.time, input: this.input, feed: this.feed, output: this.output };
  }

  /** Takes one accepted point: its time (s, shifted by `t0`) and solution. */
  add(t: number, x: Float64Array, t0 = 0): void {
    this.time.push(t - t0);
    this.input.push(x[this.inPlus]! - x[this.inMinus]!);
    if (this.feed) this.feed.push(x[this.stage.feedIndex!]! - x[this.stage.refIndex]!);
    this.output.push(vout(this.stage, x));
  }
}

/** Options of a settled cycle that hand each of its accepted points to the stage's stress meter (none without a meter). */
export function meterPoints(stage: Stage): { onPoint?: (timeSeconds: number, ctx: LoadContext) => void } {
  const m = stage.meter;
  return m ? { onPoint: (t, ctx) => m.sample(t, ctx.x, ctx.state) } : {};
}

/** True when a circuit's benches watch part stress: a `.figure stress`, or a part rated beyond `pmax` (docs/stress.md). */
export function wantsStress(c: CompiledCircuit): boolean {
  return c.flat.figures.some((f) => f.figure === 'stress') || hasStressRatings(c.flat.elements);
}

/** Describes the stage of a compiled circuit with a `.supply` line, its devices at `celsius` °C (default: the first `.temp`, else 27 °C), watched by a stress meter when `meter` (default {@link wantsStress}). Throws RailcheckError when `in=` is not a voltage source. */
export function makeStage(c: CompiledCircuit, supply: FlatSupply, celsius: number = c.flat.temperatures[0] ?? 27, meter: boolean = wantsStress(c)): Stage {
  const input = c.sources.get(supply.input);
  if (!input || input.kind !== 'vsource') throw new RailcheckError([errorAt('bad-supply-input', `.supply in=${supply.input} is not a voltage source`, supply.origin.pos, supply.origin.lineText)]);
  let load: StageLoad | undefined;
  if (supply.load !== undefined) {
    const d = c.deviceByKey.get(supply.load);
    // The passive sign convention: a source with n+ on out takes its value out of out (a positive rail's load).
    const onOut = c.flat.elements.find((el) => el.key === supply.load)?.nodes[0] === supply.out;
    if (d && isKind(d, 'isource')) load = { kind: 'current', name: d.name, device: d, nominal: d.dc, direction: onOut ? 1 : -1, waveform: d.waveform };
    else if (d && isKind(d, 'resistor')) load = { kind: 'resistor', name: d.name, device: d, nominal: d.resistance };
  }
  return {
    compiled: c,
    supply,
    input,
    inputDc: input.dc,
    inputWaveform: input.waveform,
    load,
    outIndex: c.nodeIndex.get(supply.out) ?? 0,
    refIndex: c.nodeIndex.get(supply.ref) ?? 0,
    feedIndex: supply.feed === undefined ? undefined : (c.nodeIndex.get(supply.feed) ?? 0),
    meter: meter ? new StressMeter(c) : undefined,
    celsius,
  };
}

/** The stage with its load currents oriented for a rail of sign `railSign` (+1, or −1 for a negative rail): a load draws current from the rail on either polarity. */
export function onRail(stage: Stage, railSign: 1 | -1): Stage {
  const l = stage.load;
  return l?.kind === 'current' && railSign < 0 ? { ...stage, load: { ...l, direction: l.direction === 1 ? -1 : 1 } } : stage;
}

/** Output voltage V(out) − V(ref) (V) in solution `x` (default: the workspace's). */
export function vout(stage: Stage, x: Float64Array = stage.compiled.ws.x): number {
  return x[stage.outIndex]! - x[stage.refIndex]!;
}

/** Load current (A, drawn from the rail) the stage's own load stands for: the current source's value in its direction, or Vout_nom / R for a resistor (`voutNominal` in V, a magnitude). */
export function loadCurrentOf(stage: Stage, voutNominal: number): number | undefined {
  const l = stage.load;
  if (!l) return undefined;
  return l.kind === 'current' ? l.direction * l.nominal : voutNominal / l.nominal;
}

/** Everything a solve sets on the stage's circuit. */
export interface Drive {
  /** The input source's DC value, V. */
  readonly dc: number;
  /** The input source's waveform (undefined: none). */
  readonly waveform: WaveformSpec | undefined;
  /** Load current, A: a current load takes it, a resistor load becomes Vout_nom / I (open for 0); undefined leaves the load at its own value. */
  readonly loadAmps: number | undefined;
  /** Small-signal drive of the input, V (phase 0); every other source's is 0. Default 0. */
  readonly inputAc?: number;
  /** A current load's waveform in the transient, A in the source's own sense (a load step); default the source's own. */
  readonly loadWaveform?: WaveformSpec;
}

/** Sets the input, the small-signal drives and the load for a solve. `voutNominal` (V) turns a load current into a resistance. */
export function applyDrive(stage: Stage, d: Drive, voutNominal: number): void {
  for (const s of stage.compiled.sources.values()) {
    s.acMag = 0;
    s.acPhaseDeg = 0;
  }
  stage.input.acMag = d.inputAc ?? 0;
  stage.input.waveform = d.waveform;
  if (stage.load?.kind === 'current') stage.load.device.waveform = d.loadWaveform ?? stage.load.waveform;
  applyDcSetting(stage, { vin: d.dc, loadAmps: d.loadAmps }, voutNominal);
}

/** Input (V) and load current (A) of a DC solution; for a resistor load the current fixes R = Vout_nom / I. */
export interface DcSetting {
  readonly vin: number;
  readonly loadAmps: number | undefined;
}

/** Sets the input's DC value and the load; `loadAmps` undefined puts the load back to its own value. */
function applyDcSetting(stage: Stage, s: DcSetting, voutNominal: number): void {
  stage.input.dc = s.vin;
  const l = stage.load;
  if (!l) return;
  if (l.kind === 'current') l.device.dc = s.loadAmps === undefined ? l.nominal : l.direction * s.loadAmps;
  else l.device.resistance = s.loadAmps === undefined ? l.nominal : s.loadAmps === 0 ? Infinity : voutNominal / s.loadAmps;
}

/** Largest number of halvings of a continuation step before the full operating-point search is tried. */
const MAX_HALVINGS = 14;

/**
 * Solves the DC point for `target` by continuation from the setting
 * `from`, whose solution is in the workspace: input and load conductance
 * move together along a straight line, the step halving on failure
 * (engine/continuation.ts). Falls back to the full operating-point
 * strategy, warm-started. Throws RailcheckError.
 */
export function solveSetting(stage: Stage, from: DcSetting, target: DcSetting, voutNominal: number, what: string): void {
  const c = stage.compiled;
  const ws = c.ws;
  ws.ctx.mode = 'dc';
  ws.ctx.time = 0;
  const conductance = (s: DcSetting): number | undefined => (s.loadAmps === undefined ? undefined : s.loadAmps / voutNominal);
  const g0 = conductance(from);
  const g1 = conductance(target);
  const at = (lambda: number): DcSetting =>
    lambda === 1
      ? target
      : { vin: lerp(from.vin, target.vin, lambda), loadAmps: g0 === undefined || g1 === undefined ? target.loadAmps : lerp(g0, g1, lambda) * voutNominal };
  if (continueAlong(c, (lambda) => applyDcSetting(stage, at(lambda), voutNominal), MAX_HALVINGS)) return;
  applyDcSetting(stage, target, voutNominal);
  const outcome = solveOperatingPoint(c, true);
  if (!outcome.ok) throw new RailcheckError([opFailure(outcome, `${what} (input ${formatSI(target.vin, 'V')})`, stage.supply.origin)]);
}
