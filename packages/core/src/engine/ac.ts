/**
 * Small-signal (AC) analysis: the circuit linearised at its operating
 * point, Y(ω) = G + jω·C, where G is the Newton Jacobian at the operating
 * point and C the devices' charge (and flux) derivatives; driven by the
 * sources' `ac` magnitudes and phases (Vlach and Singhal, Computer Methods
 * for Circuit Analysis and Design, 2nd ed., 1994, ch. 8).
 */
import type { ReactiveContext } from '@railcheck/devices';
import type { CompiledCircuit } from './compile.js';
import { loadAll } from './newton.js';
import { denseOf, stampStorage } from './workspace.js';
import { complexLuFactor, complexLuSolve, createComplexLuWorkspace, type ComplexLuWorkspace } from './complex-lu.js';

/** A linearised circuit, ready to be solved at any frequency. */
export interface SmallSignalSystem {
  /** Jacobian at the operating point (row-major, stride size). */
  readonly conductance: Float64Array;
  /** Capacitance/inductance matrix at the operating point. */
  readonly capacitance: Float64Array;
  /** Excitation from the sources' ac values. */
  readonly excitationRe: Float64Array;
  readonly excitationIm: Float64Array;
  readonly lu: ComplexLuWorkspace;
  /** Solution at the last frequency solved. */
  readonly xRe: Float64Array;
  readonly xIm: Float64Array;
}

/**
 * Linearises the circuit at the operating point held in `ws.x` (which must
 * be a converged DC solution).
 */
export function linearise(c: CompiledCircuit): SmallSignalSystem {
  const { ws } = c;
  ws.ctx.mode = 'dc';
  loadAll(c);
  // Both matrices scattered to dense from the stamped entries, whichever storage the circuit's solver uses.
  const conductance = denseOf(ws, ws.matrix);
  const size = ws.size;
  const rctx: ReactiveContext = {
    capacitance: stampStorage(ws),
    excitationRe: new Float64Array(size),
    excitationIm: new Float64Array(size),
    x: ws.x,
  };
  for (const d of c.devices) d.loadReactive(rctx);
  return {
    conductance,
    capacitance: denseOf(ws, rctx.capacitance),
    excitationRe: rctx.excitationRe,
    excitationIm: rctx.excitationIm,
    lu: createComplexLuWorkspace(ws.unknowns),
    xRe: new Float64Array(size),
    xIm: new Float64Array(size),
  };
}

/** Solves the linearised system at `hertz`; the solution is left in `xRe`/`xIm`. Returns 0, or the singular column. */
export function solveAt(sys: SmallSignalSystem, hertz: number): number {
  const omega = 2 * Math.PI * hertz;
  const { re, im } = sys.lu;
  re.set(sys.conductance);
  const cap = sys.capacitance;
  for (let k = 0; k < cap.length; k++) im[k] = omega * cap[k]!;
  const singular = complexLuFactor(sys.lu);
  if (singular !== 0) return singular;
  complexLuSolve(sys.lu, sys.excitationRe, sys.excitationIm, sys.xRe, sys.xIm);
  return 0;
}

/** Frequencies of a `.ac` sweep: `dec` = points per decade, `lin` = points in all (Hz). */
export function acFrequencies(variation: 'dec' | 'lin', points: number, fstart: number, fstop: number): number[] {
  if (variation === 'lin') {
    if (points <= 1 || fstop === fstart) return [fstart];
    return Array.from({ length: points }, (_, k) => fstart + ((fstop - fstart) * k) / (points - 1));
  }
  const decades = Math.log10(fstop / fstart);
  const count = Math.max(1, Math.floor(decades * points + 1e-9) + 1);
  const out = Array.from({ length: count }, (_, k) => fstart * Math.pow(10, k / points));
  if (out[out.length - 1]! < fstop * (1 - 1e-9)) out.push(fstop);
  return out;
}
