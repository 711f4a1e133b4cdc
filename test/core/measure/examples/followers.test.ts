/**
 * The two emitter-follower examples (sensor-rail-follower.cir, Zener
 * reference; follower-led-reference.cir, two LEDs) against an independent
 * solution: KCL at `ref` and `out` with the models.md diode (Shockley with
 * breakdown, RS) and the Ebers-Moll transport form with the Early factor
 * and RB, CODATA 2018 constants (hand-stages.ts), and every DC figure
 * computed by its figures.md definition from that solution. COUT and CREF
 * play no part at DC.
 */
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { RunReport } from '@railcheck/core';
import { emitterFollower, handFigures, type FollowerNames, type HandFigures, type HandStage } from './hand-stages.js';
import { VT, diodeParams } from './device-equations.js';
import { modelOf, numberOf, readExample, valueOf } from './netlist-values.js';
import { Ledger, figure, rel, runExample } from './support.js';

/**
 * The dropout input is found to a bracket of 0.1 mV (figures.md) and lands anywhere inside it
 * (observed 4.7e-9 V and 2.8e-5 V off on the two files), so its bound is that bracket, not a
 * multiple of a lucky landing.
 */
const DROPOUT_BRACKET = 1e-4;
/** The dropout criterion a file asks for (`fall=` in volts), else the figures.md default of 100 mV. */
const fallOf = (file: string): number => numberOf(readExample(file).figures.get('dropout')?.get('fall') ?? '100m');

interface Case {
  readonly file: string;
  readonly kind: 'zener' | 'leds';
  readonly names: FollowerNames;
  /**
   * Bounds, 2–3× the difference observed against the independent solution (the ledger printed
   * after the file gives the numbers): `ref`, `out` in volts at nominal, `pass` the pass
   * transistor's power, `figures` relative per DC figure, `ripple` |rr − rr_tran| in dB.
   */
  readonly bounds: { readonly ref: number; readonly out: number; readonly pass: number; readonly figures: Readonly<Record<string, number>>; readonly ripple: number };
}

const CASES: readonly Case[] = [
  {
    file: 'sensor-rail-follower.cir', kind: 'zener', names: { source: 'VBAT', bias: 'RB', reference: ['DZ'], pass: 'Q1', bleed: 'RBLEED', load: 'ILOAD' },
    // Observed (the models in their datasheet form): V(ref) 8.0e-11 V, V(out) 1.4e-10 V, P(Q1) 2.9e-11; line 1.8e-9,
    // load 6.0e-9, pd.RB 1.5e-12, pd.DZ 1.2e-10, pd.Q1 2.0e-11, pd.RBLEED 1.3e-10, efficiency 7.8e-11; ripple 6.1e-4 dB.
    bounds: {
      ref: 2.4e-10, out: 4.2e-10, pass: 8.7e-11, ripple: 1.5e-3,
      figures: { 'line.delta': 3.8e-8, 'line.slope': 3.8e-8, 'line.pct_per_v': 3.8e-8, 'load.delta': 1.4e-8, 'load.pct': 1.4e-8, 'load.rout': 1.4e-8, 'pd.RB': 2.3e-10, 'pd.DZ': 3e-10, 'pd.Q1': 1.1e-9, 'pd.RBLEED': 2.7e-10, efficiency: 1.9e-10 },
    },
  },
  {
    file: 'follower-led-reference.cir', kind: 'leds', names: { source: 'VBAT', bias: 'RB', reference: ['D1', 'D2'], pass: 'Q1', bleed: 'RBLEED', load: 'ILOAD' },
    // Observed: V(ref) 1.1e-10 V, V(out) 1.8e-10 V, P(Q1) 3.1e-11; line 9.2e-10, load 3.7e-11 (pct 1.5e-11),
    // pd.RB 2.7e-11, pd.D1 = pd.D2 6.0e-10, pd.Q1 3.0e-11, pd.RBLEED 1.2e-10, efficiency 6.3e-11; ripple 8.5e-4 dB.
    bounds: {
      ref: 2.8e-10, out: 4.5e-10, pass: 7.7e-11, ripple: 2.1e-3,
      figures: { 'line.delta': 2.3e-9, 'line.slope': 2.3e-9, 'line.pct_per_v': 2.3e-9, 'load.delta': 9e-11, 'load.pct': 9e-11, 'load.rout': 9e-11, 'pd.RB': 7e-11, 'pd.D1': 1.5e-9, 'pd.D2': 1.5e-9, 'pd.Q1': 7.5e-11, 'pd.RBLEED': 3e-10, efficiency: 1.6e-10 },
    },
  },
];

interface Solved {
  report: RunReport;
  stage: HandStage;
  hand: HandFigures;
  fall: number;
  ledger: Ledger;
}

const solved = new Map<string, Solved>();
const get = (file: string): Solved => solved.get(file)!;

beforeAll(() => {
  for (const c of CASES) {
    const stage = emitterFollower(readExample(c.file), c.names, c.kind);
    const fall = fallOf(c.file);
    solved.set(c.file, { report: runExample(c.file), stage, hand: handFigures(stage, fall), fall, ledger: new Ledger(`${c.file}: railcheck vs independent solution`) });
  }
});
afterAll(() => {
  for (const s of solved.values()) s.ledger.print();
});

describe.each(CASES)('$file: DC figures against the independent solution', ({ file, names, bounds }) => {
  const compare = (name: string, h: number, abs?: number): void => {
    const { report, ledger } = get(file);
    const r = figure(report, name);
    ledger.add(name, r, h, abs === undefined ? '' : `(abs ≤ ${abs} V)`);
    if (abs === undefined) expect(rel(r, h), name).toBeLessThan(bounds.figures[name]!);
    else expect(Math.abs(r - h), name).toBeLessThan(abs);
  };

  test('nominal operating point: V(ref), V(out), Ic', () => {
    const { report, stage, ledger } = get(file);
    const op = report.operatingPoints[0]!;
    const n = stage.nominal.nodes;
    ledger.add('V(ref) nominal', op.nodes.ref!, n.ref!);
    ledger.add('V(out) nominal', op.nodes.out!, n.out!);
    expect(Math.abs(op.nodes.ref! - n.ref!)).toBeLessThan(bounds.ref);
    expect(Math.abs(op.nodes.out! - n.out!)).toBeLessThan(bounds.out);
    expect(rel(op.power[names.pass]!, stage.nominal.power[names.pass]!)).toBeLessThan(bounds.pass);
  });

  test('line regulation (0.9 → 1.1 × nominal input, nominal load)', () => {
    const { hand } = get(file);
    compare('line.delta', hand.line.delta);
    compare('line.slope', hand.line.slope);
    compare('line.pct_per_v', hand.line.pctPerV);
  });

  test('load regulation (0 → nominal load current, nominal input)', () => {
    const { hand } = get(file);
    compare('load.delta', hand.load.delta);
    compare('load.pct', hand.load.pct);
    compare('load.rout', hand.load.rout);
  });

  test('dropout: own bisection on Vout(Vin) = Vout_nom − 100 mV, within the 0.1 mV bracket', () => {
    const { hand } = get(file);
    compare('dropout.vin', hand.dropout.vin, DROPOUT_BRACKET);
    compare('dropout.v', hand.dropout.v, DROPOUT_BRACKET);
    compare('dropout.headroom', hand.dropout.headroom, DROPOUT_BRACKET);
  });

  test('dropout definition: re-solved at dropout.vin, Vout = Vout_nom − 100 mV to within 0.1 mV of input', () => {
    const { report, stage, fall, ledger } = get(file);
    const vin = figure(report, 'dropout.vin');
    const h = 1e-3;
    const slope = (stage.solve(vin + h, stage.loadNominal).vout - stage.solve(vin - h, stage.loadNominal).vout) / (2 * h);
    const miss = stage.solve(vin, stage.loadNominal).vout - (stage.nominal.vout - fall);
    ledger.note(`at dropout.vin the independent Vout misses Vout_nom − ${fall} V by ${miss.toExponential(2)} V (local slope ${slope.toFixed(4)} V/V)`);
    expect(slope).toBeGreaterThan(0);
    expect(Math.abs(miss)).toBeLessThanOrEqual(slope * DROPOUT_BRACKET);
  });

  test('dissipation (Vce·Ic + Vbe·Ib at the terminals, I²R, V·I of each diode) and efficiency', () => {
    const { report, hand } = get(file);
    const reported = Object.keys(report.figures!.values).filter((k) => k.startsWith('pd.')).sort();
    expect(reported).toEqual(Object.keys(hand.pd).map((k) => `pd.${k}`).sort());
    for (const [el, p] of Object.entries(hand.pd)) compare(`pd.${el}`, p);
    compare('efficiency', hand.efficiency);
  });

  test('ripple: small-signal and transient methods agree (figures.md warns beyond 0.5 dB)', () => {
    const { report, ledger } = get(file);
    const rr = figure(report, 'ripple.rr');
    const rrTran = figure(report, 'ripple.rr_tran');
    ledger.add('ripple.rr_tran vs rr', rrTran, rr, `(≤ ${bounds.ripple} dB)`);
    expect(Math.abs(rr - rrTran)).toBeLessThan(bounds.ripple);
    expect(report.warnings.some((w) => w.code === 'ripple-disagree')).toBe(false);
  });
});

/**
 * Small-signal estimate of a follower's line.slope: the bias resistor and
 * the reference's incremental resistance r form a divider, and the
 * emitter follows the reference (gain about 1): slope ≈ r / (RB + r). The
 * reference's r is the diode's incremental resistance plus its RS (the
 * standard small-signal diode model; Sedra and Smith, Microelectronic
 * Circuits, ch. 4, from memory): N·Vt/I + RS per forward LED, NBV·Vt/Iz + RS
 * for the Zener in breakdown. The currents come from the independent
 * solution. Base current and the Early effect are left out: a few percent.
 */
function slopeEstimate(s: HandStage, file: string): { r: number; slope: number } {
  const v = readExample(file);
  const rb = valueOf(v, 'RB');
  const i = s.nominal.iref;
  const r = file === 'sensor-rail-follower.cir'
    ? ((p) => (p.NBV * VT) / i + p.RS)(diodeParams(modelOf(v, 'DZ', 3)))
    : ((p) => 2 * ((p.N * VT) / i + p.RS))(diodeParams(modelOf(v, 'D1', 3)));
  return { r, slope: r / (rb + r) };
}

describe('facts of the trade on the followers (common practice, no source)', () => {
  const ZENER = 'sensor-rail-follower.cir';
  const LED = 'follower-led-reference.cir';

  test('the output sits about one junction drop below the reference: V(ref) − V(out) in [0.55, 0.75] V', () => {
    const op = get(ZENER).report.operatingPoints[0]!;
    const drop = op.nodes.ref! - op.nodes.out!;
    get(ZENER).ledger.note(`V(ref) − V(out) at nominal: ${drop.toFixed(4)} V`);
    expect(drop).toBeGreaterThanOrEqual(0.55);
    expect(drop).toBeLessThanOrEqual(0.75);
  });

  test('it keeps regulating until the input is about a volt above the reference: dropout.vin − V(ref)_nom in [0.3, 2] V', () => {
    const { report } = get(ZENER);
    const margin = figure(report, 'dropout.vin') - report.operatingPoints[0]!.nodes.ref!;
    get(ZENER).ledger.note(`dropout.vin − V(ref)_nom: ${margin.toFixed(4)} V`);
    expect(margin).toBeGreaterThanOrEqual(0.3);
    expect(margin).toBeLessThanOrEqual(2);
  });

  test('an LED reference regulates worse than a Zener: line.slope larger, in the ratio of r/(RB + r) within 10 % (Zener), 5 % (LEDs)', () => {
    const z = get(ZENER);
    const l = get(LED);
    const ez = slopeEstimate(z.stage, ZENER);
    const el = slopeEstimate(l.stage, LED);
    const sz = figure(z.report, 'line.slope');
    const sl = figure(l.report, 'line.slope');
    z.ledger.add('line.slope vs r/(RB+r)', sz, ez.slope, `(r = ${ez.r.toFixed(3)} Ω; ≤ 10 %)`);
    l.ledger.add('line.slope vs r/(RB+r)', sl, el.slope, `(r = ${el.r.toFixed(3)} Ω; ≤ 5 %)`);
    l.ledger.add('slope ratio LED/Zener', sl / sz, el.slope / ez.slope, '(≤ 4.5 %)');
    expect(sl).toBeGreaterThan(sz);
    // Observed 3.8 %, 2.0 % and 1.8 % (base current and Early effect left out); bounds 10 %, 5 %, 4.5 %.
    expect(rel(sz, ez.slope)).toBeLessThan(0.1);
    expect(rel(sl, el.slope)).toBeLessThan(0.05);
    expect(rel(sl / sz, el.slope / ez.slope)).toBeLessThan(0.045);
  });
});

describe('sensor-rail follower: the input-dip figure against the DC stage', () => {
  // The dip lasts 50 ms, hundreds of the stage's time constants (CREF with
  // RB ∥ rz, COUT with the output resistance: under a millisecond), so at the
  // bottom of the dip the output settles to the DC solution there; the lowest
  // output can only be at or below it. The deepest passing dip therefore lies
  // at or above the DC dropout input, within the 0.5 % search resolution and
  // what the edges add (allowed: 0.01 below).
  test('sag.fall is at least the DC fall at the bottom of the dip; sag.max_depth is at most 1 − dropout.vin / Vin_nom', () => {
    const { report, stage, hand, ledger } = get('sensor-rail-follower.cir');
    const depth = 0.3; // `.figure sag depth=30% dur=50m`
    const dcFall = stage.nominal.vout - stage.solve(stage.vinNominal * (1 - depth), stage.loadNominal).vout;
    const deepest = 1 - hand.dropout.vin / stage.vinNominal;
    ledger.add('sag.fall vs DC fall', figure(report, 'sag.fall'), dcFall, '(sag.fall ≥ DC)');
    ledger.add('sag.max_depth vs DC', figure(report, 'sag.max_depth'), deepest, '(≤ DC + 0.005)');
    expect(figure(report, 'sag.fall')).toBeGreaterThanOrEqual(dcFall - 1e-6);
    expect(figure(report, 'sag.max_depth')).toBeLessThanOrEqual(deepest + 0.005);
    expect(figure(report, 'sag.max_depth')).toBeGreaterThan(deepest - 0.01);
    expect(figure(report, 'sag.pass')).toBe(figure(report, 'sag.fall') <= 0.1 ? 1 : 0);
  });
});
