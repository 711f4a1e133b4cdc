/**
 * The whole pipeline for one netlist: read → elaborate → compile → analyse
 * at every `.temp` temperature. Returns values, never throws for anything a
 * netlist can contain.
 */
import { warningAt, RailcheckError, type Diagnostic, errorAt } from '../errors.js';
import { parseNetlist, readNetlistFile, type ParseOptions, type ParseResult } from '../netlist/index.js';
import { elaborate } from '../elaborate/elaborate.js';
import type { FlatCircuit } from '../elaborate/flat.js';
import { compileCircuit, type CompiledCircuit } from '../engine/compile.js';
import { setCircuitTemperature } from '../engine/dcop.js';
import { dcSweep, operatingPoint, type DcSweep, type OperatingPoint } from './dc.js';
import { safetyWarnings } from './safety.js';

/** Everything a run produced. */
export interface RunReport {
  readonly title: string;
  readonly file: string;
  /** The flat circuit that was simulated. */
  readonly circuit: FlatCircuit;
  /** Operating point at each temperature, in `.temp` order (the first is the nominal one). */
  readonly operatingPoints: readonly OperatingPoint[];
  /** DC sweeps, one per `.dc` and temperature. */
  readonly sweeps: readonly DcSweep[];
  /** Warnings from every stage. */
  readonly warnings: readonly Diagnostic[];
}

/** Result of a run: a report, or the errors that stopped it. */
export type RunResult =
  | { readonly ok: true; readonly report: RunReport }
  | { readonly ok: false; readonly errors: readonly Diagnostic[]; readonly warnings: readonly Diagnostic[] };

/** Elaborates and compiles a parsed netlist. */
export function prepare(parsed: ParseResult): { ok: true; compiled: CompiledCircuit; warnings: Diagnostic[] } | { ok: false; errors: readonly Diagnostic[]; warnings: Diagnostic[] } {
  const warnings = [...parsed.warnings];
  if (!parsed.ok) return { ok: false, errors: parsed.errors, warnings };
  const flat = elaborate(parsed.netlist);
  warnings.push(...flat.warnings);
  if (!flat.ok) return { ok: false, errors: flat.errors, warnings };
  const compiled = compileCircuit(flat.circuit);
  if (!compiled.ok) return { ok: false, errors: compiled.errors, warnings };
  return { ok: true, compiled: compiled.circuit, warnings };
}

function pendingWarnings(flat: FlatCircuit): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const a of flat.analyses) {
    if (a.kind === 'tran' || a.kind === 'ac') out.push(warningAt('not-available', `.${a.kind} is not available in this version of railcheck; it was skipped`, a.origin.pos, a.origin.lineText));
  }
  for (const f of flat.figures) out.push(warningAt('not-available', `figure '${f.figure}' is not available in this version of railcheck; it was skipped`, f.origin.pos, f.origin.lineText));
  for (const l of flat.limits) out.push(warningAt('not-available', `limit on '${l.figure}' was not checked: its figure is not available in this version`, l.origin.pos, l.origin.lineText));
  return out;
}

/** Runs every analysis of a compiled circuit. Throws only RailcheckError (an analysis that fails). */
export function analyse(c: CompiledCircuit): { operatingPoints: OperatingPoint[]; sweeps: DcSweep[] } {
  const flat = c.flat;
  const operatingPoints: OperatingPoint[] = [];
  const sweeps: DcSweep[] = [];
  const opCard = flat.analyses.find((a) => a.kind === 'op')?.origin;
  for (const celsius of flat.temperatures) {
    setCircuitTemperature(c, celsius);
    operatingPoints.push(operatingPoint(c, celsius, opCard));
    for (const a of flat.analyses) {
      if (a.kind === 'dc') sweeps.push(dcSweep(c, celsius, a.source, a.start, a.stop, a.step, a.origin));
    }
  }
  setCircuitTemperature(c, flat.temperatures[0] ?? 27);
  return { operatingPoints, sweeps };
}

/** Runs netlist text. */
export function runNetlist(text: string, options: ParseOptions = {}): RunResult {
  return runParsed(parseNetlist(text, options));
}

/** Runs a netlist file. */
export function runNetlistFile(path: string, options: Omit<ParseOptions, 'file'> = {}): RunResult {
  return runParsed(readNetlistFile(path, options));
}

function runParsed(parsed: ParseResult): RunResult {
  const prepared = prepare(parsed);
  if (!prepared.ok) return prepared;
  const c = prepared.compiled;
  const warnings = [...prepared.warnings, ...safetyWarnings(c.flat), ...pendingWarnings(c.flat)];
  try {
    const { operatingPoints, sweeps } = analyse(c);
    return { ok: true, report: { title: c.flat.title, file: c.flat.file, circuit: c.flat, operatingPoints, sweeps, warnings } };
  } catch (e) {
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics, warnings };
    return { ok: false, errors: [errorAt('internal', `internal error: ${e instanceof Error ? e.message : String(e)}`)], warnings };
  }
}
