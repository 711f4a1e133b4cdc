/**
 * The rectifier circuits of rectifier.test.ts and measurement.test.ts, as
 * netlists and as ODEs for the ODEX reference. The diode is the one of
 * models.md, I = IS·(exp(Vj/(N·Vt)) − 1), written out here independently of
 * the device code; invented data (a model-railway controller's 12 V-peak,
 * 50 Hz secondary and its unregulated rail).
 */

import type { TransientOptions, TransientStats, TransientTrace } from '@railcheck/core/internal';
import { at, compile, node, odexOnGrid, odexSolver, run, times } from './support.js';

/** kT/q at 27 °C, V (CODATA 2018 exact k and q; models.md). */
export const VT = (1.380649e-23 * 300.15) / 1.602176634e-19;
/** Diode saturation current IS (A) and emission coefficient N. */
export const [IS, N] = [1e-9, 1.8];
/** N·Vt, V. */
export const NVT = N * VT;
/** Reservoir capacitance (F), load (Ω), mains frequency (Hz), secondary peak (V). */
export const [CAP, RLOAD, FREQ, VPEAK] = [1000e-6, 100, 50, 12];
/** Secondary voltage at t (s), V. */
export const vs = (t: number): number => VPEAK * Math.sin(2 * Math.PI * FREQ * t);
/** Shockley current (A) at junction voltage vj (V). */
export const shockley = (vj: number): number => IS * Math.expm1(vj / NVT);

/** Junction voltage (V) of a diode with series resistance rs for a total drop `drop` (V): Newton on Vj + rs·I(Vj) = drop. */
export function junctionWithRs(drop: number, rs: number): number {
  // f(Vj) is increasing and convex, so Newton from an upper bound of the root descends monotonically onto it.
  let vj = drop > 0 ? Math.min(drop, NVT * Math.log1p(drop / (rs * IS))) : 0;
  for (let k = 0; k < 100; k++) {
    const e = Math.exp(vj / NVT);
    const step = (vj + rs * IS * (e - 1) - drop) / (1 + (rs * IS * e) / NVT);
    vj -= step;
    if (Math.abs(step) <= 1e-15 * (1 + Math.abs(vj))) break;
  }
  return vj;
}

/**
 * ODEX's extrapolation stages can probe states far off the trajectory where an
 * exponential overflows; a non-finite derivative would slip through its error
 * test (NaN compares false), so stray stages get a large finite current
 * instead. Real currents here stay below 10 A, far under the clip (rectifier.test.ts checks).
 */
export const CLIP = 1e3;
export const clip = (i: number): number => Math.max(-CLIP, Math.min(CLIP, i));

/**
 * Bridge output current for source voltage u = V(a) − V(b) and output v, with
 * D1 a→out, D2 b→out, D3 0→a, D4 0→b of one model. KCL at a,
 * I(a − v) − I(−a) = −(I(b − v) − I(−b)) with b = a − u, holds exactly at
 * a = (u + v)/2 (each term pairs with one of the other side: I(a − v) with
 * I(−b) and I(−a) with I(b − v)), so the output current is
 * I((u − v)/2) + I(−(u + v)/2), with all four junctions kept.
 */
export function bridgeCurrent(u: number, v: number): number {
  return shockley((u - v) / 2) + shockley(-(u + v) / 2);
}

/** Half-wave stage (D1 with RS = 0.05 Ω) and full-wave bridge (RS = 0), as netlists. */
export const HALF = `half-wave rail\nVS sec 0 sin(0 ${VPEAK} ${FREQ})\nD1 sec out DR\n.model DR D (IS=${IS} N=${N} RS=0.05)\nC1 out 0 1000u\nR1 out 0 ${RLOAD}\n.end\n`;
export const BRIDGE = `bridge rail\nVS a b sin(0 ${VPEAK} ${FREQ})\nD1 a out DB\nD2 b out DB\nD3 0 a DB\nD4 0 b DB\n.model DB D (IS=${IS} N=${N})\nC1 out 0 1000u\nR1 out 0 ${RLOAD}\n.end\n`;
/** Half-wave diode current (A) at time t (s) and rail voltage v (V). */
export const halfCurrent = (t: number, v: number): number => shockley(junctionWithRs(vs(t) - v, 0.05));
/** ODE right-hand sides C·dv/dt = I − v/R for ODEX, V/s. */
export const rhsHalf = (t: number, y: number[]): number[] => [(clip(halfCurrent(t, y[0]!)) - y[0]! / RLOAD) / CAP];
export const rhsBridge = (t: number, y: number[]): number[] => [(clip(bridgeCurrent(vs(t), y[0]!)) - y[0]! / RLOAD) / CAP];

/** One engine run against the reference. */
export interface Outcome {
  readonly label: string;
  readonly stats: TransientStats;
  readonly err: number;
  readonly ripple: number;
  readonly mean: number;
  readonly ms: number;
}

/** An ODE right-hand side for ODEX: time (s), state → derivative. */
export type Rhs = (t: number, y: number[]) => number[];

/** A labelled set of stepper options (tstep 0.1 ms and tstop 1 s are fixed). */
export interface RunConfig {
  readonly label: string;
  readonly opts: Omit<TransientOptions, 'tstep' | 'tstop'>;
}

/**
 * Runs the netlist over 1 s with each configuration and ODEX (tolerance
 * 1e-10) once on the union of their accepted times plus a fine grid over the
 * last five cycles. Errors are max |v − v_ref| at the accepted points; ripple
 * and mean are over t ≥ 0.9 s; `peakCurrent` is the largest diode current
 * along the reference (A).
 */
export function compareWithOdex(netlist: string, rhs: Rhs, current: (t: number, v: number) => number, configs: readonly RunConfig[]): { results: Outcome[]; refRipple: number; refMean: number; peakCurrent: number } {
  const runs = configs.map(({ label, opts }) => {
    const c = compile(netlist);
    const t0 = performance.now();
    const r = run(c, { tstep: 1e-4, tstop: 1, ...opts });
    return { label, c, ...r, ms: performance.now() - t0 };
  });
  const fine = Array.from({ length: 10001 }, (_, k) => 0.9 + k * 1e-5);
  const grid = [...new Set([...runs.flatMap((r) => times(r.trace)), ...fine])].sort((x, y) => x - y);
  const s = odexSolver(1);
  s.absoluteTolerance = 1e-10;
  s.relativeTolerance = 1e-10;
  s.maxSteps = 1e7;
  const ref = odexOnGrid(s, rhs, 0, [0], grid);
  const refAt = new Map(grid.map((t, k) => [t, ref[k]![0]!]));
  const window = (values: Iterable<number>): { ripple: number; mean: number } => {
    const v = [...values];
    return { ripple: Math.max(...v) - Math.min(...v), mean: v.reduce((p, q) => p + q, 0) / v.length };
  };
  const refWin = window(fine.map((t) => refAt.get(t)!));
  const peakCurrent = Math.max(...grid.map((t) => Math.abs(current(t, refAt.get(t)!))));
  const results: Outcome[] = [];
  for (const r of runs) {
    const out = node(r.c, 'out');
    const trace: TransientTrace = r.trace;
    let err = 0;
    const last: number[] = [];
    for (let k = 0; k < trace.count; k++) {
      const t = trace.times[k]!;
      err = Math.max(err, Math.abs(at(trace, k, out) - refAt.get(t)!));
      if (t >= 0.9) last.push(at(trace, k, out));
    }
    results.push({ label: r.label, stats: r.stats, err, ...window(last), ms: r.ms });
  }
  return { results, refRipple: refWin.ripple, refMean: refWin.mean, peakCurrent };
}
