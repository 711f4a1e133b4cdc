/**
 * The load-step figure (figures.md, "step") against the closed-form
 * response of a first-order stage. A source V through R into C, with a
 * current-source load that ramps linearly from I1 to I2 over tr from t = 0:
 * with x = v − v2 (v2 = V − I2·R the new steady output, ΔI = I2 − I1) the
 * system is RC·x' = −x + ΔI·R·(1 − r(t)), r the ramp 0 → 1 over tr. For
 * t ≥ tr its solution is (linear first-order ODE, integrating factor;
 * Boyce and DiPrima, Elementary Differential Equations, §2.1)
 *   v1 − v(t) = ΔI·R·[1 − (τ/tr)·(e^(tr/τ) − 1)·e^(−t/τ)],  τ = RC,
 * monotone, so the dip is its limit ΔI·R (the supremum of the excursion,
 * which the figure takes once the run is within tolerance of it), there is
 * no overshoot on the way back, and the output comes within `band` of v2
 * for good at t_r = τ·ln(|ΔI|·R·(τ/tr)·(e^(tr/τ) − 1)/band) (when t_r ≥ tr).
 * A falling load (I2 < I1) mirrors it: the output rises by the same amount.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { createBench, loadStep, runNetlist } from '@railcheck/core';
import { figuresOf, logUniform, num, relErr, seedFor, value } from '../linear/support.js';
import { junctionWithRs, shockley, IS, N } from '../../transient/rectifier-model.js';
import { odexOnGrid, odexSolver } from '../../transient/support.js';

const seed = seedFor('measure/transient/step');

interface RcStep { v: number; r: number; c: number; i1: number; i2: number; riseShare: number; bandRatio: number }

const lines = (s: RcStep, keys = ''): string[] => [
  'sensor rail load step', `V1 in 0 ${num(s.v)}`, `R1 in out ${num(s.r)}`, `C1 out 0 ${num(s.c)}`, `ILOAD out 0 ${num(s.i1)}`,
  '.supply in=V1 out=out load=ILOAD', `.figure step from=${num(s.i1)} to=${num(s.i2)} ${keys}`,
];

const benchOf = (s: RcStep) => {
  const run = runNetlist([...lines(s), '.end', ''].join('\n'));
  if (!run.ok) throw new Error('the stage does not run');
  return createBench(run.report.compiled);
};

// Bands of 0.2 % to 5 % of the rail and swings ΔI·R of at least twice the band: a recovery time is read where the
// output crosses the band, so it carries the transient's error over the band (about 1e-5 of the rail here).
const arb: fc.Arbitrary<RcStep> = fc
  .record({
    v: fc.double({ min: 5, max: 48, noNaN: true }), r: logUniform(0.1, 100), c: logUniform(1e-6, 0.01),
    i1: fc.double({ min: 0, max: 0.2, noNaN: true }), swingRatio: logUniform(0.01, 0.3), rising: fc.boolean(),
    riseShare: logUniform(1e-4, 0.5), bandRatio: logUniform(0.002, 0.05),
  })
  .map(({ swingRatio, rising, ...s }) => ({ ...s, i2: Math.max(0, s.i1 + (rising ? 1 : -1) * (swingRatio * s.v) / s.r) }))
  .filter((s) => Math.abs(s.i2 - s.i1) * s.r >= 2 * s.bandRatio * s.v && s.r * s.c < 0.5 && s.v - Math.max(s.i1, s.i2) * s.r > 0);

describe('load step of an R–C output with a current-source load', () => {
  test('dip, no overshoot, and recovery time against the first-order closed form with the rise accounted', () => {
    let worstDip = 0;
    let worstRecovery = 0;
    fc.assert(
      fc.property(arb, (s) => {
        const tau = s.r * s.c;
        const tr = s.riseShare * tau;
        const swing = Math.abs(s.i2 - s.i1) * s.r;
        const band = s.bandRatio * s.v;
        const r = loadStep(benchOf(s), { from: s.i1, to: s.i2, rise: tr, band });
        const k = (tau / tr) * Math.expm1(tr / tau);
        worstDip = Math.max(worstDip, Math.abs(r.dip - swing) / s.v);
        const tRec = tau * Math.log((swing * k) / band);
        if (tRec >= tr) worstRecovery = Math.max(worstRecovery, relErr(r.recovery, tRec));
        // Monotone recovery: no overshoot past the new steady value (up to the transient's rounding).
        expect(r.peak).toBeLessThanOrEqual(1e-9 * s.v);
        // The steady values: Ohm's law, v = V − I·R.
        expect(relErr(r.before, s.v - s.i1 * s.r)).toBeLessThan(1e-12);
        expect(relErr(r.after, s.v - s.i2 * s.r)).toBeLessThan(1e-12);
      }),
      { seed, numRuns: 30 },
    );
    // dip, as a share of the rail: the steady values are DC solutions (Newton to about 1e-12 of the rail); observed
    // 4e-16 over seeds 1-3; bound 1e-12.
    expect(worstDip).toBeLessThan(1e-12);
    // recovery: observed 1.3e-3 over seeds 1-3 (the crossing moves by τ·(error/band), at bands of 0.2 % of the rail); bound 3e-3.
    expect(worstRecovery).toBeLessThan(3e-3);
  });

  test('the figure in a netlist: band as a % of Vout_nom, the default rise of 1 µs (rise ≪ RC)', () => {
    const s: RcStep = { v: 12, r: 10, c: 1e-3, i1: 0.1, i2: 0.3, riseShare: 0, bandRatio: 0 };
    const { figures } = figuresOf(lines(s, 'band=1%'));
    const tau = s.r * s.c;
    const band = 0.01 * (s.v - s.i1 * s.r);
    const swing = (s.i2 - s.i1) * s.r;
    // The 1 µs rise is 1e-4 of τ: (τ/tr)(e^(tr/τ) − 1) = 1 + 5e-5, kept in the closed form.
    const k = (tau / 1e-6) * Math.expm1(1e-6 / tau);
    // Observed 3.1e-4 (the transient's error of about 1e-5 of the rail over a band of 0.9 % of it); bound 1e-3.
    expect(relErr(figures.values['step.recovery']!, tau * Math.log((swing * k) / band))).toBeLessThan(1e-3);
    // A monotone first-order approach: the dip is the whole swing ΔI·R (up to the DC solutions' rounding).
    expect(relErr(figures.values['step.dip']!, swing)).toBeLessThan(1e-12);
    expect(figures.values['step.peak']).toBe(0);
  });

  test('not settled within tmax: not measured, with the reason, and no value', () => {
    const s: RcStep = { v: 12, r: 10, c: 0.1, i1: 0.1, i2: 0.3, riseShare: 0, bandRatio: 0 };
    // τ = 1 s; the output leaves the 110 mV band of its new value only after τ·ln(2 V / 110 mV) = 2.9 s.
    const { figures } = figuresOf(lines(s, 'band=1% tmax=2'));
    const f = figures.figures[0]!;
    expect(f.ok).toBe(false);
    if (!f.ok) expect(f.reason.message).toMatch(/load step: the stage had not settled by tmax = 2 s/);
    expect(Object.keys(figures.values)).toEqual([]);
  });

  test('a resistor load, and a sine-fed reservoir with nothing to discharge it at the first current, are not measured, each with its reason', () => {
    const resistor = figuresOf(['rail', 'V1 in 0 12', 'R1 in out 10', 'C1 out 0 1m', 'RL out 0 100', '.supply in=V1 out=out load=RL', '.figure step']).figures.figures[0]!;
    expect(!resistor.ok && resistor.reason.message).toMatch(/needs a current-source load/);
    const sine = figuresOf(['rail', 'V1 sec 0 sin(0 12 50)', 'D1 sec out DR', '.model DR D(IS=1e-9 N=1.8)', 'C1 out 0 1000u', 'ILOAD out 0 50m', '.supply in=V1 out=out load=ILOAD', '.figure step to=100m']).figures.figures[0]!;
    // At from = 0 A nothing discharges the reservoir: it creeps towards the peak for ever, so there is no settled cycle to step from.
    expect(!sine.ok && sine.reason.message).toMatch(/load step, first current: periodic steady state of the sine-fed stage: no periodic steady state/);
  });
});

// The sine-fed stage: a model-railway controller's half-wave reservoir, 15 V peak at 50 Hz, with an electronic load
// stepped from 50 mA to 250 mA. The reference is the same circuit as an ODE, C·v' = iD(t, v) − v/RB − I(t) (the
// diode of models.md with its series resistance, test/core/transient/rectifier-model.ts), integrated by ODEX; its
// settled cycles are found by shooting on the period map with a scalar secant iteration, so nothing of the engine's
// periodic steady state or step plan is reused.
describe('load step of a sine-fed half-wave reservoir (against the ODE of the same circuit)', () => {
  const VP = 15;
  const F = 50;
  const T = 1 / F;
  const RWIND = 1;
  const RSER = 0.05;
  const C = 2200e-6;
  const RB = 1000;
  const [I1, I2, RISE] = [0.05, 0.25, 1e-4];
  const BAND = 0.15;
  const src = (t: number): number => VP * Math.sin(2 * Math.PI * F * t);
  const iD = (t: number, v: number): number => shockley(junctionWithRs(src(t) - v, RWIND + RSER));
  const ramp = (t: number): number => (t <= 0 ? I1 : t >= RISE ? I2 : I1 + ((I2 - I1) * t) / RISE);
  const solver = (): ReturnType<typeof odexSolver> => {
    const s = odexSolver(1);
    s.absoluteTolerance = 1e-10;
    s.relativeTolerance = 1e-10;
    s.maxStepSize = 2e-5;
    s.maxSteps = 1e7;
    return s;
  };
  /** v over `cycles` whole cycles from v0 at t = 0 (a cycle start), on a grid of `per` points a cycle, with the load current `load(t)`. */
  const integrate = (v0: number, cycles: number, load: (t: number) => number, per = 2000): { t: number[]; v: number[] } => {
    const grid = Array.from({ length: cycles * per + 1 }, (_, k) => (k * T) / per);
    const v = odexOnGrid(solver(), (t, y) => [(iD(t, y[0]!) - y[0]! / RB - load(t)) / C], 0, [v0], grid).map((y) => y[0]!);
    return { t: grid, v };
  };
  /** The settled cycle at a constant load current: v0 with v(T) = v0 (secant on the period map), and its least and greatest output. */
  const settled = (i: number): { v0: number; lo: number; hi: number } => {
    const map = (v0: number): number => integrate(v0, 1, () => i, 200).v.at(-1)! - v0;
    let [a, b] = [VP - 2, VP - 1];
    let [fa, fb] = [map(a), map(b)];
    for (let k = 0; k < 30 && Math.abs(fb) > 1e-12; k++) {
      const c = b - (fb * (b - a)) / (fb - fa);
      [a, fa, b, fb] = [b, fb, c, map(c)];
    }
    const cyc = integrate(b, 1, () => i).v;
    return { v0: b, lo: Math.min(...cyc), hi: Math.max(...cyc) };
  };

  test('step.dip, step.peak and step.recovery agree with the ODE', () => {
    const lines = [
      'model-railway controller, half-wave reservoir load step', `V1 sec 0 sin(0 ${VP} ${F})`, `RW sec a ${RWIND}`, 'D1 a out DR', `.model DR D(IS=${IS} N=${N} RS=${RSER})`,
      `C1 out 0 ${C}`, `RB out 0 ${RB}`, `ILOAD out 0 ${I1}`, '.supply in=V1 out=out load=ILOAD', `.figure step from=${I1} to=${I2} rise=${RISE} band=${BAND}`,
    ];
    const { figures } = figuresOf(lines);
    expect(figures.bench).toBe('sine-fed');
    const first = settled(I1);
    const second = settled(I2);
    // The step starts at a cycle start, from the settled cycle at I1; 30 cycles are far past recovery here.
    const run = integrate(first.v0, 30, ramp);
    const dip = first.lo - Math.min(...run.v);
    let k = run.v.length - 1;
    while (k > 0 && run.v[k - 1]! >= second.lo - BAND && run.v[k - 1]! <= second.hi + BAND) k--;
    const edge = run.v[k - 1]! < second.lo - BAND ? second.lo - BAND : second.hi + BAND;
    const recovery = run.t[k - 1]! + ((edge - run.v[k - 1]!) / (run.v[k]! - run.v[k - 1]!)) * (run.t[k]! - run.t[k - 1]!);
    // No trough of the run grazes the band edge (a graze would make the crossing hang on a fraction of a millivolt).
    for (let c = 0; c < 30; c++) expect(Math.abs(Math.min(...run.v.slice(c * 2000, (c + 1) * 2000)) - (second.lo - BAND))).toBeGreaterThan(0.005);
    // Past the dip's extreme, the largest rise above the new settled cycle's crest.
    const kMin = run.v.indexOf(Math.min(...run.v));
    const peak = Math.max(0, Math.max(...run.v.slice(kMin)) - second.hi);
    const got = { dip: value(figures, 'step.dip'), peak: value(figures, 'step.peak'), recovery: value(figures, 'step.recovery') };
    // dip: observed 3.6e-4 (both troughs are read off accepted points, 200 a cycle, against a 2000-point grid here); bound 1e-3.
    expect(relErr(got.dip, dip)).toBeLessThan(1e-3);
    // The crests come down onto the new ones without passing them: no overshoot (observed |Δ| 2e-12 V); bound 1 µV.
    expect(Math.abs(got.peak - peak)).toBeLessThan(1e-6);
    // recovery: observed 7.4e-4 (the crossing on the first discharge slope, read off the engine's points); bound 2e-3.
    expect(relErr(got.recovery, recovery)).toBeLessThan(2e-3);
  }, 120_000);
});
