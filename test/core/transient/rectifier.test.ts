/**
 * Rectifier with reservoir capacitor (a 12 V-peak, 50 Hz secondary feeding a
 * model-railway controller's unregulated rail; invented data) against ODEX
 * (Hairer and Wanner's extrapolation code, npm odex) at tolerance 1e-10 on the
 * same circuit written as an ODE here:
 *   C·dv/dt = Id(vs(t) − v) − v/R                          (half wave)
 * with the diode of models.md, I = IS·(exp(Vj/(N·Vt)) − 1), its series RS
 * solved inside the right-hand side by a scalar Newton on
 * Vj + RS·I(Vj) = vs − v; and a full-wave bridge (RS = 0) whose floating nodes
 * follow from KCL in closed form (see bridgeCurrent).
 *
 * Steady-state ripple against the handbook estimate ΔV ≈ I/(f·C) half wave,
 * I/(2f·C) full wave (Horowitz and Hill, The Art of Electronics, ch. 1,
 * power supplies — from memory). The estimate assumes the capacitor
 * discharges for the whole period, so it overstates the ripple: the
 * simulated ripple must be below it, by at most 25% (common practice, no
 * source).
 *
 * Safety: this is an extra-low-voltage secondary; the transformer's primary
 * is mains and is outside these tests (see docs/transient.md).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { IntegrationMethod, TransientStats, TransientTrace } from '@railcheck/core';
import { at, compile, node, odexOnGrid, odexSolver, run, times } from './support.js';

const VT = (1.380649e-23 * 300.15) / 1.602176634e-19; // kT/q at 27 °C, CODATA 2018 (models.md)
const [IS, N] = [1e-9, 1.8];
const NVT = N * VT;
const [CAP, RLOAD, FREQ, VPEAK] = [1000e-6, 100, 50, 12];
const vs = (t: number): number => VPEAK * Math.sin(2 * Math.PI * FREQ * t);
const shockley = (vj: number): number => IS * Math.expm1(vj / NVT);

/** Junction voltage (V) of a diode with series resistance rs for a total drop `drop` (V): Newton on Vj + rs·I(Vj) = drop. */
function junctionWithRs(drop: number, rs: number): number {
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
 * instead. Real currents here stay below 10 A, far under the clip (checked below).
 */
const CLIP = 1e3;
const clip = (i: number): number => Math.max(-CLIP, Math.min(CLIP, i));

/**
 * Bridge output current for source voltage u = V(a) − V(b) and output v, with
 * D1 a→out, D2 b→out, D3 0→a, D4 0→b of one model. KCL at a,
 * I(a − v) − I(−a) = −(I(b − v) − I(−b)) with b = a − u, holds exactly at
 * a = (u + v)/2 (each term pairs with one of the other side: I(a − v) with
 * I(−b) and I(−a) with I(b − v)), so the output current is
 * I((u − v)/2) + I(−(u + v)/2), with all four junctions kept.
 */
function bridgeCurrent(u: number, v: number): number {
  return shockley((u - v) / 2) + shockley(-(u + v) / 2);
}

const HALF = `half-wave rail\nVS sec 0 sin(0 ${VPEAK} ${FREQ})\nD1 sec out DR\n.model DR D (IS=${IS} N=${N} RS=0.05)\nC1 out 0 1000u\nR1 out 0 ${RLOAD}\n.end\n`;
const BRIDGE = `bridge rail\nVS a b sin(0 ${VPEAK} ${FREQ})\nD1 a out DB\nD2 b out DB\nD3 0 a DB\nD4 0 b DB\n.model DB D (IS=${IS} N=${N})\nC1 out 0 1000u\nR1 out 0 ${RLOAD}\n.end\n`;
const halfCurrent = (t: number, v: number): number => shockley(junctionWithRs(vs(t) - v, 0.05));
const rhsHalf = (t: number, y: number[]): number[] => [(clip(halfCurrent(t, y[0]!)) - y[0]! / RLOAD) / CAP];
const rhsBridge = (t: number, y: number[]): number[] => [(clip(bridgeCurrent(vs(t), y[0]!)) - y[0]! / RLOAD) / CAP];

interface Outcome {
  readonly stats: TransientStats;
  readonly err: number;
  readonly ripple: number;
  readonly mean: number;
  readonly ms: number;
}

/** Runs both methods, and ODEX once on the union of their accepted times (plus a fine grid for the ripple). */
function compare(netlist: string, rhs: (t: number, y: number[]) => number[], current: (t: number, v: number) => number): { results: Record<IntegrationMethod, Outcome>; refRipple: number; refMean: number; peakCurrent: number } {
  const runs = (['trap', 'be'] as const).map((method) => {
    const c = compile(netlist);
    const t0 = performance.now();
    const r = run(c, { tstep: 1e-4, tstop: 1, method });
    return { method, c, ...r, ms: performance.now() - t0 };
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
  const results = {} as Record<IntegrationMethod, Outcome>;
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
    results[r.method] = { stats: r.stats, err, ...window(last), ms: r.ms };
  }
  return { results, refRipple: refWin.ripple, refMean: refWin.mean, peakCurrent };
}

describe.each([
  { name: 'half-wave rectifier', netlist: HALF, rhs: rhsHalf, current: halfCurrent, pulsesPerSecond: FREQ },
  { name: 'full-wave bridge', netlist: BRIDGE, rhs: rhsBridge, current: (t: number, v: number) => bridgeCurrent(vs(t), v), pulsesPerSecond: 2 * FREQ },
])('$name, 1 s of 50 Hz, against ODEX', ({ name, netlist, rhs, current, pulsesPerSecond }) => {
  let data: ReturnType<typeof compare>;
  beforeAll(() => {
    data = compare(netlist, rhs, current);
  });

  it('the reference never reaches the clip of its right-hand side', () => {
    console.log(`${name}: peak diode current on the reference ${data.peakCurrent.toFixed(2)} A`);
    expect(data.peakCurrent).toBeLessThan(CLIP / 100);
    expect(data.peakCurrent).toBeGreaterThan(0.5);
  });

  it.each(['trap', 'be'] as const)('%s follows the reference', (method) => {
    const { results, refRipple } = data;
    const r = results[method];
    console.log(`${name}, ${method}: ${r.stats.accepted} steps, ${r.stats.rejectedLte} rejected (LTE), ${r.stats.rejectedNewton} rejected (Newton), ${r.stats.newtonIterations} Newton iterations; max |error| ${(r.err * 1e3).toFixed(2)} mV; ripple ${r.ripple.toFixed(4)} V (reference ${refRipple.toFixed(4)} V); ${r.ms.toFixed(0)} ms`);
    // 1% of the peak: the accuracy a supply designer reads a rail to (common practice, no source).
    expect(r.err).toBeLessThan(0.01 * VPEAK);
    // Ripple from the accepted points alone (no interpolation) within 2% of the reference ripple (common practice, no source).
    expect(Math.abs(r.ripple - refRipple)).toBeLessThan(0.02 * refRipple);
  });

  it('ripple is below the handbook estimate I/(pulses·C), by at most 25%', () => {
    const { results, refRipple, refMean } = data;
    // I is the load current at the mean rail voltage of the last five cycles.
    const estimate = refMean / RLOAD / (pulsesPerSecond * CAP);
    for (const r of [results.trap, results.be]) {
      const ratio = r.ripple / estimate;
      console.log(`${name}: ripple ${r.ripple.toFixed(3)} V vs estimate ${estimate.toFixed(3)} V (ratio ${ratio.toFixed(3)}); reference ratio ${(refRipple / estimate).toFixed(3)}`);
      expect(ratio).toBeLessThan(1);
      expect(ratio).toBeGreaterThan(0.75);
    }
  });
});

it('the ODE right-hand sides solve their diode equations (guards the reference)', () => {
  // Series RS: the drop splits into the junction and RS·I.
  for (const drop of [-12, -0.1, 0, 0.4, 0.9, 3, 12]) {
    const vj = junctionWithRs(drop, 0.05);
    expect(Math.abs(vj + 0.05 * shockley(vj) - drop)).toBeLessThan(1e-12 * (1 + Math.abs(drop)));
  }
  // Bridge: KCL at both floating nodes holds at a = (u + v)/2, b = a − u, for either polarity.
  for (const [u, v] of [[12, 9], [-12, 9], [10.5, 9.7], [-3, 9], [0, 0.5]] as const) {
    const a = (u + v) / 2;
    const b = a - u;
    const intoA = shockley(-a) - shockley(a - v); // from D3, minus into D1
    const intoB = shockley(-b) - shockley(b - v);
    expect(Math.abs(intoA + intoB)).toBeLessThanOrEqual(1e-12 * (Math.abs(shockley(a - v)) + Math.abs(shockley(-b)) + IS));
    expect(Math.abs(bridgeCurrent(u, v) - (shockley(a - v) + shockley(b - v)))).toBeLessThanOrEqual(1e-15);
  }
  expect(bridgeCurrent(12, 9)).toBeGreaterThan(1);
  expect(Math.abs(bridgeCurrent(-12, 9) - bridgeCurrent(12, 9))).toBeLessThan(1e-9 * bridgeCurrent(12, 9));
});
