/**
 * Operating points at several `.temp` temperatures: a current-biased diode
 * (a weather-station temperature sensor) against the models.md IS(T) and
 * Shockley equations evaluated in the test, and a Zener's breakdown voltage
 * against BV(T) = BV·(1 + TBV·(T − Tnom)).
 */
import { describe, expect, test } from 'vitest';
import { runNetlist, type RunReport } from '@railcheck/core';
import { thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';

const TEMPS = [-40, 27, 85];
const kelvin = (celsius: number): number => celsius + 273.15;
/** engine.md: 1e-12 S stays across every junction. */
const GMIN = 1e-12;

function run(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

describe('current-biased sensor diode at −40, 27 and 85 °C', () => {
  const IBIAS = 1e-3;
  const m = { IS: 2e-14, N: 1.05, EG: 1.11, XTI: 3 };
  const report = run(
    `sensor diode\nIB 0 a ${IBIAS}\nD1 a 0 dsense\n.model dsense D (IS=${m.IS} N=${m.N} EG=${m.EG} XTI=${m.XTI})\n.temp ${TEMPS.join(' ')}\n.op\n`,
  );

  /** models.md: IS(T) = IS·(T/Tnom)^(XTI/N)·exp((EG/(N·Vt(T)))·(T/Tnom − 1)). */
  const isAt = (t: number): number => m.IS * (t / T_NOM) ** (m.XTI / m.N) * Math.exp((m.EG / (m.N * thermalVoltage(t))) * (t / T_NOM - 1));

  /** V = n·Vt(T)·ln(I/IS(T) + 1), with the junction's gmin share I = IBIAS − gmin·V (fixed point, converges at once). */
  const voltageAt = (t: number): number => {
    const nVt = m.N * thermalVoltage(t);
    let v = 0.6;
    for (let k = 0; k < 20; k++) v = nVt * Math.log1p((IBIAS - GMIN * v) / isAt(t));
    return v;
  };

  test('one operating point per temperature, in .temp order', () => {
    expect(report.operatingPoints.map((op) => op.temperature)).toEqual(TEMPS);
  });

  test('V(T) as the models.md equations', () => {
    const errs = report.operatingPoints.map((op) => {
      const want = voltageAt(kelvin(op.temperature));
      const got = op.nodes['a']!;
      // Observed 1.4e-12 relative at most; bound 3.5e-12.
      expect(Math.abs(got - want) / want, `${op.temperature} °C`).toBeLessThan(3.5e-12);
      return Math.abs(got - want);
    });
    console.log(`sensor diode: V = ${report.operatingPoints.map((op) => op.nodes['a']!.toFixed(5)).join(', ')} V; max |Δ| vs models.md ${Math.max(...errs).toExponential(2)} V`);
  });

  test('the forward drop falls by about 2 mV/K (common practice, no source)', () => {
    const v = report.operatingPoints.map((op) => op.nodes['a']!);
    const slope = (v[2]! - v[0]!) / (85 - -40);
    expect(slope).toBeGreaterThan(-2.5e-3);
    expect(slope).toBeLessThan(-1.5e-3);
  });

  test('the temperature matters: V(85 °C) differs from the 27 °C value by far more than the tolerance', () => {
    const v27 = report.operatingPoints[1]!.nodes['a']!;
    const v85 = report.operatingPoints[2]!.nodes['a']!;
    expect(Math.abs(v85 - v27)).toBeGreaterThan(0.05);
  });
});

describe('Zener breakdown voltage with TBV', () => {
  const BV = 5.1;
  const TBV = 5e-4;
  const IBV = 1e-3;
  const report = run(`reference zener\nIZ 0 k ${IBV}\nDZ 0 k zref\n.model zref D (BV=${BV} IBV=${IBV} TBV=${TBV})\n.temp ${TEMPS.join(' ')}\n.op\n`);

  test('at IBV the Zener sits at BV·(1 + TBV·(T − Tnom)) (models.md)', () => {
    for (const op of report.operatingPoints) {
      const want = BV * (1 + TBV * (kelvin(op.temperature) - T_NOM));
      // At exactly IBV the breakdown exponent is zero whatever Vt is; IS(T) and gmin add < 1e-10 of IBV.
      // Observed 1.3e-10 relative at most; bound 3.2e-10.
      expect(Math.abs(op.nodes['k']! - want) / want, `${op.temperature} °C`).toBeLessThan(3.2e-10);
    }
  });

  test('the shift from 27 to 85 °C is BV·TBV·58 K = 0.1479 V', () => {
    const shift = report.operatingPoints[2]!.nodes['k']! - report.operatingPoints[1]!.nodes['k']!;
    // Observed 5.3e-10 V; bound 1.3e-9 V.
    expect(Math.abs(shift - BV * TBV * 58)).toBeLessThan(1.3e-9);
  });
});
