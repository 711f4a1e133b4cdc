/**
 * Dissipation of every resistor, diode and transistor (figures.md,
 * "dissipation"): the power each absorbs at nominal and at the worst
 * corners of the line and load ranges (highest input with the lowest and
 * with the highest load), the largest of these per element, and the
 * efficiency at nominal, P_load / P_in.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import { readSolution } from '../analysis/solution.js';
import { formatSI } from '../units.js';
import { backToNominal, voutAt, type Bench } from './bench.js';
import type { DcSetting } from './stage.js';
import type { FlatElement } from '../elaborate/flat.js';

/** Options: the ranges over which corners are taken. */
export interface DissipationOptions {
  /** Highest input, V (default: the line figure's `to`, else 1.1 × nominal). */
  readonly highInput?: number | undefined;
  /** Lowest and highest load current, A (default: the load figure's range, else 0 and nominal). */
  readonly loadRange?: readonly [number, number] | undefined;
}

/** Power per element and efficiency. */
export interface Dissipation {
  /** Element name → largest dissipation over nominal and the corners, W. */
  readonly pd: Readonly<Record<string, number>>;
  /** Element name → dissipation at nominal, W. */
  readonly nominal: Readonly<Record<string, number>>;
  /** `efficiency`: power into the load / power out of the input source at nominal (undefined without a load). */
  readonly efficiency: number | undefined;
  /** The settings that were solved. */
  readonly corners: readonly DcSetting[];
  readonly warnings: readonly Diagnostic[];
}

/** True for the elements whose dissipation is reported: resistors, diodes and transistors. */
export function dissipates(el: FlatElement): boolean {
  return el.kind === 'resistor' || el.kind === 'diode' || el.kind === 'bjt';
}

/** Measures dissipation. Throws RailcheckError when a corner cannot be solved. */
export function dissipation(bench: Bench, opts: DissipationOptions = {}): Dissipation {
  const { stage } = bench;
  const c = stage.compiled;
  const high = opts.highInput ?? 1.1 * stage.nominalInput;
  const range = opts.loadRange ?? (bench.loadNominal === undefined ? undefined : ([0, bench.loadNominal] as const));
  const corners: DcSetting[] = [{ vin: stage.nominalInput, loadAmps: bench.loadNominal }];
  if (range) corners.push({ vin: high, loadAmps: Math.min(...range) }, { vin: high, loadAmps: Math.max(...range) });
  else corners.push({ vin: high, loadAmps: undefined });
  const pd: Record<string, number> = {};
  const nominal: Record<string, number> = {};
  let efficiency: number | undefined;
  try {
    corners.forEach((corner, k) => {
      if (k > 0) backToNominal(bench);
      voutAt(bench, corner, `dissipation corner ${k}`);
      const sol = readSolution(c);
      for (const el of c.elements) {
        if (!dissipates(el)) continue;
        const p = sol.power[el.name] ?? 0;
        if (k === 0) nominal[el.name] = p;
        pd[el.name] = Math.max(pd[el.name] ?? -Infinity, p);
      }
      if (k === 0 && stage.load) {
        const pin = -(sol.power[stage.input.name] ?? 0);
        const pload = sol.power[stage.load.name] ?? 0;
        efficiency = pin > 0 ? pload / pin : undefined;
      }
    });
  } finally {
    backToNominal(bench);
  }
  return { pd, nominal, efficiency, corners, warnings: ratingWarnings(c.elements, pd) };
}

/** A warning for every element whose dissipation exceeds its rating (`pmax=` or the model's PMAX). */
export function ratingWarnings(elements: readonly FlatElement[], pd: Readonly<Record<string, number>>): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const el of elements) {
    const p = pd[el.name];
    if (p === undefined || el.pmax === undefined || !(p > el.pmax)) continue;
    out.push(warningAt('over-rating', `${el.name} dissipates ${formatSI(p, 'W')}, above its rating of ${formatSI(el.pmax, 'W')}`, el.origin.pos, el.origin.lineText));
  }
  return out;
}
