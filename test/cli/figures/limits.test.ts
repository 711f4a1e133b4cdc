/**
 * `.limit` lines and the exit status of `railcheck run` (docs/figures.md,
 * "Limits"; docs/output.md, "Exit status"): 0 when every limit passes, 1 when one fails,
 * 2 for a netlist error, a failed analysis or a limit not evaluated, with
 * the message and its file:line:column on standard error. The measured values are checked
 * against the divider's closed forms (voltage divider and Thévenin, any
 * circuit-theory text), never against earlier output.
 */
import { describe, expect, test } from 'vitest';
import { runJson, runLines, type FiguresJson } from './support.js';

// 12 V into 1 kΩ / 1 kΩ with 1 mA drawn: k = 1/2, Vth = 6 V, Rth = 500 Ω, Vout_nom = 5.5 V.
const DIVIDER = ['model-railway controller: signal rail divider', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', 'IL out 0 1m', '.supply in=V1 out=out load=IL'];
const FIGURES = ['.figure line', '.figure load'];
/** Closed forms: line.delta = k·(13.2 − 10.8) V, load.rout = Rth, load.pct = 100·I·Rth/Vth. */
const LINE_DELTA = 0.5 * 2.4;
const LOAD_ROUT = 500;
const LOAD_PCT = (100 * 1e-3 * 500) / 6;

/** Line number (1-based) of `text` in the lines written for a run. */
const lineOf = (lines: readonly string[], text: string): number => lines.indexOf(text) + 1;

describe('limits and exit status', () => {
  test('every limit passing: exit 0, and JSON limits entries {figure, op, value, actual, pass, status}', async () => {
    const { status, json } = await runJson([...DIVIDER, ...FIGURES, '.limit line.delta <= 1300m', '.limit load.rout < 510', '.limit load.pct > 8']);
    expect(status).toBe(0);
    expect(json.limits).toHaveLength(3);
    for (const l of json.limits) expect(Object.keys(l).sort()).toEqual(['actual', 'figure', 'op', 'pass', 'status', 'value']);
    expect(json.limits.map((l) => l.status)).toEqual(['pass', 'pass', 'pass']);
    expect(json.not_measured).toEqual([]);
    const [delta, rout, pct] = json.limits;
    expect(delta).toMatchObject({ figure: 'line.delta', op: '<=', value: 1.3, pass: true });
    // Observed 2.0e-15, 0 and 0; bounds 5e-15 and 2·eps·|value|.
    expect(Math.abs(delta!.actual - LINE_DELTA)).toBeLessThan(5e-15);
    expect(rout).toMatchObject({ figure: 'load.rout', op: '<', value: 510, pass: true });
    expect(Math.abs(rout!.actual - LOAD_ROUT)).toBeLessThanOrEqual(2 * Number.EPSILON * LOAD_ROUT);
    expect(pct).toMatchObject({ figure: 'load.pct', op: '>', value: 8, pass: true });
    expect(Math.abs(pct!.actual - LOAD_PCT)).toBeLessThanOrEqual(2 * Number.EPSILON * LOAD_PCT);
    // The same numbers under `figures`.
    expect(json.figures['load.rout']).toBe(rout!.actual);
  });

  test('one limit failing: exit 1, the failing entry pass=false and the others still true', async () => {
    // load.pct = 8.333 %: `< 8` fails (percent figures are written in percent, figures.md).
    const { status, json } = await runJson([...DIVIDER, ...FIGURES, '.limit line.delta <= 1300m', '.limit load.pct < 8']);
    expect(status).toBe(1);
    expect(json.limits.map((l) => l.pass)).toEqual([true, false]);
    expect(json.limits.map((l) => l.status)).toEqual(['pass', 'fail']);
    expect(json.limits[1]).toMatchObject({ figure: 'load.pct', op: '<', value: 8 });
    // Observed 0; bound 2·eps·|value|.
    expect(Math.abs(json.limits[1]!.actual - LOAD_PCT)).toBeLessThanOrEqual(2 * Number.EPSILON * LOAD_PCT);
  });

  test('the text report gives the same exit status as --json', async () => {
    expect((await runLines([...DIVIDER, ...FIGURES, '.limit load.pct < 8'])).status).toBe(1);
    expect((await runLines([...DIVIDER, ...FIGURES, '.limit load.pct < 9'])).status).toBe(0);
  });
});

describe('limit errors: exit 2 with file:line:column', () => {
  test('a limit on a figure not asked for', async () => {
    const lines = [...DIVIDER, '.figure line', '.limit ripple.rr >= 40'];
    const r = await runLines(lines, ['--json']);
    expect(r.status).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toContain(`${r.file}:${lineOf(lines, '.limit ripple.rr >= 40')}:`);
    expect(r.err).toMatch(/:\d+:\d+: error: .*ripple\.rr.*not asked for/);
  });

  test('a % sign in a limit value', async () => {
    const lines = [...DIVIDER, '.figure load', '.limit load.pct < 1%'];
    const r = await runLines(lines);
    expect(r.status).toBe(2);
    // The column points into the value `1%` (columns 19–20 of `.limit load.pct < 1%`).
    expect(r.err).toMatch(new RegExp(`stage\\.cir:${lineOf(lines, '.limit load.pct < 1%')}:(19|20): error:`));
    expect(r.err).toMatch(/%/);
  });

  test('a limit on a value the figure did not produce (ripple.rr_tran with method=ac)', async () => {
    const lines = [...DIVIDER, '.figure ripple method=ac', '.limit ripple.rr_tran >= 1'];
    const r = await runLines(lines);
    expect(r.status).toBe(2);
    expect(r.err).toContain(`${r.file}:${lineOf(lines, '.limit ripple.rr_tran >= 1')}:`);
  });

  test('a pd.<element> limit on an element that does not exist', async () => {
    const r = await runLines([...DIVIDER, '.figure dissipation', '.limit pd.R9 < 1']);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/pd\.R9/);
  });

  test('a limit on a figure that could not be measured (dropout of an output that does not follow the input) is exit 2, the report still printed', async () => {
    const lines = ['output set by a current source', 'V1 in 0 12', 'I1 in out 1m', 'R4 out 0 1k', '.supply in=V1 out=out', '.figure dropout', '.limit dropout.v < 2'];
    const r = await runLines(lines, ['--json']);
    expect(r.status).toBe(2);
    expect(r.err).toContain(`${r.file}:${lineOf(lines, '.limit dropout.v < 2')}:1: error:`);
    expect(r.err).toMatch(/not evaluated.*never falls/);
    const json = JSON.parse(r.out) as FiguresJson;
    expect(json.limits).toEqual([expect.objectContaining({ figure: 'dropout.v', status: 'not-evaluated', pass: false, actual: null })]);
  });
});

describe('each operator at and around its boundary', () => {
  /** Expected outcome of `actual op value`, by the definitions of the four comparisons. */
  const expected = (actual: number, op: string, v: number): boolean => (op === '<' ? actual < v : op === '<=' ? actual <= v : op === '>' ? actual > v : actual >= v);
  const OPS = ['<', '<=', '>', '>='] as const;

  test('sag.pass is exactly 1 on a divider whose dip stays within fall: < <= > >= at 1, 1 ± 1e-3', async () => {
    // The output follows the input: a 10 % dip of a 6 V output falls 0.6 V, within fall = 25 % (1.5 V).
    const lines = ['divider', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', '.figure sag depth=10% fall=25%'];
    const cases = OPS.flatMap((op) => [1, 0.999, 1.001].map((v) => ({ op, v })));
    const { status, json } = await runJson([...lines, ...cases.map((c) => `.limit sag.pass ${c.op} ${c.v}`)]);
    expect(json.figures['sag.pass']).toBe(1);
    expect(json.limits.map((l) => [l.op, l.value, l.pass])).toEqual(cases.map((c) => [c.op, c.v, expected(1, c.op, c.v)]));
    expect(status).toBe(1);
    const passing = cases.filter((c) => expected(1, c.op, c.v));
    expect((await runJson([...lines, ...passing.map((c) => `.limit sag.pass ${c.op} ${c.v}`)])).status).toBe(0);
  });

  test('a continuous figure: limits written at its measured value (shortest round-trip form) and 1e-9 either side', async () => {
    // The measured value only places the boundary; it is first checked against the closed form k = 1/2.
    const first = await runJson([...DIVIDER, '.figure line']);
    const a = first.json.figures['line.slope']!;
    // Observed 7.8e-16; bound 2e-15.
    expect(Math.abs(a - 0.5)).toBeLessThan(2e-15);
    const cases = OPS.flatMap((op) => [a, a - 1e-9, a + 1e-9].map((v) => ({ op, v })));
    const { json } = await runJson([...DIVIDER, '.figure line', ...cases.map((c) => `.limit line.slope ${c.op} ${String(c.v)}`)]);
    expect(json.limits.map((l) => l.value)).toEqual(cases.map((c) => c.v));
    expect(json.limits.map((l) => l.pass)).toEqual(cases.map((c) => expected(a, c.op, c.v)));
  });

  test('limit values take the usual suffixes: 450m is 0.45', async () => {
    // load.delta = 1 mA · 500 Ω = 0.5 V.
    const { status, json } = await runJson([...DIVIDER, '.figure load', '.limit load.delta > 450m', '.limit load.delta < 0.55']);
    expect(status).toBe(0);
    expect(json.limits.map((l) => l.value)).toEqual([0.45, 0.55]);
  });
});
