/**
 * A supply stage as the figures see it: the compiled circuit, its input
 * source, its output (against a reference node) and its load, with the
 * means to move input and load and re-solve by continuation from wherever
 * the last solution was.
 */
import { isKind, type IndependentSource, type Resistor } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatSupply } from '../elaborate/flat.js';
import { continueAlong, lerp } from '../engine/continuation.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from '../analysis/dc.js';
import { formatSI } from '../units.js';

/** The stage's load: a current source (value in A) or a resistor (value in Ω). */
export type StageLoad =
  | { readonly kind: 'current'; readonly name: string; readonly device: IndependentSource; readonly nominal: number }
  | { readonly kind: 'resistor'; readonly name: string; readonly device: Resistor; readonly nominal: number };

/** A stage ready for measurement. */
export interface Stage {
  readonly compiled: CompiledCircuit;
  readonly supply: FlatSupply;
  /** The input voltage source. */
  readonly input: IndependentSource;
  /** Nominal input: the DC value, or for a stage fed with a sine the sine's amplitude (V). */
  readonly nominalInput: number;
  /** The input source's own DC value as compiled (restored after every figure). */
  readonly inputDc: number;
  /** True when the input is a `sin` source: figures are taken at periodic steady state. */
  readonly acFed: boolean;
  readonly load: StageLoad | undefined;
  /** Unknown indices of out, ref and feed (0 = ground). */
  readonly outIndex: number;
  readonly refIndex: number;
  readonly feedIndex: number | undefined;
}

/** Builds the stage description from a compiled circuit with a `.supply` line. */
export function makeStage(c: CompiledCircuit, supply: FlatSupply): Stage {
  const input = c.sources.get(supply.input);
  if (!input || input.kind !== 'vsource') throw new RailcheckError([errorAt('bad-supply-input', `.supply in=${supply.input} is not a voltage source`, supply.origin.pos, supply.origin.lineText)]);
  let load: StageLoad | undefined;
  if (supply.load !== undefined) {
    const d = c.deviceByKey.get(supply.load);
    if (d && isKind(d, 'isource')) load = { kind: 'current', name: d.name, device: d, nominal: d.dc };
    else if (d && isKind(d, 'resistor')) load = { kind: 'resistor', name: d.name, device: d, nominal: d.resistance };
  }
  const w = input.waveform;
  const acFed = w?.kind === 'sin';
  return {
    compiled: c,
    supply,
    input,
    nominalInput: w?.kind === 'sin' ? w.va : input.dc,
    inputDc: input.dc,
    acFed,
    load,
    outIndex: c.nodeIndex.get(supply.out) ?? 0,
    refIndex: c.nodeIndex.get(supply.ref) ?? 0,
    feedIndex: supply.feed === undefined ? undefined : (c.nodeIndex.get(supply.feed) ?? 0),
  };
}

/** Output voltage (V) in the present solution. */
export function vout(stage: Stage, x: Float64Array = stage.compiled.ws.x): number {
  return x[stage.outIndex]! - x[stage.refIndex]!;
}

/** Load current (A) a setting stands for: the current source's value, or Vout_nom/R for a resistor. */
export function loadCurrentOf(stage: Stage, voutNominal: number): number | undefined {
  const l = stage.load;
  if (!l) return undefined;
  return l.kind === 'current' ? l.nominal : voutNominal / l.nominal;
}

/** Input (V) and load current (A) at which to solve; for a resistor load the current fixes R = Vout_nom / I. */
export interface DcSetting {
  readonly vin: number;
  readonly loadAmps: number | undefined;
}

/** Applies a setting to the devices. Resistor loads: R = voutNominal / I, open for I = 0. */
export function applySetting(stage: Stage, s: DcSetting, voutNominal: number): void {
  stage.input.dc = s.vin;
  const l = stage.load;
  if (!l || s.loadAmps === undefined) return;
  if (l.kind === 'current') l.device.dc = s.loadAmps;
  else l.device.resistance = s.loadAmps === 0 ? Infinity : voutNominal / s.loadAmps;
}

/** Restores the nominal input and load. */
export function restoreNominal(stage: Stage): void {
  stage.input.dc = stage.inputDc;
  const l = stage.load;
  if (l?.kind === 'current') l.device.dc = l.nominal;
  else if (l) l.device.resistance = l.nominal;
}

/** Largest number of halvings of a continuation step before the full operating-point search is tried. */
const MAX_HALVINGS = 14;

/**
 * Solves the DC point for `target`, by continuation from the setting
 * `from` whose solution is in the workspace: input and load conductance
 * move together along a straight line, the step halving on failure. Falls
 * back to the full operating-point strategy. Throws RailcheckError.
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
  if (continueAlong(c, (lambda) => applySetting(stage, at(lambda), voutNominal), MAX_HALVINGS)) return;
  applySetting(stage, target, voutNominal);
  const outcome = solveOperatingPoint(c, true);
  if (!outcome.ok) throw new RailcheckError([opFailure(outcome, `${what} (input ${formatSI(target.vin, 'V')})`, stage.supply.origin)]);
}
