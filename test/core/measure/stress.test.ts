/**
 * Part stress against ratings (docs/stress.md). References outside the
 * project: Ohm's law and the voltage divider for DC stresses; the final
 * value of a first-order step (a capacitor charged through a resistor
 * reaches the source voltage) for a transient's peak; for a capacitor-input
 * rectifier, the RMS of the capacitor current computed here from the
 * transient's CSV waveform (the trapezoidal rule over the last whole ripple
 * cycles), and the rectangular-pulse estimate of the ripple current from the
 * conduction time (common practice, no source; derived below).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { parseNetlist, runNetlist, type RunReport, type StressRow } from '@railcheck/core';
import { cli, freshDir, netlistFile } from '../../cli/support.js';
import { seedFor } from './linear/support.js';

const seed = seedFor('measure/stress');

function reportOf(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

function stressRows(rep: RunReport): readonly StressRow[] {
  const f = rep.figures?.figures.find((g) => g.ok && g.kind === 'stress');
  if (!f || !f.ok || !f.stress) throw new Error('no stress table');
  return f.stress;
}

const row = (rows: readonly StressRow[], element: string, quantity: string): StressRow => {
  const r = rows.find((x) => x.element === element && x.quantity === quantity);
  if (!r) throw new Error(`no row ${element} ${quantity}`);
  return r;
};

describe('part data on element lines', () => {
  test('each letter takes its own options; others are refused with the list accepted', () => {
    const ok = parseNetlist('t\nR1 a 0 1k vmax=200 pmax=0.25\nC1 a 0 1u vmax=25 irms=0.5 ipk=3\nL1 a b 1m imax=2 ipk=3 irms=2\nD1 b 0 dm vmax=100 imax=1 ipk=10 irms=1.5 rth=80 rthsink=5 tjmax=150\n.model dm D\n');
    expect(ok.ok).toBe(true);
    const bad = parseNetlist('t\nR1 a 0 1k irms=1\n');
    expect(!bad.ok && bad.errors[0]?.code).toBe('unknown-key');
    expect(!bad.ok && bad.errors[0]?.expected).toContain('vmax=');
    const q = parseNetlist('t\nQ1 c b e qm vmax=10\n.model qm NPN\n');
    expect(!q.ok && q.errors[0]?.code).toBe('unknown-key');
  });

  test('a rating out of range is an error at elaboration; a transistor model takes VCEMAX, VCBMAX, ICMAX', () => {
    const neg = runNetlist('t\nV1 a 0 1\nR1 a 0 1k vmax={-1}\n.op\n');
    expect(neg.ok).toBe(false);
    const q = runNetlist('t\nV1 c 0 5\nV2 b 0 0.7\nQ1 c b 0 qm\n.model qm NPN (VCEMAX=40 VCBMAX=60 ICMAX=0.2)\n.op\n');
    expect(q.ok).toBe(true);
    expect(q.ok && q.report.circuit.elements.find((e) => e.name === 'Q1')?.kind === 'bjt').toBe(true);
  });
});

describe('DC stresses against the divider and Ohm\'s law', () => {
  test('a divider over its line range: each resistor\'s worst |V| = Vin_max·R/(R1+R2), marked over, past derating or ok', () => {
    fc.assert(
      fc.property(fc.double({ min: 5, max: 50, noNaN: true }), fc.double({ min: 100, max: 1e5, noNaN: true }), fc.double({ min: 100, max: 1e5, noNaN: true }), (vin, r1, r2) => {
        const high = 1.2 * vin;
        const v1 = (high * r1) / (r1 + r2);
        const v2 = (high * r2) / (r1 + r2);
        // Ratings chosen so that R1 is over (ratio 1.25), R2 past 0.8 but within (0.9).
        const text = `divider\nV1 in 0 ${vin}\nR1 in out ${r1} vmax=${v1 / 1.25}\nR2 out 0 ${r2} vmax=${v2 / 0.9}\n.supply in=V1 out=out load=R2\n.figure line from=${vin} to=${high}\n.figure stress\n`;
        const rep = reportOf(text);
        const rows = stressRows(rep);
        // Divider formula vs. the solver: observed at rounding (2e-16 relative) on a linear stage; 1e-12.
        expect(Math.abs(row(rows, 'R1', 'v').value - v1) / v1).toBeLessThan(1e-12);
        expect(Math.abs(row(rows, 'R2', 'v').value - v2) / v2).toBeLessThan(1e-12);
        expect(row(rows, 'R1', 'v').status).toBe('over');
        expect(row(rows, 'R2', 'v').status).toBe('margin');
        expect(rep.warnings.some((w) => w.code === 'over-rating' && w.message.startsWith('R1 '))).toBe(true);
        expect(rep.warnings.some((w) => w.code === 'over-rating' && w.message.startsWith('R2 '))).toBe(false);
        expect(rep.figures!.values['stress.worst']).toBeCloseTo(1.25, 5);
      }),
      { seed, numRuns: 12 },
    );
  });

  test('vderate= moves the mark; no rating at all leaves the figure not measured with a reason', () => {
    const rep = reportOf('d\nV1 in 0 10\nR1 in out 1k vmax=6\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure stress vderate=0.9\n');
    // 5 V of 6 V: 0.833, below 0.9.
    expect(row(stressRows(rep), 'R1', 'v').status).toBe('ok');
    const none = reportOf('d\nV1 in 0 10\nR1 in out 1k\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure stress\n');
    const f = none.figures!.figures[0]!;
    expect(f.ok).toBe(false);
    expect(!f.ok && f.reason.message).toMatch(/no part carries a rating/);
  });

  test('a transistor follower: VCE = Vin − Vout and IC against the load current (KVL and KCL)', () => {
    const rep = reportOf(
      'follower\nV1 in 0 15\nRB in b 2.2k\nDZ 0 b dz\nQ1 in b out qn\nRL out 0 100\n.model dz D (BV=6.2 IBV=5m)\n.model qn NPN (BF=100 VCEMAX=12 ICMAX=0.1)\n.supply in=V1 out=out load=RL\n.figure stress\n',
    );
    const vout = rep.figures!.voutNominal!;
    const rows = stressRows(rep);
    // KVL: collector at the input, emitter at the output (observed exact); 1e-12 V.
    expect(Math.abs(row(rows, 'Q1', 'vce').value - (15 - vout))).toBeLessThan(1e-12);
    // KCL with IB = IC/BF (Ebers-Moll, no Early voltage): IC = IE·BF/(BF+1), IE the load current. Observed 1.04e-9 relative
    // (the gmin conductances of the DC solution); 3e-9.
    const ic = (vout / 100) * (100 / 101);
    expect(Math.abs(row(rows, 'Q1', 'ic').value - ic) / ic).toBeLessThan(3e-9);
  });
});

describe('analyses are judged too', () => {
  test('a capacitor charged by a 24 V step through a resistor reaches 24 V (first-order final value): over its 16 V rating in the .tran', () => {
    const rep = reportOf('rc\nV1 in 0 pulse(0 24 0 1u)\nR1 in out 100\nC1 out 0 10u vmax=16\n.tran 0.1m 10m\n');
    const w = rep.warnings.find((d) => d.code === 'over-rating' && d.message.startsWith('C1 '));
    expect(w?.message).toMatch(/transient/);
    // 10 ms = 10 τ: within 24·e^-10 = 1.1 mV of 24 V; the message rounds to four figures.
    expect(w?.message).toMatch(/goes through 24(\.0+)? V/);
  });
});

describe('capacitor ripple current of a bridge and reservoir', () => {
  const stage = (extra: string): string =>
    [
      'bridge and reservoir for a weather-station heater rail',
      'V1 ac 0 sin(0 17 50)',
      'RW ac a 0.5',
      'D1 a res dr',
      'D2 0 res dr',
      'D3 neg a dr',
      'D4 neg 0 dr',
      // A 10 mΩ sense resistor: the capacitor current is V(res, cp)/10 mΩ in the CSV, which holds node voltages.
      'RSENSE res cp 10m',
      'C1 cp neg 2200u vmax=25 irms=2',
      'RL res neg 33',
      '.model dr D (IS=2n N=1.8 RS=0.05)',
      extra,
    ].join('\n') + '\n';

  test('irms against the RMS of the sensed current in the CSV waveform, and against the rectangular-pulse estimate', async () => {
    const rep = reportOf(stage('.supply in=V1 out=res ref=neg load=RL\n.figure stress'));
    const irms = row(stressRows(rep), 'C1', 'irms').value;
    // The same stage run as a plain transient for 1 s (50 source cycles; the reservoir settles in a few), written to CSV.
    const dir = freshDir('stress-csv');
    const file = netlistFile(stage('.tran 20u 1'));
    const csv = join(dir, 'w.csv');
    const run = await cli(['run', file, '--csv', csv]);
    expect(run.status).toBe(0);
    const [head, ...lines] = readFileSync(csv, 'utf8').trim().split('\n');
    const cols = head!.split(',');
    const ti = 0;
    const vr = cols.indexOf('res');
    const vp = cols.indexOf('cp');
    const vn = cols.indexOf('neg');
    expect(Math.min(vr, vp, vn)).toBeGreaterThan(0);
    const ii = cols.length;
    const rowsCsv = lines.map((l) => {
      const r = l.split(',').map(Number);
      r.push((r[vr]! - r[vp]!) / 0.01);
      return r;
    });
    // The last five whole source cycles (0.9 s to 1 s), trapezoidal rule.
    const window = rowsCsv.filter((r) => r[ti]! >= 0.9 - 1e-9);
    let sq = 0;
    let mean = 0;
    for (let k = 1; k < window.length; k++) {
      const dt = window[k]![ti]! - window[k - 1]![ti]!;
      const a = window[k - 1]![ii]!;
      const b = window[k]![ii]!;
      sq += 0.5 * (a * a + b * b) * dt;
      mean += 0.5 * (a + b) * dt;
    }
    const span = window[window.length - 1]![ti]! - window[0]![ti]!;
    const rmsCsv = Math.sqrt(sq / span);
    // The stress figure's settled cycle vs. the plain transient's 20 µs output grid: observed 0.18 % apart (the grid samples the charging pulses coarsely); 0.5 %.
    expect(Math.abs(irms - rmsCsv) / rmsCsv).toBeLessThan(0.005);
    // A capacitor carries no mean current at steady state: observed 1.4e-6 of the RMS (the transient still settling slowly at 0.9 s); 1e-5.
    expect(Math.abs(mean / span)).toBeLessThan(1e-5 * rmsCsv);

    // Rectangular-pulse estimate (common practice, no source): the bridge conducts for tc of each half period T
    // with cos(ω·tc) = 1 − Vpp/Vpk (from the moment the rising sine meets the capacitor voltage to the crest);
    // a pulse of Idc·T/tc over tc and −Idc otherwise has RMS Idc·√(T/tc − 1).
    const vc = window.map((r) => r[vr]! - r[vn]!);
    const vpk = Math.max(...vc);
    const vpp = vpk - Math.min(...vc);
    const idc = vc.reduce((s, v) => s + v, 0) / vc.length / 33;
    const omega = 2 * Math.PI * 50;
    const tc = Math.acos(1 - vpp / vpk) / omega;
    const estimate = idc * Math.sqrt(0.01 / tc - 1);
    // The ideal conduction time ignores the winding and diode resistance, which lengthen the pulses and lower their RMS:
    // the estimate reads high, observed 27 %; a rule of thumb, held to 60 % (about 2×).
    expect(Math.abs(irms - estimate) / estimate).toBeLessThan(0.6);
    expect(irms).toBeLessThan(estimate);
  }, 120_000);
});

describe('ratings in a diode model (the datasheet values VRRM, IFAV, IFRM)', () => {
  test('a half-wave reservoir rectifier: vr is the peak inverse voltage 2·Vpk − VF, judged by the model VRRM; an option on the line wins', () => {
    // Peak inverse voltage of a half-wave capacitor-input rectifier: 2·Vm less the diode drop (textbook result, e.g.
    // any power-electronics text's rectifier chapter; from memory): the reservoir holds about Vm − VF while the
    // secondary swings to −Vm.
    const vpk = 10;
    const lines = (extra: string): string => `half-wave PIV\nVSEC sec 0 sin(0 ${vpk} 50)\nD1 sec out DR${extra}\nC1 out 0 1000u\nRL out 0 1k\n.model DR D (VF=0.7 IF=10m VF2=0.9 IF2=1 VRRM=25 IFAV=1 IFRM=5)\n.supply in=VSEC out=out load=RL\n.figure stress\n.end\n`;
    const rows = stressRows(reportOf(lines('')));
    const vr = row(rows, 'D1', 'vr');
    expect(vr.ratedBy).toBe('model VRRM');
    expect(vr.rating).toBe(25);
    // Between 2·Vpk − 1 V and 2·Vpk: the drop at the light load is 0.6 V to 0.8 V (the model's two points).
    expect(vr.value).toBeGreaterThan(2 * vpk - 1);
    expect(vr.value).toBeLessThan(2 * vpk);
    expect(row(rows, 'D1', 'iavg').ratedBy).toBe('model IFAV');
    expect(row(rows, 'D1', 'ipk').ratedBy).toBe('model IFRM');
    const own = row(stressRows(reportOf(lines(' vmax=50'))), 'D1', 'vr');
    expect(own.ratedBy).toBe('vmax=');
    expect(own.rating).toBe(50);
  });
});
