/**
 * A DC source, a resistor and a Shockley diode: the engine's operating point
 * against the explicit Lambert W solution of Banwell and Jayakumar
 * (Electronics Letters 36(4), 2000), for random source voltages, resistances
 * and diode parameters; once with an external resistor and once with the
 * diode's own RS.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { lambertW0, lambertW0Log } from 'lambert-w-function';
import { runNetlist } from '@railcheck/core';
import { DEFAULT_NEWTON } from '@railcheck/core/internal';
import { fcSeed } from '../../helpers/device-harness.js';
import { lambertRelativeError, seriesDiode, thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';
import { logUniform } from '../../helpers/linear-networks.js';

const seed = fcSeed('core/engine/diode-lambert');

/** engine.md: the final solution keeps 1e-12 S across every pn junction; the closed form includes it. */
const JUNCTION_GMIN = 1e-12;

/**
 * Tolerances. The engine stops when every unknown moved by less than
 * reltol·|V| + vntol (DEFAULT_NEWTON: 1e-6, 1 nV) in an unlimited iteration.
 * Newton converges quadratically there: the error left after a last step Δ is
 * about Δ²/(2·n·Vt) for an exponential (Nagel 1975, ch. 4), below 1e-10 V
 * for Δ ≤ 1 µV, which moves the junction current by ΔV/(n·Vt) < 1e-8
 * relative; the reference W itself is good to ~1e-15 (checked below).
 * Observed worst over FC_SEED 20261201, 1–13 and 424242: 1.8e-11 relative on
 * the voltage, 6.7e-10 on the junction current; bounds 4.5e-11 and 1.7e-9.
 */
const V_REL = 4.5e-11;
const I_REL = 1.7e-9;

const relErr = (got: number, want: number): number => Math.abs(got - want) / Math.abs(want);

/**
 * The source current is fixed by Vs − V(a) across R. At picoamps through 10 Ω
 * that difference is 1e-10 of V(a), so the double round-off of V(a), a few
 * ulps of Vs, bounds it more tightly than any tolerance: allowed error
 * I_REL·|I| + 8·eps·Vs/R.
 */
const sourceTolerance = (amps: number, vs: number, r: number): number => I_REL * Math.abs(amps) + (8 * Number.EPSILON * vs) / r;

const circuit = fc.record({
  vs: logUniform(-1, Math.log10(50)),
  r: logUniform(1, 5),
  is: logUniform(-16, -9),
  n: fc.integer({ min: 1000, max: 2000 }).map((k) => k / 1000),
});

describe('the reference: lambert-w-function', () => {
  test('W·e^W = x to round-off over the arguments used (ln x from −40 to 2500; series below −20)', () => {
    fc.assert(
      fc.property(fc.integer({ min: -40_000, max: 2_500_000 }).map((k) => k / 1000), (logX) => {
        // Worst observed 3.6e-15 over FC_SEED 20261201, 1–13, 100–105 and 424242; bound 9e-15.
        expect(lambertRelativeError(logX)).toBeLessThan(9e-15);
      }),
      { seed, numRuns: 500 },
    );
  });

  test('known values: W(e) = 1, W(1) = Ω = 0.567143290409784 (omega constant, from memory)', () => {
    // Observed 2.2e-16, 1.1e-16, 1.1e-16 (the last digit of Ω as written); bounds 5e-16, 3e-16, 3e-16.
    expect(Math.abs(lambertW0Log(1) - 1)).toBeLessThan(5e-16);
    expect(Math.abs(lambertW0(1) - 0.567143290409784)).toBeLessThan(3e-16);
    expect(Math.abs(lambertW0Log(0) - 0.567143290409784)).toBeLessThan(3e-16);
  });
});

describe('series resistor and diode against the Lambert W closed form', () => {
  test('tolerance rests on the engine defaults it was argued from', () => {
    expect(DEFAULT_NEWTON.reltol).toBe(1e-6);
    expect(DEFAULT_NEWTON.vntol).toBe(1e-9);
  });

  test('external resistor: junction voltage, junction current and source current', () => {
    const worst = { v: 0, i: 0, src: 0 };
    fc.assert(
      fc.property(circuit, ({ vs, r, is, n }) => {
        const text = `series diode\nV1 in 0 ${vs}\nR1 in a ${r}\nD1 a 0 dm\n.model dm D (IS=${is} N=${n})\n.op\n`;
        const run = runNetlist(text);
        if (!run.ok) throw new Error(run.errors.map((e) => e.message).join('; '));
        const op = run.report.operatingPoints[0]!;
        const ref = seriesDiode(vs, r, is, n * thermalVoltage(T_NOM), JUNCTION_GMIN);
        const dv = relErr(op.nodes['a']!, ref.vd);
        const di = relErr(op.currents['D1']!, ref.junction);
        // The source delivers current: its passive-convention current is negative.
        const ds = Math.abs(-op.currents['V1']! - ref.source) / sourceTolerance(ref.source, vs, r);
        worst.v = Math.max(worst.v, dv);
        worst.i = Math.max(worst.i, di);
        worst.src = Math.max(worst.src, ds);
        expect(dv, 'V(a)').toBeLessThan(V_REL);
        expect(di, 'I(D1)').toBeLessThan(I_REL);
        expect(ds, 'I(V1), in units of its tolerance').toBeLessThan(1);
      }),
      { seed, numRuns: 400 },
    );
    console.log(`diode + R vs Lambert W: max relative error V ${worst.v.toExponential(2)}, I(D) ${worst.i.toExponential(2)}; I(V) ${worst.src.toFixed(3)} of its tolerance`);
  });

  test('series resistance RS of the model instead of a resistor: the same closed form', () => {
    const worst = { i: 0, src: 0 };
    fc.assert(
      fc.property(circuit, ({ vs, r, is, n }) => {
        const text = `diode with RS\nV1 in 0 ${vs}\nD1 in 0 dm\n.model dm D (IS=${is} N=${n} RS=${r})\n.op\n`;
        const run = runNetlist(text);
        if (!run.ok) throw new Error(run.errors.map((e) => e.message).join('; '));
        const op = run.report.operatingPoints[0]!;
        const ref = seriesDiode(vs, r, is, n * thermalVoltage(T_NOM), JUNCTION_GMIN);
        const di = relErr(op.currents['D1']!, ref.junction);
        const ds = Math.abs(-op.currents['V1']! - ref.source) / sourceTolerance(ref.source, vs, r);
        worst.i = Math.max(worst.i, di);
        worst.src = Math.max(worst.src, ds);
        expect(di, 'I(D1)').toBeLessThan(I_REL);
        expect(ds, 'I(V1), in units of its tolerance').toBeLessThan(1);
      }),
      { seed, numRuns: 400 },
    );
    console.log(`diode with RS vs Lambert W: max relative error I(D) ${worst.i.toExponential(2)}; I(V) ${worst.src.toFixed(3)} of its tolerance`);
  });

  test('a worked case by hand: 5 V, 1 kΩ, IS = 1e-14, N = 1 sits at ≈ 0.693 V and 4.31 mA', () => {
    // Two rounds of V = Vt·ln(I/IS), I = (5 − V)/1 kΩ by hand, Vt = 25.86 mV:
    // I = 4.33 mA → V = 0.6930 V → I = 4.307 mA → V = 0.6929 V.
    const ref = seriesDiode(5, 1e3, 1e-14, thermalVoltage(T_NOM));
    // Observed 1.2e-5 V and 1.1e-7 A from the hand values as rounded; bounds 3e-5 V and 2.8e-7 A.
    expect(Math.abs(ref.vd - 0.6929)).toBeLessThan(3e-5);
    expect(Math.abs(ref.junction - 4.307e-3)).toBeLessThan(2.8e-7);
    const run = runNetlist('worked\nV1 in 0 5\nR1 in a 1k\nD1 a 0 dm\n.model dm D (IS=1e-14)\n.op\n');
    if (!run.ok) throw new Error('rejected');
    const op = run.report.operatingPoints[0]!;
    // Observed 6.0e-12 and 9.6e-13; bounds 1.5e-11 and 2.5e-12.
    expect(relErr(op.nodes['a']!, ref.vd)).toBeLessThan(1.5e-11);
    expect(relErr(op.currents['R1']!, (5 - ref.vd) / 1e3)).toBeLessThan(2.5e-12);
  });
});
