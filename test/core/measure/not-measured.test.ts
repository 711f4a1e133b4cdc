/**
 * The measure layer's report when a figure cannot be measured
 * (measureFigures, checkLimits; docs/figures.md "Figures that cannot be
 * measured"): the figure is `{ ok: false, reason }`, the others are
 * measured as usual, a limit on it is `not-evaluated` with that reason,
 * and a netlist mistake in a limit is still an error. The stage's output
 * is set by an ideal current source from the input (Ohm's law: 1 mA into
 * 1 kΩ is 1 V), which the input's value does not change: the line figure
 * is exactly 0 and the output never falls, so there is no dropout.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { runNetlist, type FigureReport, type LimitResult } from '@railcheck/core';
import { checkLimits } from '@railcheck/core/internal';
import { examplePath } from './examples/netlist-values.js';

const OWN = ['output set by a current source', 'V1 in 0 12', 'I1 in out 1m', 'R4 out 0 1k', '.supply in=V1 out=out', '.figure line', '.figure dropout'];
const SUPPLY_LINE = OWN.indexOf('.supply in=V1 out=out') + 1;

/** Runs netlist lines that must produce a report with figures. */
function figures(lines: readonly string[]): FigureReport {
  const r = runNetlist([...lines, '.end', ''].join('\n'));
  if (!r.ok) throw new Error(`expected a report: ${r.errors.map((e) => e.message).join('; ')}`);
  if (!r.report.figures) throw new Error('no figure report');
  return r.report.figures;
}

describe('one figure not measured', () => {
  test('dropout is { ok: false } with the reason at the .supply line; line is measured; limits pass or are not evaluated', () => {
    const f = figures([...OWN, '.limit line.delta <= 1m', '.limit dropout.vin < 5']);
    const [line, drop] = f.figures;
    expect(line).toMatchObject({ ok: true, kind: 'line', values: { 'line.delta': 0, 'line.slope': 0 }, notMeasured: [] });
    expect(drop).toMatchObject({ ok: false, kind: 'dropout', reason: { code: 'no-dropout', pos: { line: SUPPLY_LINE, column: 1 } } });
    expect(f.values).toEqual({ 'line.delta': 0, 'line.slope': 0, 'line.pct_per_v': 0 });
    expect(f.voutNominal).toBe(1);
    expect(f.nominalFailure).toBeUndefined();
    const [ok, ne] = f.limits as [LimitResult, LimitResult];
    expect(ok).toMatchObject({ status: 'pass', pass: true, actual: 0 });
    expect(ne).toMatchObject({ status: 'not-evaluated', pass: false, actual: undefined });
    if (ne.status !== 'not-evaluated' || drop!.ok) throw new Error('unreachable');
    expect(ne.reason).toBe(drop!.reason);
    // A note in the warnings, at the .figure line.
    expect(f.warnings.find((w) => w.code === 'figure-not-measured')?.pos?.line).toBe(OWN.indexOf('.figure dropout') + 1);
  });

  test('checkLimits: a limit whose figure is not measured is not evaluated; one on a value nothing measured still throws', () => {
    const f = figures(OWN);
    const limits = runNetlist([...OWN, '.limit dropout.v < 1', '.limit line.slope < 1', '.end', ''].join('\n'));
    if (!limits.ok) throw new Error('expected a report');
    const flat = limits.report.circuit.limits;
    expect(checkLimits(flat, f.values, 'dc', f.figures).map((l) => l.status)).toEqual(['not-evaluated', 'pass']);
    // Without the figures' outcomes there is nothing to excuse the missing value: the netlist error of before.
    expect(() => checkLimits(flat, f.values, 'dc')).toThrow(/dropout\.v/);
  });

  test('a limit on a value no figure produces is still a netlist error that stops the run', () => {
    const r = runNetlist([...OWN, '.figure dissipation', '.limit pd.R9 < 1', '.end', ''].join('\n'));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.code)).toEqual(['limit-without-figure']);
  });

  test('so is a limit on a value this kind of stage never has, though its figure was not measured', () => {
    // dropout.ratio belongs to sine-fed stages (figures.md); this one is fed with DC.
    const r = runNetlist([...OWN, '.limit dropout.ratio < 0.9', '.end', ''].join('\n'));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.message)).toEqual([expect.stringMatching(/dropout\.ratio: a dc stage does not have this value/)]);
  });
});

describe('the nominal point cannot be solved', () => {
  test('every figure carries the one reason, there are no values, and the operating point is still in the report', () => {
    // examples/railway-transformer-follower.cir with the winding resistance mistyped as 1 µΩ and no
    // diode resistance: nothing but junctions limits the reservoir's first charge and that transient fails.
    const text = readFileSync(examplePath('railway-transformer-follower.cir'), 'utf8').replace(/^RWIND w a .*$/m, 'RWIND w a 1u').replace('RS=0.04 ', '');
    const r = runNetlist(text);
    if (!r.ok) throw new Error(`expected a report: ${r.errors.map((e) => e.message).join('; ')}`);
    const f = r.report.figures!;
    expect(f.nominalFailure?.message).toMatch(/^the stage's nominal point could not be solved: .*transient failed/);
    expect(f.figures.length).toBeGreaterThan(0);
    for (const g of f.figures) expect(g).toMatchObject({ ok: false, reason: f.nominalFailure });
    expect(f.values).toEqual({});
    expect(f.bench).toBeUndefined();
    expect(f.voutNominal).toBeUndefined();
    expect(f.limits.map((l) => l.status)).toEqual(f.limits.map(() => 'not-evaluated'));
    expect(f.limits.length).toBeGreaterThan(0);
    expect(r.report.operatingPoints).toHaveLength(1);
  });
});
