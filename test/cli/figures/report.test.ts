/**
 * The figure report of `railcheck run FILE` (text) and the mains caution
 * (rules of the project; docs/figures.md, "Safety"). The text is matched
 * loosely: headings, names, values in engineering notation with their
 * units, pass/FAIL and a verdict; the wording may change. Values are the
 * divider's closed forms (voltage divider, Thévenin, first-order RC).
 */
import { describe, expect, test } from 'vitest';
import { runJson, runLines } from './support.js';

// 12 V into 1 kΩ / 1 kΩ, 1 mA drawn, 10 µF across the output: k = 1/2, Rth = 500 Ω, Vout_nom = 5.5 V.
const STAGE = ['bench instrument reference: divider check', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', 'IL out 0 1m', 'C1 out 0 10u', '.supply in=V1 out=out load=IL'];
const FIGURES = ['.figure line from=11.9 to=12.1', '.figure load', '.figure dropout', '.figure ripple'];

/** The row of `name` in the report (a figure or limit table line). */
function row(text: string, name: string): string {
  const line = text.split('\n').find((l) => l.trim().startsWith(`${name} `));
  if (line === undefined) throw new Error(`no row for ${name} in:\n${text}`);
  return line;
}

describe('text report of figures and limits', () => {
  test('Stage section, each figure with its conditions, values with units and engineering prefixes', async () => {
    const r = await runLines([...STAGE, ...FIGURES, '.limit line.delta <= 120m', '.limit load.pct < 8']);
    const t = r.out;
    expect(t).toMatch(/^Stage$/m);
    const stage = t.slice(t.search(/^Stage$/m)).split(/\n\s*\n/)[0]!;
    expect(stage).toMatch(/^\s*input\s+V1.*12 V/m);
    expect(stage).toMatch(/^\s*output\s+out\b/m);
    expect(stage).toMatch(/^\s*load\s+IL.*1 mA/m);
    // Conditions: the ends of the line range, the load range, the ripple frequency.
    expect(t).toMatch(/line regulation.*11\.9 V.*12\.1 V/);
    expect(t).toMatch(/load regulation.*0 A.*1 mA/);
    expect(t).toMatch(/ripple rejection.*100 Hz/);
    // line.delta = k·0.2 V = 100 mV; slope 500 mV/V; 100·k/5.5 V = 9.091 %/V.
    expect(row(t, 'line.delta')).toMatch(/\b100(\.0+)? mV\b/);
    expect(row(t, 'line.slope')).toMatch(/\b500(\.0+)? mV\/V/);
    expect(row(t, 'line.pct_per_v')).toMatch(/9\.09\d* %\/V/);
    // load: Rth = 500 Ω, delta 1 mA·500 Ω = 500 mV, pct = 100·0.5/6 = 8.333 %.
    expect(row(t, 'load.rout')).toMatch(/\b500(\.0+)? Ω/);
    expect(row(t, 'load.delta')).toMatch(/\b500(\.0+)? mV\b/);
    expect(row(t, 'load.pct')).toMatch(/8\.33\d* %/);
    // dropout.headroom = fall/k = 200 mV.
    expect(row(t, 'dropout.headroom')).toMatch(/\b200(\.0+)? mV\b/);
    // 1/H = 1 + R1/R2 + jωR1C = 2 + j6.283: 20·log10(6.594) = 16.38 dB (first-order RC with a resistive shunt).
    const rr = 20 * Math.log10(Math.hypot(2, 2 * Math.PI * 100 * 1e3 * 10e-6));
    expect(row(t, 'ripple.rr')).toContain(`${rr.toFixed(2)} dB`);
  });

  test('limits with pass and FAIL, and a verdict line', async () => {
    const failing = await runLines([...STAGE, ...FIGURES, '.limit line.delta <= 120m', '.limit load.pct < 8']);
    expect(failing.status).toBe(1);
    expect(failing.out).toMatch(/^Limits$/m);
    expect(row(failing.out, 'line.delta <=')).toMatch(/\bpass\b/);
    expect(row(failing.out, 'load.pct <')).toMatch(/\bFAIL\b/);
    expect(failing.out).toMatch(/verdict:.*1 of 2.*FAIL/i);
    const passing = await runLines([...STAGE, ...FIGURES, '.limit line.delta <= 120m', '.limit load.pct < 9']);
    expect(passing.status).toBe(0);
    expect(passing.out).toMatch(/verdict:.*all 2.*pass/i);
    expect(passing.out).not.toMatch(/\bFAIL/);
  });
});

describe('mains caution above extra-low voltage', () => {
  // IEC 61140 extra-low voltage: at most 50 V a.c. r.m.s. or 120 V ripple-free d.c. (the limits
  // docs/figures.md and the README quote; from memory they match IEC 60449 band I).
  const divider = (source: string): string[] => ['line-powered divider', `V1 in 0 ${source}`, 'R1 in out 10k', 'R2 out 0 10k', '.supply in=V1 out=out', '.figure line'];
  const cautioned = (warnings: readonly string[]): boolean => warnings.some((w) => /extra-low voltage/.test(w) && /IEC 61140/.test(w));

  test('230 V d.c. input: the caution is in the JSON warnings and the text report', async () => {
    const { status, json } = await runJson(divider('230'));
    expect(status).toBe(0);
    expect(cautioned(json.warnings)).toBe(true);
    const text = (await runLines(divider('230'))).out;
    expect(text).toMatch(/extra-low voltage/);
    expect(text).toMatch(/IEC 61140/);
  });

  test('a sine of 325 V peak (230 V r.m.s.) carries the caution', async () => {
    const { json } = await runJson(['transformer primary side', 'V1 in 0 sin(0 325 50)', 'R1 in out 10k', 'R2 out 0 10k', '.supply in=V1 out=out', '.figure line']);
    expect(cautioned(json.warnings)).toBe(true);
  });

  test('48 V d.c. does not', async () => {
    const { json } = await runJson(divider('48'));
    expect(json.warnings.some((w) => /extra-low voltage/.test(w))).toBe(false);
  });

  test('at the limits: 120 V d.c. and 70 V peak (49.5 V r.m.s.) are extra-low; 121 V d.c. and 71 V peak (50.2 V r.m.s.) are not', async () => {
    const caution = async (source: string): Promise<boolean> => cautioned((await runJson([...divider(source).slice(0, -1), '.op'])).json.warnings);
    expect(await caution('120')).toBe(false);
    expect(await caution('121')).toBe(true);
    expect(await caution('sin(0 70 50)')).toBe(false);
    expect(await caution('sin(0 71 50)')).toBe(true);
  });
});
