/**
 * DC sweeps with continuation (each point starts from the last): points
 * that a cold start finds hard, hysteresis that only continuation can show,
 * the sweep grid of `.dc start stop step` (netlist.md), and the swept
 * source's value afterwards.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, prepare, runNetlist, type CompiledCircuit, type DcSweep, type FlatElement, type RunReport } from '@railcheck/core';
import { dcSweep, operatingPoint } from '@railcheck/core/internal';
import { seriesDiode, thermalVoltage, T_NOM } from '../../helpers/diode-closed-form.js';
import { terminalCurrents } from '../../helpers/laws.js';

const IS = 1e-14;
const VT = thermalVoltage(T_NOM);

function run(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

function compile(text: string): CompiledCircuit {
  const prepared = prepare(parseNetlist(text));
  if (!prepared.ok) throw new Error(prepared.errors.map((e) => e.message).join('; '));
  return prepared.compiled;
}

/** Largest KCL sum (A) over the nodes at sweep point k, from the recorded element currents (passive convention). */
function sweepKcl(elements: readonly FlatElement[], sweep: DcSweep, k: number): number {
  const sums = new Map<string, number>();
  const add = (node: string, amps: number): void => {
    sums.set(node, (sums.get(node) ?? 0) + amps);
  };
  for (const el of elements) {
    for (const [node, amps] of terminalCurrents(el, (label) => sweep.currents[label ? `${el.name}.${label}` : el.name]![k]!)) add(node, amps);
  }
  sums.delete('0');
  return Math.max(...[...sums.values()].map(Math.abs));
}

describe('continuation through points a cold start finds hard', () => {
  test('a diode straight across a source swept 0 → 60 V: every point by continuation, the source current the diode current', () => {
    const sweep = run(`stiff\nV1 in 0 1\nD1 in 0 dm\n.model dm D (IS=${IS})\n.dc V1 0 60 5\n.op\n`).sweeps[0]!;
    // A cold start at 40 V and above needs source stepping (stepping.test.ts); stepping from the last point does not.
    expect(sweep.assisted).toEqual([]);
    sweep.values.forEach((v, k) => {
      // The source fixes the node, and what it delivers is what the diode takes (Kirchhoff's current
      // law; the reported diode current leaves out the 1e-12 S junction gmin, engine.md, which is
      // nothing beside it). The diode current at a given voltage is the device law, which
      // test/devices checks; beyond 80·Vt (2 V) that law is models.md's tangent continuation,
      // which has no outside reference to compare with.
      // Observed 1.6e-16·v and 2.7e-16·|I| at most; bounds 4e-16·v and 7e-16·|I|.
      expect(Math.abs(sweep.nodes['in']![k]! - v)).toBeLessThanOrEqual(4e-16 * v);
      const iD = sweep.currents['D1']![k]!;
      expect(Math.abs(iD + sweep.currents['V1']![k]!)).toBeLessThanOrEqual(7e-16 * Math.abs(iD));
      if (k > 0) expect(iD).toBeGreaterThan(sweep.currents['D1']![k - 1]!);
    });
  });

  test('sweeping down from 60 V, only the cold first point is assisted', () => {
    const sweep = run(`stiff\nV1 in 0 1\nD1 in 0 dm\n.model dm D (IS=${IS})\n.dc V1 60 0 -5\n.op\n`).sweeps[0]!;
    expect(sweep.assisted).toEqual([60]);
  });

  test('diode with 10 Ω swept 0 → 50 V: every point on the Lambert W solution (Banwell and Jayakumar 2000)', () => {
    const sweep = run(`series\nV1 in 0 0\nR1 in a 10\nD1 a 0 dm\n.model dm D (IS=${IS})\n.dc V1 0 50 2.5\n.op\n`).sweeps[0]!;
    expect(sweep.values).toHaveLength(21);
    sweep.values.forEach((v, k) => {
      if (v === 0) return;
      const ref = seriesDiode(v, 10, IS, VT, 1e-12);
      // Observed 1.4e-11 relative at most; bound 3.5e-11.
      expect(Math.abs(sweep.nodes['a']![k]! - ref.vd) / ref.vd, `${v} V`).toBeLessThan(3.5e-11);
    });
  });
});

describe('hysteresis of a Schmitt trigger: continuation follows the branch it is on', () => {
  const text = `track detector schmitt\nVCC vcc 0 12\nRC1 vcc c1 1k\nRC2 vcc c2 1k\nQ1 c1 in e qs\nQ2 c2 b2 e qs\nRE e 0 100\nR1 c1 b2 10k\nR2 b2 0 10k\nVIN in 0 0\n.model qs NPN (IS=1e-14 BF=100)\n.dc VIN 0 6 0.25\n.dc VIN 6 0 -0.25\n.op\n`;
  const report = run(text);
  const [up, down] = report.sweeps as [DcSweep, DcSweep];
  const c2At = (s: DcSweep, vin: number): number => s.nodes['c2']![s.values.findIndex((v) => Math.abs(v - vin) < 1e-9)]!;

  test('outside the window both directions agree; inside, the rising sweep keeps Q2 on and the falling one keeps it off (textbook, from memory)', () => {
    // Observed 4.5e-12 V and 0; bounds 1.1e-11 V and 2 ulps of 12 V.
    expect(Math.abs(c2At(up, 0) - c2At(down, 0))).toBeLessThan(1.1e-11);
    expect(Math.abs(c2At(up, 6) - c2At(down, 6))).toBeLessThanOrEqual(2 * Number.EPSILON * 12);
    // c2 low: Q2 conducting; c2 at VCC: Q2 off.
    expect(c2At(up, 2)).toBeLessThan(3);
    expect(c2At(down, 2)).toBeGreaterThan(11.9);
    // Each direction switches once, at a different input: the hysteresis window.
    const switchAt = (s: DcSweep): number => s.values[s.nodes['c2']!.findIndex((v, k, a) => k > 0 && Math.abs(v - a[k - 1]!) > 5)]!;
    expect(switchAt(up)).toBeGreaterThan(switchAt(down));
  });

  test('every point of both sweeps satisfies KCL', () => {
    const elements = report.circuit.elements;
    let worst = 0;
    for (const s of [up, down]) {
      for (let k = 0; k < s.values.length; k++) {
        const scale = Math.max(...Object.values(s.currents).map((col) => Math.abs(col[k]!)));
        // Newton stops at updates of reltol·|V| (1e-6); through a junction of conductance I/Vt that is
        // a current error of up to ~1e-6·V/Vt of I in the worst case, quadratic convergence makes it far
        // less: observed 4.9e-9 at most; bound 1.2e-8.
        const r = sweepKcl(elements, s, k) / scale;
        worst = Math.max(worst, r);
        expect(r, `VIN = ${s.values[k]}`).toBeLessThan(1.2e-8);
      }
    }
    console.log(`schmitt sweeps: worst KCL imbalance ${worst.toExponential(2)} of the largest current`);
  });
});

describe('the sweep grid of .dc start stop step (netlist.md)', () => {
  const grid = (card: string, source = 'V1 in 0 1\nR1 in 0 1k'): readonly number[] => run(`grid\n${source}\n${card}\n.op\n`).sweeps[0]!.values;

  test('rising, with a step that divides the range: start + k·step up to and including stop', () => {
    const v = grid('.dc V1 0 1 0.1');
    expect(v).toHaveLength(11);
    // Observed 0 (the sweep computes start + k·step too); bound 2·eps·|value|.
    v.forEach((x, k) => expect(Math.abs(x - 0.1 * k)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.1 * k));
  });

  test('falling, with a negative step', () => {
    const v = grid('.dc V1 5 -5 -0.5');
    expect(v).toHaveLength(21);
    // Observed 0; bound 2·eps·|value|.
    v.forEach((x, k) => expect(Math.abs(x - (5 - 0.5 * k))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(5 - 0.5 * k)));
  });

  test('a step that does not divide the range stops before passing stop', () => {
    expect(grid('.dc V1 0 1 0.3').map((x) => Number(x.toFixed(12)))).toEqual([0, 0.3, 0.6, 0.9]);
  });

  test('a current source sweeps the same way, and the node follows Ohm', () => {
    const s = run('grid\nI1 0 a 0\nR1 a 0 2k\n.dc I1 -1m 1m 0.5m\n.op\n').sweeps[0]!;
    expect(s.values).toHaveLength(5);
    // Observed 0; bound 2·eps·|value|.
    s.values.forEach((i, k) => expect(Math.abs(s.nodes['a']![k]! - 2e3 * i)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(2e3 * i)));
  });
});

describe('the swept source keeps its value', () => {
  test('after the sweep, the operating point at the next temperature uses the nominal value', () => {
    const report = run('restore\nV1 in 0 7\nR1 in a 1k\nD1 a 0 dm\n.model dm D (IS=1e-14)\n.temp 27 85\n.dc V1 0 20 5\n.op\n');
    expect(report.sweeps).toHaveLength(2);
    for (const op of report.operatingPoints) expect(op.nodes['in']).toBe(7);
  });

  test('dcSweep through the API restores the DC value, and a later operating point is the nominal one', () => {
    const c = compile('restore\nV1 in 0 7\nR1 in a 1k\nD1 a 0 dm\n.model dm D (IS=1e-14)\n.op\n');
    const before = operatingPoint(c, 27).nodes['a']!;
    const sweep = dcSweep(c, 27, 'v1', -3, 12, 1.5);
    expect(sweep.values).toHaveLength(11);
    expect(c.sources.get('v1')!.dc).toBe(7);
    const after = operatingPoint(c, 27);
    expect(after.nodes['in']).toBe(7);
    // The same cold-start solve: observed 0; bound 2·eps·|V|.
    expect(Math.abs(after.nodes['a']! - before)).toBeLessThanOrEqual(2 * Number.EPSILON * before);
  });
});
