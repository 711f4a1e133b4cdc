/**
 * The whole pipeline for one netlist: read → elaborate → compile → analyse
 * at every `.temp` temperature → measure the figures (at the first). Returns
 * values, never throws for anything a netlist can contain. A figure that
 * cannot be measured does not stop the run: it is in the report as not
 * measured, with the reason, beside everything else. An analysis that
 * fails (an operating point, sweep, transient or small-signal run the
 * netlist asks for) still stops it: the run then has errors, no report.
 */
import { match } from 'ts-pattern';
import { warningAt, RailcheckError, type Diagnostic, errorAt } from '../errors.js';
import { MAX_OUTPUT_VALUES } from '../budgets.js';
import { argumentDiagnostic, isRecord, optionsProblem } from '../arguments.js';
import { parseNetlist, readNetlistFile, type ParseOptions, type ParseResult } from '../netlist/index.js';
import { elaborate } from '../elaborate/elaborate.js';
import type { FlatAnalysis, FlatCircuit } from '../elaborate/flat.js';
import type { CardOrigin } from '../netlist/ast.js';
import { compileCircuit, type CompiledCircuit } from '../engine/compile.js';
import { setCircuitTemperature } from '../engine/dcop.js';
import { dcSweep, operatingPoint, type DcSweep, type OperatingPoint } from '../analysis/dc.js';
import { safetyWarnings } from '../analysis/safety.js';
import { operatingPointsJudged, sanityWarnings } from '../analysis/sanity.js';
import { hasStressRatings, judgeStress, namedOverRatings, overRatingWarnings, StressMeter } from '../analysis/stress.js';
import { isSineFed, measureFigures, type FigureReport } from '../measure/figures.js';
import { transient, type TransientResult } from '../analysis/tran.js';
import { acFrequencies, acSweep, type AcResult } from '../analysis/ac.js';


/** Output points of one analysis (the operating point is one). */
function outputPoints(a: FlatAnalysis): number {
  return match(a)
    .with({ kind: 'op' }, () => 1)
    .with({ kind: 'dc' }, (d) => Math.floor(Math.abs((d.stop - d.start) / d.step) + 1e-9) + 1)
    .with({ kind: 'tran' }, (t) => Math.floor((t.tstop - t.tstart) / t.tstep + 1e-9) + 2)
    .with({ kind: 'ac' }, (f) => 2 * acFrequencies(f.variation, f.points, f.fstart, f.fstop).length)
    .exhaustive();
}

/**
 * Throws RailcheckError, located at the analysis card that takes the total
 * over it, when the analyses at all temperatures would hand back more than
 * MAX_OUTPUT_VALUES values; checked before any analysis runs.
 */
function checkOutputBudget(c: CompiledCircuit): void {
  const signals = c.flat.nodes.length + c.unknowns.filter((u) => u.kind === 'branch').length;
  const temps = c.flat.temperatures.length;
  let total = 0;
  for (const a of c.flat.analyses) {
    total += outputPoints(a) * signals * temps;
    if (!(total <= MAX_OUTPUT_VALUES)) {
      throw new RailcheckError([errorAt('budget-output', `the analyses would hand back ${total.toPrecision(3)} values by this card (points × ${signals} node voltages and branch currents × ${temps} temperature${temps === 1 ? '' : 's'}), over the budget MAX_OUTPUT_VALUES = ${MAX_OUTPUT_VALUES}`, a.origin.pos, a.origin.lineText, 'fewer points (a larger step), fewer temperatures or a smaller circuit')]);
    }
  }
}

/** Everything a run produced. */
export interface RunReport {
  readonly title: string;
  readonly file: string;
  /** The flat circuit that was simulated. */
  readonly circuit: FlatCircuit;
  /** The compiled circuit (devices and workspaces), for further analyses by library callers. */
  readonly compiled: CompiledCircuit;
  /** Operating point at each temperature, in `.temp` order (the first is the nominal one). */
  readonly operatingPoints: readonly OperatingPoint[];
  /** DC sweeps, one per `.dc` and temperature. */
  readonly sweeps: readonly DcSweep[];
  /** Transient runs, one per `.tran` and temperature. */
  readonly transients: readonly TransientResult[];
  /** Small-signal sweeps, one per `.ac` and temperature. */
  readonly ac: readonly AcResult[];
  /** Power-supply figures and limits (absent when the netlist asks for none); figures that could not be measured are in it as such, and limits on them as not evaluated. */
  readonly figures: FigureReport | undefined;
  /** Warnings from every stage. */
  readonly warnings: readonly Diagnostic[];
}

/** Result of a run: a report, or the errors that stopped it. */
export type RunResult =
  | { readonly ok: true; readonly report: RunReport }
  | { readonly ok: false; readonly errors: readonly Diagnostic[]; readonly warnings: readonly Diagnostic[] };

/** Elaborates and compiles a parsed netlist; an argument that is not a parse result is an `ok: false` result (`bad-argument`). */
export function prepare(parsed: ParseResult): { ok: true; compiled: CompiledCircuit; warnings: Diagnostic[] } | { ok: false; errors: readonly Diagnostic[]; warnings: Diagnostic[] } {
  if (!isRecord(parsed) || typeof parsed['ok'] !== 'boolean' || !Array.isArray(parsed['warnings']) || (parsed['ok'] === false && !Array.isArray(parsed['errors']))) {
    return { ok: false, errors: [argumentDiagnostic('prepare', 'parsed', 'a result of parseNetlist or readNetlistFile', parsed)], warnings: [] };
  }
  const warnings = [...parsed.warnings];
  if (!parsed.ok) return { ok: false, errors: parsed.errors, warnings };
  const flat = elaborate(parsed.netlist);
  for (const d of flat.warnings) warnings.push(d); // not push(...): a long list would overflow the call stack
  if (!flat.ok) return { ok: false, errors: flat.errors, warnings };
  const compiled = compileCircuit(flat.circuit);
  if (!compiled.ok) return { ok: false, errors: compiled.errors, warnings };
  return { ok: true, compiled: compiled.circuit, warnings };
}

function acDriveWarnings(flat: FlatCircuit): Diagnostic[] {
  const out: Diagnostic[] = [];
  const driven = flat.elements.some((el) => (el.kind === 'vsource' || el.kind === 'isource') && el.spec.acMag !== 0);
  for (const a of flat.analyses) {
    if (a.kind === 'ac' && !driven) out.push(warningAt('no-ac-drive', 'no source has an ac value, so every small-signal response is zero (add e.g. "ac 1" to the input source)', a.origin.pos, a.origin.lineText));
  }
  return out;
}

/**
 * The note on `.spread` lines: `run` simulates the nominal values only;
 * the tolerance runs that read the lines are `railcheck spread FILE`
 * (docs/spread.md). One note, at the first such line.
 */
export function spreadNote(flat: FlatCircuit): Diagnostic[] {
  const first = flat.spreads[0];
  if (!first) return [];
  const n = flat.spreads.length;
  return [warningAt('spread-not-used', `run uses the nominal values; the ${n} .spread line${n === 1 ? '' : 's'} ${n === 1 ? 'is' : 'are'} read by \`railcheck spread ${flat.file}\` (Monte Carlo or corners with yield against the limits)`, first.origin.pos, first.origin.lineText)];
}

/**
 * Where a failed operating point is reported: the `.op` line; without one,
 * the first analysis that needs the operating point (`.dc`, `.tran`, `.ac`),
 * else the `.supply` line whose figures start from it, else the title line
 * (every run finds the operating point at each `.temp` temperature).
 */
function operatingPointOrigin(flat: FlatCircuit): { origin: CardOrigin; what: string | undefined } {
  const op = flat.analyses.find((a) => a.kind === 'op');
  if (op) return { origin: op.origin, what: undefined };
  const first = flat.analyses[0];
  if (first) return { origin: first.origin, what: `needed by this .${first.kind}` };
  if (flat.supply) return { origin: flat.supply.origin, what: 'needed by the figures of this .supply' };
  return { origin: { pos: { file: flat.file, line: 1, column: 1 }, lineText: flat.title }, what: 'which every run finds, at each .temp temperature' };
}

/**
 * Runs every analysis of a compiled circuit, part stress kept by `meter`
 * when given, every accepted transient point with `keepSteps`. Throws only
 * RailcheckError (an analysis that fails).
 */
export function analyse(c: CompiledCircuit, meter?: StressMeter, keepSteps = false): { operatingPoints: OperatingPoint[]; sweeps: DcSweep[]; transients: TransientResult[]; ac: AcResult[] } {
  const flat = c.flat;
  const operatingPoints: OperatingPoint[] = [];
  const sweeps: DcSweep[] = [];
  const transients: TransientResult[] = [];
  const ac: AcResult[] = [];
  const { origin: opCard, what } = operatingPointOrigin(flat);
  checkOutputBudget(c);
  for (const celsius of flat.temperatures) {
    setCircuitTemperature(c, celsius);
    operatingPoints.push(operatingPoint(c, celsius, opCard, what));
    meter?.point(c.ws.x, c.ws.states[0], `the operating point at ${celsius} °C`);
    for (const a of flat.analyses) {
      if (a.kind === 'dc') sweeps.push(dcSweep(c, celsius, a.source, a.start, a.stop, a.step, a.origin, meter));
      else if (a.kind === 'ac') ac.push(acSweep(c, celsius, acFrequencies(a.variation, a.points, a.fstart, a.fstop), a.origin));
      else if (a.kind === 'tran') {
        const method = a.flags.includes('be') ? 'be' : 'trap';
        transients.push(transient(c, celsius, { tstep: a.tstep, tstop: a.tstop, tstart: a.tstart, tmax: a.tmax, method, fromIc: a.flags.includes('fromic'), keepSteps }, a.origin, meter));
      }
    }
  }
  setCircuitTemperature(c, flat.temperatures[0] ?? 27);
  return { operatingPoints, sweeps, transients, ac };
}

/**
 * The run's own option, `keepSteps`: keep every accepted point of each
 * transient (`TransientResult.trace`, for `acceptedTimes` and
 * `sampleTrace`; what the command's `--steps` writes). Default false: a
 * transient keeps only its output grid, so memory does not grow with the
 * number of time steps (docs/transient.md, "Output"). The other members
 * are reading's, checked there. A keepSteps that is not a boolean is a
 * `bad-argument` diagnostic.
 */
function keepStepsOf(fn: string, options: unknown): boolean | Diagnostic {
  if (!isRecord(options)) return false;
  return optionsProblem(fn, options, { keepSteps: 'boolean' }) ?? options['keepSteps'] === true;
}

/** Runs netlist text (options: those of parseNetlist, and `keepSteps`: keep every accepted transient point; default false). */
export function runNetlist(text: string, options: ParseOptions & { readonly keepSteps?: boolean } = {}): RunResult {
  const keep = keepStepsOf('runNetlist', options);
  if (typeof keep !== 'boolean') return { ok: false, errors: [keep], warnings: [] };
  return runParsed(parseNetlist(text, options), keep);
}

/** Runs a netlist file (options: those of readNetlistFile, and `keepSteps`: keep every accepted transient point; default false). */
export function runNetlistFile(path: string, options: Omit<ParseOptions, 'file'> & { readonly keepSteps?: boolean } = {}): RunResult {
  const keep = keepStepsOf('runNetlistFile', options);
  if (typeof keep !== 'boolean') return { ok: false, errors: [keep], warnings: [] };
  return runParsed(readNetlistFile(path, options), keep);
}

/** Runs a parse result (the whole pipeline after reading), every accepted transient point kept with `keepSteps`; never throws for anything a netlist can contain. */
export function runParsed(parsed: ParseResult, keepSteps = false): RunResult {
  const prepared = prepare(parsed);
  if (!prepared.ok) return prepared;
  const c = prepared.compiled;
  const warnings = [...prepared.warnings, ...acDriveWarnings(c.flat), ...spreadNote(c.flat)];
  try {
    // Ratings beyond pmax are judged over every analysis too (docs/stress.md).
    const meter = hasStressRatings(c.flat.elements) ? new StressMeter(c) : undefined;
    const results = analyse(c, meter, keepSteps);
    // Figures are measured on a bench of their own at the first .temp (measure/create-bench.ts).
    const figures = c.flat.figures.length > 0 || c.flat.limits.length > 0 || isSineFed(c) ? measureFigures(c) : undefined;
    // The caution judges what the analyses reached, the sine-fed steady cycle among them (analysis/safety.ts).
    const cycle = figures?.cycleOperatingPoint?.nodes;
    warnings.unshift(...safetyWarnings(c.flat, { ...results, ...(cycle ? { cycle } : {}) }));
    const cycleOp = figures?.cycleOperatingPoint;
    const judged = [
      ...operatingPointsJudged(results.operatingPoints),
      ...(cycleOp ? [{ where: 'averaged over the steady cycle of the sine-fed stage', currents: cycleOp.currents, power: cycleOp.power }] : []),
    ];
    // A part the dissipation figure already found over its rating (over conditions that include nominal) is named once.
    const figureOver = new Set((figures?.warnings ?? []).filter((w) => w.code === 'over-rating').map((w) => `${w.pos?.file}:${w.pos?.line}`));
    warnings.push(...sanityWarnings(c.flat, judged).filter((w) => w.code !== 'over-rating' || !figureOver.has(`${w.pos?.file}:${w.pos?.line}`)));
    if (figures) warnings.push(...figures.warnings);
    if (meter) warnings.push(...overRatingWarnings(c.elements, judgeStress(c.elements, meter.results()), namedOverRatings(figures?.warnings ?? [])));
    return { ok: true, report: { title: c.flat.title, file: c.flat.file, circuit: c.flat, compiled: c, ...results, figures, warnings } };
  } catch (e) {
    // Without results, the sources as written still earn the caution.
    warnings.unshift(...safetyWarnings(c.flat));
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics, warnings };
    return { ok: false, errors: [errorAt('internal', `internal error: ${e instanceof Error ? e.message : String(e)}`)], warnings };
  }
}
