/**
 * Sanity notes on a run's results: every part over its power rating, and
 * currents and powers no discrete part of a linear supply stage survives
 * (a resistor written `1M`, which reads as 1 mΩ, drawing kiloamps). They go
 * under the report's Notes (warnings at the element's line), so that a
 * rating exceeded is never seen only as a mark in a table.
 */
import { DEVICES } from '@railcheck/devices';
import { warningAt, type Diagnostic } from '../errors.js';
import type { FlatCircuit, FlatElement } from '../elaborate/flat.js';
import type { OperatingPoint } from './dc.js';
import { formatSI } from '../units.js';

/**
 * Current and power above which a part is physically absurd, A and W: no
 * resistor, capacitor, inductor, diode or transistor of a discrete linear
 * supply carries a kiloamp or dissipates ten kilowatts (the largest stud
 * rectifiers and power resistors are rated hundreds of amps and a few
 * kilowatts). Common practice, no source.
 */
export const ABSURD_CURRENT = 1e3;
/** See {@link ABSURD_CURRENT}, W. */
export const ABSURD_POWER = 1e4;

/** Parts judged for absurd currents and powers (sources and controlled sources are ideal and are not). */
const PARTS: ReadonlySet<FlatElement['kind']> = new Set(['resistor', 'capacitor', 'inductor', 'diode', 'bjt']);

/** Operating-point-like results to judge: per-element currents (names as in the operating point) and absorbed powers. */
export interface JudgedPoint {
  /** Where the values come from, in words ("the operating point at 27 °C"). */
  readonly where: string;
  readonly currents: Readonly<Record<string, number>>;
  readonly power: Readonly<Record<string, number>>;
}

/** The judged points of a run's operating points. */
export function operatingPointsJudged(ops: readonly OperatingPoint[]): JudgedPoint[] {
  return ops.map((op) => ({ where: `in the operating point at ${op.temperature} °C`, currents: op.currents, power: op.power }));
}

/** A hint for a resistor written with an `M` suffix, which is milli (netlist.md, Numbers), when it draws an absurd current. */
function suffixHint(el: FlatElement): string {
  if (el.kind !== 'resistor') return '';
  return /\s[0-9.]+M(?:ohm|Ω)?(?:\s|$)/.test(el.origin.lineText) ? `; note that its value's M suffix is milli (1M is 1 mΩ): write meg for a megohm` : '';
}

/**
 * Warnings for every part over its rating and every absurd current or
 * power, at the element's line, one of each kind per element (the worst
 * of the points given).
 */
export function sanityWarnings(flat: FlatCircuit, points: readonly JudgedPoint[]): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const el of flat.elements) {
    let worstPower: { p: number; where: string } | undefined;
    let worstCurrent: { i: number; where: string } | undefined;
    for (const pt of points) {
      const p = pt.power[el.name];
      if (p !== undefined && Number.isFinite(p) && (!worstPower || p > worstPower.p)) worstPower = { p, where: pt.where };
      // The element's own current labels, named as readSolution names them (`R1`, `Q1.c`).
      for (const label of DEVICES[el.kind].currents) {
        const i = pt.currents[label ? `${el.name}.${label}` : el.name];
        if (i !== undefined && Number.isFinite(i) && (!worstCurrent || Math.abs(i) > worstCurrent.i)) worstCurrent = { i: Math.abs(i), where: pt.where };
      }
    }
    if (el.pmax !== undefined && worstPower && worstPower.p > el.pmax) {
      const times = worstPower.p / el.pmax;
      out.push(warningAt('over-rating', `${el.name} absorbs ${formatSI(worstPower.p, 'W')} ${worstPower.where}, over its rating of ${formatSI(el.pmax, 'W')} (${times < 10 ? times.toFixed(2) : times.toPrecision(3)}×)`, el.origin.pos, el.origin.lineText));
    }
    if (!PARTS.has(el.kind)) continue;
    const absurdI = worstCurrent !== undefined && worstCurrent.i > ABSURD_CURRENT;
    const absurdP = worstPower !== undefined && worstPower.p > ABSURD_POWER;
    if (absurdI || absurdP) {
      const what = [absurdI ? `a current of ${formatSI(worstCurrent!.i, 'A')}` : '', absurdP ? `${formatSI(worstPower!.p, 'W')}` : ''].filter((s) => s !== '').join(' and ');
      const where = absurdI ? worstCurrent!.where : worstPower!.where;
      out.push(warningAt('absurd-stress', `${el.name} carries ${what} ${where}: no discrete part survives that (over ${formatSI(ABSURD_CURRENT, 'A')} or ${formatSI(ABSURD_POWER, 'W')}); check its value and suffix${suffixHint(el)}`, el.origin.pos, el.origin.lineText));
    }
  }
  return out;
}
