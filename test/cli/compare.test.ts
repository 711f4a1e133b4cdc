/**
 * `railcheck compare ORIGINAL MODIFIED` (docs/compare.md): exit status 0
 * when the modified stage passes every limit, 1 when it fails one (saying
 * whether the original passed it), 2 on an error in either file (naming
 * which); the --json shape; the note on inherited conditions; a part over
 * its rating shown first; help.
 */
import { describe, expect, test } from 'vitest';
import { cli, netlistFile, STACK_LINE } from './support.js';

const lines = (...ls: string[]): string => [...ls, '.end', ''].join('\n');

/**
 * A loaded divider (Thevenin and the divider formula, e.g. Horowitz & Hill,
 * The Art of Electronics, 3rd ed., §1.2.5, from memory): line.delta over
 * 10.8 V to 13.2 V is 2.4 V·R2/(R1+R2), 0.6 V for R1 = 3 kΩ and 0.8 V for
 * R1 = 2 kΩ; the limit of 0.7 V passes the first and fails the second.
 */
const divider = (r1: string, conditions = true) =>
  lines(
    'loaded divider',
    'V1 in 0 12',
    `R1 in out ${r1} pmax=40m`,
    'R2 out 0 1k',
    'ILOAD out 0 1m',
    ...(conditions ? ['.supply in=V1 out=out load=ILOAD', '.figure line', '.figure load', '.figure dissipation', '.limit line.delta <= 0.7'] : []),
    '.op',
  );

describe('exit status', () => {
  test('0: the modified stage passes every limit (R1 3 kΩ → 3.3 kΩ: line.delta 0.558 V)', async () => {
    const run = await cli(['compare', netlistFile(divider('3k'), 'a.cir'), netlistFile(divider('3.3k'), 'b.cir')]);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/verdict: the modified stage passes all 1 of its limits/);
    expect(run.err).toBe('');
  });

  test('1: a limit fails in the modified stage, and the report says the original passed it', async () => {
    const run = await cli(['compare', netlistFile(divider('3k'), 'a.cir'), netlistFile(divider('2k'), 'b.cir')]);
    expect(run.status).toBe(1);
    expect(run.out).toMatch(/line\.delta <= 0\.7 +pass \(600 mV\) +FAIL \(800 mV\)/);
    expect(run.out).toMatch(/the modified stage FAILS line\.delta <= 0\.7; the original passed it/);
    // R1's 40 mW rating: (13.2 − 2.55)²/3k = 37.81 mW at the worst corner (13.2 V, 1 mA) in the original, (13.2 − 3.733)²/2k = 44.81 mW in the modified.
    expect(run.out.indexOf('OVER RATING in the modified stage')).toBeLessThan(run.out.indexOf('What changed in the circuit'));
    expect(run.out).toMatch(/R1 dissipates 44\.81 mW, over its 40 mW rating; within its rating in the original \(37\.81 mW\)/);
    expect(run.out).toMatch(/R1 +value +resistance 3 kΩ → 2 kΩ/);
  });

  test('2: an error in the modified file names it, and nothing is compared', async () => {
    const bad = netlistFile(lines('bad', 'R1 a 0'), 'b.cir');
    const run = await cli(['compare', netlistFile(divider('3k'), 'a.cir'), bad]);
    expect(run.status).toBe(2);
    expect(run.out).toBe('');
    expect(run.err).toContain(`the modified netlist ${bad} has 1 error`);
    expect(run.err).not.toMatch(STACK_LINE);
  });

  test('2: an error in the original file names it', async () => {
    const run = await cli(['compare', 'no-such-original.cir', netlistFile(divider('3k'), 'b.cir')]);
    expect(run.status).toBe(2);
    expect(run.err).toMatch(/the original netlist no-such-original\.cir has 1 error/);
  });

  test('2: an error in a card the modified file inherited is at the original\'s line, and the message says so', async () => {
    const original = netlistFile(divider('3k'), 'a.cir');
    const run = await cli(['compare', original, netlistFile(divider('3k', false).replace('V1 in 0 12', 'VIN in 0 12'), 'b.cir')]);
    expect(run.status).toBe(2);
    // Line 6 of divider(): the .supply card naming V1.
    expect(run.err).toContain(`${original}:6:`);
    expect(run.err).toMatch(/the modified netlist .*b\.cir has \d+ errors? \(run with the original's \.supply, \.figure, \.limit lines/);
  });

  test('2: a limit of the modified stage not evaluated (its figure not measured); the report is still printed', async () => {
    const withLoad = divider('3k').replace('.limit line.delta <= 0.7', '.limit load.rout <= 800');
    const noLoad = withLoad.replace('.supply in=V1 out=out load=ILOAD', '.supply in=V1 out=out');
    const run = await cli(['compare', netlistFile(withLoad, 'a.cir'), netlistFile(noLoad, 'b.cir')]);
    expect(run.status).toBe(2);
    expect(run.out).toMatch(/load\.rout <= 800 +pass \(750 Ω\) +not evaluated/);
    expect(run.out).toMatch(/load\.rout not measured in the modified: /);
    expect(run.err).toMatch(/1 limit was not evaluated on the modified netlist .*b\.cir/);
  });

  test('2: wrong number of files', async () => {
    const run = await cli(['compare', 'a.cir']);
    expect(run.status).toBe(2);
    expect(run.err).toMatch(/expected two netlist files, ORIGINAL and MODIFIED, got 1: a\.cir/);
  });
});

describe('the report', () => {
  test('the inherited conditions are named', async () => {
    const run = await cli(['compare', netlistFile(divider('3k'), 'a.cir'), netlistFile(divider('2k', false), 'b.cir')]);
    expect(run.out).toMatch(/Conditions of the modified stage[\s\S]*\.supply +the original's[\s\S]*\.figure lines +the original's[\s\S]*\.limit lines +the original's/);
    expect(run.out).toMatch(/5 cards inherited from the original/);
    expect(run.status).toBe(1);
  });

  test('the same file against itself: nothing changed, every figure the same', async () => {
    const a = netlistFile(divider('3k'), 'a.cir');
    const run = await cli(['compare', a, a]);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/nothing: the two netlists elaborate to the same circuit/);
    expect(run.out).toMatch(/0 better, 0 worse, \d+ the same/);
  });

  test('--json: the documented members, with the verdicts against the divider formula', async () => {
    const run = await cli(['compare', netlistFile(divider('3k'), 'a.cir'), netlistFile(divider('2k', false), 'b.cir'), '--json']);
    expect(run.status).toBe(1);
    const j = JSON.parse(run.out) as Record<string, any>;
    expect(Object.keys(j)).toEqual(['original', 'modified', 'status', 'mains_fed', 'conditions', 'over_rating', 'changes', 'figures', 'limits', 'nodes', 'nodes_only_in', 'dissipation', 'warnings']);
    expect(j.status).toBe(1);
    expect(j.conditions).toEqual({ supply: 'inherited', figures: 'inherited', limits: 'inherited', temperatures: 'none', inherited_cards: 5, differing: [] });
    expect(j.changes.elements).toEqual([{ change: 'modified', element: 'R1', kind: 'resistor', moved: null, values: [{ what: 'resistance', unit: 'Ω', original: 3000, modified: 2000 }] }]);
    const delta = j.figures.find((f: any) => f.name === 'line.delta');
    expect(delta).toMatchObject({ unit: 'V', better: 'lower', verdict: 'worse', original: { status: 'measured' }, modified: { status: 'measured' } });
    // 0.6 V → 0.8 V (divider formula); LU rounding observed 1.4e-15 relative, bound 4e-15.
    expect(Math.abs(delta.absolute - 0.2)).toBeLessThan(4e-15 * 0.8);
    expect(j.limits[0]).toMatchObject({ figure: 'line.delta', op: '<=', value: 0.7, original: { status: 'pass', applied: true }, modified: { status: 'fail', applied: true } });
    expect(j.over_rating).toMatchObject([{ element: 'R1', over: true, pmax: 0.04, original: { over: false } }]);
    expect(j.mains_fed).toEqual({ original: false, modified: false });
    expect(j.nodes.map((n: any) => n.node)).toEqual(['in', 'out']);
  });

  test('a mains-fed stage carries the caution at the top', async () => {
    const mains = (r: string) => lines('mains dropper', 'V1 in 0 230', `R1 in out ${r}`, 'R2 out 0 1k', '.op');
    const run = await cli(['compare', netlistFile(mains('10k'), 'a.cir'), netlistFile(mains('12k'), 'b.cir')]);
    expect(run.out.split('\n').slice(0, 6).join('\n')).toMatch(/CAUTION \(both stages\): this stage works above extra-low voltage/);
  });
});

describe('help', () => {
  test.each([[['compare', '--help']], [['help', 'compare']]])('railcheck %j prints the compare usage', async (argv) => {
    const run = await cli(argv);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/usage: railcheck compare ORIGINAL MODIFIED/);
    expect(run.out).toMatch(/--json/);
  });
  test('the general usage lists compare', async () => {
    expect((await cli(['help'])).out).toMatch(/railcheck compare ORIGINAL MODIFIED/);
  });
});
