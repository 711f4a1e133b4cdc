/**
 * A report survives one failing figure (docs/output.md, docs/figures.md
 * "Figures that cannot be measured"): the figure is reported as not
 * measured with the reason and its place, everything else is still
 * reported (text and JSON), a limit on it is not evaluated, and the exit
 * status is 2 only then. The circuit checks use laws from outside the
 * project: Kirchhoff's current law on the reported operating point, the
 * stage whose output is set by an ideal current source from its input (1 mA into 1 kΩ whatever the input).
 */
import { describe, expect, test } from 'vitest';
import { runJson, runLines, type FiguresJson } from './support.js';

/** The JSON members these tests read besides the figures ones (figures.md "Results", docs/output.md). */
interface ReportJson extends FiguresJson {
  op: { nodes: Record<string, number>; currents: Record<string, number> };
  figure_conditions: Record<string, string>;
  vout_nominal?: number;
}

/**
 * Kirchhoff's current law on a reported operating point holds to this, A:
 * the largest residual observed in these stages is 5.4e-12 A (the hold-up
 * stage's `res` node; the others about 7e-13 A), about three times that.
 */
const KCL_TOL = 1.5e-11;

/** Line number (1-based) of `text` in the lines written for a run. */
const lineOf = (lines: readonly string[], text: string): number => lines.indexOf(text) + 1;

/**
 * The weather-station follower of examples/sensor-rail-follower.cir with
 * the pass transistor's collector and emitter swapped (a pin-out mistake):
 * it runs inverted, the output sits below ground and grows in magnitude as
 * the input falls, so the output never falls by 100 mV and dropout cannot
 * be measured. The operating point is what shows the mistake.
 */
const SWAPPED = [
  'Weather-station sensor rail: follower with its pass transistor fitted the wrong way round',
  'VBAT in 0 dc 12',
  'RB in ref 680',
  'DZ 0 ref ZREF',
  'CREF ref 0 47u',
  'Q1 out ref in NPASS',
  'RBLEED out 0 1k',
  'COUT out 0 100u',
  'ILOAD out 0 50m',
  '.model ZREF D (IS=1e-14 N=1 BV=5.6 IBV=5m NBV=1.4 RS=3 PMAX=0.5)',
  '.model NPASS NPN (IS=2e-13 BF=150 VAF=90 RB=10 PMAX=1)',
  '.supply in=VBAT out=out load=ILOAD',
  '.figure line',
  '.figure load',
  '.figure dropout',
  '.figure ripple freq=100',
  '.figure dissipation',
  '.figure sag depth=30% dur=50m',
];
const SUPPLY_LINE = lineOf(SWAPPED, '.supply in=VBAT out=out load=ILOAD');

/** Kirchhoff's current law at `out` of the swapped follower: the currents into Q1's collector, RBLEED, COUT and ILOAD sum to zero (A). */
function kclAtOut(currents: Record<string, number>): number {
  return currents['Q1.c']! + currents['RBLEED']! + currents['COUT']! + currents['ILOAD']!;
}

describe('one figure that cannot be measured: the swapped transistor', () => {
  test('JSON: dropout is not measured with the reason at the .supply line; every other figure and the operating point are reported; exit 0 without a limit on it', async () => {
    const { status, json, err } = await runJson(SWAPPED);
    expect(status).toBe(0);
    expect(err).toBe('');
    const j = json as ReportJson;
    expect(j.not_measured).toEqual([
      expect.objectContaining({ figure: 'dropout', code: 'no-dropout', line: SUPPLY_LINE, column: 1, reason: expect.stringMatching(/never falls by 100 mV/) as unknown as string }),
    ]);
    expect(j.not_measured[0]!.file).toMatch(/stage\.cir$/);
    // Every other figure kind has its values and conditions; dropout has neither.
    for (const name of ['line.delta', 'line.slope', 'line.pct_per_v', 'load.delta', 'load.pct', 'load.rout', 'ripple.rr', 'ripple.rr_tran', 'ripple.out_pp', 'pd.Q1', 'pd.RB', 'sag.fall', 'sag.pass', 'sag.max_depth']) {
      expect(Number.isFinite(j.figures[name]), name).toBe(true);
    }
    expect(Object.keys(j.figures).filter((n) => n.startsWith('dropout.'))).toEqual([]);
    expect(Object.keys(j.figure_conditions).sort()).toEqual(['dissipation', 'line', 'load', 'ripple', 'sag']);
    // The operating point is there, and it is a solution: KCL at `out` holds.
    expect(Math.abs(kclAtOut(j.op.currents))).toBeLessThan(KCL_TOL);
    // ... and it shows the mistake: the output of a 12 V follower below ground.
    expect(j.op.nodes['out']!).toBeLessThan(0);
    // A note says so in the warnings, at the .figure line.
    expect(j.warnings.some((w) => w.includes(`:${lineOf(SWAPPED, '.figure dropout')}:1: warning: .figure dropout was not measured`))).toBe(true);
  });

  test('text: "not measured" under the dropout title with the reason; the other figures, the operating point and a note', async () => {
    const r = await runLines(SWAPPED);
    expect(r.status).toBe(0);
    const lines = r.out.split('\n');
    const title = lines.findIndex((l) => l.trim() === 'dropout');
    expect(title, r.out).toBeGreaterThan(0);
    expect(lines[title + 1]).toMatch(new RegExp(`^\\s+not measured: the output never falls by 100 mV.*stage\\.cir:${SUPPLY_LINE}:1\\)$`));
    expect(r.out).toMatch(/^ {2}not measured: dropout\b/m);
    for (const heading of ['line regulation — ', 'load regulation — ', 'ripple rejection — ', 'dissipation — ', 'input-dip ride-through — ']) expect(r.out).toContain(`  ${heading}`);
    expect(r.out).toMatch(/^Operating point at 27 °C$/m);
    expect(r.out).toMatch(/warning: \.figure dropout was not measured/);
  });

  test('a limit on the figure not measured is not evaluated: exit 2, the report still on standard output, the error on standard error', async () => {
    const lines = [...SWAPPED, '.limit dropout.v <= 2', '.limit ripple.rr >= 20'];
    const r = await runLines(lines, ['--json']);
    expect(r.status).toBe(2);
    const j = JSON.parse(r.out) as ReportJson;
    expect(j.limits[0]).toMatchObject({ figure: 'dropout.v', op: '<=', value: 2, status: 'not-evaluated', pass: false, actual: null, line: SUPPLY_LINE });
    expect(j.limits[0]!.reason).toMatch(/never falls/);
    expect(j.limits[1]).toMatchObject({ figure: 'ripple.rr', status: 'pass', pass: true });
    expect(r.err).toContain(`${r.file}:${lineOf(lines, '.limit dropout.v <= 2')}:1: error: .limit dropout.v was not evaluated`);
    expect(r.err).toMatch(/1 limit was not evaluated/);
    // The text report says the same in its limits table and verdict.
    const t = await runLines(lines);
    expect(t.status).toBe(2);
    expect(t.out).toMatch(/^\s+dropout\.v <= 2\s+not measured\s+not evaluated$/m);
    expect(t.out).toMatch(/verdict: 1 of 2 limits not evaluated.*1 pass/);
  });

  test('a limit failing elsewhere is exit 1; failing and not evaluated together is exit 2', async () => {
    // The inverted stage's output magnitude falls as the input rises (the negative-rail rule
    // takes line.delta on magnitudes), so line.delta < 0 and `line.delta >= 0` fails.
    const failing = await runJson([...SWAPPED, '.limit line.delta >= 0']);
    expect(failing.json.figures['line.delta']!).toBeLessThan(0);
    expect(failing.status).toBe(1);
    expect(failing.json.limits.map((l) => l.status)).toEqual(['fail']);
    const both = await runJson([...SWAPPED, '.limit line.delta >= 0', '.limit dropout.headroom > 1']);
    expect(both.status).toBe(2);
    expect(both.json.limits.map((l) => l.status)).toEqual(['fail', 'not-evaluated']);
  });
});

describe('the same rules on a stage with closed forms', () => {
  // The output is set by an ideal current source from the input: Vout = 1 mA · 1 kΩ = 1 V whatever V1
  // does (Ohm's law), so line.delta = 0 exactly and the output never falls: no dropout.
  const OWN = ['output set by a current source', 'V1 in 0 12', 'I1 in out 1m', 'R4 out 0 1k', '.supply in=V1 out=out', '.figure line', '.figure dropout'];

  test('exit 0 with a passing limit, 1 with a failing one, 2 with one on the figure not measured', async () => {
    const pass = await runJson([...OWN, '.limit line.delta <= 1m']);
    expect(pass.json.figures['line.delta']).toBe(0);
    expect((pass.json as ReportJson).vout_nominal).toBe(1);
    expect(pass.json.not_measured.map((n) => n.figure)).toEqual(['dropout']);
    expect(pass.status).toBe(0);
    expect((await runJson([...OWN, '.limit line.delta >= 1m'])).status).toBe(1);
    expect((await runJson([...OWN, '.limit dropout.vin < 5'])).status).toBe(2);
  });

  test('a value that comes out infinite is not measured: |Vout/Vin| = 0 makes ripple.rr = −20·log10(0) = +∞', async () => {
    const lines = [...OWN.filter((l) => !l.startsWith('.figure')), '.figure ripple method=ac', '.limit ripple.rr >= 40'];
    const r = await runLines(lines, ['--json']);
    const j = JSON.parse(r.out) as ReportJson;
    // `figures` holds numbers only (figures.md): ripple.rr is left out, ripple.out_pp is absent with method=ac.
    expect(j.figures).toEqual({});
    expect(r.out).not.toMatch(/NaN|Infinity/);
    expect(j.not_measured).toEqual([expect.objectContaining({ figure: 'ripple', value: 'ripple.rr', code: 'not-finite', reason: expect.stringMatching(/\+∞/) as unknown as string })]);
    expect(j.limits[0]).toMatchObject({ figure: 'ripple.rr', status: 'not-evaluated', actual: null });
    expect(r.status).toBe(2);
    const t = await runLines(lines);
    expect(t.out).not.toMatch(/NaN|Infinity/);
    expect(t.out).toMatch(/^\s+not measured: ripple\.rr came out as \+∞/m);
  });
});

describe('a figure whose transient fails', () => {
  /**
   * A logger's hold-up stage: an ideal diode straight into a reservoir
   * capacitor, no resistance anywhere in the path from the battery, asked
   * for an abrupt dip (edge=0): the dip transient cannot be run.
   */
  const HOLD_UP = [
    'Weather-station logger: hold-up diode and reservoir ahead of the follower',
    'VBAT in 0 12',
    'DH in res DHOLD',
    'CRES res 0 1000u',
    'RB res ref 680',
    'DZ 0 ref ZREF',
    'Q1 res ref out NPASS',
    'RBLEED out 0 1k',
    'ILOAD out 0 50m',
    '.model DHOLD D (IS=1e-9 N=1.05)',
    '.model ZREF D (IS=1e-14 N=1 BV=5.6 IBV=5m NBV=1.4 RS=3 PMAX=0.5)',
    '.model NPASS NPN (IS=2e-13 BF=150 VAF=90 RB=10 PMAX=1)',
    '.supply in=VBAT out=out load=ILOAD',
    '.figure line',
    '.figure sag depth=60% dur=20m edge=0',
  ];

  test('sag is not measured, line and the operating point are reported; a limit on sag is not evaluated, one on line still decides', async () => {
    const { status, json } = await runJson(HOLD_UP);
    expect(status).toBe(0);
    const j = json as ReportJson;
    expect(j.not_measured).toEqual([expect.objectContaining({ figure: 'sag', code: 'transient-failed', line: lineOf(HOLD_UP, '.supply in=VBAT out=out load=ILOAD'), reason: expect.stringMatching(/^sag: /) as unknown as string })]);
    expect(Object.keys(j.figures).sort()).toEqual(['line.delta', 'line.pct_per_v', 'line.slope']);
    // KCL at `res`: the diode's current feeds RB and Q1's collector (the capacitor carries none at DC).
    const c = j.op.currents;
    expect(Math.abs(c['DH']! - c['RB']! - c['Q1.c']! - c['CRES']!)).toBeLessThan(KCL_TOL);
    expect((await runJson([...HOLD_UP, '.limit sag.pass >= 1'])).status).toBe(2);
    // line.slope of a follower is well below 1 V/V: `< 1` passes, `< 1u` fails.
    expect((await runJson([...HOLD_UP, '.limit line.slope < 1'])).status).toBe(0);
    expect((await runJson([...HOLD_UP, '.limit line.slope < 1u'])).status).toBe(1);
  });
});

describe('when the nominal point itself cannot be solved', () => {
  /**
   * examples/railway-transformer-follower.cir with the winding resistance
   * typed as 1 µΩ and no diode resistance: the bridge charges the
   * reservoir through nothing but its junctions and the first cycle's
   * transient fails, so no figure can be measured. The DC operating point
   * (the source at its t = 0 value) is still found and reported.
   */
  const IDEAL_BRIDGE = [
    'Model-railway accessory supply: bridge with the winding resistance mistyped',
    'VSEC w b sin(0 17 50)',
    'RWIND w a 1u',
    'D1 a res DBR',
    'D2 b res DBR',
    'D3 0 a DBR',
    'D4 0 b DBR',
    'CRES res 0 2200u',
    'RB res ref 470',
    'DZ 0 ref Z10',
    'CREF ref 0 47u',
    'Q1 res ref out NPASS',
    'RBLEED out 0 1k',
    'ILOAD out 0 150m',
    '.model DBR D (IS=1e-9 N=1.8 CJO=60p PMAX=1)',
    '.model Z10 D (IS=1e-14 BV=10 IBV=5m NBV=1.3 RS=4 PMAX=0.5)',
    '.model NPASS NPN (IS=5e-13 BF=120 VAF=80 RB=5 PMAX=2)',
    '.supply in=VSEC out=out load=ILOAD feed=res',
    '.figure line',
    '.figure ripple',
    '.figure dropout',
  ];
  const SUPPLY = lineOf(IDEAL_BRIDGE, '.supply in=VSEC out=out load=ILOAD feed=res');

  test('every figure is not measured with the same reason, the operating point is reported, limits are not evaluated (exit 2)', async () => {
    const lines = [...IDEAL_BRIDGE, '.limit ripple.rr >= 20'];
    const r = await runLines(lines, ['--json']);
    expect(r.status).toBe(2);
    const j = JSON.parse(r.out) as ReportJson;
    expect(j.figures).toEqual({});
    expect(j.vout_nominal).toBeUndefined();
    expect(j.not_measured.map((n) => n.figure)).toEqual(['line', 'ripple', 'dropout']);
    for (const n of j.not_measured) {
      expect(n).toMatchObject({ code: 'transient-failed', line: SUPPLY, column: 1 });
      expect(n.reason).toMatch(/^the stage's nominal point could not be solved: .*transient failed/);
    }
    expect(j.limits).toEqual([expect.objectContaining({ figure: 'ripple.rr', status: 'not-evaluated', actual: null, pass: false })]);
    // KCL at `out` on the reported operating point.
    const c = j.op.currents;
    expect(Math.abs(c['Q1.e']! + c['RBLEED']! + c['ILOAD']!)).toBeLessThan(KCL_TOL);
    expect(r.err).toMatch(/\.limit ripple\.rr was not evaluated/);
  });

  test('text: one line naming every figure not measured and the reason once; without limits, exit 0', async () => {
    const r = await runLines(IDEAL_BRIDGE);
    expect(r.status).toBe(0);
    expect(r.out).toMatch(/^ {2}not measured: line regulation, ripple rejection, dropout$/m);
    expect(r.out.match(/nominal point could not be solved/g)).toHaveLength(2); // the Figures section and one note
    expect(r.out).toMatch(/^Operating point at 27 °C$/m);
  });
});
