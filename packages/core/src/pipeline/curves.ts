/**
 * The curves and waveforms behind a netlist's figures, for plots and CSV
 * files (measure/curves.ts; docs/plots.md): a bench of their own, at the
 * figure temperature, as the figures are measured.
 */
import type { Diagnostic } from '../errors.js';
import { RailcheckError } from '../errors.js';
import { COMPILED_CIRCUITS, type CompiledCircuit } from '../engine/compile.js';
import { checkOptions, argumentDiagnostic, isRecord } from '../arguments.js';
import { createBench } from '../measure/create-bench.js';
import { CURVE_KINDS, figureCurves, type CurveKind, type FigureCurves } from '../measure/curves.js';

/** Options of {@link measureCurves}. */
export interface CurveOptions {
  /** Temperature, °C (default the circuit's first `.temp`, 27 °C without one). */
  readonly celsius?: number | undefined;
  /** Which curves to measure (default all the figures give): `--csv` alone needs only the waveforms. */
  readonly kinds?: readonly CurveKind[] | undefined;
}

/** The curves, or why none could be measured (the stage's nominal point, or a bad argument). */
export type CurvesResult = { readonly ok: true; readonly curves: FigureCurves } | { readonly ok: false; readonly errors: readonly Diagnostic[] };

/**
 * Measures the curves and waveforms of the figures the compiled circuit's
 * netlist asks for (see measure/curves.ts). A curve that cannot be measured
 * is left out, with the reason in `curves.notes`; `ok: false` only when no
 * bench can be built (no `.supply`, the nominal point not solved) or for an
 * argument of the wrong kind.
 */
export function measureCurves(compiled: CompiledCircuit, options: CurveOptions = {}): CurvesResult {
  if (!COMPILED_CIRCUITS.has(compiled)) return { ok: false, errors: [argumentDiagnostic('measureCurves', 'compiled', 'a compiled circuit as compileCircuit or runNetlist returns it', compiled)] };
  if (!isRecord(options)) return { ok: false, errors: [argumentDiagnostic('measureCurves', 'options', 'an object', options)] };
  try {
    checkOptions('measureCurves', options, { celsius: 'finite' });
    const { celsius, kinds } = options as CurveOptions;
    if (kinds !== undefined && !(Array.isArray(kinds) && kinds.every((k) => CURVE_KINDS.includes(k)))) return { ok: false, errors: [argumentDiagnostic('measureCurves', 'options.kinds', `a list of ${CURVE_KINDS.join(', ')}`, kinds)] };
    const bench = createBench(compiled, celsius === undefined ? {} : { celsius });
    return { ok: true, curves: figureCurves(bench, compiled.flat.figures, kinds) };
  } catch (e) {
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics };
    throw e;
  }
}
