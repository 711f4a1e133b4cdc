/**
 * The report a person reads: the operating point (node voltages, element
 * currents and dissipation) and DC sweeps, with engineering prefixes.
 */
import { describeSteady, formatDiagnostic, formatSI, type CycleOperatingPoint, type DcSweep, type Diagnostic, type OperatingPoint, type RunReport } from '@railcheck/core';
import { heading, table } from './table.js';
import { formatAc, formatTransient } from './waves.js';
import { formatFigures, formatLimits, formatStage } from './figures.js';

const METHOD_WORDS: Readonly<Record<OperatingPoint['method'], string>> = {
  newton: 'Newton from a cold start',
  'gmin-stepping': 'gmin stepping (plain Newton did not converge)',
  'source-stepping': 'source stepping (plain Newton and gmin stepping did not converge)',
  'newton-after-stepping': 'Newton at full sources from the last point source stepping reached (plain Newton, gmin and source stepping did not converge)',
};

/**
 * Each element's current (a transistor's three terminals on one line),
 * power and rating, marked OVER above its `pmax`; `header` names the
 * columns (plain or cycle-average values).
 */
function elementTable(report: RunReport, op: { readonly currents: Readonly<Record<string, number>>; readonly power: Readonly<Record<string, number>> }, header: readonly string[]): string {
  const rows: string[][] = [[...header]];
  for (const el of report.circuit.elements) {
    const p = op.power[el.name] ?? 0;
    const rating = el.pmax === undefined ? '' : `${formatSI(el.pmax, 'W')}${p > el.pmax ? '  OVER' : ''}`;
    if (el.kind === 'bjt') {
      const [c, b, e] = ['c', 'b', 'e'].map((t) => formatSI(op.currents[`${el.name}.${t}`] ?? 0, 'A'));
      rows.push([el.name, `c ${c}  b ${b}  e ${e}`, formatSI(p, 'W'), rating]);
    } else {
      rows.push([el.name, formatSI(op.currents[el.name] ?? 0, 'A'), formatSI(p, 'W'), rating]);
    }
  }
  return table(rows);
}

/** Node voltages and the per-element current and power table for one operating point. */
export function formatOperatingPoint(op: OperatingPoint, report: RunReport): string {
  const parts: string[] = [];
  parts.push(heading(`Operating point at ${op.temperature} °C`));
  parts.push(`  found by ${METHOD_WORDS[op.method]}, ${op.iterations} iterations`);
  const supply = report.circuit.supply;
  const input = supply ? report.circuit.elements.find((e) => e.key === supply.input) : undefined;
  if (input?.kind === 'vsource' && input.spec.waveform?.kind === 'sin') {
    parts.push(`  (the stage is fed with a sine: this is the DC solution with ${input.name} at its t = 0 value; the figures are taken at periodic steady state)`);
  }
  parts.push('');
  parts.push(table([['node', 'voltage'], ...Object.entries(op.nodes).map(([n, v]) => [n, formatSI(v, 'V')])]));
  parts.push('');
  parts.push(elementTable(report, op, ['element', 'current', 'power', 'rating']));
  parts.push('  (currents enter an element at its first node; a source delivering power shows negative current and power)');
  return parts.join('\n');
}

/**
 * A sine-fed stage's operating point: cycle averages at periodic steady
 * state, each node with its least and greatest value over the cycle.
 */
export function formatCycleOperatingPoint(op: CycleOperatingPoint, report: RunReport): string {
  const parts: string[] = [];
  parts.push(heading(`Operating point at ${report.circuit.temperatures[0] ?? 27} °C: averages over one cycle at periodic steady state`));
  parts.push(`  steady state by ${describeSteady(op.steady)}`);
  parts.push('');
  parts.push(table([['node', 'mean', 'min', 'max'], ...Object.entries(op.nodes).map(([n, v]) => [n, formatSI(v.mean, 'V'), formatSI(v.min, 'V'), formatSI(v.max, 'V')])]));
  parts.push('');
  parts.push(elementTable(report, op, ['element', 'mean current', 'mean power', 'rating']));
  parts.push('  (cycle averages; currents enter an element at its first node; a source delivering power shows negative current and power)');
  return parts.join('\n');
}

/** Largest number of node columns printed for a sweep in text (all are in --json). */
const SWEEP_COLUMNS = 6;

/** A DC sweep as a table of the swept value against node voltages. */
export function formatSweep(s: DcSweep): string {
  const names = Object.keys(s.nodes).slice(0, SWEEP_COLUMNS);
  const unit = s.source.toLowerCase().startsWith('i') ? 'A' : 'V';
  const rows = [[s.source, ...names], ...s.values.map((v, k) => [formatSI(v, unit), ...names.map((n) => formatSI(s.nodes[n]![k]!, 'V'))])];
  const more = Object.keys(s.nodes).length - names.length;
  const lines = [heading(`DC sweep of ${s.source} at ${s.temperature} °C`), table(rows)];
  if (more > 0) lines.push(`  (${more} more node${more > 1 ? 's' : ''} in --json output)`);
  if (s.assisted.length) lines.push(`  note: ${s.assisted.length} point(s) needed gmin or source stepping`);
  return lines.join('\n');
}

/** Warnings, each with its place in the netlist. */
export function formatWarnings(warnings: readonly Diagnostic[]): string {
  if (warnings.length === 0) return '';
  return [heading('Notes'), ...warnings.map((w) => formatDiagnostic(w).replace(/^/gm, '  '))].join('\n');
}

/** The whole text report of a run. */
export function formatReport(report: RunReport): string {
  const parts = [`railcheck — ${report.title || '(untitled)'}`, `  netlist ${report.file}`, ''];
  const stage = formatStage(report);
  if (stage) parts.push(stage, '');
  if (report.figures && report.figures.figures.length > 0) parts.push(formatFigures(report.figures, report.circuit.temperatures[0] ?? 27), '');
  const limits = report.figures ? formatLimits(report.figures.limits, report.figures) : '';
  if (limits) parts.push(limits, '');
  // A sine-fed stage's operating point is its cycle average; the DC solutions at switch-on are only in --json.
  const cycle = report.figures?.cycleOperatingPoint;
  if (cycle) parts.push(formatCycleOperatingPoint(cycle, report), '');
  else for (const op of report.operatingPoints) parts.push(formatOperatingPoint(op, report), '');
  for (const s of report.sweeps) parts.push(formatSweep(s), '');
  for (const t of report.transients) parts.push(formatTransient(t), '');
  for (const a of report.ac) parts.push(formatAc(a), '');
  const notes = formatWarnings(report.warnings);
  if (notes) parts.push(notes, '');
  return parts.join('\n');
}
