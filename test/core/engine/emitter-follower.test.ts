/**
 * NPN emitter follower (a bench instrument's reference buffer): the output
 * sits one junction drop below the base and follows it with a gain just
 * under one. References: the rule of thumb for silicon junction drops, the
 * Ebers-Moll equations of models.md solved by hand in the test, and the
 * follower's small-signal gain RE/(RE + re + RB/(β + 1)), re = Vt/Ie (Gray
 * and Meyer, Analysis and Design of Analog Integrated Circuits, follower
 * chapter; from memory), which is also what differentiating the hand
 * solution gives.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, prepare, runNetlist, type RunReport } from '@railcheck/core';
import { operatingPoint } from '@railcheck/core/internal';
import { thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';
import { kclImbalance } from '../../helpers/laws.js';

const VT = thermalVoltage(T_NOM);
const IS = 1e-14;
const BF = 100;
const RE = 1000;
const VCC = 12;
const MODEL = `.model qbuf NPN (IS=${IS} BF=${BF})`;

function run(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

/**
 * Forward-active solution by hand for a base fed from `vth` through `rth`:
 * vth = rth·Icc/BF + Vt·ln(Icc/IS + 1) + RE·Icc·(1 + 1/BF), by bisection on
 * Icc. Neglected: the B-C junction's −IS and gmin·Vbc (~1e-11 A against mA).
 */
function handSolution(vth: number, rth: number): { ie: number; vb: number; ve: number; vbe: number } {
  const f = (icc: number): number => rth * (icc / BF) + VT * Math.log1p(icc / IS) + RE * icc * (1 + 1 / BF) - vth;
  let lo = 0;
  let hi = vth / RE;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (f(mid) < 0) lo = mid;
    else hi = mid;
  }
  const icc = (lo + hi) / 2;
  const ie = icc * (1 + 1 / BF);
  return { ie, vb: vth - rth * (icc / BF), ve: RE * ie, vbe: VT * Math.log1p(icc / IS) };
}

const follower = (vb: number, rb: number, extra = ''): string =>
  `reference buffer\nVCC vcc 0 ${VCC}\nVB drive 0 ${vb}\nRB drive b ${rb}\nQ1 vcc b e qbuf\nRE e 0 ${RE}\n${MODEL}\n${extra}\n.op\n`;

describe('stiffly driven base', () => {
  const report = run(follower(3, 1e-3, '.dc VB 2.99 3.01 0.01'));
  const op = report.operatingPoints[0]!;

  test('output one junction drop below the base: 0.6–0.7 V for silicon at mA (common practice, no source)', () => {
    const drop = op.nodes['b']! - op.nodes['e']!;
    expect(op.nodes['e']! / RE).toBeGreaterThan(1e-3);
    expect(drop).toBeGreaterThan(0.6);
    expect(drop).toBeLessThan(0.7);
  });

  test('operating point as the hand solution of the Ebers-Moll equations', () => {
    const hand = handSolution(3, 1e-3);
    // Observed 2.2e-12 and 2.0e-10 relative; bounds 5.5e-12 and 5e-10.
    expect(Math.abs(op.nodes['e']! - hand.ve) / hand.ve).toBeLessThan(5.5e-12);
    expect(Math.abs(-op.currents['Q1.e']! - hand.ie) / hand.ie).toBeLessThan(5e-10);
  });

  test('gain dVe/dVb ≥ 0.98 with RE ≫ 1/gm, and equal to RE/(RE + re)', () => {
    const sweep = report.sweeps[0]!;
    const ve = sweep.nodes['e']!;
    const gain = (ve[2]! - ve[0]!) / 0.02;
    expect(gain).toBeGreaterThanOrEqual(0.98);
    const re = VT / handSolution(3, 1e-3).ie;
    // The central difference over ±10 mV and the neglected base terms: observed 7.4e-8; bound 1.8e-7.
    expect(Math.abs(gain - RE / (RE + re))).toBeLessThan(1.8e-7);
    console.log(`emitter follower, stiff base: gain ${gain.toFixed(7)} vs RE/(RE + re) ${(RE / (RE + re)).toFixed(7)} (Δ ${Math.abs(gain - RE / (RE + re)).toExponential(1)})`);
  });

  test('KCL holds at every node of the transistor circuit', () => {
    const prepared = prepare(parseNetlist(follower(3, 1e-3)));
    if (!prepared.ok) throw new Error('rejected');
    operatingPoint(prepared.compiled, 27);
    const kcl = kclImbalance(prepared.compiled);
    // Reported terminal currents exclude the 1e-12 S junction gmin: ~1e-11 A at a 9 V reverse B-C bias.
    expect(kcl.worst).toBeLessThan(2e-11);
  });
});

describe('base fed through 10 kΩ', () => {
  const RB = 10e3;

  test('gain from the source is RE/(RE + re + RB/(β + 1))', () => {
    const report = run(follower(3, RB, '.dc VB 2.99 3.01 0.01'));
    const ve = report.sweeps[0]!.nodes['e']!;
    const gain = (ve[2]! - ve[0]!) / 0.02;
    const hand = handSolution(3, RB);
    const predicted = RE / (RE + VT / hand.ie + RB / (BF + 1));
    // Observed 6.6e-8 and 3.6e-8 relative; bounds 1.6e-7 and 9e-8.
    expect(Math.abs(gain - predicted)).toBeLessThan(1.6e-7);
    expect(Math.abs(report.operatingPoints[0]!.nodes['e']! - hand.ve) / hand.ve).toBeLessThan(9e-8);
    console.log(`emitter follower, 10 kΩ base feed: gain ${gain.toFixed(7)} vs formula ${predicted.toFixed(7)} (Δ ${Math.abs(gain - predicted).toExponential(1)})`);
  });
});

describe('divider-biased base', () => {
  test('47 kΩ/22 kΩ from 12 V: the hand solution of the Thévenin-fed base, and Vbe in 0.6–0.7 V', () => {
    const op = run(`divider buffer\nVCC vcc 0 ${VCC}\nR1 vcc b 47k\nR2 b 0 22k\nQ1 vcc b e qbuf\nRE e 0 ${RE}\n${MODEL}\n.op\n`).operatingPoints[0]!;
    const vth = (VCC * 22e3) / 69e3;
    const rth = (47e3 * 22e3) / 69e3;
    const hand = handSolution(vth, rth);
    // Observed 3.0e-8 and 3.7e-8 relative; bounds 7.5e-8 and 9e-8.
    expect(Math.abs(op.nodes['b']! - hand.vb) / hand.vb).toBeLessThan(7.5e-8);
    expect(Math.abs(op.nodes['e']! - hand.ve) / hand.ve).toBeLessThan(9e-8);
    const vbe = op.nodes['b']! - op.nodes['e']!;
    expect(vbe).toBeGreaterThan(0.6);
    expect(vbe).toBeLessThan(0.7);
  });
});
