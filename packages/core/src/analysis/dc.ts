/**
 * DC analyses: the operating point and the swept DC transfer curve, each
 * at one temperature. The sweep continues from point to point (the last
 * solution is the next first guess), halving its step towards a point
 * that does not converge and doubling it again after a success
 * (engine/continuation.ts), before falling back to the full operating-point
 * strategy.
 */
import { errorAt, RailcheckError, type Diagnostic } from '../errors.js';
import type { CardOrigin } from '../netlist/ast.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { solveOperatingPoint, type OpMethod, type OpOutcome } from '../engine/dcop.js';
import { continueAlong, lerp } from '../engine/continuation.js';
import { readSolution, type SolutionValues } from './solution.js';
import type { StressMeter } from './stress.js';
import { formatSI } from '../units.js';

/** The DC operating point at one temperature. */
export interface OperatingPoint extends SolutionValues {
  /** °C. */
  readonly temperature: number;
  /** How the point was found. */
  readonly method: OpMethod;
  /** Newton iterations spent, all strategies together. */
  readonly iterations: number;
}

/** A DC sweep at one temperature: columns of values, one entry per sweep point. */
export interface DcSweep {
  readonly temperature: number;
  /** Name of the swept source as written. */
  readonly source: string;
  /** Swept values (V or A). */
  readonly values: readonly number[];
  readonly nodes: Readonly<Record<string, readonly number[]>>;
  readonly currents: Readonly<Record<string, readonly number[]>>;
  /** Points that needed more than plain continuation (gmin or source stepping), by sweep value. */
  readonly assisted: readonly number[];
}

/** Turns a failed operating-point search into a diagnostic naming what did not settle. */
export function opFailure(outcome: Extract<OpOutcome, { ok: false }>, what: string, origin: CardOrigin | undefined): Diagnostic {
  const detail = outcome.reason === 'singular'
    ? `the circuit matrix is singular at ${outcome.singularAt ?? 'an unknown'} (a node or branch the equations do not determine)`
    : outcome.reason === 'non-finite'
      ? 'the iteration produced a non-finite value'
      : `Newton did not converge in ${outcome.iterations} iterations, with gmin and source stepping tried`;
  const worst = outcome.stragglers
    .map((s) => `${s.name} = ${formatSI(s.value, '')} (last update ${formatSI(s.update, '')}, residual ${formatSI(s.residual, '')})`)
    .join('; ');
  return errorAt('no-convergence', `${what}: ${detail}${worst ? `. Least settled: ${worst}` : ''}`, origin?.pos, origin?.lineText, 'a circuit with a solution; check element values, source polarity and model parameters');
}

/**
 * Refuses a solution with a voltage, current or power that is no finite
 * number (a product of two huge values overflows even when Newton settled):
 * such a solution is reported as the analysis failing, never as numbers.
 */
function requireFinite(v: SolutionValues, what: string, origin: CardOrigin | undefined): void {
  const bad = (rec: Record<string, number>, unit: string): string | undefined => {
    for (const [k, x] of Object.entries(rec)) if (!Number.isFinite(x)) return `${unit} of ${k}`;
    return undefined;
  };
  const which = bad(v.nodes, 'the voltage') ?? bad(v.currents, 'the current') ?? bad(v.power, 'the power');
  if (which !== undefined) {
    throw new RailcheckError([errorAt('non-finite-solution', `${what}: ${which} is not a finite number (it overflows double precision)`, origin?.pos, origin?.lineText, 'element values and source levels of physical size')]);
  }
}

/** Solves the operating point at the present temperature; throws RailcheckError on failure. */
export function operatingPoint(c: CompiledCircuit, temperature: number, origin?: CardOrigin, neededBy?: string): OperatingPoint {
  const outcome = solveOperatingPoint(c);
  const what = `operating point at ${temperature} °C${neededBy ? ` (${neededBy})` : ''}`;
  if (!outcome.ok) throw new RailcheckError([opFailure(outcome, what, origin)]);
  const values = readSolution(c);
  requireFinite(values, what, origin);
  return { temperature, method: outcome.method, iterations: outcome.iterations, ...values };
}

/** Deepest step halving between two sweep points before the full strategy is tried. */
const MAX_HALVINGS = 12;

/**
 * Sweeps source `sourceKey` from `start` to `stop` by `step` (V or A) and
 * records every node and element current; restores the source's DC value.
 * With `meter`, every point's part stress is kept (analysis/stress.ts).
 */
export function dcSweep(c: CompiledCircuit, temperature: number, sourceKey: string, start: number, stop: number, step: number, origin?: CardOrigin, meter?: StressMeter): DcSweep {
  const src = c.sources.get(sourceKey);
  if (!src) throw new RailcheckError([errorAt('unknown-sweep-source', `no independent source '${sourceKey}' to sweep`, origin?.pos, origin?.lineText)]);
  const nominal = src.dc;
  const set = (v: number): void => {
    src.dc = v;
  };
  const count = Math.floor((stop - start) / step + 1e-9) + 1;
  const values: number[] = [];
  const nodes: Record<string, number[]> = {};
  const currents: Record<string, number[]> = {};
  const assisted: number[] = [];
  try {
    let last = Number.NaN;
    for (let k = 0; k < count; k++) {
      const v = start + k * step;
      let ok = !Number.isNaN(last) && continueAlong(c, (lambda) => set(lerp(last, v, lambda)), MAX_HALVINGS);
      if (!ok) {
        set(v);
        const outcome = solveOperatingPoint(c, !Number.isNaN(last));
        if (!outcome.ok) throw new RailcheckError([opFailure(outcome, `DC sweep of ${src.name} at ${formatSI(v, '')} (${temperature} °C)`, origin)]);
        if (outcome.method !== 'newton') assisted.push(v);
        ok = true;
      }
      last = v;
      values.push(v);
      meter?.point(c.ws.x, c.ws.states[0], `the DC sweep of ${src.name} at ${formatSI(v, '')} (${temperature} °C)`);
      const sol = readSolution(c);
      for (const [name, volts] of Object.entries(sol.nodes)) (nodes[name] ??= []).push(volts);
      for (const [name, amps] of Object.entries(sol.currents)) (currents[name] ??= []).push(amps);
    }
  } finally {
    src.dc = nominal;
  }
  return { temperature, source: src.name, values, nodes, currents, assisted };
}
