/**
 * The curves and waveforms behind the figures (measure/curves.ts), on
 * linear stages whose every point has a closed form: a source V behind a
 * resistance R1 into R2 with a current-source load (Thévenin: Vout =
 * V·R2/(R1+R2) − I·R1‖R2 at each input and load), and the same with a
 * capacitor C across R2, whose rejection is that of a first-order low-pass,
 * −20·log10|G/(1 + jωτ)| with G = R2/(R1+R2), τ = (R1‖R2)·C, and whose
 * steady-state response to a sine is the phasor G/(1 + jωτ) of it (circuit
 * theory of any textbook, e.g. Hayt and Kemmerly, "Engineering Circuit
 * Analysis", sinusoidal steady state; from memory). The dip waveform's
 * input follows the dip's corners exactly (figures.md, sag).
 */
import { describe, expect, test } from 'vitest';
import { createBench, measureCurves, runNetlist } from '@railcheck/core';
import { figureCurves } from '@railcheck/core/internal';

const V = 12;
const R1 = 100;
const R2 = 400;
const I = 0.02;
const G = R2 / (R1 + R2);
const RP = (R1 * R2) / (R1 + R2);

function benchOf(lines: readonly string[]) {
  const r = runNetlist([...lines, '.end', ''].join('\n'));
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return { bench: createBench(r.report.compiled), flat: r.report.compiled.flat };
}

const divider = (extra: readonly string[], c = ''): string[] => [
  'sensor rail divider', `V1 in 0 ${V}`, `R1 in out ${R1}`, `R2 out 0 ${R2}`, ...(c ? [`C1 out 0 ${c}`] : []), `ILOAD out 0 ${I}`, '.supply in=V1 out=out load=ILOAD', ...extra,
];

describe('line and load curves of a divider (Thévenin at every point)', () => {
  test('every point on Vout = G·Vin − I·R1‖R2 and Vout = G·V − I·R1‖R2; the nominal point marked', () => {
    const { bench, flat } = benchOf(divider(['.figure line', '.figure load']));
    const c = figureCurves(bench, flat.figures);
    expect(c.line!.x.length).toBeGreaterThan(20);
    // A divider's output falls in proportion: it is 100 mV (the default fall) below nominal at Vin = V − 0.1/G, and the
    // curve goes on down past that by 0.6 of the headroom (docs/plots.md).
    const d = V - 0.1 / G;
    expect(c.line!.dropout!.x).toBeCloseTo(d, 9);
    expect(c.line!.dropout!.y).toBeCloseTo(G * V - I * RP - 0.1, 12);
    expect(Math.min(...c.line!.x)).toBeCloseTo(d - 0.6 * (V - d), 9);
    let worst = 0;
    c.line!.x.forEach((vin, k) => (worst = Math.max(worst, Math.abs(c.line!.y[k]! - (G * vin - I * RP)))));
    c.load!.x.forEach((i, k) => (worst = Math.max(worst, Math.abs(c.load!.y[k]! - (G * V - i * RP)))));
    // Linear DC solutions: observed 3.6e-15 V; bound 1e-14 V.
    expect(worst).toBeLessThan(1e-14);
    expect(c.load!.nominal!.x).toBe(I);
    expect(c.load!.nominal!.y).toBeCloseTo(G * V - I * RP, 12);
    expect(Math.max(...c.load!.x)).toBeCloseTo(1.5 * I, 15);
  });
});

describe('rejection curve and ripple waveform of an R–C low-pass', () => {
  const C = 100e-6;
  const tau = RP * C;
  const { bench, flat } = benchOf(divider(['.figure ripple freq=100 amp=0.1'], String(C)));
  const c = figureCurves(bench, flat.figures);

  test('rejection at every frequency is −20·log10|G/(1 + jωτ)|, 10 Hz to 1 MHz, the ripple frequency marked', () => {
    const r = c.rejection!;
    expect(r.marked).toBe(100);
    expect(r.x[0]).toBeCloseTo(10, 9);
    expect(r.x[r.x.length - 1]).toBeCloseTo(1e6, 3);
    let worst = 0;
    r.x.forEach((f, k) => {
      const w = 2 * Math.PI * f * tau;
      worst = Math.max(worst, Math.abs(r.y[k]! - -20 * Math.log10(G / Math.hypot(1, w))));
    });
    // Observed 1.4e-14 dB (the complex solve); bound 4e-14 dB.
    expect(worst).toBeLessThan(4e-14);
  });

  test('the ripple waveform: input a sine of 0.1 V on 12 V, output its phasor G/(1 + jωτ) at periodic steady state', () => {
    const w = c.ripple!;
    expect(w.hertz).toBe(100);
    expect(w.time[w.time.length - 1]).toBeCloseTo(0.03, 9);
    const omega = 2 * Math.PI * 100;
    const gain = G / Math.hypot(1, omega * tau);
    const phase = -Math.atan(omega * tau);
    let worstIn = 0;
    let worstOut = 0;
    // The recorded times start at the settled cycle's start, a whole number of periods after t = 0: the sine's phase is 0 there.
    w.time.forEach((t, k) => {
      worstIn = Math.max(worstIn, Math.abs(w.input[k]! - (V + 0.1 * Math.sin(omega * t))));
      worstOut = Math.max(worstOut, Math.abs(w.output[k]! - (G * V - I * RP + 0.1 * gain * Math.sin(omega * t + phase))));
    });
    // The input is the source itself: observed 1.8e-15 V; bound 6e-15 V. The output: the transient's truncation error on
    // its ripple, observed 1.26e-6 V; bound 3.5e-6 V.
    expect(worstIn).toBeLessThan(6e-15);
    expect(worstOut).toBeLessThan(3.5e-6);
  });
});

describe('the dip waveform', () => {
  test('the input follows the dip corners (30 % for 20 ms, 1 ms edges); the resistive divider output follows G·Vin − I·R1‖R2', () => {
    const { bench, flat } = benchOf(divider(['.figure sag depth=30% dur=20m edge=1m']));
    const c = figureCurves(bench, flat.figures);
    const w = c.sag!;
    expect(w.depth).toBeCloseTo(0.3, 15);
    // Times from the start of the dip: the fall ends at 1 ms, the recovery starts at 21 ms and ends at 22 ms.
    expect(w.corners.map((t) => Number(t.toFixed(12)))).toEqual([0, 0.001, 0.021, 0.022]);
    const vin = (t: number): number => (t <= 0 ? V : t < 0.001 ? V - (0.3 * V * t) / 0.001 : t <= 0.021 ? 0.7 * V : t < 0.022 ? 0.7 * V + (0.3 * V * (t - 0.021)) / 0.001 : V);
    let worst = 0;
    w.time.forEach((t, k) => {
      worst = Math.max(worst, Math.abs(w.input[k]! - vin(t)), Math.abs(w.output[k]! - (G * w.input[k]! - I * RP)));
    });
    // Piecewise-linear input and a resistive stage: observed 1.2e-14 V; bound 4e-14 V.
    expect(worst).toBeLessThan(4e-14);
    expect(Math.max(...w.time)).toBeGreaterThan(0.022);
  });
});

describe('asking for some of the curves', () => {
  test('only the kinds asked for are measured; a kind that is not one is a bad argument', () => {
    const { bench, flat } = benchOf(divider(['.figure line', '.figure ripple freq=100 amp=0.1'], '100u'));
    const c = figureCurves(bench, flat.figures, ['ripple']);
    expect([c.line, c.load, c.rejection, c.sag]).toEqual([undefined, undefined, undefined, undefined]);
    expect(c.ripple!.time.length).toBeGreaterThan(0);
    const r = runNetlist([...divider(['.figure line']), '.end', ''].join('\n'));
    if (!r.ok) throw new Error('the divider does not run');
    const bad = measureCurves(r.report.compiled, { kinds: ['nope' as never] });
    expect(!bad.ok && bad.errors[0]!.code).toBe('bad-argument');
  });
});
