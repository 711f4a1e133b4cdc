/**
 * Initial conditions and source waveforms in a transient.
 *
 * Initial conditions (netlist.md: `ic=` on C and L, the `.tran` flag
 * `fromic`): without the flag a run starts from the operating point and ic=
 * is ignored; with it capacitors start at their ic= voltage (0 where absent)
 * and inductors at their ic= current (0 where absent). Expected trajectories
 * are first-order closed forms (Alexander and Sadiku ch. 7, from memory) and
 * the operating point of a divider (Ohm's law).
 *
 * Sources: sin, pulse and pwl as netlist.md defines them, re-written here,
 * must appear at every accepted time across a resistor (a linear circuit, so
 * to rounding), with the passive sign convention for the source current.
 * Through runNetlist, the `.tran` output grid is tstart, tstart + tstep, …,
 * tstop with values linearly interpolated between accepted points; its
 * distance from the waveform is bounded by the linear-interpolation error
 * h²/8·max|v''| (Burden and Faires, Numerical Analysis, §3.1 — from memory).
 */
import { describe, expect, it } from 'vitest';
import { runNetlist } from '@railcheck/core';
import { solveOperatingPoint } from '@railcheck/core/internal';
import { at, branch, compile, interpolate, node, run } from './support.js';

// Divider 10 V → 1k/1k with C1 (ic=2) across the bottom; a second RC without ic; an RL loop with ic.
const IC_CIRCUIT = `ic study
V1 in 0 10
R1 in out 1k
R2 out 0 1k
C1 out 0 1u ic=2
R3 in out2 1k
C2 out2 0 1u
L1 a 0 10m ic=0.1
R4 a 0 10
V2 p 0 2
R5 p q 4
L2 q 0 1m ic=5
.end
`;

describe('initial conditions', () => {
  const c = compile(IC_CIRCUIT);
  const [out, out2, a] = [node(c, 'out'), node(c, 'out2'), node(c, 'a')];
  const [iL1, iL2] = [branch(c, 'L1'), branch(c, 'L2')];
  // Fixed short steps keep the integration error to microvolts (1.4e-6 observed) so that the checks
  // test the start; the first step is backward Euler, whose local error (h²/2)·|x''| at 0.1 µs stays
  // below 1e-6.
  const opts = { tstep: 1e-5, tstop: 1e-3, method: 'trap' as const, fixedStep: 1e-7 };

  it('default: the operating point, ic= ignored (capacitors at their DC voltage, inductors at their DC current)', () => {
    const { trace } = run(c, opts);
    let drift = 0;
    for (let k = 0; k < trace.count; k++) {
      drift = Math.max(drift, Math.abs(at(trace, k, out) - 5), Math.abs(at(trace, k, out2) - 10), Math.abs(at(trace, k, iL1)), Math.abs(at(trace, k, iL2) - 0.5));
    }
    // Divider: 10·1k/(1k + 1k) = 5 V; C2 charged to 10 V; L1 has no source in its loop; L2 carries 2 V / 4 Ω.
    // Observed 2.0e-11; bound 5e-11.
    expect(drift).toBeLessThan(5e-11);
  });

  it('fromic: capacitors at ic= (0 where absent), inductors at ic=, then the closed-form relaxations', () => {
    const { trace } = run(c, { ...opts, fromIc: true });
    // Observed 8.9e-16, 1.0e-15, 0 and 1.8e-15 (a few ulps); bounds 2–3× that, or 2·eps·|value| for 0.
    expect(Math.abs(at(trace, 0, out) - 2)).toBeLessThan(2e-15);
    expect(Math.abs(at(trace, 0, out2))).toBeLessThan(2.5e-15);
    expect(Math.abs(at(trace, 0, iL1) - 0.1)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.1);
    expect(Math.abs(at(trace, 0, iL2) - 5)).toBeLessThan(4e-15);
    // The inductor's current flows a → 0 through L1 and back through R4: V(a) = −R4·iL from the first step on
    // (observed 1.1e-16; bound 3e-16).
    for (let k = 1; k < trace.count; k += 97) expect(Math.abs(at(trace, k, a) + 10 * at(trace, k, iL1))).toBeLessThan(3e-16);
    const tau1 = 500e-6; // (R1 ∥ R2)·C1
    const exact = {
      out: (t: number) => 5 + (2 - 5) * Math.exp(-t / tau1),
      out2: (t: number) => 10 * (1 - Math.exp(-t / 1e-3)),
      iL1: (t: number) => 0.1 * Math.exp(-t / 1e-3),
      iL2: (t: number) => 0.5 + (5 - 0.5) * Math.exp(-t / 250e-6),
    };
    let worst = 0;
    for (let k = 1; k < trace.count; k++) {
      const t = trace.times[k]!;
      worst = Math.max(worst, Math.abs(at(trace, k, out) - exact.out(t)), Math.abs(at(trace, k, out2) - exact.out2(t)));
      worst = Math.max(worst, Math.abs(at(trace, k, iL1) - exact.iL1(t)) * 10, Math.abs(at(trace, k, iL2) - exact.iL2(t)) * 4);
    }
    // Observed 1.44e-6 (V, and A scaled by the loop resistance); bound 3.5e-6.
    expect(worst).toBeLessThan(3.5e-6);
  });

  // At the fromic start the engine solves a backward-Euler step of length ~tstop·1e-16 from the ic=
  // state. The inductor's branch row, divided through by L/h, leaves the pivot to the KCL rows, so the
  // voltage across it follows from KCL: −R4·ic = −1 V.
  it('with fromic, the t = 0 voltage across an inductor with ic= obeys KCL', () => {
    const { trace } = run(c, { ...opts, fromIc: true });
    // Observed 0 (exact); bound 2·eps.
    expect(Math.abs(at(trace, 0, a) + 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });

  it('the .tran flag fromic reaches the run (runNetlist), and without it the start is the operating point', () => {
    const withIc = runNetlist(IC_CIRCUIT.replace('.end', '.tran 10u 1m fromic\n.end'));
    const without = runNetlist(IC_CIRCUIT.replace('.end', '.tran 10u 1m\n.end'));
    if (!withIc.ok || !without.ok) throw new Error('run failed');
    const [tw, tn] = [withIc.report.transients[0]!, without.report.transients[0]!];
    expect(tw.fromIc).toBe(true);
    expect(tn.fromIc).toBe(false);
    // Observed 8.9e-16 and 0; bounds 2e-15 and 2·eps·5.
    expect(Math.abs(tw.nodes['out']![0]! - 2)).toBeLessThan(2e-15);
    expect(Math.abs(tn.nodes['out']![0]! - 5)).toBeLessThanOrEqual(2 * Number.EPSILON * 5);
  });
});

describe('a start from a given solution (TransientOptions.initialSolution)', () => {
  it('started at its own operating point, a circuit with junction charge stays there', () => {
    // A DC operating point is an equilibrium: with constant sources every consistent integrator
    // keeps it (common practice, no source). The diode carries 0.42 A (TT charge 4 nC), and its
    // limiting memory is left at −5 V by an earlier operating point at another bias.
    const c = compile('t\nV1 a 0 5\nR1 a b 10\nD1 b 0 DX\n.model DX D (IS=1e-14 CJO=100p TT=10n)\n.end\n');
    const op = solveOperatingPoint(c);
    if (!op.ok) throw new Error('operating point failed');
    const x0 = Float64Array.from(c.ws.x);
    const v1 = c.sources.get('v1')!;
    v1.dc = -5;
    solveOperatingPoint(c);
    v1.dc = 5;
    const { trace } = run(c, { tstep: 1e-6, tstop: 1e-5, initialSolution: x0 });
    const b = node(c, 'b');
    let drift = 0;
    for (let k = 0; k < trace.count; k++) drift = Math.max(drift, Math.abs(at(trace, k, b) - x0[b]!));
    expect(x0[b]!).toBeGreaterThan(0.8);
    // Observed 3.9e-12 V; bound 1e-11 V.
    expect(drift).toBeLessThan(1e-11);
  });
});

/** netlist.md sin, written out: vo + va·sin(2πf(t − td) + φ)·e^(−θ(t − td)) from td, vo + va·sin φ before. */
function sinRef(vo: number, va: number, f: number, td: number, theta: number, phaseDeg: number, t: number): number {
  const phi = (phaseDeg * Math.PI) / 180;
  return t < td ? vo + va * Math.sin(phi) : vo + va * Math.sin(2 * Math.PI * f * (t - td) + phi) * Math.exp(-theta * (t - td));
}

/** netlist.md pulse: v1 until td, ramp over tr to v2, v2 for pw, ramp over tf back to v1, repeated every per. */
function pulseRef(v1: number, v2: number, td: number, tr: number, tf: number, pw: number, per: number, t: number): number {
  if (t <= td) return v1;
  const u = (t - td) % per;
  if (u < tr) return v1 + ((v2 - v1) * u) / tr;
  if (u <= tr + pw) return v2;
  if (u < tr + pw + tf) return v2 - ((v2 - v1) * (u - tr - pw)) / tf;
  return v1;
}

/** netlist.md pwl: linear between points, held before the first and after the last. */
function pwlRef(points: ReadonlyArray<readonly [number, number]>, t: number): number {
  if (t <= points[0]![0]) return points[0]![1];
  for (let k = 1; k < points.length; k++) {
    const [t1, v1] = points[k]!;
    if (t <= t1) {
      const [t0, v0] = points[k - 1]!;
      return v0 + ((v1 - v0) * (t - t0)) / (t1 - t0);
    }
  }
  return points[points.length - 1]![1];
}

const PWL: ReadonlyArray<readonly [number, number]> = [[0, 0], [0.2e-3, 2e-3], [0.5e-3, 2e-3], [0.9e-3, -1e-3]];
const SOURCES = `sources
V1 a 0 sin(1 2 1k 0.2m 100 30)
R1 a 0 1k
V2 b 0 pulse(-1 3 0.1m 50u 80u 0.3m 1m)
R2 b 0 1k
I1 0 c pwl(${PWL.map(([t, v]) => `${t} ${v}`).join(' ')})
R3 c 0 500
.end
`;
const waves = {
  a: (t: number) => sinRef(1, 2, 1e3, 0.2e-3, 100, 30, t),
  b: (t: number) => pulseRef(-1, 3, 0.1e-3, 50e-6, 80e-6, 0.3e-3, 1e-3, t),
  // I1 takes current from node 0 and delivers it into c (netlist.md sign convention), so V(c) = +R3·I.
  c: (t: number) => 500 * pwlRef(PWL, t),
};

describe('sources across resistors', () => {
  it.each(['trap', 'be'] as const)('%s: sin, pulse and pwl at every accepted time, and the source currents', (method) => {
    const c = compile(SOURCES);
    const { trace } = run(c, { tstep: 1e-5, tstop: 2.5e-3, method });
    const idx = { a: node(c, 'a'), b: node(c, 'b'), c: node(c, 'c') };
    const [iv1, iv2] = [branch(c, 'V1'), branch(c, 'V2')];
    for (let k = 0; k < trace.count; k++) {
      const t = trace.times[k]!;
      // t = 0 is the operating point, whose sine value is checked on its own below.
      // Observed 4.4e-16·(1 + |v|) at most; bound 1e-15·(1 + |v|).
      for (const key of t === 0 ? (['b', 'c'] as const) : (['a', 'b', 'c'] as const)) expect(Math.abs(at(trace, k, idx[key]) - waves[key](t))).toBeLessThanOrEqual(1e-15 * (1 + Math.abs(waves[key](t))));
      // A source delivering power into its resistor carries a negative current (netlist.md).
      // Observed at most 0.36 (V1) and 0.43 (V2) of the bounds below.
      if (t > 0) expect(Math.abs(at(trace, k, iv1) + waves.a(t) / 1e3)).toBeLessThanOrEqual(4e-19 + 4e-16 * Math.abs(waves.a(t) / 1e3));
      expect(Math.abs(at(trace, k, iv2) + waves.b(t) / 1e3)).toBeLessThanOrEqual(1e-18 + 1e-15 * Math.abs(waves.b(t) / 1e3));
    }
  });

  // netlist.md: with no dc value the operating point uses the waveform's value at t = 0, and a delayed
  // sine equals vo + va·sin(phase) before td, here 1 + 2·sin 30° = 2 V.
  it('a delayed sine with a phase has its netlist.md value at the t = 0 operating point', () => {
    const c = compile(SOURCES);
    const { trace } = run(c, { tstep: 1e-5, tstop: 1e-4, method: 'trap' });
    // Observed 0 (exact); bound 2·eps·|value|.
    expect(Math.abs(at(trace, 0, node(c, 'a')) - waves.a(0))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(waves.a(0)));
  });

  it('the .tran output grid (tstart, tstep) is linear interpolation of the accepted points', () => {
    const r = runNetlist(SOURCES.replace('.end', '.tran 10u 2.5m 0.5m be\n.end'), { keepSteps: true });
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const tr = r.report.transients[0]!;
    const trace = tr.trace!;
    expect(tr.method).toBe('be');
    expect(tr.times.length).toBe(201);
    // Observed 0 (exact); bound 2·eps·t.
    tr.times.forEach((t, k) => expect(Math.abs(t - (0.5e-3 + k * 1e-5))).toBeLessThanOrEqual(2 * Number.EPSILON * t));
    const c = r.report.compiled;
    // The names of nodes are as first written; the grid values are interpolations of the trace.
    for (const [name, key] of [['a', 'a'], ['b', 'b'], ['c', 'c']] as const) {
      const grid = tr.nodes[name]!;
      const index = c.nodeIndex.get(key)!;
      let hmax = 0;
      for (let k = 1; k < trace.count; k++) hmax = Math.max(hmax, trace.times[k]! - trace.times[k - 1]!);
      // |v''| ≤ va·(2πf + θ)² for the damped sine; the pulse and pwl are straight between their corners.
      const curvature = key === 'a' ? 2 * (2 * Math.PI * 1e3 + 100) ** 2 : 0;
      tr.times.forEach((t, k) => {
        // The same interpolation: observed 0 (exact); bound 2·eps·|value|.
        expect(Math.abs(grid[k]! - interpolate(trace, index, t))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(grid[k]!));
        expect(Math.abs(grid[k]! - waves[key](t))).toBeLessThanOrEqual((hmax * hmax * curvature) / 8 + 1e-9);
      });
    }
  });
});
