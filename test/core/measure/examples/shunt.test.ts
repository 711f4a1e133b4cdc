/**
 * examples/bench-reference-shunt.cir (Zener shunt) against an independent
 * solution: KCL at the one node `ref` with the Shockley-with-breakdown
 * diode of models.md and CODATA 2018 constants (hand-stages.ts), and the
 * figures computed by their figures.md definitions from that solution.
 * Ripple rejection against the textbook small-signal model of a shunt
 * regulator: a divider of the series resistor and the shunt impedance
 * rz ∥ RL ∥ 1/(jωC), with rz = NBV·Vt/Iz + RS (the incremental resistance
 * of the breakdown exponential plus the series resistance; standard
 * small-signal diode model, e.g. Sedra and Smith, Microelectronic Circuits,
 * ch. 4, from memory).
 */
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { abs, add, complex, divide, type Complex } from 'mathjs';
import type { RunReport } from '@railcheck/core';
import { VT, diodeParams } from './device-equations.js';
import { handFigures, zenerShunt, type HandFigures, type HandStage } from './hand-stages.js';
import { modelOf, numberOf, readExample, valueOf } from './netlist-values.js';
import { Ledger, figure, rel, runExample } from './support.js';

const FILE = 'bench-reference-shunt.cir';
const values = readExample(FILE);
/** The dropout criterion the file asks for (`.figure dropout fall=50m`). */
const FALL = numberOf(values.figures.get('dropout')?.get('fall') ?? '100m');
/** Relative agreement asked of DC figures: the engine's Newton stops at 1e-6 relative; 1e-4 leaves room for differences of near values. */
const REL = 1e-4;

let report: RunReport;
let stage: HandStage;
let hand: HandFigures;
const ledger = new Ledger(`${FILE}: railcheck vs independent solution`);

beforeAll(() => {
  report = runExample(FILE);
  stage = zenerShunt(values);
  hand = handFigures(stage, FALL);
});
afterAll(() => ledger.print());

describe('Zener shunt: DC figures against the independent solution', () => {
  test('nominal operating point (KCL at ref, models.md diode)', () => {
    const op = report.operatingPoints[0]!;
    ledger.add('V(ref) nominal', op.nodes.ref!, stage.nominal.vout);
    ledger.add('I(DZ) nominal', -op.currents.DZ!, stage.nominal.iref);
    expect(Math.abs(op.nodes.ref! - stage.nominal.vout)).toBeLessThan(1e-7);
    expect(rel(-op.currents.DZ!, stage.nominal.iref)).toBeLessThan(1e-5);
  });

  test('line regulation (figures.md: 0.9 → 1.1 × nominal input, nominal load)', () => {
    for (const [name, h] of [['line.delta', hand.line.delta], ['line.slope', hand.line.slope], ['line.pct_per_v', hand.line.pctPerV]] as const) {
      ledger.add(name, figure(report, name), h);
      expect(rel(figure(report, name), h)).toBeLessThan(REL);
    }
  });

  test('load regulation (figures.md: open load → Vout_nom / I_nom, nominal input)', () => {
    for (const [name, h] of [['load.delta', hand.load.delta], ['load.pct', hand.load.pct], ['load.rout', hand.load.rout]] as const) {
      ledger.add(name, figure(report, name), h);
      expect(rel(figure(report, name), h)).toBeLessThan(REL);
    }
  });

  test('dropout: own root finder on Vout(Vin) = Vout_nom − fall, within 1 mV', () => {
    for (const [name, h] of [['dropout.vin', hand.dropout.vin], ['dropout.v', hand.dropout.v], ['dropout.headroom', hand.dropout.headroom]] as const) {
      ledger.add(name, figure(report, name), h, '(abs ≤ 1 mV)');
      expect(Math.abs(figure(report, name) - h)).toBeLessThan(1e-3);
    }
  });

  test('dropout definition: re-solved at dropout.vin, the output is Vout_nom − fall to within 1 mV of input', () => {
    const vin = figure(report, 'dropout.vin');
    const target = stage.nominal.vout - FALL;
    const h = 1e-3;
    const slope = (stage.solve(vin + h, stage.loadNominal).vout - stage.solve(vin - h, stage.loadNominal).vout) / (2 * h);
    const miss = stage.solve(vin, stage.loadNominal).vout - target;
    ledger.note(`at dropout.vin the independent Vout misses Vout_nom − ${FALL} V by ${miss.toExponential(2)} V (local slope ${slope.toFixed(4)} V/V)`);
    expect(slope).toBeGreaterThan(0);
    expect(Math.abs(miss)).toBeLessThanOrEqual(slope * 1e-3);
  });

  test('dissipation: every resistor and diode at its worst corner, and the efficiency', () => {
    const reported = Object.keys(report.figures!.values).filter((k) => k.startsWith('pd.')).sort();
    expect(reported).toEqual(Object.keys(hand.pd).map((k) => `pd.${k}`).sort());
    for (const [el, p] of Object.entries(hand.pd)) {
      ledger.add(`pd.${el}`, figure(report, `pd.${el}`), p);
      expect(rel(figure(report, `pd.${el}`), p)).toBeLessThan(REL);
    }
    ledger.add('efficiency', figure(report, 'efficiency'), hand.efficiency);
    expect(rel(figure(report, 'efficiency'), hand.efficiency)).toBeLessThan(REL);
  });
});

describe('Zener shunt: ripple rejection', () => {
  test('small-signal and transient methods agree within 0.5 dB (figures.md requirement)', () => {
    const rr = figure(report, 'ripple.rr');
    const rrTran = figure(report, 'ripple.rr_tran');
    ledger.add('ripple.rr_tran vs rr', rrTran, rr, '(≤ 0.5 dB)');
    expect(Math.abs(rr - rrTran)).toBeLessThan(0.5);
    expect(report.warnings.some((w) => w.code === 'ripple-disagree')).toBe(false);
  });

  test('against the hand small-signal model 20·log10|Rs + Z| / |Z|, Z = rz ∥ RL ∥ 1/(jωC), within 0.5 dB', () => {
    const f = numberOf(values.figures.get('ripple')?.get('freq') ?? '100');
    const dz = diodeParams(modelOf(values, 'DZ', 3));
    const rz = (dz.NBV * VT) / stage.nominal.iref + dz.RS;
    const w = 2 * Math.PI * f;
    const y = add(add(complex(1 / rz, 0), complex(1 / valueOf(values, 'RBUF'), 0)), complex(0, w * valueOf(values, 'CREF'))) as Complex;
    const z = divide(1, y) as Complex;
    const rrHand = 20 * Math.log10((abs(add(z, complex(valueOf(values, 'RS'), 0)) as unknown as number)) / (abs(z) as unknown as number));
    ledger.add('ripple.rr vs hand', figure(report, 'ripple.rr'), rrHand, `(rz = ${rz.toFixed(3)} Ω; ≤ 0.5 dB)`);
    expect(Math.abs(figure(report, 'ripple.rr') - rrHand)).toBeLessThan(0.5);
  });
});
