/**
 * examples/railway-transformer-follower.cir: a sine-fed bridge, reservoir
 * and Zener follower, every figure at periodic steady state (figures.md,
 * "Stages fed from a transformer secondary"). Run once; the checks are
 * the handbook estimate of reservoir ripple, the symmetry of the bridge,
 * and the follower's DC equations solved independently (hand-stages.ts) at
 * the reservoir's mean voltage.
 */
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { RunReport } from '@railcheck/core';
import { emitterFollower, type HandStage } from './hand-stages.js';
import { element, numberOf, readExample, valueOf } from './netlist-values.js';
import { Ledger, figure, rel, runExample } from './support.js';

const FILE = 'railway-transformer-follower.cir';
const values = readExample(FILE);
/** `VSEC w b sin(0 17 50)`: amplitude (V) and frequency (Hz) as written. */
const VPEAK = numberOf(element(values, 'VSEC').tokens[5]!);
const FREQ = numberOf(element(values, 'VSEC').tokens[6]!);

let report: RunReport;
let voutNominal: number;
/** Reservoir mean: trough (Vout + headroom.min) plus half the swing, the sawtooth approximation (common practice). */
let vresMean: number;
let follower: HandStage;
const ledger = new Ledger(`${FILE}: railcheck vs estimates and the independent follower solution`);

beforeAll(() => {
  report = runExample(FILE);
  // figures.md: line.pct = 100·line.delta/Vout_nom.
  voutNominal = (100 * figure(report, 'line.delta')) / figure(report, 'line.pct');
  vresMean = voutNominal + figure(report, 'headroom.min') + figure(report, 'ripple.feed_pp') / 2;
  follower = emitterFollower(values, { source: 'VSEC', bias: 'RB', reference: ['DZ'], pass: 'Q1', bleed: 'RBLEED', load: 'ILOAD', input: 'res' }, 'zener', vresMean);
});
afterAll(() => ledger.print());

describe('sine-fed follower: periodic steady state and the definitions', () => {
  test('every figure asked for exists (the periodic steady state was reached)', () => {
    for (const n of ['line.delta', 'line.pct', 'load.delta', 'load.pct', 'load.rout', 'ripple.out_pp', 'ripple.feed_pp', 'ripple.rr', 'dropout.ratio', 'dropout.headroom', 'headroom.min', 'efficiency']) {
      expect(Number.isFinite(figure(report, n))).toBe(true);
    }
    ledger.note(`Vout_nom (mean) = ${voutNominal.toFixed(4)} V; reservoir mean estimate ${vresMean.toFixed(3)} V`);
  });

  test('reservoir ripple against ΔV ≈ I/(2·f·C) for a full-wave bridge: 0.6 … 1.1 × the estimate', () => {
    // Horowitz and Hill, The Art of Electronics, ch. 1 (from memory): the
    // reservoir discharges at the load current for about a half period
    // between peaks; the estimate overstates, since the capacitor recharges
    // for part of that time. I is what the reservoir feeds: the load, the
    // bleeder and the Zener's share of the RB current.
    const zener = follower.nominal.iref;
    const i = valueOf(values, 'ILOAD') + voutNominal / valueOf(values, 'RBLEED') + zener;
    const estimate = i / (2 * FREQ * valueOf(values, 'CRES'));
    const ratio = figure(report, 'ripple.feed_pp') / estimate;
    ledger.add('ripple.feed_pp vs I/2fC', figure(report, 'ripple.feed_pp'), estimate, `(I = ${(i * 1e3).toFixed(1)} mA; ratio ${ratio.toFixed(3)})`);
    expect(ratio).toBeGreaterThanOrEqual(0.6);
    expect(ratio).toBeLessThanOrEqual(1.1);
  });

  test('line.pct small and positive; dropout.ratio in (0, 1); headroom.min > 0; efficiency in (0, 1)', () => {
    expect(figure(report, 'line.pct')).toBeGreaterThan(0);
    expect(figure(report, 'line.pct')).toBeLessThan(2);
    expect(figure(report, 'dropout.ratio')).toBeGreaterThan(0);
    expect(figure(report, 'dropout.ratio')).toBeLessThan(1);
    expect(figure(report, 'headroom.min')).toBeGreaterThan(0);
    expect(figure(report, 'efficiency')).toBeGreaterThan(0);
    expect(figure(report, 'efficiency')).toBeLessThan(1);
  });

  // The four bridge diodes carry the same current shape half a period apart (symmetry of the bridge
  // under a sine): observed 2.0e-5 relative; bound 5e-5.
  test('dissipation: every value positive, the four bridge diodes alike', () => {
    const pd = Object.entries(report.figures!.values).filter(([k]) => k.startsWith('pd.'));
    expect(pd.map(([k]) => k).sort()).toEqual(['pd.D1', 'pd.D2', 'pd.D3', 'pd.D4', 'pd.Q1', 'pd.RB', 'pd.RBLEED', 'pd.RWIND', 'pd.DZ'].sort());
    for (const [, p] of pd) expect(p).toBeGreaterThan(0);
    const bridge = ['pd.D1', 'pd.D2', 'pd.D3', 'pd.D4'].map((n) => figure(report, n));
    const mean = bridge.reduce((a, b) => a + b, 0) / 4;
    for (const p of bridge) expect(rel(p, mean)).toBeLessThan(5e-5);
  });
});

describe('sine-fed follower against the independent follower solution at the reservoir mean', () => {
  // The output ripple is millivolts and the follower is smooth, so its mean
  // output is its DC output at the reservoir's mean voltage, up to the
  // error of the sawtooth estimate of that mean (a tenth of a volt at most,
  // times the follower's line slope of about 0.02: a few millivolts).
  test('mean output vs the DC follower at the reservoir mean', () => {
    // Observed 7.1e-5 V; bound 1.8e-4 V.
    ledger.add('Vout_nom vs DC follower', voutNominal, follower.nominal.vout, '(abs ≤ 0.18 mV)');
    expect(Math.abs(voutNominal - follower.nominal.vout)).toBeLessThan(1.8e-4);
  });

  test('line.delta vs the follower slope times the move of the reservoir (0.2 × peak)', () => {
    // The reservoir's peak follows the secondary's less two nearly constant
    // diode drops, and its ripple is set by the load, so its mean moves by
    // about (1.1 − 0.9)·Vpeak (common practice, no source).
    const h = 0.1;
    const slope = (follower.solve(vresMean + h, follower.loadNominal).vout - follower.solve(vresMean - h, follower.loadNominal).vout) / (2 * h);
    const estimate = slope * 0.2 * VPEAK;
    // Observed 1.3 %; bound 3.3 %.
    ledger.add('line.delta vs estimate', figure(report, 'line.delta'), estimate, '(≤ 3.3 %)');
    expect(rel(figure(report, 'line.delta'), estimate)).toBeLessThan(0.033);
  });

  test('pd.Q1 (worst corner: 1.1 × amplitude, full load) vs Vce·Ic + Vbe·Ib at the raised reservoir mean', () => {
    const raised = follower.solve(vresMean + 0.1 * VPEAK, follower.loadNominal);
    // Observed 0.63 %; bound 1.6 %.
    ledger.add('pd.Q1 vs DC estimate', figure(report, 'pd.Q1'), raised.power.Q1!, '(≤ 1.6 %)');
    expect(rel(figure(report, 'pd.Q1'), raised.power.Q1!)).toBeLessThan(0.016);
  });
});
