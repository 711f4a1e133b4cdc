/**
 * Runs every `.figure` a netlist asks for and checks its `.limit`s: the
 * measure layer's entry point. Figures are measured at the first `.temp`
 * temperature. Each figure comes back with its values (dotted names of
 * figures.md, SI units), the conditions it was measured at, and warnings.
 */
import { match } from 'ts-pattern';
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatFigure, FlatLimit } from '../elaborate/flat.js';
import type { FigureKind, LimitOp } from '../netlist/ast.js';
import { formatSI } from '../units.js';
import { FIGURE_KIND_INFO, figureUnit, type BenchKind, type FigureUnit } from '../figure-registry.js';
import { createDcBench, type Bench } from './bench.js';
import { lineRegulation, loadRegulation } from './regulation.js';
import { dropout, fallVolts } from './dropout.js';
import { rippleRejection } from './ripple.js';
import { dissipation } from './dissipation.js';
import { sagRideThrough } from './sag.js';
import { measureAcFedFigure, createAcBench, type AcBench } from './acfed.js';

/** One measured figure. */
export interface MeasuredFigure {
  readonly kind: FigureKind;
  /** Dotted figure name (figures.md) → value in SI units. */
  readonly values: Readonly<Record<string, number>>;
  /** What it was measured at, in words. */
  readonly conditions: string;
}

/** A measured figure with the unit of each value (from the figure registry). */
export interface MeasuredFigureWithUnits extends MeasuredFigure {
  readonly units: Readonly<Record<string, FigureUnit>>;
}

/** The result of one `.limit`. */
export interface LimitResult {
  /** Figure name as written in the `.limit` line. */
  readonly figure: string;
  readonly op: LimitOp;
  readonly value: number;
  readonly actual: number;
  readonly pass: boolean;
}

/** Everything the measure layer produced. */
export interface FigureReport {
  readonly figures: readonly MeasuredFigureWithUnits[];
  /** All figure values, by dotted name. */
  readonly values: Readonly<Record<string, number>>;
  readonly limits: readonly LimitResult[];
  readonly warnings: readonly Diagnostic[];
  /** The stage's nominal output, V (for a sine-fed stage the mean over the nominal cycle); undefined without figures. */
  readonly voutNominal: number | undefined;
  /** True when the stage was measured at periodic steady state (a sine input). */
  readonly sineFed: boolean;
}

/** Unit of a measured value from the figure registry; a name the registry does not give for this bench kind is an internal error, never an empty unit. */
function unitOf(name: string, bench: BenchKind): FigureUnit {
  const unit = figureUnit(name, bench);
  if (unit === undefined) throw new RailcheckError([errorAt('internal', `internal error: the figure registry has no unit for ${name} on a ${bench} bench`)]);
  return unit;
}

const amps = (a: number): string => formatSI(a, 'A');
const volts = (v: number): string => formatSI(v, 'V');

function measureDc(bench: Bench, f: FlatFigure, all: readonly FlatFigure[], warnings: Diagnostic[]): MeasuredFigure {
  const k = f.keys;
  const loadText = bench.loadNominal === undefined ? 'the stage\'s own load' : `load ${amps(bench.loadNominal)}`;
  return match(f.figure)
    .returnType<MeasuredFigure>()
    .with('line', () => {
      const r = lineRegulation(bench, { from: k.get('from'), to: k.get('to') });
      const dropFigure = all.find((g) => g.figure === 'dropout');
      try {
        const d = dropout(bench, fallVolts(dropFigure, bench.voutNominal));
        if (r.from < d.vin) warnings.push(warningAt('line-below-dropout', `line regulation starts at ${volts(r.from)}, below the dropout input ${volts(d.vin)}: the figure describes a stage that is not regulating there`, f.origin.pos, f.origin.lineText));
      } catch (e) {
        if (!(e instanceof RailcheckError)) throw e;
      }
      return { kind: 'line', values: { 'line.delta': r.delta, 'line.slope': r.slope, 'line.pct_per_v': r.pctPerV }, conditions: `input ${volts(r.from)} → ${volts(r.to)}, ${loadText}` };
    })
    .with('load', () => {
      const r = loadRegulation(bench, { from: k.get('from'), to: k.get('to') });
      return { kind: 'load', values: { 'load.delta': r.delta, 'load.pct': r.pct, 'load.rout': r.rout }, conditions: `load ${amps(r.from)} → ${amps(r.to)}, input ${volts(bench.stage.nominalInput)}` };
    })
    .with('dropout', () => {
      const r = dropout(bench, fallVolts(f, bench.voutNominal));
      return { kind: 'dropout', values: { 'dropout.vin': r.vin, 'dropout.v': r.v, 'dropout.headroom': r.headroom }, conditions: `output ${volts(r.fall)} below nominal, ${loadText}` };
    })
    .with('ripple', () => {
      const r = rippleRejection(bench, { freq: k.get('freq'), amp: k.get('amp'), method: f.method });
      warnings.push(...r.warnings);
      const values: Record<string, number> = {};
      if (r.rr !== undefined) values['ripple.rr'] = r.rr;
      if (r.rrTran !== undefined) values['ripple.rr_tran'] = r.rrTran;
      if (r.outPp !== undefined) values['ripple.out_pp'] = r.outPp;
      return { kind: 'ripple', values, conditions: `${formatSI(r.freq, 'Hz')}, ${volts(r.amp)} peak on the input${r.cycles ? `, steady after ${r.cycles} cycles` : ''}` };
    })
    .with('dissipation', () => {
      const line = all.find((g) => g.figure === 'line');
      const load = all.find((g) => g.figure === 'load');
      const high = line?.keys.get('to');
      const range = load && bench.loadNominal !== undefined ? ([load.keys.get('from') ?? 0, load.keys.get('to') ?? bench.loadNominal] as const) : undefined;
      const r = dissipation(bench, { highInput: high, loadRange: range });
      warnings.push(...r.warnings);
      const values: Record<string, number> = {};
      for (const [name, p] of Object.entries(r.pd)) values[`pd.${name}`] = p;
      if (r.efficiency !== undefined) values.efficiency = r.efficiency;
      else warnings.push(warningAt('no-efficiency', 'efficiency needs the load element on the .supply line (load=...)', f.origin.pos, f.origin.lineText));
      const corners = r.corners.map((c) => `${volts(c.vin)}${c.loadAmps === undefined ? '' : ` / ${amps(c.loadAmps)}`}`).join(', ');
      return { kind: 'dissipation', values, conditions: `largest over input / load: ${corners}` };
    })
    .with('sag', () => {
      const r = sagRideThrough(bench, { depth: k.get('depth'), dur: k.get('dur'), edge: k.get('edge'), fall: fallVolts(f, bench.voutNominal), ripple: k.get('ripple'), freq: k.get('freq') });
      const values: Record<string, number> = { 'sag.fall': r.fall, 'sag.pass': r.pass, 'sag.max_depth': r.maxDepth };
      if (r.outPp !== undefined) values['sag.out_pp'] = r.outPp;
      if (r.outPpBefore !== undefined) values['sag.out_pp_before'] = r.outPpBefore;
      return { kind: 'sag', values, conditions: `dip of ${(r.depth * 100).toFixed(1)} % for ${formatSI(r.dur, 's')}, edges ${formatSI(r.edge, 's')}, pass if the fall ≤ ${volts(r.criterion)}` };
    })
    .exhaustive();
}

function compare(actual: number, op: LimitOp, value: number): boolean {
  return match(op)
    .with('<', () => actual < value)
    .with('<=', () => actual <= value)
    .with('>', () => actual > value)
    .with('>=', () => actual >= value)
    .exhaustive();
}

/** Checks the limits against measured values. Throws RailcheckError for a limit whose figure produced no value. */
export function checkLimits(limits: readonly FlatLimit[], values: Readonly<Record<string, number>>): LimitResult[] {
  const lower = new Map(Object.entries(values).map(([n, v]) => [n.toLowerCase(), v]));
  return limits.map((l) => {
    const actual = lower.get(l.figure.toLowerCase());
    if (actual === undefined) {
      throw new RailcheckError([errorAt('limit-without-figure', `.limit ${l.figure}: no such value was measured (check the figure's method= or the element name)`, l.origin.pos, l.origin.lineText, `one of: ${[...lower.keys()].join(', ') || '(no figures measured)'}`)]);
    }
    return { figure: l.figure, op: l.op, value: l.value, actual, pass: compare(actual, l.op, l.value) };
  });
}

/** A note for every key of a `.figure` line that the measurement on this kind of bench does not read (figure registry). */
export function unusedKeyNotes(f: FlatFigure, bench: BenchKind): Diagnostic[] {
  const info = FIGURE_KIND_INFO[f.figure].keys;
  const given = [...f.keys.keys(), ...(f.method !== undefined ? ['method'] : [])];
  return given
    .filter((k) => info[k] !== undefined && !info[k].benches.includes(bench))
    .map((k) => warningAt('unused-key', `${f.figure}: ${k}= is not used on a ${bench} stage (figures.md, "Stages fed from a transformer secondary")`, f.origin.pos, f.origin.lineText));
}

/** Measures every figure of the compiled circuit's netlist and checks its limits. Throws RailcheckError. */
export function measureFigures(c: CompiledCircuit): FigureReport {
  const flat = c.flat;
  const warnings: Diagnostic[] = [];
  const measured: MeasuredFigure[] = [];
  let sineFed = false;
  let voutNominal: number | undefined;
  if (flat.figures.length > 0) {
    const supplyInput = flat.supply ? c.sources.get(flat.supply.input) : undefined;
    sineFed = supplyInput?.waveform?.kind === 'sin';
    for (const f of flat.figures) warnings.push(...unusedKeyNotes(f, sineFed ? 'sine-fed' : 'dc'));
    if (sineFed) {
      const bench: AcBench = createAcBench(c);
      voutNominal = bench.voutNominal;
      for (const f of flat.figures) measured.push(measureAcFedFigure(bench, f, flat.figures, warnings));
    } else {
      const bench = createDcBench(c);
      voutNominal = bench.outputSign * bench.voutNominal;
      for (const f of flat.figures) measured.push(measureDc(bench, f, flat.figures, warnings));
    }
  }
  const figures = measured.map((f) => ({ ...f, units: Object.fromEntries(Object.keys(f.values).map((n) => [n, unitOf(n, sineFed ? 'sine-fed' : 'dc')])) }));
  const values: Record<string, number> = {};
  for (const f of figures) Object.assign(values, f.values);
  return { figures, values, limits: checkLimits(flat.limits, values), warnings, voutNominal, sineFed };
}
