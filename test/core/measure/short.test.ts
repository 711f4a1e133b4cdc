/**
 * The output short (docs/figures.md, "short"). References outside the
 * project: the DC analysis of an emitter follower with a resistor-fed base
 * (IB = (Vin − VBE)/R, IE = (β + 1)·IB; any transistor-circuit text, e.g.
 * Sedra and Smith, "Microelectronic Circuits", BJT DC analysis; from
 * memory), with β between BF and BF·(1 + VCE/VAF) as the Early effect of
 * models.md allows; conservation of energy (Tellegen's theorem) for the
 * input power; and, on a sine-fed stage, the half-wave current of a sine
 * source through a resistance into a Shockley junction, integrated here over
 * one cycle from the closed form of Banwell and Jayakumar (test/helpers).
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { runNetlist, type RunReport, type StressRow } from '@railcheck/core';
import { seedFor } from './linear/support.js';
import { seriesDiode, thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';

const seed = seedFor('measure/short');

function reportOf(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

function shortRows(rep: RunReport): readonly StressRow[] {
  const f = rep.figures?.figures.find((g) => g.ok && g.kind === 'short');
  if (!f || !f.ok) throw new Error(`no short figure: ${rep.warnings.map((w) => w.message).join('; ')}`);
  return f.stress ?? [];
}

const follower = (vin: number, rb: number, bf: number, vaf: number | undefined, extra = ''): string =>
  `follower short\nVIN in 0 ${vin}\nRB in b ${rb}\nQ1 in b out NQ pmax=1\nRL out 0 220\n.model NQ NPN (IS=1e-14 BF=${bf}${vaf === undefined ? '' : ` VAF=${vaf}`})\n.supply in=VIN out=out load=RL\n.figure short ${extra}\n.end\n`;

describe('a follower with a resistor-fed base, shorted', () => {
  test('short.current lies within the hand formula (β + 1)·(Vin − VBE)/R over β from BF to BF·(1 + VCE/VAF)', () => {
    fc.assert(
      fc.property(fc.double({ min: 6, max: 30, noNaN: true }), fc.double({ min: 2200, max: 47000, noNaN: true }), fc.double({ min: 40, max: 300, noNaN: true }), (vin, rb, bf) => {
        const vaf = 200;
        const v = reportOf(follower(vin, rb, bf, vaf)).figures!.values;
        const i = v['short.current']!;
        // VBE of a small silicon transistor between 0.5 V and 0.9 V over these currents (common practice, no source);
        // VCE is at most Vin (the output is at the short).
        const low = (bf + 1) * (vin - 0.9) / rb;
        const high = (bf * (1 + vin / vaf) + 1) * (vin - 0.5) / rb;
        expect(i).toBeGreaterThanOrEqual(low);
        expect(i).toBeLessThanOrEqual(high);
        // The output across the short is the current through it times r (10 mΩ default).
        expect(v['short.vout']!).toBeCloseTo(i * 0.01, 12);
      }),
      { seed, numRuns: 25 },
    );
  });

  test('without the Early effect the current is (BF + 1)·(Vin − VBE)/R, VBE from the Shockley law at that current, within 0.03 %', () => {
    // No VAF means no Early effect (models.md): β is BF exactly.
    const vin = 15;
    const rb = 10e3;
    const bf = 100;
    const i = reportOf(follower(vin, rb, bf, undefined)).figures!.values['short.current']!;
    // IC = BF·IB; VBE = Vt·ln(IC/IS + 1) (Shockley), found by fixed-point iteration of the hand formula.
    const vt = thermalVoltage(T_NOM);
    let ie = (bf + 1) * (vin - 0.7) / rb;
    for (let k = 0; k < 50; k++) ie = (bf + 1) * (vin - vt * Math.log((ie * bf) / (bf + 1) / 1e-14 + 1)) / rb;
    // Observed 1.0e-4: the 10 mΩ short's drop (1.4 mV of 14.3 V) is in the simulation, not in the hand formula; bound 3e-4.
    expect(Math.abs(i / ie - 1)).toBeLessThan(3e-4);
  });

  test('the input power is the sum of every dissipation and the short\'s own I²r (conservation of energy)', () => {
    const v = reportOf(follower(12, 10e3, 120, 100, 'r=0.5')).figures!.values;
    const pd = Object.entries(v).filter(([n]) => n.startsWith('short.pd.')).reduce((a, [, p]) => a + p, 0);
    const inShort = v['short.current']! * v['short.vout']!;
    // Observed 7e-11 (the DC point's Newton tolerances); bound 2e-10.
    expect(Math.abs(v['short.pin']! - (pd + inShort)) / v['short.pin']!).toBeLessThan(2e-10);
    // The load is taken off: RL dissipates nothing in the short and is not listed.
    expect(v['short.pd.RL']).toBeUndefined();
  });

  test('the pass transistor past its pmax is OVER in the short\'s table, named in a note; the stress figure\'s table never holds the short', () => {
    const rep = reportOf(follower(12, 4700, 150, 100).replace('.figure short', '.figure stress\n.figure short'));
    const rows = shortRows(rep);
    const q = rows.find((r) => r.element === 'Q1' && r.quantity === 'p')!;
    expect(q.status).toBe('over');
    expect(rep.figures!.values['short.worst']).toBe(q.ratio);
    expect(rep.warnings.some((w) => w.code === 'short-over-rating' && w.message.includes('Q1'))).toBe(true);
    // In normal operation (220 Ω load) Q1 dissipates well under 1 W.
    expect(rep.figures!.values['stress.Q1.p']!).toBeLessThan(1);
  });

  test('a part with rth= gets its junction temperature in the short, Ta + P·(rth + rthsink) (JESD51-1 series path), and a note past tjmax', () => {
    const text = follower(12, 4700, 150, 100, 'tamb=30').replace('Q1 in b out NQ pmax=1', 'Q1 in b out NQ pmax=1 rth=5 rthsink=20 tjmax=125');
    const rep = reportOf(text);
    const v = rep.figures!.values;
    // JEDEC JESD51-1's junction-to-ambient series path, as the thermal figure uses it (docs/thermal.md).
    expect(v['short.Q1.tj']).toBeCloseTo(30 + v['short.pd.Q1']! * 25, 10);
    expect(v['short.Q1.tj']!).toBeGreaterThan(125);
    expect(rep.warnings.some((w) => w.code === 'short-too-hot' && w.message.includes('Q1'))).toBe(true);
  });

  test('r out of range is refused at the .figure line; no rating means short.worst is not measured, with the reason', () => {
    const bad = runNetlist(follower(12, 10e3, 100, 100, 'r=0'));
    expect(bad.ok).toBe(false);
    const text = follower(12, 10e3, 100, 100).replace(' pmax=1', '');
    const rep = reportOf(text);
    const f = rep.figures!.figures.find((g) => g.kind === 'short')!;
    expect(f.ok && f.notMeasured.map((n) => n.name)).toEqual(['short.worst']);
    expect(rep.figures!.values['short.current']!).toBeGreaterThan(0);
  });
});

describe('a sine-fed half-wave rectifier, shorted', () => {
  test('the cycle-average short current and the diode peak agree with the closed-form series-diode current integrated over a cycle', () => {
    const vpk = 20;
    const rw = 10;
    const is = 1e-9;
    const n = 1.5;
    const freq = 50;
    const r = 0.01;
    const text = `half-wave short\nVSEC w 0 sin(0 ${vpk} ${freq})\nRW w a ${rw}\nD1 a out DR ipk=3 imax=1\nCRES out 0 1000u\nRL out 0 100\n.model DR D (IS=${is} N=${n})\n.supply in=VSEC out=out load=RL\n.figure short r=${r}\n.end\n`;
    const rep = reportOf(text);
    expect(rep.figures!.bench).toBe('sine-fed');
    const v = rep.figures!.values;
    // Reference: i(t) of a sine through Rw + r into the junction (the reservoir across the short holds a few mV), trapezoidal rule over one cycle.
    const nvt = n * thermalVoltage(T_NOM);
    const steps = 20000;
    let sum = 0;
    let peak = 0;
    for (let k = 0; k <= steps; k++) {
      const vs = vpk * Math.sin((2 * Math.PI * k) / steps);
      const i = seriesDiode(vs, rw + r, is, nvt).junction;
      sum += (k === 0 || k === steps ? 0.5 : 1) * i;
      peak = Math.max(peak, i);
    }
    const mean = sum / steps;
    // The reservoir's average current is zero at periodic steady state, so the short carries the diode's mean current (KCL).
    // Observed 8.2e-5 (the engine's time steps and the reservoir's few mV against the reference's 20000 points); bound 2.5e-4.
    expect(Math.abs(v['short.current']! / mean - 1)).toBeLessThan(2.5e-4);
    const rows = shortRows(rep);
    const ipk = rows.find((x) => x.element === 'D1' && x.quantity === 'ipk')!;
    // Observed 2.2e-5 (the peak as sampled at the engine's time points); bound 7e-5.
    expect(Math.abs(ipk.value / peak - 1)).toBeLessThan(7e-5);
    const iavg = rows.find((x) => x.element === 'D1' && x.quantity === 'iavg')!;
    // Observed 8.2e-5, as for the short's current; bound 2.5e-4.
    expect(Math.abs(iavg.value / mean - 1)).toBeLessThan(2.5e-4);
  });
});
