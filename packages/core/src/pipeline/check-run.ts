/**
 * One netlist of a regression check, run and boiled down to plain data
 * (numbers and strings only) so that a worker thread can hand it back and
 * a shard's JSON can carry it: the measured figures with their units, the
 * operating-point node voltages, the limits with their outcome, the errors
 * that stopped the run, and whether the stage works above extra-low
 * voltage.
 */
import { formatDiagnostic, type Diagnostic } from '../errors.js';
import type { FigureUnit } from '../figure-registry.js';
import type { LimitOp } from '../netlist/ast.js';
import { runNetlistFile, type RunReport } from './run.js';

/** A limit of a netlist and what became of it. */
export interface CheckLimit {
  /** The figure's dotted name as the `.limit` line writes it. */
  readonly figure: string;
  readonly op: LimitOp;
  /** The bound, in the figure's own unit. */
  readonly value: number;
  /** `not-evaluated`: the figure was not measured (`reason` says why). */
  readonly status: 'pass' | 'fail' | 'not-evaluated';
  /** The measured value in the figure's unit; null when not evaluated. */
  readonly actual: number | null;
  /** The figure's unit (figure registry); null when not evaluated. */
  readonly unit: FigureUnit | null;
  /** Why it was not evaluated (one line with its place); null otherwise. */
  readonly reason: string | null;
}

/** A netlist's run as plain data: what it measured, or the errors that stopped it. */
export type NetlistRun =
  | {
      readonly ok: true;
      readonly title: string;
      /** Every measured figure value by dotted name, with its unit. */
      readonly figures: Readonly<Record<string, { readonly value: number; readonly unit: FigureUnit }>>;
      /** Operating-point node voltages, V, by node name: the nominal d.c. point, or for a sine-fed stage the cycle means at periodic steady state (as `run --json` reports `op`). */
      readonly nodes: Readonly<Record<string, number>>;
      readonly limits: readonly CheckLimit[];
      /** True when the run carries the extra-low-voltage caution (code `above-elv`). */
      readonly aboveElv: boolean;
    }
  | {
      readonly ok: false;
      /** The errors, each formatted as `file:line:column: message` with its source line. */
      readonly errors: readonly string[];
      readonly aboveElv: boolean;
    };

const aboveElv = (warnings: readonly Diagnostic[]): boolean => warnings.some((w) => w.code === 'above-elv');

/** Sorted copy of a record (code-point order of the keys), so the data do not depend on evaluation order. */
export function sortedRecord<T>(r: Readonly<Record<string, T>>): Record<string, T> {
  return Object.fromEntries(Object.entries(r).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
}

/** The plain data of a report. */
export function netlistRunOf(report: RunReport): NetlistRun {
  const figures: Record<string, { value: number; unit: FigureUnit }> = {};
  for (const f of report.figures?.figures ?? []) {
    if (!f.ok) continue;
    for (const [name, value] of Object.entries(f.values)) {
      const unit = f.units[name];
      if (unit !== undefined && Number.isFinite(value)) figures[name] = { value, unit };
    }
  }
  const unitOf = (name: string): FigureUnit | null => {
    const low = name.toLowerCase();
    for (const [n, v] of Object.entries(figures)) if (n.toLowerCase() === low) return v.unit;
    return null;
  };
  const cycle = report.figures?.cycleOperatingPoint;
  const nodes = cycle ? Object.fromEntries(Object.entries(cycle.nodes).map(([n, v]) => [n, v.mean])) : { ...(report.operatingPoints[0]?.nodes ?? {}) };
  const limits = (report.figures?.limits ?? []).map((l): CheckLimit => {
    const common = { figure: l.figure, op: l.op, value: l.value };
    if (l.status === 'not-evaluated') {
      const at = l.reason.pos ? ` (${l.reason.pos.file}:${l.reason.pos.line}:${l.reason.pos.column})` : '';
      return { ...common, status: l.status, actual: null, unit: null, reason: `${l.reason.message}${at}` };
    }
    return { ...common, status: l.status, actual: l.actual, unit: unitOf(l.figure), reason: null };
  });
  return { ok: true, title: report.title, figures: sortedRecord(figures), nodes: sortedRecord(nodes), limits, aboveElv: aboveElv(report.warnings) };
}

/** Runs one netlist file and returns its plain data; never throws for anything a netlist can contain. */
export function runForCheck(file: string, allowOutsideIncludes: boolean): NetlistRun {
  const result = runNetlistFile(file, { allowOutsideIncludes });
  if (!result.ok) return { ok: false, errors: result.errors.map((e) => formatDiagnostic(e)), aboveElv: aboveElv(result.warnings) };
  return netlistRunOf(result.report);
}
