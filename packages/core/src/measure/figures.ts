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
import type { LimitOp } from '../netlist/ast.js';
import { FIGURE_KIND_INFO, figureEntry, figureUnit, type BenchKind, type FigureUnit } from '../figure-registry.js';
import { createBench } from './create-bench.js';
import type { CycleOperatingPoint } from './bench.js';
import { dropout, type Dropout } from './dropout.js';
import { measureFigure, type MeasuredFigure } from './figure-values.js';

export type { MeasuredFigure };

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
  /** The kind of bench the figures were measured on (`sine-fed`: at periodic steady state); undefined without figures. */
  readonly bench: BenchKind | undefined;
  /** A sine-fed stage's operating point as cycle averages at periodic steady state (undefined for a DC-fed stage). */
  readonly cycleOperatingPoint: CycleOperatingPoint | undefined;
}

/** Unit of a measured value from the figure registry; a name the registry does not give for this bench kind is an internal error, never an empty unit. */
function unitOf(name: string, bench: BenchKind): FigureUnit {
  const unit = figureUnit(name, bench);
  if (unit === undefined) throw new RailcheckError([errorAt('internal', `internal error: the figure registry has no unit for ${name} on a ${bench} bench`)]);
  return unit;
}

function compare(actual: number, op: LimitOp, value: number): boolean {
  return match(op)
    .with('<', () => actual < value)
    .with('<=', () => actual <= value)
    .with('>', () => actual > value)
    .with('>=', () => actual >= value)
    .exhaustive();
}

/**
 * Checks the limits against measured values. Throws RailcheckError for a
 * limit whose figure produced no value; with `bench`, one that kind of
 * stage never produces (figure registry) is named as such.
 */
export function checkLimits(limits: readonly FlatLimit[], values: Readonly<Record<string, number>>, bench?: BenchKind): LimitResult[] {
  const lower = new Map(Object.entries(values).map(([n, v]) => [n.toLowerCase(), v]));
  return limits.map((l) => {
    const actual = lower.get(l.figure.toLowerCase());
    if (actual === undefined) {
      const why = bench !== undefined && figureEntry(l.figure) !== undefined && figureUnit(l.figure, bench) === undefined
        ? `a ${bench} stage does not have this value (figures.md)`
        : "no such value was measured (check the figure's method= or the element name)";
      throw new RailcheckError([errorAt('limit-without-figure', `.limit ${l.figure}: ${why}`, l.origin.pos, l.origin.lineText, `one of: ${[...lower.keys()].join(', ') || '(no figures measured)'}`)]);
    }
    return { figure: l.figure, op: l.op, value: l.value, actual, pass: compare(actual, l.op, l.value) };
  });
}

/** Whether the measurement on a kind of bench reads a figure's key (figure registry). */
function reads(f: FlatFigure, key: string, bench: BenchKind): boolean {
  return FIGURE_KIND_INFO[f.figure].keys[key]?.benches.includes(bench) ?? false;
}

/** A note for every key of a `.figure` line that the measurement on this kind of bench does not read (figure registry). */
export function unusedKeyNotes(f: FlatFigure, bench: BenchKind): Diagnostic[] {
  const given = [...f.keys.keys(), ...(f.method !== undefined ? ['method'] : [])];
  return given
    .filter((k) => !reads(f, k, bench))
    .map((k) => warningAt('unused-key', `${f.figure}: ${k}= is not used on a ${bench} stage (figures.md, "Stages fed from a transformer secondary")`, f.origin.pos, f.origin.lineText));
}

/** The figure with only the keys the bench kind reads. */
function readableKeys(f: FlatFigure, bench: BenchKind): FlatFigure {
  return { ...f, keys: new Map([...f.keys].filter(([k]) => reads(f, k, bench))), method: reads(f, 'method', bench) ? f.method : undefined };
}

/** True when the circuit's `.supply` input is a `sin` source: its operating point is a cycle average (figures.md). */
export function isSineFed(c: CompiledCircuit): boolean {
  const supply = c.flat.supply;
  const input = supply ? c.flat.elements.find((e) => e.key === supply.input) : undefined;
  return input?.kind === 'vsource' && input.spec.waveform?.kind === 'sin';
}

/**
 * Measures every figure of the compiled circuit's netlist on one bench
 * (create-bench.ts: a circuit of its own, at the first `.temp`
 * temperature) and checks its limits. The caller's circuit is not changed.
 * Throws RailcheckError.
 */
export function measureFigures(c: CompiledCircuit): FigureReport {
  const flat = c.flat;
  const warnings: Diagnostic[] = [];
  const measured: MeasuredFigure[] = [];
  let kind: BenchKind | undefined;
  let voutNominal: number | undefined;
  let cycleOperatingPoint: CycleOperatingPoint | undefined;
  if (flat.figures.length > 0 || isSineFed(c)) {
    const bench = createBench(c);
    kind = bench.kind;
    voutNominal = bench.railSign * bench.voutNominal;
    cycleOperatingPoint = bench.cycleOperatingPoint;
    const dropouts = new Map<number, Dropout | RailcheckError>();
    const dropoutAt = (fall: number): Dropout => {
      if (!dropouts.has(fall)) {
        try {
          dropouts.set(fall, dropout(bench, fall));
        } catch (e) {
          if (!(e instanceof RailcheckError)) throw e;
          dropouts.set(fall, e);
        }
      }
      const d = dropouts.get(fall)!;
      if (d instanceof RailcheckError) throw d;
      return d;
    };
    const figures = flat.figures.map((f) => readableKeys(f, bench.kind));
    for (const f of flat.figures) warnings.push(...unusedKeyNotes(f, bench.kind));
    for (const f of figures) measured.push(measureFigure(bench, f, { all: figures, dropoutAt, warnings }));
  }
  const figures = measured.map((f) => ({ ...f, units: Object.fromEntries(Object.keys(f.values).map((n) => [n, unitOf(n, kind!)])) }));
  const values: Record<string, number> = {};
  for (const f of figures) Object.assign(values, f.values);
  return { figures, values, limits: checkLimits(flat.limits, values, kind), warnings, voutNominal, bench: kind, cycleOperatingPoint };
}
