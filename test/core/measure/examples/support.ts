/**
 * Running an example once and comparing its figures with independent
 * values: the run, a relative-difference helper, and a table printed once
 * per file so that the measured numbers are on record beside the checks.
 */
import { runNetlistFile, type RunReport } from '@railcheck/core';
import { examplePath } from './netlist-values.js';

/** Runs an example netlist through railcheck; fails the test with the messages if it does not run. */
export function runExample(file: string): RunReport {
  const r = runNetlistFile(examplePath(file));
  if (!r.ok) throw new Error(`${file} did not run: ${r.errors.map((e) => e.message).join('; ')}`);
  return r.report;
}

/** The figure value `name` of a report, or a failure naming it. */
export function figure(report: RunReport, name: string): number {
  const v = report.figures?.values[name];
  if (v === undefined) throw new Error(`${report.file}: no figure ${name} (have ${Object.keys(report.figures?.values ?? {}).join(', ')})`);
  return v;
}

/** |a − b| / |b|. */
export function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/** Rows of railcheck-versus-independent numbers, printed together at the end of a file. */
export class Ledger {
  private readonly rows: string[] = [];
  constructor(private readonly title: string) {}
  add(name: string, railcheck: number, independent: number, note = ''): void {
    const d = independent === 0 ? Math.abs(railcheck) : rel(railcheck, independent);
    this.rows.push(`  ${name.padEnd(22)} ${railcheck.toPrecision(8).padStart(16)} ${independent.toPrecision(8).padStart(16)}  rel ${d.toExponential(2)} ${note}`);
  }
  note(text: string): void {
    this.rows.push(`  ${text}`);
  }
  print(): void {
    console.log(`${this.title}\n  ${'figure'.padEnd(22)} ${'railcheck'.padStart(16)} ${'independent'.padStart(16)}\n${this.rows.join('\n')}`);
  }
}
