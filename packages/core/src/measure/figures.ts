/**
 * Runs every `.figure` a netlist asks for and checks its `.limit`s: the
 * measure layer's entry point. Figures are measured at the first `.temp`
 * temperature. Each figure comes back measured, with its values (dotted
 * names of figures.md, SI units), the conditions it was measured at and
 * warnings, or not measured, with the reason; one figure that cannot be
 * measured does not stop the others, and a limit on it is not evaluated.
 */
import { match } from 'ts-pattern';
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatFigure, FlatLimit } from '../elaborate/flat.js';
import type { CardOrigin, LimitOp } from '../netlist/ast.js';
import { FIGURE_KIND_INFO, figureEntry, figureKindOf, figureUnit, type BenchKind, type FigureKind, type FigureUnit } from '../figure-registry.js';
import type { Bench, CycleOperatingPoint } from './bench.js';
import { createBench } from './create-bench.js';
import { dropout, type Dropout } from './dropout.js';
import { measureFigure, type FigureValues } from './figure-values.js';
import { COMPILED_CIRCUITS } from '../engine/compile.js';
import { overRatingNotes } from './stress.js';
import { checkOptions } from '../arguments.js';

export type { FigureValues };

/** A value of a measured figure that came out as no finite number (a quotient or logarithm of zero): left out of the values, with the reason. */
export interface ValueNotMeasured {
  /** Dotted figure name (figures.md). */
  readonly name: string;
  /** Why it is not reported, at the `.figure` line. */
  readonly reason: Diagnostic;
}

/** A figure that was measured: its values (finite numbers only), the unit of each value (figure registry), and any value left out. */
export interface FigureMeasured extends FigureValues {
  readonly ok: true;
  readonly units: Readonly<Record<string, FigureUnit>>;
  /** Values that came out as ±∞ or NaN; they are not in `values`. */
  readonly notMeasured: readonly ValueNotMeasured[];
}

/** A figure that could not be measured, with the reason. */
export interface FigureNotMeasured {
  readonly ok: false;
  readonly kind: FigureKind;
  /** The `.figure` line. */
  readonly origin: CardOrigin;
  /** The error that stopped the measurement: message and place (the `.figure` line when the error names none). */
  readonly reason: Diagnostic;
}

/** One `.figure` line's outcome: measured, or not measured with the reason. */
export type MeasuredFigure = FigureMeasured | FigureNotMeasured;

/** What every limit result has: the `.limit` line as written. */
interface LimitCommon {
  /** Figure name as written in the `.limit` line. */
  readonly figure: string;
  readonly op: LimitOp;
  /** The limit value, in the figure's unit. */
  readonly value: number;
  /** The `.limit` line. */
  readonly origin: CardOrigin;
}

/**
 * The result of one `.limit`: `pass` or `fail` with the measured value
 * (`actual`, in the figure's unit), or `not-evaluated` when its figure (or
 * that value) was not measured, with the reason. `pass` is true only for
 * status `pass`.
 */
export type LimitResult =
  | (LimitCommon & { readonly status: 'pass'; readonly pass: true; readonly actual: number })
  | (LimitCommon & { readonly status: 'fail'; readonly pass: false; readonly actual: number })
  | (LimitCommon & { readonly status: 'not-evaluated'; readonly pass: false; readonly actual: undefined; readonly reason: Diagnostic });

/** Everything the measure layer produced. */
export interface FigureReport {
  /** Every `.figure` line, in netlist order, measured or not. */
  readonly figures: readonly MeasuredFigure[];
  /** All measured figure values, by dotted name (finite numbers only). */
  readonly values: Readonly<Record<string, number>>;
  readonly limits: readonly LimitResult[];
  /** Warnings of the figures, among them one per figure or value not measured. */
  readonly warnings: readonly Diagnostic[];
  /** The stage's nominal output, V (for a sine-fed stage the mean over the nominal cycle); undefined without figures or when the nominal point could not be solved. */
  readonly voutNominal: number | undefined;
  /** The kind of bench the figures were measured on (`sine-fed`: at periodic steady state); undefined without figures or when the nominal point could not be solved. */
  readonly bench: BenchKind | undefined;
  /** When the stage's nominal point could not be solved (no figure measured): the reason, the same every figure carries. */
  readonly nominalFailure: Diagnostic | undefined;
  /** A sine-fed stage's operating point as cycle averages at periodic steady state (undefined for a DC-fed stage, or when its steady state could not be found). */
  readonly cycleOperatingPoint: CycleOperatingPoint | undefined;
}

/** Unit of a measured value from the figure registry; a name the registry does not give for this bench kind is an internal error, never an empty unit. */
function unitOf(name: string, bench: BenchKind): FigureUnit {
  const unit = figureUnit(name, bench);
  if (unit === undefined) throw new RailcheckError([errorAt('internal', `internal error: the figure registry has no unit for ${name} on a ${bench} bench`)]);
  return unit;
}

/** True when `actual` satisfies the limit `op value` (both in the figure's unit). */
export function limitHolds(actual: number, op: LimitOp, value: number): boolean {
  return match(op)
    .with('<', () => actual < value)
    .with('<=', () => actual <= value)
    .with('>', () => actual > value)
    .with('>=', () => actual >= value)
    .exhaustive();
}

/** The outcome of one limit whose figure or value was not measured. */
function notEvaluated(l: FlatLimit, reason: Diagnostic): LimitResult {
  return { figure: l.figure, op: l.op, value: l.value, origin: l.origin, status: 'not-evaluated', pass: false, actual: undefined, reason };
}

/** Why a limit's figure or value was not measured, if it was not: the figure of its kind not measured, or that value left out. */
function unmeasuredReason(name: string, figures: readonly MeasuredFigure[]): Diagnostic | undefined {
  const kind = figureKindOf(name);
  const low = name.toLowerCase();
  for (const f of figures) {
    const reason = match(f)
      .with({ ok: false }, (g) => (g.kind === kind ? g.reason : undefined))
      .with({ ok: true }, (g) => g.notMeasured.find((v) => v.name.toLowerCase() === low)?.reason)
      .exhaustive();
    if (reason) return reason;
  }
  return undefined;
}

/**
 * Checks the limits against measured values (pass or fail). A limit whose
 * figure, or whose value, is among `figures` as not measured is
 * `not-evaluated`, with that reason. Throws RailcheckError for a limit on
 * a value that was measured by no figure; with `bench`, one that kind of
 * stage never produces (figure registry) is named as such.
 */
export function checkLimits(limits: readonly FlatLimit[], values: Readonly<Record<string, number>>, bench?: BenchKind, figures: readonly MeasuredFigure[] = []): LimitResult[] {
  const lower = new Map(Object.entries(values).map(([n, v]) => [n.toLowerCase(), v]));
  return limits.map((l): LimitResult => {
    const actual = lower.get(l.figure.toLowerCase());
    if (actual === undefined) {
      // A value this kind of stage never has is a netlist error, measured or not.
      const never = bench !== undefined && figureEntry(l.figure) !== undefined && figureUnit(l.figure, bench) === undefined;
      const reason = never ? undefined : unmeasuredReason(l.figure, figures);
      if (reason) return notEvaluated(l, reason);
      const why = never ? `a ${bench} stage does not have this value (figures.md)` : "no such value was measured (check the figure's method= or the element name)";
      throw new RailcheckError([errorAt('limit-without-figure', `.limit ${l.figure}: ${why}`, l.origin.pos, l.origin.lineText, `one of: ${[...lower.keys()].join(', ') || '(no figures measured)'}`)]);
    }
    const common = { figure: l.figure, op: l.op, value: l.value, origin: l.origin, actual };
    return limitHolds(actual, l.op, l.value) ? { ...common, status: 'pass', pass: true } : { ...common, status: 'fail', pass: false };
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

/** The reason a figure was not measured, from the error that stopped it; placed at the `.figure` line when the error names no place. */
function reasonOf(e: RailcheckError, f: FlatFigure): Diagnostic {
  const [first, ...more] = e.diagnostics;
  const d = first ?? errorAt('figure-failed', 'the measurement failed');
  const message = [d.message, ...more.map((m) => m.message)].join('; ');
  return d.pos ? { ...d, message } : { ...d, message, pos: f.origin.pos, lineText: f.origin.lineText };
}

/** The note in the report for a figure not measured: at its `.figure` line, naming the reason's place when that is another line. */
function notMeasuredNote(f: FlatFigure, reason: Diagnostic): Diagnostic {
  const p = reason.pos;
  const elsewhere = p && (p.file !== f.origin.pos.file || p.line !== f.origin.pos.line) ? ` (${p.file}:${p.line}:${p.column})` : '';
  const note = warningAt('figure-not-measured', `.figure ${f.figure} was not measured: ${reason.message}${elsewhere}`, f.origin.pos, f.origin.lineText);
  return reason.expected === undefined ? note : { ...note, expected: reason.expected };
}

/** A non-finite value in words. */
const nonFinite = (v: number): string => (Number.isNaN(v) ? 'undefined (zero divided by zero)' : v > 0 ? '+∞' : '−∞');

/**
 * A measured figure with the unit of each value; a value that is not a
 * finite number is left out of the values, as not measured with its
 * reason, and noted in `warnings`.
 */
function withUnits(m: FigureValues, f: FlatFigure, bench: BenchKind, warnings: Diagnostic[]): FigureMeasured {
  const values: Record<string, number> = {};
  const notMeasured: ValueNotMeasured[] = [];
  for (const [name, v] of Object.entries(m.values)) {
    if (Number.isFinite(v)) {
      values[name] = v;
      continue;
    }
    const reason = errorAt('not-finite', `${name} came out as ${nonFinite(v)}, not a finite number: its definition (figures.md) divides by, or takes the logarithm of, a quantity that is zero at these conditions`, f.origin.pos, f.origin.lineText);
    notMeasured.push({ name, reason });
    warnings.push(warningAt('value-not-measured', `${name} was not measured: ${reason.message}`, f.origin.pos, f.origin.lineText));
  }
  for (const o of m.omitted ?? []) {
    const reason = errorAt('not-applicable', `${o.name}: ${o.reason}`, f.origin.pos, f.origin.lineText);
    notMeasured.push({ name: o.name, reason });
    warnings.push(warningAt('value-not-measured', `${o.name} was not measured: ${o.reason}`, f.origin.pos, f.origin.lineText));
  }
  const units = Object.fromEntries(Object.keys(values).map((n) => [n, unitOf(n, bench)]));
  return { ok: true, kind: m.kind, values, conditions: m.conditions, units, notMeasured, ...(m.stress ? { stress: m.stress } : {}) };
}

/** The figures when the bench's nominal point cannot be solved: each not measured with that one reason, and one note for them all. */
function nominalFailed(e: RailcheckError, all: readonly FlatFigure[], warnings: Diagnostic[]): { figures: FigureNotMeasured[]; reason: Diagnostic } {
  const cause = reasonOf(e, all[0]!);
  const reason = { ...cause, message: `the stage's nominal point could not be solved: ${cause.message}` };
  const note = warningAt('figures-not-measured', `no figure was measured (${all.map((f) => f.figure).join(', ')}): ${reason.message}`, reason.pos, reason.lineText);
  warnings.push(reason.expected === undefined ? note : { ...note, expected: reason.expected });
  return { figures: all.map((f) => ({ ok: false, kind: f.figure, origin: f.origin, reason })), reason };
}

/** Every figure measured on the bench; one whose measurement throws RailcheckError is not measured, with the reason, and the others go on. */
function measureOnBench(bench: Bench, all: readonly FlatFigure[], warnings: Diagnostic[]): MeasuredFigure[] {
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
  const figures = all.map((f) => readableKeys(f, bench.kind));
  for (const f of all) warnings.push(...unusedKeyNotes(f, bench.kind));
  // The stress figure judges what every other figure's solves went through, so it is measured last (docs/stress.md).
  const order = figures.map((_, k) => k).sort((a, b) => Number(figures[a]!.figure === 'stress') - Number(figures[b]!.figure === 'stress'));
  const out: MeasuredFigure[] = new Array<MeasuredFigure>(figures.length);
  for (const k of order) out[k] = measureOne(bench, figures[k]!, figures, dropoutAt, warnings);
  warnings.push(...overRatingNotes(bench));
  return out;
}

/** One figure measured on the bench; a RailcheckError makes it not measured, with the reason. */
function measureOne(bench: Bench, f: FlatFigure, figures: readonly FlatFigure[], dropoutAt: (fall: number) => Dropout, warnings: Diagnostic[]): MeasuredFigure {
  let m: FigureValues;
  try {
    m = measureFigure(bench, f, { all: figures, dropoutAt, warnings });
  } catch (e) {
    if (!(e instanceof RailcheckError)) throw e;
    const reason = reasonOf(e, f);
    warnings.push(notMeasuredNote(f, reason));
    return { ok: false, kind: f.figure, origin: f.origin, reason };
  }
  return withUnits(m, f, bench.kind, warnings);
}

/** True when the circuit's `.supply` input is a `sin` source: its operating point is a cycle average (figures.md). */
export function isSineFed(c: CompiledCircuit): boolean {
  const supply = c.flat.supply;
  const input = supply ? c.flat.elements.find((e) => e.key === supply.input) : undefined;
  return input?.kind === 'vsource' && input.spec.waveform?.kind === 'sin';
}

/** Options of {@link measureFigures}. */
export interface MeasureOptions {
  /** Temperature of the measurement, °C (default: the circuit's first `.temp`, 27 °C without one). */
  readonly celsius?: number | undefined;
}

/**
 * Measures every figure of the compiled circuit's netlist on one bench
 * (create-bench.ts: a circuit of its own, at the first `.temp`
 * temperature or at `options.celsius`) and checks its limits. The caller's circuit is not changed.
 * A figure that cannot be measured (its measurement throws RailcheckError)
 * is reported as not measured with the reason, and the others are still
 * measured; when the bench's nominal point cannot be solved, no figure is
 * measured and each carries that reason. Limits on what was not measured
 * are `not-evaluated`. Throws RailcheckError only for a limit on a value
 * no figure produces (a netlist error).
 */
export function measureFigures(c: CompiledCircuit, options: MeasureOptions = {}): FigureReport {
  COMPILED_CIRCUITS.check('measureFigures', 'c', c);
  checkOptions('measureFigures', options, { celsius: 'finite' });
  return measureFiguresOn(c, () => createBench(c, options.celsius === undefined ? {} : { celsius: options.celsius }));
}

/**
 * {@link measureFigures} on the bench `makeBench` builds (it may throw
 * RailcheckError as createBench does): internal to core, for tolerance
 * runs that build their benches on a revalued circuit.
 */
export function measureFiguresOn(c: CompiledCircuit, makeBench: () => Bench): FigureReport {
  const flat = c.flat;
  const warnings: Diagnostic[] = [];
  let bench: Bench | undefined;
  let measured: MeasuredFigure[] = [];
  let nominalFailure: Diagnostic | undefined;
  // A sine-fed stage gets its bench even without figures: its operating point is the nominal cycle's average.
  if (flat.figures.length > 0 || isSineFed(c)) {
    try {
      bench = makeBench();
    } catch (e) {
      if (!(e instanceof RailcheckError)) throw e;
      if (flat.figures.length > 0) ({ figures: measured, reason: nominalFailure } = nominalFailed(e, flat.figures, warnings));
      else {
        nominalFailure = e.diagnostics[0];
        const o = flat.supply?.origin;
        warnings.push(warningAt('no-cycle-average', `the cycle-average operating point of the sine-fed stage could not be found: ${e.diagnostics.map((d) => d.message).join('; ')}`, o?.pos, o?.lineText));
      }
    }
  }
  if (bench) measured = measureOnBench(bench, flat.figures, warnings);
  const values: Record<string, number> = {};
  for (const f of measured) if (f.ok) Object.assign(values, f.values);
  const voutNominal = bench ? bench.railSign * bench.voutNominal : undefined;
  return { figures: measured, values, limits: checkLimits(flat.limits, values, bench?.kind, measured), warnings, voutNominal, bench: bench?.kind, nominalFailure, cycleOperatingPoint: bench?.cycleOperatingPoint };
}
