/**
 * Coupled inductors (`Kname L1 L2 k`, netlist.md) in DC, small-signal and
 * transient analysis, against the coupled-inductor equations of circuit
 * texts (Alexander and Sadiku, Fundamentals of Electric Circuits, ch. 13,
 * from memory):
 *
 *   v1 = L1·di1/dt + M·di2/dt,   v2 = M·di1/dt + L2·di2/dt,   M = k·√(L1·L2)
 *
 * with each current entering its winding's dotted (first) node; in phasors
 * V1 = jωL1·I1 + jωM·I2, V2 = jωM·I1 + jωL2·I2. The references are solved
 * here independently: phasor algebra in mathjs, the step response by ODEX
 * (Hairer and Wanner's extrapolation code), the ideal-transformer relations
 * and the stored energy ½L1·i1² + M·i1·i2 + ½L2·i2² (same chapter).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { add, complex, divide, multiply, type Complex } from 'mathjs';
import { linearise, operatingPoint, setCircuitTemperature, solveAt } from '@railcheck/core/internal';
import { lineariseNetlist, relErr } from '../ac/support.js';
import { at, branch, compile, maxError, node, odexOnGrid, odexSolver, run, times } from './support.js';

const jw = (f: number): Complex => complex(0, 2 * Math.PI * f);

describe('DC: inductors are shorts and K adds nothing', () => {
  test('a coupled pair carries the Ohm\'s-law currents of its shorts', () => {
    const c = compile('dc pair\nV1 in 0 12\nR1 in p 100\nL1 p 0 10m\nL2 s 0 40m\nK1 L1 L2 0.9\nR2 s 0 50\nI2 0 s 20m\n.end\n');
    setCircuitTemperature(c, 27);
    const op = operatingPoint(c, 27);
    // Ohm's law with L1 and L2 as shorts: 12 V / 100 Ω through L1; the 20 mA I2 drives into s all
    // enters L2 at s (R2 sees 0 V).
    expect(op.currents['L1']).toBeCloseTo(0.12, 12);
    expect(op.currents['L2']).toBeCloseTo(0.02, 12);
    expect(Math.abs(op.nodes['s']!)).toBeLessThan(1e-12);
  });
});

describe('small signal', () => {
  test('loosely coupled pair (k = 0.3): V2 against the reflected-impedance closed form over four decades', () => {
    const [R1, L1, L2, R2, k] = [50, 20e-3, 80e-3, 200, 0.3];
    const M = k * Math.sqrt(L1 * L2);
    const lin = lineariseNetlist(`loose pair\nV1 in 0 dc 0 ac 1\nR1 in p ${R1}\nL1 p 0 ${L1}\nL2 s 0 ${L2}\nK1 L1 L2 ${k}\nR2 s 0 ${R2}\n.end\n`);
    // Alexander and Sadiku ch. 13 (from memory): with I2 entering the dotted end of L2 and
    // flowing back through R2, 0 = (R2 + jωL2)·I2 + jωM·I1, so I2 = −jωM·I1/Z2 and the
    // primary sees R1 + jωL1 + ω²M²/Z2 (the reflected impedance). V(s) = −R2·I2.
    let worst = 0;
    for (const f of [10, 100, 1e3, 1e4, 1e5]) {
      const z2 = add(complex(R2, 0), multiply(jw(f), L2)) as Complex;
      const w2m2 = (2 * Math.PI * f * M) ** 2;
      const zin = add(add(complex(R1, 0), multiply(jw(f), L1)), divide(complex(w2m2, 0), z2)) as Complex;
      const i1 = divide(complex(1, 0), zin) as Complex;
      const want = divide(multiply(multiply(jw(f), M), multiply(i1, R2)), z2) as Complex;
      worst = Math.max(worst, relErr(lin.at('s', f), want));
    }
    console.log(`loose pair V(s) vs reflected-impedance form: worst rel ${worst.toExponential(2)}`);
    // A linear MNA solve is exact to rounding; 1e-9 leaves room for the conditioning (as in analytic.test.ts).
    expect(worst).toBeLessThan(1e-9);
  });

  test('reciprocity: the open-circuit transfer impedance is jωM both ways (M12 = M21)', () => {
    // Drive one winding with a 1 A phasor current, read the other's open-circuit voltage: jωM (ch. 13).
    const [L1, L2, k, f] = [5e-3, 45e-3, 0.6, 1e3];
    const M = k * Math.sqrt(L1 * L2);
    const pair = (drive: 'p' | 's'): string => `reciprocity\nI1 0 ${drive} dc 0 ac 1\nL1 p 0 ${L1}\nL2 s 0 ${L2}\nK1 L1 L2 ${k}\nRp p 0 1e12\nRs s 0 1e12\n.end\n`;
    const v21 = lineariseNetlist(pair('p')).at('s', f);
    const v12 = lineariseNetlist(pair('s')).at('p', f);
    const want = multiply(jw(f), M) as Complex;
    console.log(`reciprocity: Z21 = ${v21.im.toExponential(6)}j, Z12 = ${v12.im.toExponential(6)}j, jωM = ${want.im.toExponential(6)}j`);
    // The 1e12 Ω bleeders (for a DC path) load the windings by ωM/1e12 ≈ 1e-10 relative.
    expect(relErr(v21, want)).toBeLessThan(1e-9);
    expect(relErr(v12, want)).toBeLessThan(1e-9);
  });

  test('k = 1 with large windings: V2/V1 = √(L2/L1) and I1 = n·I_load + V1/(jωL1), the ideal transformer with its magnetising inductance', () => {
    // Hayt and Kemmerly, Engineering Circuit Analysis, ch. 13 (from memory): a unity-coupled pair is an ideal
    // transformer of ratio n = √(L2/L1) with L1 across its primary. A 10:1 mains-style step-down at 50 Hz.
    const [L1, L2, RL, f] = [400, 4, 10, 50];
    const n = Math.sqrt(L2 / L1);
    // 1 mΩ of winding resistance keeps V1 and L1 from forming a loop of voltage-defining branches.
    const lin = lineariseNetlist(`ideal\nV1 in 0 dc 0 ac 1\nRw in p 1m\nL1 p 0 ${L1}\nL2 s 0 ${L2}\nK1 L1 L2 1\nRL s 0 ${RL}\n.end\n`);
    const v1 = lin.at('p', f);
    const v2 = divide(lin.at('s', f), v1) as Complex;
    // The primary current is L1's branch unknown, read from the same small-signal solve.
    const sys = linearise(lin.compiled);
    expect(solveAt(sys, f)).toBe(0);
    const b1 = branch(lin.compiled, 'L1');
    const i1 = complex(sys.xRe[b1]!, sys.xIm[b1]!);
    // The load current leaves the dotted end of L2: I2 = −V2/RL enters it, so n·I_load = −n·I2.
    // Voltages per volt at the primary: I_load = V2/RL, magnetising current 1/(jωL1).
    const want = divide(add(multiply(divide(v2, RL), n), divide(complex(1, 0), multiply(jw(f), L1))), divide(complex(1, 0), v1)) as Complex;
    console.log(`ideal transformer: V2/V1 = ${v2.re.toFixed(12)} ${v2.im.toExponential(1)}j (n = ${n}); I1 = ${i1.re.toExponential(6)} ${i1.im.toExponential(6)}j vs ${want.re.toExponential(6)} ${want.im.toExponential(6)}j`);
    // Exact relations of the k = 1 pair, so rounding only.
    expect(relErr(v2, complex(n, 0))).toBeLessThan(1e-9);
    expect(relErr(i1, want)).toBeLessThan(1e-9);
    // And the ideal-transformer current ratio I1/I_load → n as ωL1 grows against the reflected load RL/n²:
    // here the magnetising term is (RL/n²)/(ωL1) = 0.8 % of n·I_load, in quadrature (0.003 % in magnitude).
    const ratio = Math.hypot(i1.re, i1.im) / (Math.hypot(v2.re, v2.im) / RL) / Math.hypot(v1.re, v1.im);
    expect(Math.abs(ratio / n - 1)).toBeLessThan(1e-3);
  });
});

describe('transient', () => {
  const [V, R1, L1, L2, R2, k] = [10, 10, 100e-3, 400e-3, 40, 0.5];
  const M = k * Math.sqrt(L1 * L2);
  const text = `step into a coupled pair\nV1 in 0 ${V}\nR1 in p ${R1}\nL1 p 0 ${L1}\nL2 s 0 ${L2}\nK1 L1 L2 ${k}\nR2 s 0 ${R2}\n.end\n`;

  /** The coupled first-order ODEs L·di/dt = v − R·i with L = [[L1, M], [M, L2]] (ch. 13), solved for di/dt. */
  const rhs = (_t: number, y: number[]): number[] => {
    const [i1, i2] = y as [number, number];
    const e1 = V - R1 * i1;
    const e2 = -R2 * i2;
    const det = L1 * L2 - M * M;
    return [(L2 * e1 - M * e2) / det, (L1 * e2 - M * e1) / det];
  };

  test('step response from rest: both winding currents against ODEX', () => {
    const c = compile(text);
    const { trace, stats } = run(c, { tstep: 0.1e-3, tstop: 40e-3, fromIc: true, tmax: 0.05e-3 });
    const ts = times(trace);
    const s = odexSolver(2);
    s.absoluteTolerance = 1e-12;
    s.relativeTolerance = 1e-12;
    const ref = odexOnGrid(s, rhs, 0, [0, 0], ts);
    const b1 = branch(c, 'L1');
    const b2 = branch(c, 'L2');
    let e1 = 0;
    let e2 = 0;
    ts.forEach((_, kk) => {
      e1 = Math.max(e1, Math.abs(at(trace, kk, b1) - ref[kk]![0]!));
      e2 = Math.max(e2, Math.abs(at(trace, kk, b2) - ref[kk]![1]!));
    });
    console.log(`coupled step (trap, ${stats.accepted} steps): max |Δi1| ${e1.toExponential(2)} A, max |Δi2| ${e2.toExponential(2)} A`);
    // Trapezoidal steps of at most 50 µs against time constants of a few ms: observed 1.6e-6 A and
    // 7.0e-7 A; bounds about three times those.
    expect(e1).toBeLessThan(5e-6);
    expect(e2).toBeLessThan(2e-6);
  });

  test('energy: the work done on the windings equals ½L1·i1² + M·i1·i2 + ½L2·i2² at every point (needs M12 = M21)', () => {
    const c = compile(text);
    const { trace } = run(c, { tstep: 0.1e-3, tstop: 10e-3, fromIc: true, tmax: 10e-6 });
    const [p, s, b1, b2] = [node(c, 'p'), node(c, 's'), branch(c, 'L1'), branch(c, 'L2')];
    const energy = (kk: number): number => {
      const i1 = at(trace, kk, b1);
      const i2 = at(trace, kk, b2);
      return 0.5 * L1 * i1 * i1 + M * i1 * i2 + 0.5 * L2 * i2 * i2;
    };
    // With symmetric L, W_n − W_(n−1) = ½(i_n + i_(n−1))ᵀ·(φ_n − φ_(n−1)) exactly. The trapezoidal rule
    // gives Δφ = (h/2)(v_n + v_(n−1)), backward Euler (the first step after t = 0, docs/transient.md)
    // Δφ = h·v_n; summing these works is an exact discrete energy balance. An asymmetric coupling
    // (M12 ≠ M21) would leave a difference of (M12 − M21)·(i1·Δi2 − i2·Δi1)/2 per step.
    let absorbed = 0;
    let worst = 0;
    let peak = 0;
    for (let kk = 1; kk < trace.count; kk++) {
      const h = trace.times[kk]! - trace.times[kk - 1]!;
      const dphi = (v: number): number => (kk === 1 ? h * at(trace, kk, v) : (h / 2) * (at(trace, kk, v) + at(trace, kk - 1, v)));
      const isum = (b: number): number => (at(trace, kk, b) + at(trace, kk - 1, b)) / 2;
      absorbed += isum(b1) * dphi(p) + isum(b2) * dphi(s);
      worst = Math.max(worst, Math.abs(absorbed - energy(kk)));
      peak = Math.max(peak, energy(kk));
    }
    console.log(`coupled energy balance: worst |work − W| = ${worst.toExponential(2)} J against W up to ${peak.toExponential(3)} J`);
    // An exact identity: what is left is rounding summed over ~1000 steps (observed 5e-14 of the peak).
    expect(worst / peak).toBeLessThan(2e-13);
  });

  test('maxError helper agrees with the ODEX comparison for the primary current', () => {
    const c = compile(text);
    const { trace } = run(c, { tstep: 0.1e-3, tstop: 20e-3, fromIc: true, tmax: 0.05e-3, method: 'be' });
    const grid = times(trace);
    const s = odexSolver(2);
    s.absoluteTolerance = 1e-12;
    s.relativeTolerance = 1e-12;
    const ref = odexOnGrid(s, rhs, 0, [0, 0], grid);
    const byTime = new Map(grid.map((t, kk) => [t, ref[kk]![0]!] as const));
    const e = maxError(trace, branch(c, 'L1'), (t) => byTime.get(t)!);
    console.log(`coupled step (backward Euler): max |Δi1| ${e.toExponential(2)} A`);
    // First-order method, h ≤ 50 µs against τ of ms: observed 1.1e-3 A; bound about three times it.
    expect(e).toBeLessThan(3e-3);
  });
});

describe('a mains transformer written as two coupled windings feeding a bridge rectifier', () => {
  // examples/railway-accessory-transformer.cir, our own scenario: 230 V 50 Hz mains stepped down to about
  // 16 V rms (n = 16/230, L2 = n²·L1 with L1 = 20 H, k = 0.995, 15 Ω and 0.4 Ω of winding resistance), a
  // bridge, a 2200 µF reservoir and a 47 Ω accessory load. The bridge diodes carry junction capacitance:
  // without it, the floating secondary of a bridge with every diode off is held only by gmin, and the
  // stepper fails at the first turn-off (seen with an ideal source in place of the windings too). Rdamp
  // across the secondary damps the ringing of the leakage inductance with that capacitance (about 1 MHz
  // and a Q of 10⁴ undamped, which the trapezoidal rule would follow in 50 ns steps), as a snubber does.
  const n = 16 / 230;
  const vPeak = 230 * Math.SQRT2;
  const text = readFileSync(fileURLToPath(new URL('../../../examples/railway-accessory-transformer.cir', import.meta.url)), 'utf8');

  test('reservoir: charges to the secondary peak less two diode drops, and ripples by about I/(2·f·C)', () => {
    const c = compile(text);
    const { trace, stats } = run(c, { tstep: 0.2e-3, tstop: 0.2 });
    const pos = node(c, 'pos');
    const [sa, sb] = [node(c, 'sa'), node(c, 'sb')];
    let lo = Infinity;
    let hi = -Infinity;
    let sum = 0;
    let weight = 0;
    let secPeak = 0;
    for (let k = 1; k < trace.count; k++) {
      const t = trace.times[k]!;
      if (t < 0.18) continue;
      const v = at(trace, k, pos);
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
      const h = t - trace.times[k - 1]!;
      sum += (h * (v + at(trace, k - 1, pos))) / 2;
      weight += h;
      secPeak = Math.max(secPeak, Math.abs(at(trace, k, sa) - at(trace, k, sb)));
    }
    const mean = sum / weight;
    const ripple = hi - lo;
    // Horowitz and Hill, The Art of Electronics, ch. 1 (from memory): a full-wave reservoir droops by
    // I/(2·f·C) between peaks; the estimate overstates because the capacitor recharges for part of the time.
    const estimate = mean / 47 / (2 * 50 * 2200e-6);
    // The ideal-transformer relation gives the open-circuit secondary peak n·V̂ (ch. 13, from memory).
    const ideal = n * vPeak;
    console.log(`accessory supply (${stats.accepted} steps, ${stats.rejectedLte} + ${stats.rejectedNewton} rejected): Vres mean ${mean.toFixed(3)} V, ripple ${ripple.toFixed(3)} V pp (I/(2fC) = ${estimate.toFixed(3)} V), secondary peak ${secPeak.toFixed(3)} V (n·V̂ = ${ideal.toFixed(3)} V), Vres peak ${hi.toFixed(3)} V`);
    expect(ripple / estimate).toBeGreaterThan(0.6);
    expect(ripple / estimate).toBeLessThan(1.1);
    // Loaded, the secondary sags below n·V̂ through leakage and winding resistance, but not by much at
    // 0.3 A from a 16 V winding: within 15 % (common practice for a small mains transformer, no source).
    expect(secPeak).toBeLessThan(ideal);
    expect(secPeak).toBeGreaterThan(0.85 * ideal);
    // Two silicon junctions conduct between the winding and the reservoir at the peak: each drops
    // 0.6 … 1.2 V at the charging current (common practice, no source).
    const drops = secPeak - hi;
    expect(drops).toBeGreaterThan(2 * 0.6);
    expect(drops).toBeLessThan(2 * 1.2);
  });
});
