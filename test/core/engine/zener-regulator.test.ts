/**
 * Zener shunt regulator (a weather-station sensor rail: 12 V in, 470 Ω,
 * 5.1 V Zener, 2.2 kΩ load) against the textbook design relations, and
 * against the models.md diode equations solved independently by bisection.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist, type RunReport } from '@railcheck/core';
import { thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';

const VIN = 12;
const RS = 470;
const RL = 2200;
const BV = 5.1;
const IBV = 1e-3;
const NBV = 1;
const IS = 1e-14;
const VT = thermalVoltage(T_NOM);
/** engine.md: 1e-12 S stays across every junction in the final solution. */
const GMIN = 1e-12;

const MODEL = `.model zref D (IS=${IS} BV=${BV} IBV=${IBV} NBV=${NBV})`;
const regulator = (vin: number, rs = RS, extra = ''): string =>
  `sensor rail shunt regulator\nVIN in 0 ${vin}\nRS in out ${rs}\nDZ 0 out zref\nRL out 0 ${RL}\n${MODEL}\n${extra}\n.op\n`;

function run(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

/** Current through the Zener from cathode (out) to anode (ground) at Vout, models.md plus the junction gmin. */
function zenerCurrent(vout: number): number {
  const v = -vout;
  const forward = IS * Math.expm1(v / VT);
  const breakdown = IBV * Math.exp(-(v + BV) / (NBV * VT));
  return -(forward - breakdown + GMIN * v);
}

/** Vout solving (Vin − V)/Rs = V/RL + Iz(V), by bisection (monotone in V): no Newton, no limiting. */
function referenceVout(vin: number, rs = RS): number {
  const f = (v: number): number => (vin - v) / rs - v / RL - zenerCurrent(v);
  let lo = 0;
  let hi = vin;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('operating point', () => {
  const op = run(regulator(VIN)).operatingPoints[0]!;
  const vout = op.nodes['out']!;
  // The Zener's passive-convention current (anode 0 → cathode out) is negative in breakdown.
  const iz = -op.currents['DZ']!;

  test('Iz ≈ (Vin − Vz)/Rs − Vz/RL with Vz = BV (textbook, from memory)', () => {
    const textbook = (VIN - BV) / RS - BV / RL;
    // Vz sits NBV·Vt·ln(Iz/IBV) ≈ 65 mV above BV, which the textbook neglects: ~1.5 % here.
    expect(Math.abs(iz - textbook) / textbook).toBeLessThan(0.03);
  });

  test('Vout and Iz as the models.md equations solved by bisection', () => {
    const ref = referenceVout(VIN);
    // Observed 1.6e-15 and 3.1e-13 relative; bounds 4e-15 and 8e-13.
    expect(Math.abs(vout - ref) / ref).toBeLessThan(4e-15);
    expect(Math.abs(iz - (zenerCurrent(ref) - GMIN * ref)) / iz).toBeLessThan(8e-13);
    console.log(`zener regulator: Vout ${vout.toFixed(6)} V vs bisection ${ref.toFixed(6)} V (Δ ${Math.abs(vout - ref).toExponential(2)} V), Iz ${(iz * 1e3).toFixed(4)} mA`);
  });

  test('Vout ≈ BV + NBV·Vt·ln(Iz/IBV), the breakdown exponential inverted (models.md)', () => {
    // Observed 2.1e-14 V; bound 5e-14 V.
    expect(Math.abs(vout - (BV + NBV * VT * Math.log(iz / IBV)))).toBeLessThan(5e-14);
  });
});

describe('line regulation', () => {
  test('ΔVout/ΔVin ≈ (rz∥RL)/(Rs + rz∥RL), rz = NBV·Vt/Iz (textbook, from memory), from a .dc sweep', () => {
    const report = run(regulator(VIN, RS, `.dc VIN ${VIN - 0.1} ${VIN + 0.1} 0.1`));
    const sweep = report.sweeps[0]!;
    expect(sweep.values).toHaveLength(3);
    const out = sweep.nodes['out']!;
    const measured = (out[2]! - out[0]!) / 0.2;
    const iz = -report.operatingPoints[0]!.currents['DZ']!;
    const rz = (NBV * VT) / iz;
    const par = (rz * RL) / (rz + RL);
    const predicted = par / (RS + par);
    // The breakdown exponential is the whole small-signal story (IS and gmin add ~1e-12 S to 1/rz),
    // and the central difference over ±0.1 V is second-order accurate: ~1e-4 is expected (observed
    // 9.9e-5; bound 2.5e-4).
    expect(Math.abs(measured - predicted) / predicted).toBeLessThan(2.5e-4);
    // With the textbook estimate of Iz (Vz = BV) the prediction is still within a few percent.
    const izTextbook = (VIN - BV) / RS - BV / RL;
    const rzT = (NBV * VT) / izTextbook;
    const parT = (rzT * RL) / (rzT + RL);
    expect(Math.abs(measured - parT / (RS + parT)) / predicted).toBeLessThan(0.05);
    console.log(`zener line regulation: measured ${(measured * 1e3).toFixed(4)} mV/V, rz∥RL/(Rs + rz∥RL) = ${(predicted * 1e3).toFixed(4)} mV/V`);
  });

  test('the same from two separate operating points', () => {
    const lo = run(regulator(VIN - 0.5)).operatingPoints[0]!.nodes['out']!;
    const hi = run(regulator(VIN + 0.5)).operatingPoints[0]!.nodes['out']!;
    const reference = (referenceVout(VIN + 0.5) - referenceVout(VIN - 0.5)) / 1;
    // Observed 0: each end agrees with its bisection to 4e-15 relative (above), so the difference
    // to 2·4e-15·Vout.
    expect(Math.abs((hi - lo) - reference)).toBeLessThan(2 * 4e-15 * hi);
  });

  test('below breakdown the Zener is open and the stage is a plain divider (textbook)', () => {
    const op = run(regulator(5)).operatingPoints[0]!;
    // 5 V·2.2k/2.67k = 4.12 V, ~38 NBV·Vt short of BV: the breakdown term is ~1e-20 A.
    expect(op.nodes['out']).toBeCloseTo((5 * RL) / (RS + RL), 8);
  });
});

describe('Vout at IBV is BV (models.md: the breakdown term is exactly IBV at V = −BV)', () => {
  test('driven by a current source of IBV', () => {
    const op = run(`zener at IBV\nIZ 0 out ${IBV}\nDZ 0 out zref\n${MODEL}\n.op\n`).operatingPoints[0]!;
    // IS and gmin·BV shift the breakdown current by ~5 pA out of 1 mA: ~1e-10 V (observed 2.6e-11
    // relative; bound 6.5e-11).
    expect(Math.abs(op.nodes['out']! - BV) / BV).toBeLessThan(6.5e-11);
  });

  test('in the regulator, with Rs chosen so that Iz = IBV', () => {
    const rs = (VIN - BV) / (IBV + BV / RL);
    const op = run(regulator(VIN, rs)).operatingPoints[0]!;
    // Observed 2.5e-11 and 5.0e-9 relative; bounds 6.5e-11 and 1.25e-8.
    expect(Math.abs(op.nodes['out']! - BV) / BV).toBeLessThan(6.5e-11);
    expect(Math.abs(-op.currents['DZ']! - IBV) / IBV).toBeLessThan(1.25e-8);
  });
});
