/**
 * Line regulation, load regulation and dropout of a resistive divider
 * stage (Vin – R1 series – out – R2 shunt), against the voltage divider and
 * Thévenin's theorem (any circuit-theory text): seen from `out` the stage is
 * Vth = Vin·R2/(R1 + R2) behind Rth = R1∥R2. Definitions of the figures are
 * those of figures.md; component values are randomised.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { createBench, dropout, lineRegulation, loadRegulation, parseNetlist, prepare, RailcheckError, type FigureMeasured, type MeasuredFigure } from '@railcheck/core';
import { dividerThevenin, dividerWithCurrent, dividerWithResistor, figuresOf, logUniform, num, par, relErr, seedFor, value } from './support.js';

const seed = seedFor('measure/linear/divider');
const RUNS = { seed, numRuns: 25 };

/** A divider stage; the load is a current source `IL` (A) or a resistor `RL` (Ω). */
interface Divider { vin: number; r1: number; r2: number; load: { kind: 'I'; amps: number } | { kind: 'R'; ohms: number } }

const dividerArb: fc.Arbitrary<Divider> = fc
  .record({ vin: fc.double({ min: 2, max: 100, noNaN: true }), r1: logUniform(10, 100e3), r2: logUniform(10, 100e3), share: fc.double({ min: 0.05, max: 0.8, noNaN: true }), resistor: fc.boolean() })
  .map(({ vin, r1, r2, share, resistor }) => {
    const { vth, rth } = dividerThevenin(vin, r1, r2);
    // `share` of the short-circuit current Vth/Rth keeps Vout_nom at (1 − share)·Vth > 0.
    const amps = (share * vth) / rth;
    return { vin, r1, r2, load: resistor ? { kind: 'R', ohms: (vth * (1 - share)) / amps } : { kind: 'I', amps } };
  });

function netlist(d: Divider, figures: readonly string[]): string[] {
  const load = d.load.kind === 'I' ? `IL out 0 ${num(d.load.amps)}` : `RL out 0 ${num(d.load.ohms)}`;
  return ['divider stage', `V1 in 0 ${num(d.vin)}`, `R1 in out ${num(d.r1)}`, `R2 out 0 ${num(d.r2)}`, load, `.supply in=V1 out=out load=${d.load.kind}L`, ...figures];
}

/** Vout (V) at input `vin` with the load at the setting for current `amps` (figures.md: resistor = Vout_nom/I, open for 0). */
function voutAt(d: Divider, vin: number, amps?: number): number {
  if (d.load.kind === 'I') return dividerWithCurrent(vin, d.r1, d.r2, amps ?? d.load.amps);
  if (amps === undefined) return dividerWithResistor(vin, d.r1, d.r2, d.load.ohms);
  const nominal = dividerWithResistor(d.vin, d.r1, d.r2, d.load.ohms);
  return dividerWithResistor(vin, d.r1, d.r2, amps === 0 ? Infinity : nominal / amps);
}

/** dVout/dVin at nominal load: R2/(R1 + R2) for a current load, (R2∥RL)/(R1 + R2∥RL) for a resistor. */
function lineRatio(d: Divider): number {
  const shunt = d.load.kind === 'I' ? d.r2 : par(d.r2, d.load.ohms);
  return shunt / (d.r1 + shunt);
}

/** A figure that must have been measured. */
function measured(f: MeasuredFigure): FigureMeasured {
  if (!f.ok) throw new Error(`${f.kind} was not measured: ${f.reason.message}`);
  return f;
}

/** The reason the netlist's first figure was not measured (the run itself goes on: docs/figures.md, "Figures that cannot be measured"). */
function notMeasuredReason(lines: readonly string[]): string {
  const f = figuresOf(lines).figures.figures[0]!;
  if (f.ok) throw new Error(`expected ${f.kind} not to be measured`);
  return f.reason.message;
}

/** Each figure kind once per netlist: one run per figure line. */
const each = (d: Divider, figs: readonly string[]) => figs.map((f) => measured(figuresOf(netlist(d, [f])).figures.figures[0]!));

const nominalLoad = (d: Divider): number => (d.load.kind === 'I' ? d.load.amps : voutAt(d, d.vin) / d.load.ohms);

describe('line regulation of a divider', () => {
  test('line.delta, line.slope and line.pct_per_v equal the divider ratio, default and explicit from/to', () => {
    fc.assert(
      fc.property(dividerArb, fc.double({ min: 0.3, max: 0.95, noNaN: true }), fc.double({ min: 1.05, max: 1.5, noNaN: true }), (d, a, b) => {
        const from = a * d.vin;
        const to = b * d.vin;
        const [def, explicit] = each(d, ['.figure line', `.figure line from=${num(from)} to=${num(to)}`]);
        const k = lineRatio(d);
        const vnom = voutAt(d, d.vin);
        // Default ends 0.9 and 1.1 × nominal (figures.md).
        // Rounding only: worst observed 1.3e-15 to 1.7e-15 over FC_SEED 20261201, 1–13 and 424242; bounds 4e-15 (default ends), 6e-15 (explicit ends, 2.4e-15).
        expect(relErr(def!.values['line.delta']!, k * 0.2 * d.vin)).toBeLessThan(4e-15);
        expect(relErr(def!.values['line.slope']!, k)).toBeLessThan(4e-15);
        expect(relErr(def!.values['line.pct_per_v']!, (100 * k) / vnom)).toBeLessThan(4e-15);
        expect(relErr(explicit!.values['line.delta']!, k * (to - from))).toBeLessThan(6e-15);
        expect(relErr(explicit!.values['line.slope']!, k)).toBeLessThan(6e-15);
        expect(relErr(explicit!.values['line.pct_per_v']!, (100 * k) / vnom)).toBeLessThan(6e-15);
      }),
      RUNS,
    );
  });
});

describe('load regulation of a divider', () => {
  test('load.rout is the Thévenin resistance R1∥R2 for a current-source load, any from/to', () => {
    fc.assert(
      fc.property(dividerArb.filter((d) => d.load.kind === 'I'), fc.double({ min: 0, max: 0.4, noNaN: true }), fc.double({ min: 0.6, max: 1.2, noNaN: true }), (d, a, b) => {
        const inom = nominalLoad(d);
        const [def, explicit] = each(d, ['.figure load', `.figure load from=${num(a * inom)} to=${num(b * inom)}`]);
        const { vth, rth } = dividerThevenin(d.vin, d.r1, d.r2);
        // Worst observed 4.3e-15 (default range) and 2.1e-14 (explicit) over FC_SEED 20261201, 1–13 and 424242; bounds 1.1e-14, 5.5e-14.
        expect(relErr(def!.values['load.rout']!, rth)).toBeLessThan(1.1e-14);
        expect(relErr(def!.values['load.delta']!, inom * rth)).toBeLessThan(1.1e-14);
        // Vout(from = 0) = Vth.
        expect(relErr(def!.values['load.pct']!, (100 * inom * rth) / vth)).toBeLessThan(1.1e-14);
        const delta = (b - a) * inom * rth;
        expect(relErr(explicit!.values['load.rout']!, rth)).toBeLessThan(5.5e-14);
        expect(relErr(explicit!.values['load.delta']!, delta)).toBeLessThan(5.5e-14);
        expect(relErr(explicit!.values['load.pct']!, (100 * delta) / (vth - a * inom * rth))).toBeLessThan(5.5e-14);
      }),
      RUNS,
    );
  });

  test('resistor load: R = Vout_nom/I at each end, open for 0; the default range gives rout = R1∥R2', () => {
    fc.assert(
      fc.property(dividerArb.filter((d) => d.load.kind === 'R'), fc.double({ min: 0.1, max: 0.4, noNaN: true }), fc.double({ min: 0.6, max: 1.5, noNaN: true }), (d, a, b) => {
        const inom = nominalLoad(d);
        const [def, explicit] = each(d, ['.figure load', `.figure load from=${num(a * inom)} to=${num(b * inom)}`]);
        const { vth, rth } = dividerThevenin(d.vin, d.r1, d.r2);
        // Open (Vth) to RL: Vth − Vth·RL/(Rth + RL) = Inom·Rth exactly, since Inom = Vth/(Rth + RL).
        // Worst observed 7.7e-15 (default range) and 3.0e-14 (explicit) over FC_SEED 20261201, 1–13 and 424242; bounds 2e-14, 7.5e-14.
        expect(relErr(def!.values['load.delta']!, vth - voutAt(d, d.vin))).toBeLessThan(2e-14);
        expect(relErr(def!.values['load.rout']!, rth)).toBeLessThan(2e-14);
        expect(relErr(def!.values['load.pct']!, (100 * (vth - voutAt(d, d.vin))) / vth)).toBeLessThan(2e-14);
        // Away from nominal the resistor's actual current is not the label I, so rout ≠ Rth: derive it.
        const va = voutAt(d, d.vin, a * inom);
        const vb = voutAt(d, d.vin, b * inom);
        expect(relErr(explicit!.values['load.delta']!, va - vb)).toBeLessThan(7.5e-14);
        expect(relErr(explicit!.values['load.pct']!, (100 * (va - vb)) / va)).toBeLessThan(7.5e-14);
        expect(relErr(explicit!.values['load.rout']!, (va - vb) / ((b - a) * inom))).toBeLessThan(7.5e-14);
      }),
      RUNS,
    );
  });
});

describe('dropout of a divider', () => {
  // Vout(Vin) = Vout_nom − k·(Vnom − Vin) with k the line ratio, so Vin* = Vnom − fall/k.
  const expected = (d: Divider, fall: number) => {
    const vinStar = d.vin - fall / lineRatio(d);
    return { vin: vinStar, v: vinStar - (voutAt(d, d.vin) - fall), headroom: fall / lineRatio(d) };
  };
  let worstMv = 0;

  test('dropout.vin solves Vout(Vin*) = Vout_nom − fall (to rounding on a linear stage); dropout.v and dropout.headroom follow', () => {
    fc.assert(
      fc.property(dividerArb, fc.double({ min: 0.02, max: 0.9, noNaN: true }), (d, share) => {
        // Any fall below k·Vnom is reachable before the input reaches 0 V.
        const fall = share * lineRatio(d) * d.vin;
        const { figures } = figuresOf(netlist(d, [`.figure dropout fall=${num(fall)}`]));
        const e = expected(d, fall);
        const err = Math.abs(value(figures, 'dropout.vin') - e.vin);
        worstMv = Math.max(worstMv, err * 1e3);
        // On a linear stage the Illinois iteration lands on the root: worst observed 2.8e-14 V over FC_SEED 20261201, 1–13 and 424242; bound 7e-14 V (figures.md promises 0.1 mV).
        expect(err).toBeLessThan(7e-14);
        expect(Math.abs(value(figures, 'dropout.v') - e.v)).toBeLessThan(7e-14);
        expect(Math.abs(value(figures, 'dropout.headroom') - e.headroom)).toBeLessThan(7e-14);
      }),
      RUNS,
    );
    console.log(`[divider] worst dropout.vin error ${worstMv.toExponential(2)} mV`);
  });

  const fixed: Divider = { vin: 12, r1: 1e3, r2: 2e3, load: { kind: 'I', amps: 1e-3 } };

  test('the default fall is 100 mV, and fall=2% is 2 % of Vout_nom', () => {
    const [def, pct] = each(fixed, ['.figure dropout', '.figure dropout fall=2%']);
    // k = 2/3, Vout_nom = 8 − 1 mA·666.7 Ω = 7.333 V.
    const vnom = voutAt(fixed, 12);
    // Observed 3.6e-15 V, 0 and 6.4e-16 V; bounds 9e-15 V, 2·eps·12 V, 1.6e-15 V.
    expect(Math.abs(def!.values['dropout.vin']! - expected(fixed, 0.1).vin)).toBeLessThan(9e-15);
    expect(Math.abs(pct!.values['dropout.vin']! - expected(fixed, 0.02 * vnom).vin)).toBeLessThanOrEqual(2 * Number.EPSILON * 12);
    expect(Math.abs(pct!.values['dropout.headroom']! - (0.02 * vnom) / (2 / 3))).toBeLessThan(1.6e-15);
  });

  test('an output that does not depend on the input: dropout is not measured, the reason saying the output never falls', () => {
    const lines = ['output set by a current source', 'V1 in 0 12', 'I1 in out 1m', 'R4 out 0 1k', '.supply in=V1 out=out', '.figure dropout'];
    expect(notMeasuredReason(lines)).toMatch(/never falls/);
    // Through the library: a RailcheckError, not another exception.
    const p = prepare(parseNetlist([...lines, '.end'].join('\n')));
    if (!p.ok) throw new Error('expected the netlist to compile');
    expect(() => dropout(createBench(p.compiled), 0.1)).toThrow(RailcheckError);
  });

  test('a fall larger than the divider can give (k·Vnom) has the same reason', () => {
    // From Vout_nom = 7.333 V to Vout(0 V) = −1 mA·666.7 Ω = −0.667 V: the output can fall k·Vnom = 8 V at most.
    expect(notMeasuredReason(netlist(fixed, ['.figure dropout fall=8.1']))).toMatch(/never falls/);
    // Observed 3.9e-16 V; bound 1e-15 V.
    expect(Math.abs(value(figuresOf(netlist(fixed, ['.figure dropout fall=7.9'])).figures, 'dropout.vin') - expected(fixed, 7.9).vin)).toBeLessThan(1e-15);
  });
});

describe('library entry points', () => {
  test('lineRegulation, loadRegulation and dropout on a bench agree with the closed forms', () => {
    const p = prepare(parseNetlist([...netlist({ vin: 24, r1: 3.3e3, r2: 4.7e3, load: { kind: 'I', amps: 2e-3 } }, []), '.end'].join('\n')));
    if (!p.ok) throw new Error('expected the netlist to compile');
    const bench = createBench(p.compiled);
    const k = 4.7 / 8;
    // Observed 3.8e-16, 1.2e-16, 0, 0; bounds 1e-15, 3e-16, 2·eps·24 V, 2·eps.
    expect(relErr(lineRegulation(bench, { from: 20, to: 28 }).delta, 8 * k)).toBeLessThan(1e-15);
    expect(relErr(loadRegulation(bench).rout, par(3.3e3, 4.7e3))).toBeLessThan(3e-16);
    expect(Math.abs(dropout(bench, 0.5).level - (24 - 0.5 / k))).toBeLessThanOrEqual(2 * Number.EPSILON * 24);
    // Every figure starts from the nominal point, whatever was measured before.
    expect(relErr(lineRegulation(bench).slope!, k)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

describe('output against ref= (not ground)', () => {
  test('Vout = V(out) − V(ref): the divider R1 – R2 – R3 with RL across R2', () => {
    // Seen between out and ref: Vth = Vin·R2/(R1 + R2 + R3) = 4 V behind Rth = R2∥(R1 + R3) = 666.7 Ω.
    const { figures } = figuresOf(['floating output', 'V1 in 0 12', 'R1 in out 1k', 'R2 out ref 1k', 'R3 ref 0 1k', 'RL out ref 2k', '.supply in=V1 out=out ref=ref load=RL', '.figure line', '.figure load', '.figure ripple method=ac']);
    const shunt = par(1e3, 2e3);
    const k = shunt / (2e3 + shunt);
    // Observed 7.8e-16, 0, 0 and 1.8e-15 dB; bounds 2e-15, 2·eps, 2·eps, 4.5e-15 dB.
    expect(relErr(value(figures, 'line.slope'), k)).toBeLessThan(2e-15);
    expect(relErr(value(figures, 'load.rout'), par(1e3, 2e3))).toBeLessThanOrEqual(2 * Number.EPSILON);
    // Open RL: 4 V; with RL: 4·2k/(2k + 666.7) = 3 V.
    expect(relErr(value(figures, 'load.delta'), 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(value(figures, 'ripple.rr') - -20 * Math.log10(k))).toBeLessThan(4.5e-15);
  });
});

describe("line regulation below dropout (figures.md: 'line-below-dropout')", () => {
  const d: Divider = { vin: 12, r1: 1e3, r2: 1e3, load: { kind: 'I', amps: 1e-3 } };
  // k = 1/2: with the default 100 mV fall Vin* = 11.8 V; with fall=1 it is 10 V.
  const warned = (figs: readonly string[]): boolean => figuresOf(netlist(d, figs)).warnings.some((w) => w.code === 'line-below-dropout');

  test('from below the dropout input warns, from above it does not', () => {
    expect(warned(['.figure line from=11.75 to=13'])).toBe(true);
    expect(warned(['.figure line from=11.85 to=13'])).toBe(false);
  });

  test("the dropout figure's own fall sets the dropout input", () => {
    expect(warned(['.figure line from=10.5 to=13', '.figure dropout fall=1'])).toBe(false);
    expect(warned(['.figure line from=9.9 to=13', '.figure dropout fall=1'])).toBe(true);
  });
});
