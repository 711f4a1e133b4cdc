/**
 * Junction-voltage limiting (Nagel, UCB/ERL M520, 1975): a diode fed
 * from a large source through a small resistor defeats plain Newton (the
 * first step lands near the source voltage, where the exponential either
 * overflows or can only retreat by about n·Vt per iteration), while the
 * engine converges by plain Newton with limiting to the Lambert W solution
 * (Banwell and Jayakumar, Electronics Letters 36(4), 2000).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { runNetlist } from '@railcheck/core';
import { DEFAULT_NEWTON } from '@railcheck/core/internal';
import { criticalVoltage } from '@railcheck/devices';
import { fcSeed } from '../../helpers/device-harness.js';
import { seriesDiode, thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';
import { logUniform } from '../../helpers/linear-networks.js';

const seed = fcSeed('core/engine/limiting');
const VT = thermalVoltage(T_NOM);
const IS = 1e-14;

type PlainOutcome = { readonly kind: 'converged'; readonly v: number; readonly iterations: number } | { readonly kind: 'non-finite' | 'iterations'; readonly iterations: number };

/**
 * Newton on (V − Vs)/R + IS·(exp(V/nVt) − 1) = 0 from V = 0, with no limiting
 * and Math.exp as it is, stopped by the engine's own test (DEFAULT_NEWTON).
 */
function plainNewton(vs: number, r: number, is: number, nVt: number): PlainOutcome {
  const { reltol, vntol, maxIterations } = DEFAULT_NEWTON;
  let v = 0;
  for (let k = 1; k <= maxIterations; k++) {
    const e = Math.exp(v / nVt);
    const f = (v - vs) / r + is * (e - 1);
    const df = 1 / r + (is * e) / nVt;
    const next = v - f / df;
    if (!Number.isFinite(next)) return { kind: 'non-finite', iterations: k };
    if (k > 1 && Math.abs(next - v) <= reltol * Math.max(Math.abs(next), Math.abs(v)) + vntol) return { kind: 'converged', v: next, iterations: k };
    v = next;
  }
  return { kind: 'iterations', iterations: maxIterations };
}

function engine(vs: number, r: number): { v: number; i: number; method: string; iterations: number } {
  const run = runNetlist(`hard start\nV1 in 0 ${vs}\nR1 in a ${r}\nD1 a 0 dm\n.model dm D (IS=${IS})\n.op\n`);
  if (!run.ok) throw new Error(run.errors.map((e) => e.message).join('; '));
  const op = run.report.operatingPoints[0]!;
  return { v: op.nodes['a']!, i: op.currents['D1']!, method: op.method, iterations: op.iterations };
}

describe('plain Newton fails where the engine does not', () => {
  test('10 V through 1 Ω: plain Newton retreats ~nVt per step and runs out of iterations', () => {
    const plain = plainNewton(10, 1, IS, VT);
    expect(plain.kind).toBe('iterations');
    const e = engine(10, 1);
    expect(e.method).toBe('newton');
    const ref = seriesDiode(10, 1, IS, VT, 1e-12);
    // Observed 3.3e-12 and 1.1e-10 relative; bounds 8e-12 and 2.8e-10.
    expect(Math.abs(e.v - ref.vd) / ref.vd).toBeLessThan(8e-12);
    expect(Math.abs(e.i - ref.junction) / ref.junction).toBeLessThan(2.8e-10);
    console.log(`limiting, 10 V/1 Ω: plain Newton ${plain.kind} after ${plain.iterations}; engine ${e.iterations} iterations, V = ${e.v.toFixed(6)} V (Lambert W ${ref.vd.toFixed(6)} V)`);
  });

  test('50 V through 10 Ω: exp(50/Vt) overflows and plain Newton goes non-finite', () => {
    const plain = plainNewton(50, 10, IS, VT);
    expect(plain.kind).toBe('non-finite');
    const e = engine(50, 10);
    expect(e.method).toBe('newton');
    const ref = seriesDiode(50, 10, IS, VT, 1e-12);
    // Observed 1.3e-16 and 6.3e-15 relative; bounds 3e-16 and 1.6e-14.
    expect(Math.abs(e.v - ref.vd) / ref.vd).toBeLessThan(3e-16);
    expect(Math.abs(e.i - ref.junction) / ref.junction).toBeLessThan(1.6e-14);
  });

  test('plain Newton itself is sound: it converges on a gentle case (1 V through 1 kΩ)', () => {
    const plain = plainNewton(1, 1e3, IS, VT);
    expect(plain.kind).toBe('converged');
    // Observed 0; bound 2·eps·|V|.
    if (plain.kind === 'converged') expect(Math.abs(plain.v - seriesDiode(1, 1e3, IS, VT).vd)).toBeLessThanOrEqual(2 * Number.EPSILON * plain.v);
  });

  test('random hard cases (10–100 V through 0.1–10 Ω): plain fails, the engine converges by Newton to Lambert W', () => {
    let worst = 0;
    let most = 0;
    fc.assert(
      fc.property(logUniform(1, 2), logUniform(-1, 1), (vs, r) => {
        expect(plainNewton(vs, r, IS, VT).kind).not.toBe('converged');
        const e = engine(vs, r);
        expect(e.method).toBe('newton');
        const ref = seriesDiode(vs, r, IS, VT, 1e-12);
        const d = Math.abs(e.i - ref.junction) / ref.junction;
        worst = Math.max(worst, d);
        most = Math.max(most, e.iterations);
        // Worst observed 6.8e-10 over FC_SEED 20261201, 1–13 and 424242; bound 1.7e-9.
        expect(d).toBeLessThan(1.7e-9);
      }),
      { seed, numRuns: 200 },
    );
    console.log(`limiting, random hard cases: max relative current error ${worst.toExponential(2)}, at most ${most} engine iterations`);
  });
});

describe('critical voltage (Nagel 1975)', () => {
  /**
   * Nagel's definition: the voltage where I = IS·exp(V/nVt) has its minimum
   * radius of curvature, found here numerically by golden-section search on
   * κ(V) = I''/(1 + I'²)^(3/2) in SI units, with I' = u = (IS/nVt)·e^(V/nVt)
   * and I'' = u/nVt.
   */
  function curvatureMaximum(nVt: number, is: number): number {
    const logCurvature = (v: number): number => {
      const logU = Math.log(is / nVt) + v / nVt;
      return logU - 1.5 * Math.log1p(Math.exp(2 * logU));
    };
    let a = -1;
    let b = 3;
    const g = (Math.sqrt(5) - 1) / 2;
    for (let k = 0; k < 200; k++) {
      const c = b - g * (b - a);
      const d = a + g * (b - a);
      if (logCurvature(c) > logCurvature(d)) b = d;
      else a = c;
    }
    return (a + b) / 2;
  }

  test('criticalVoltage is where the curvature of the exponential peaks', () => {
    fc.assert(
      fc.property(logUniform(-16, -9), fc.integer({ min: 1000, max: 2000 }).map((k) => k / 1000), (is, n) => {
        const nVt = n * VT;
        // A flat maximum pins its location to about √eps of the scale nVt: worst observed 1.05e-9 V over
        // FC_SEED 20261201, 1–13 and 424242; bound 2.6e-9 V.
        expect(Math.abs(criticalVoltage(nVt, is) - curvatureMaximum(nVt, is))).toBeLessThan(2.6e-9);
      }),
      { seed, numRuns: 100 },
    );
  });

  test('a worked value: IS = 1e-14, N = 1 at 27 °C gives Vcrit ≈ 0.730 V (hand calculation)', () => {
    // 25.864 mV·ln(25.864e-3/(√2·1e-14)) = 25.864 mV·28.235 = 0.7303 V.
    expect(criticalVoltage(VT, 1e-14)).toBeCloseTo(0.7303, 4);
  });
});
