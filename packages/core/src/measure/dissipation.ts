/**
 * Dissipation of every resistor, diode and transistor (figures.md,
 * "dissipation"): the power each absorbs at nominal and at the worst
 * corners of the line and load ranges (highest input with the lowest and
 * with the highest load), the largest of these per element, and the
 * efficiency at nominal, P_load / P_in. On a sine-fed bench the powers are
 * cycle averages at periodic steady state.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import type { FlatElement } from '../elaborate/flat.js';
import type { CardOrigin } from '../netlist/ast.js';
import { formatSI } from '../units.js';
import type { Bench, StageSetting } from './bench.js';
import { BENCHES } from './bench.js';
import { argumentError, checkOptions } from '../arguments.js';

/** Options: the ranges over which corners are taken. */
export interface DissipationOptions {
  /** Highest input level (default: the line figure's `to`, else 1.1 × nominal). */
  readonly highLevel?: number | undefined;
  /** Lowest and highest load current, A (default: the load figure's range, else 0 and nominal). */
  readonly loadRange?: readonly [number, number] | undefined;
  /** The line a missing efficiency is reported at (default: the `.supply` line). */
  readonly origin?: CardOrigin | undefined;
}

/** Power per element and efficiency. */
export interface Dissipation {
  /** Element name → largest dissipation over nominal and the corners, W. */
  readonly pd: Readonly<Record<string, number>>;
  /** Element name → dissipation at nominal, W. */
  readonly nominal: Readonly<Record<string, number>>;
  /** `efficiency`: power into the load / power out of the input source at nominal (undefined without a load, or when the input delivers no power). */
  readonly efficiency: number | undefined;
  /** The settings that were solved, nominal first. */
  readonly corners: readonly StageSetting[];
  /** Ratings exceeded, and why efficiency is missing. */
  readonly warnings: readonly Diagnostic[];
}

/** True for the elements whose dissipation is reported: resistors, diodes and transistors. */
export function dissipates(el: FlatElement): boolean {
  return el.kind === 'resistor' || el.kind === 'diode' || el.kind === 'bjt';
}

/** Checks the types of {@link DissipationOptions} at the boundary. */
function checkDissipationOptions(opts: unknown): void {
  checkOptions('dissipation', opts, { highLevel: 'finite' });
  const range = (opts as DissipationOptions | undefined)?.loadRange;
  if (range !== undefined && !(Array.isArray(range) && range.length === 2 && range.every((x) => typeof x === 'number' && Number.isFinite(x)))) {
    throw argumentError('dissipation', 'options.loadRange', 'two finite numbers [low, high] in A', range);
  }
  const origin = (opts as DissipationOptions | undefined)?.origin;
  if (origin !== undefined && !(typeof origin === 'object' && origin !== null && typeof origin.lineText === 'string' && typeof origin.pos === 'object')) {
    throw argumentError('dissipation', 'options.origin', 'a card origin (pos and lineText)', origin);
  }
}

/** Measures dissipation. Throws RailcheckError when a corner cannot be solved, or for an argument of the wrong type. */
export function dissipation(bench: Bench, opts: DissipationOptions = {}): Dissipation {
  BENCHES.check('dissipation', 'bench', bench);
  checkDissipationOptions(opts);
  const { stage } = bench;
  const elements = stage.compiled.elements;
  const nominalLevel = bench.input.nominal;
  const high = opts.highLevel ?? 1.1 * nominalLevel;
  const range = opts.loadRange ?? (bench.loadNominal === undefined ? undefined : ([0, bench.loadNominal] as const));
  const corners: StageSetting[] = [{ level: nominalLevel, loadAmps: bench.loadNominal }];
  if (range) corners.push({ level: high, loadAmps: Math.min(...range) }, { level: high, loadAmps: Math.max(...range) });
  else corners.push({ level: high, loadAmps: undefined });
  const powers = corners.map((corner, k) => bench.solve(corner, `dissipation corner ${k}`, true).power!);
  const pd: Record<string, number> = {};
  const nominal: Record<string, number> = {};
  for (const el of elements) {
    if (!dissipates(el)) continue;
    nominal[el.name] = powers[0]![el.name] ?? 0;
    pd[el.name] = Math.max(...powers.map((p) => p[el.name] ?? 0));
  }
  const warnings = ratingWarnings(elements, pd);
  let efficiency: number | undefined;
  const origin = opts.origin ?? stage.supply.origin;
  if (!stage.load) warnings.push(warningAt('no-efficiency', 'efficiency needs the load element on the .supply line (load=...)', origin.pos, origin.lineText));
  else {
    const pin = -(powers[0]![stage.input.name] ?? 0);
    if (pin > 0) efficiency = (powers[0]![stage.load.name] ?? 0) / pin;
    else warnings.push(warningAt('no-efficiency', `efficiency: the input source ${stage.input.name} delivers no power at nominal (${formatSI(-pin, 'W')} absorbed)`, origin.pos, origin.lineText));
  }
  return { pd, nominal, efficiency, corners, warnings };
}

/** A warning for every element whose dissipation (W) exceeds its rating (`pmax=` or the model's PMAX). */
export function ratingWarnings(elements: readonly FlatElement[], pd: Readonly<Record<string, number>>): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const el of elements) {
    const p = pd[el.name];
    if (p === undefined || el.pmax === undefined || !(p > el.pmax)) continue;
    out.push(warningAt('over-rating', `${el.name} dissipates ${formatSI(p, 'W')}, above its rating of ${formatSI(el.pmax, 'W')}`, el.origin.pos, el.origin.lineText));
  }
  return out;
}
