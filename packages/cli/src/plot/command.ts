/**
 * `--plot DIR` of run, demo, compare and spread (docs/plots.md): the
 * curves measured on their own bench, turned into plot specs and written
 * as SVG files and one page; a failure is a message, never a throw.
 */
import { measureCurves, type CurveKind, type FigureCurves, type RunReport } from '@railcheck/core';
import { writePlots, type PlotFolder } from './write.js';

/** The option as every command lists it. */
export const PLOT_FLAG = { name: 'plot', short: 'p', takesValue: true, valueName: 'DIR', help: 'write the plots (SVG) and one HTML page of them into the folder DIR (docs/plots.md)' } as const;

/** The curves of a run's figures (`kinds`, default all), or undefined with the reason added to `notes` when no bench can be built. */
export function curvesOf(report: RunReport, notes: string[], kinds?: readonly CurveKind[]): FigureCurves | undefined {
  if (!report.circuit.supply || report.circuit.figures.length === 0) return undefined;
  const r = measureCurves(report.compiled, kinds ? { kinds } : {});
  if (!r.ok) {
    notes.push(`the curves behind the figures were not measured: ${r.errors.map((e) => e.message).join('; ')}`);
    return undefined;
  }
  notes.push(...r.curves.notes);
  return r.curves;
}

/** Writes a plot folder and says so on standard error (the report keeps standard output); the exit status of the write: 0, or 2 with the message. */
export function writePlotFolder(dir: string, folder: PlotFolder, protect: string, command: string, notes: readonly string[], err: (line: string) => void): number {
  const written = writePlots(dir, folder, protect);
  if (!written.ok) {
    err(`railcheck ${command}: --plot: ${written.message}`);
    return 2;
  }
  for (const n of notes) err(`railcheck ${command}: --plot: ${n}`);
  err(`railcheck ${command}: --plot: ${written.paths.length - 1} plots and ${written.paths[written.paths.length - 1]} written`);
  return 0;
}
