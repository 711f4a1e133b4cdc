/**
 * Temperature scaling against the models.md formulas (written out in
 * reference.ts) across the industrial range, and the resulting junction
 * temperature coefficient.
 */

import { describe, expect, it } from 'vitest';
import { bjtCurrents, bjtModel, createDiode, diodeCurrent, diodeModel, scaleBjtModel, scaleDiodeModel } from '@railcheck/devices';
import { DeviceHarness } from '../helpers/device-harness.js';
import { kelvinOf, refBjtIs, refDiodeBv, refDiodeG, refDiodeI, refDiodeIs, vt } from './reference.js';

const CELSIUS = [-40, 0, 27, 85, 125];

describe('diode temperature scaling (models.md)', () => {
  const m = diodeModel(new Map([['IS', 2e-14], ['N', 1.3], ['XTI', 3], ['EG', 1.11], ['BV', 6.2], ['TBV', 4e-4]]));

  it.each(CELSIUS)('IS(T) and BV(T) at %d °C', (c) => {
    const T = kelvinOf(c);
    const s = scaleDiodeModel(m, T);
    // Observed 0 (the same formula, models.md); bounds 2·eps·|value|.
    expect(Math.abs(s.IS / refDiodeIs(m, T) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(s.BV! - (refDiodeBv(m, T) ?? NaN))).toBeLessThanOrEqual(2 * Number.EPSILON * s.BV!);
  });

  it('is the identity at 27 °C, and IS grows with temperature', () => {
    expect(scaleDiodeModel(m, kelvinOf(27)).IS).toBe(m.IS);
    const is = CELSIUS.map((c) => scaleDiodeModel(m, kelvinOf(c)).IS);
    for (let k = 1; k < is.length; k++) expect(is[k]).toBeGreaterThan(is[k - 1] ?? Infinity);
  });

  it.each(CELSIUS)('setTemperature(%d °C) makes load stamp the scaled equations', (c) => {
    const T = kelvinOf(c);
    const d = createDiode('D1', 1, 0, m, 1);
    d.setTemperature(T);
    const hz = new DeviceHarness(2, [d]);
    for (const v of [0.55, -3, -6.4]) {
      hz.setX({ 1: v });
      hz.settle();
      const ref = refDiodeI(v, m, T, 1);
      // Observed 2.3e-14 of the scale at most; bound 5.7e-14.
      expect(Math.abs((hz.residual()[1] ?? NaN) - ref.i)).toBeLessThan(5.7e-14 * (Math.abs(ref.fwd) + ref.bd + refDiodeIs(m, T)));
      // Observed 2.2e-16; bound 5.5e-16.
      expect(Math.abs(hz.entry(1, 1) / refDiodeG(v, m, T, 1) - 1)).toBeLessThan(5.5e-16);
    }
  });
});

describe('transistor temperature scaling (models.md)', () => {
  const m = bjtModel('npn', new Map([['IS', 5e-15], ['XTI', 3], ['EG', 1.11], ['BF', 150], ['BR', 2], ['XTB', 1.5]]));

  it.each(CELSIUS)('IS(T), BF(T), BR(T) at %d °C', (c) => {
    const T = kelvinOf(c);
    const s = scaleBjtModel(m, T);
    const r = T / kelvinOf(27);
    // Observed 0 (models.md); bounds 2·eps.
    expect(Math.abs(s.IS / refBjtIs(m, T) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(s.BF / (150 * r ** 1.5) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(s.BR / (2 * r ** 1.5) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

/** Junction voltage (V) that carries `amps`, by bisection on a monotone current function. */
function voltageAt(amps: number, current: (v: number) => number): number {
  let lo = 0;
  let hi = 1.5;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (current(mid) < amps) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('junction voltage temperature coefficient at constant current', () => {
  // Differentiating V = N·Vt·ln(I/IS(T)) with the models.md IS(T) (derived here by hand):
  // diode, whose IS(T) carries 1/N in both exponents: dV/dT = (V − XTI·Vt − EG)/T;
  // transistor, whose IS(T) has no 1/N: dVbe/dT = (Vbe − NF·(XTI·Vt + EG))/T.
  it('diode defaults at 1 mA: matches the derivative of the models.md law, and is about −2 mV/K', () => {
    const m = diodeModel(new Map());
    const T = kelvinOf(27);
    const v = (kelvin: number): number => voltageAt(1e-3, (x) => diodeCurrent(x, m, kelvin, 1).i);
    const tc = (v(T + 0.5) - v(T - 0.5)) / 1;
    const analytic = (v(T) - m.XTI * vt(T) - m.EG) / T;
    // Central difference over ±0.5 K against the analytic derivative: observed 6.7e-8; bound 1.7e-7.
    expect(Math.abs(tc / analytic - 1)).toBeLessThan(1.7e-7);
    // About −2 mV/K for a silicon junction: common practice, no source.
    expect(tc).toBeGreaterThan(-2.4e-3);
    expect(tc).toBeLessThan(-1.6e-3);
  });

  it('silicon-like transistor (IS = 1e-14 A) at 100 µA: dVbe/dT = (Vbe − NF·(XTI·Vt + EG))/T ≈ −2 mV/K', () => {
    const m = bjtModel('npn', new Map([['IS', 1e-14]]));
    const T = kelvinOf(27);
    const vbe = (kelvin: number): number => voltageAt(100e-6, (x) => bjtCurrents(x, 0, m, kelvin, 1).ic);
    const tc = (vbe(T + 0.5) - vbe(T - 0.5)) / 1;
    const analytic = (vbe(T) - m.NF * (m.XTI * vt(T) + m.EG)) / T;
    // Observed 6.1e-8; bound 1.5e-7.
    expect(Math.abs(tc / analytic - 1)).toBeLessThan(1.5e-7);
    // About −2 mV/K: common practice, no source.
    expect(tc).toBeGreaterThan(-2.4e-3);
    expect(tc).toBeLessThan(-1.6e-3);
  });
});
