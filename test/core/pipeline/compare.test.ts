/**
 * compareNetlists (docs/compare.md): the change of every figure, node and
 * dissipation of a stage whose change is known in closed form, checked
 * against the formula; the better/worse verdict of each against the
 * direction docs/figures.md states; two spellings of one circuit show no
 * change; conditions inherited at the card level; the circuit changes in
 * engineering terms; errors name the file.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { compareNetlists, compareNetlistFiles, parseNetlist, type CompareReport, type CompareResult, type FigureComparison } from '@railcheck/core';

const lines = (...ls: string[]): string => [...ls, '.end', ''].join('\n');
const parse = (text: string, file: string) => parseNetlist(text, { file });
const compared = (r: CompareResult): CompareReport => {
  if (!r.ok) throw new Error(`${r.file}: ${r.errors.map((e) => e.message).join('\n')}`);
  return r.report;
};
const figure = (r: CompareReport, name: string): FigureComparison => {
  const f = r.figures.find((x) => x.name === name);
  if (!f) throw new Error(`no ${name}`);
  return f;
};
const measured = (f: FigureComparison, side: 'original' | 'modified'): number => {
  const s = f[side];
  if (s.status !== 'measured') throw new Error(`${f.name} not measured in the ${side}`);
  return s.value;
};

/**
 * A loaded divider: Vin – R1 – out – R2 – ground, a 1 mA current-source
 * load at out. Thevenin's theorem with the divider formula (any circuits
 * text, e.g. Horowitz & Hill, The Art of Electronics, 3rd ed., §1.2.5-1.2.6,
 * from memory): Vout = Vin·R2/(R1+R2) − I·R1·R2/(R1+R2); the power in R1
 * is (Vin − Vout)²/R1 (Ohm's law and Joule's law).
 */
const divider = (r1: string, extra: string[] = []) =>
  lines(
    'loaded divider',
    'V1 in 0 12',
    `R1 in out ${r1} pmax=40m`,
    'R2 out 0 1k',
    'ILOAD out 0 1m',
    ...extra,
    '.supply in=V1 out=out load=ILOAD',
    '.figure line',
    '.figure load',
    '.figure dissipation',
    '.limit line.delta <= 0.7',
    '.limit load.rout <= 800',
  );
const vout = (vin: number, r1: number, r2: number, i: number): number => (vin * r2) / (r1 + r2) - (i * r1 * r2) / (r1 + r2);

describe('a divider whose series resistor goes from 3 kΩ to 2 kΩ, against the divider formula', () => {
  const r = compared(compareNetlists(parse(divider('3k'), 'a.cir'), parse(divider('2k'), 'b.cir')));
  const R2 = 1000;
  const I = 1e-3;
  // The line figure's default ends are 0.9 and 1.1 × nominal (docs/figures.md, "line"): 10.8 V and 13.2 V.
  const [lo, hi] = [10.8, 13.2];
  // A linear circuit solved by LU: the largest relative error observed over these checks is 1.4e-15; bound 4e-15.
  const close = (x: number, want: number): void => expect(Math.abs(x - want)).toBeLessThanOrEqual(4e-15 * Math.abs(want));

  test('the change: R1 resistance 3 kΩ → 2 kΩ, nothing else', () => {
    expect(r.changes.elements).toEqual([{ change: 'modified', element: 'R1', kind: 'resistor', moved: undefined, values: [{ what: 'resistance', unit: 'Ω', original: 3000, modified: 2000 }] }]);
    expect(r.changes.models).toEqual([]);
    expect(r.changes.params).toEqual([]);
  });

  test('line.delta = (hi − lo)·R2/(R1+R2): 0.6 V → 0.8 V, +33 %, worse (lower is better)', () => {
    const f = figure(r, 'line.delta');
    for (const [side, r1] of [['original', 3000], ['modified', 2000]] as const) close(measured(f, side), vout(hi, r1, R2, I) - vout(lo, r1, R2, I));
    close(f.absolute!, 0.8 - 0.6);
    close(f.relative!, (0.8 - 0.6) / 0.6);
    expect([f.better, f.verdict]).toEqual(['lower', 'worse']);
  });

  test('load.rout = R1‖R2: 750 Ω → 666.7 Ω, better (lower is better); load.delta = I·R1‖R2, better', () => {
    const rout = figure(r, 'load.rout');
    close(measured(rout, 'original'), 750);
    close(measured(rout, 'modified'), 2000 / 3);
    close(rout.relative!, 2000 / 3 / 750 - 1);
    expect(rout.verdict).toBe('better');
    const delta = figure(r, 'load.delta');
    close(measured(delta, 'modified'), I * (2000 / 3));
    expect(delta.verdict).toBe('better');
  });

  test('line.pct_per_v = 100·slope/Vout_nom: 11.11 %/V → 10 %/V, better', () => {
    const f = figure(r, 'line.pct_per_v');
    close(measured(f, 'original'), (100 * 0.25) / vout(12, 3000, R2, I));
    close(measured(f, 'modified'), (100 * (1 / 3)) / vout(12, 2000, R2, I));
    expect(f.verdict).toBe('better');
  });

  test('efficiency = I·Vout / (Vin·I_in) rises: better (higher is better)', () => {
    const f = figure(r, 'efficiency');
    const eff = (r1: number): number => {
      const v = vout(12, r1, R2, I);
      return (I * v) / (12 * ((12 - v) / r1));
    };
    close(measured(f, 'original'), eff(3000));
    close(measured(f, 'modified'), eff(2000));
    expect([f.better, f.verdict]).toEqual(['higher', 'better']);
  });

  test('pd.R1 at the worst corner (13.2 V, 1 mA) goes over the 40 mW rating: 37.8 mW → 44.8 mW, flagged first', () => {
    const p = (vin: number, r1: number): number => (vin - vout(vin, r1, R2, I)) ** 2 / r1;
    const f = figure(r, 'pd.R1');
    close(measured(f, 'original'), p(hi, 3000));
    close(measured(f, 'modified'), p(hi, 2000));
    expect(f.verdict).toBe('worse');
    const d = r.dissipation.find((x) => x.element === 'R1')!;
    // At the operating point (12 V) both are within the rating: 31.7 mW and 37.6 mW.
    close(d.original!.power, p(12, 3000));
    close(d.modified!.power, p(12, 2000));
    expect([d.original!.over, d.modified!.over]).toEqual([false, true]);
    expect(r.overRating.map((x) => x.element)).toEqual(['R1']);
  });

  test('the operating point: V(out) 2.25 V → 3.333 V, V(in) the same', () => {
    const out = r.nodes.find((n) => n.node === 'out')!;
    close(out.original, vout(12, 3000, R2, I));
    close(out.modified, vout(12, 2000, R2, I));
    expect(r.nodes.find((n) => n.node === 'in')).toEqual({ node: 'in', original: 12, modified: 12 });
  });

  test('limits: line.delta <= 0.7 passes in the original (0.6 V) and fails in the modified (0.8 V); load.rout passes in both', () => {
    const l = r.limits.find((x) => x.figure === 'line.delta')!;
    expect([l.original.status, l.modified.status, l.modified.applied]).toEqual(['pass', 'fail', true]);
    expect(r.limits.find((x) => x.figure === 'load.rout')!.modified.status).toBe('pass');
  });

  test('a capacitor changed alone leaves every DC figure the same (a capacitor carries no DC current)', () => {
    const same = compared(compareNetlists(parse(divider('3k', ['COUT out 0 10u']), 'a.cir'), parse(divider('3k', ['COUT out 0 22u']), 'b.cir')));
    expect(same.changes.elements).toEqual([{ change: 'modified', element: 'COUT', kind: 'capacitor', moved: undefined, values: [{ what: 'capacitance', unit: 'F', original: 10e-6, modified: 22e-6 }] }]);
    expect(same.figures.length).toBeGreaterThan(5);
    for (const f of same.figures) expect([f.name, f.verdict]).toEqual([f.name, 'same']);
  });
});

describe('a Zener shunt whose series resistor is changed, against the small-signal shunt formula', () => {
  // Shunt regulator Vin – RS – out – Zener to ground. Small-signal: ΔVout/ΔVin = rz/(RS + rz) with the
  // Zener's dynamic resistance rz = NBV·VT/Iz + RSz in breakdown (the Shockley breakdown branch's
  // slope; Sedra & Smith, Microelectronic Circuits, 7th ed., §4.7, shunt regulator, from memory).
  // A larger RS divides the input change down further: line.delta smaller, better.
  const zener = (rs: string) =>
    lines('zener shunt', 'V1 in 0 15', `RS in out ${rs}`, 'DZ 0 out ZD', '.model ZD D (IS=1e-14 N=1 BV=6.2 IBV=1m NBV=1 RS=2)', '.supply in=V1 out=out', '.figure line from=14.9 to=15.1');
  const r = compared(compareNetlists(parse(zener('470'), 'a.cir'), parse(zener('1k'), 'b.cir')));
  test('the change is RS 470 Ω → 1 kΩ', () => {
    expect(r.changes.elements).toEqual([{ change: 'modified', element: 'RS', kind: 'resistor', moved: undefined, values: [{ what: 'resistance', unit: 'Ω', original: 470, modified: 1000 }] }]);
  });
  test('line.slope follows rz/(RS + rz) in both versions; the verdict is better', () => {
    const f = figure(r, 'line.slope');
    const VT = (1.380649e-23 * 300.15) / 1.602176634e-19; // k·T/q at 27 °C (CODATA 2018 constants)
    for (const [side, rs] of [['original', 470], ['modified', 1000]] as const) {
      const vz = r.nodes.find((n) => n.node === 'out')![side];
      const iz = (15 - vz) / rs;
      const rz = VT / iz + 2;
      // The line ends are ±0.1 V about 15 V, so the slope is the small-signal ratio up to the curvature of the
      // exponential over that range: observed 1.8e-5 (470 Ω) and 2.6e-5 (1 kΩ) relative to the formula; bound 7e-5.
      expect(Math.abs(measured(f, side) / (rz / (rs + rz)) - 1)).toBeLessThan(7e-5);
    }
    expect(f.verdict).toBe('better');
    expect(measured(f, 'modified')).toBeLessThan(measured(f, 'original'));
  });
});

describe('two spellings of one circuit show no change', () => {
  test('10k, 10000 and 10K; 4.7u, 4.7e-6 and 4.7U; {4.7/1e6}: one value each (SPICE suffixes are case-insensitive, netlist.md)', () => {
    const rc = (r: string, c: string) => lines('rc', 'V1 in 0 5', `R1 in out ${r}`, `C1 out 0 ${c}`, 'R2 out 0 22k', '.op');
    const spellings = [rc('10k', '4.7u'), rc('10000', '4.7e-6'), rc('10K', '4.7U'), rc('{5k*2}', '{4.7/1e6}')];
    for (const a of spellings) {
      for (const b of spellings) {
        expect(compared(compareNetlists(parse(a, 'a.cir'), parse(b, 'b.cir'))).changes).toEqual({ elements: [], models: [], params: [] });
      }
    }
    // And the comparison does see a change of one part in a million.
    const r = compared(compareNetlists(parse(rc('10k', '4.7u'), 'a.cir'), parse(rc('10.00001k', '4.7u'), 'b.cir')));
    expect(r.changes.elements.map((e) => e.element)).toEqual(['R1']);
  });

  const original = readFileSync('examples/sensor-rail-follower.cir', 'utf8');
  // The same stage with its cards in another order, other spacing and case, and other number spellings
  // (680 ↔ 0.68k, 47u ↔ 47e-6, 100u ↔ 100U, 50m ↔ 0.05, 5.6 ↔ 5600m, 2m ↔ 2e-3, 157 ↔ 1.57e2), its models in the
  // same datasheet form.
  const respelled = [
    'Weather-station sensor rail, written another way',
    '.MODEL npass npn (hfe=1.57e2 ichfe=0.05 vbe=680m vce=5 va=90 rb=10 pmax=1)',
    '.model zref D (VZ=5620m IZT=5m ZZT=10.2 IZK=1m ZZK=0.039k TCVZ=2e-3 PMAX=500m)',
    '.param VBAT = 12',
    'iload OUT 0    0.05',
    'cout  OUT 0    100U',
    'rbleed   OUT 0 1K',
    'q1 IN REF OUT npass',
    'cref REF 0 47e-6',
    'dz 0 REF zref',
    'rb IN REF 0.68k pmax=250m',
    'vbat IN 0 DC {VBAT}',
    '.limit sag.pass >= 1',
    '.limit ripple.rr >= 30',
    '.limit dropout.v <= 1.9',
    '.limit load.rout <= 2',
    '.limit line.pct_per_v <= 0.5',
    '.figure sag depth=0.3 dur=50m',
    '.figure dissipation',
    '.figure ripple freq=0.1k',
    '.figure dropout',
    '.figure load',
    '.figure line',
    '.supply in=vbat out=OUT load=iload',
    '.op',
    '.end',
    '',
  ].join('\n');
  const r = compared(compareNetlists(parse(original, 'a.cir'), parse(respelled, 'b.cir')));

  test('no element, model or parameter change', () => {
    expect(r.changes).toEqual({ elements: [], models: [], params: [] });
  });

  test('every figure the same, every limit with the same outcome, every node voltage equal', () => {
    expect(r.figures.length).toBe(20);
    // Another order of the cards is another order of the equations: the figures then differ by rounding only.
    // Largest relative difference observed over the 20 figures: 5.4e-11; bound 1.5e-10. The verdict's
    // own tolerance (SAME_FIGURE_RTOL, 1e-9) sits above that with room for stiffer stages.
    const worst = Math.max(...r.figures.map((f) => Math.abs(f.absolute ?? 0) / Math.max(1e-30, Math.abs(measured(f, 'original')))));
    expect(worst).toBeLessThan(1.5e-10);
    for (const f of r.figures) expect([f.name, f.verdict]).toEqual([f.name, 'same']);
    for (const l of r.limits) expect(l.modified.status).toBe(l.original.status);
    for (const n of r.nodes) expect(Math.abs(n.modified - n.original)).toBeLessThanOrEqual(1e-9 * Math.abs(n.original));
    expect(r.nodes.map((n) => n.node).sort()).toEqual(['in', 'out', 'ref']);
    expect(r.conditions).toMatchObject({ supply: 'own', figures: 'own', limits: 'own', differing: [] });
  });
});

describe('conditions the modified netlist inherits', () => {
  const bare = lines('divider, bare', 'V1 in 0 12', 'R1 in out 2k pmax=40m', 'R2 out 0 1k', 'ILOAD out 0 1m', '.op');

  test('a netlist without .supply, .figure and .limit lines is measured with the original\'s', () => {
    const r = compared(compareNetlists(parse(divider('3k'), 'a.cir'), parse(bare, 'b.cir')));
    expect(r.conditions).toEqual({ supply: 'inherited', figures: 'inherited', limits: 'inherited', temperatures: 'none', inheritedCards: 6, differing: [] });
    // The same figures as when the modified netlist carries them itself (the divider formula above: 0.8 V).
    expect(Math.abs(measured(figure(r, 'line.delta'), 'modified') - 0.8)).toBeLessThan(1e-12);
    // An inherited limit applies to the modified stage and is placed at the original's line.
    const l = r.limits.find((x) => x.figure === 'line.delta')!;
    expect([l.modified.status, l.modified.applied]).toEqual(['fail', true]);
    expect(r.modified.figures!.limits.find((x) => x.figure === 'line.delta')!.origin.pos).toMatchObject({ file: 'a.cir', line: 10 }); // line 10 of divider(): the .limit line.delta card
  });

  test('.temp goes too: figures at the original\'s first temperature', () => {
    const r = compared(compareNetlists(parse(divider('3k', ['.temp 50']), 'a.cir'), parse(bare, 'b.cir')));
    expect(r.conditions.temperatures).toBe('inherited');
    expect(r.modified.circuit.temperatures).toEqual([50]);
  });

  test('its own figure lines with other keys are used and noted as differing', () => {
    const own = bare.replace('.op', '.supply in=V1 out=out load=ILOAD\n.figure line from=11 to=13\n.figure load\n.op');
    const r = compared(compareNetlists(parse(divider('3k'), 'a.cir'), parse(own, 'b.cir')));
    expect(r.conditions).toMatchObject({ supply: 'own', figures: 'own', limits: 'inherited', differing: ['figures'] });
  });

  test('an error in an inherited card: the modified file fails, at the original\'s line', () => {
    const renamed = bare.replace('V1 in 0 12', 'VIN in 0 12');
    const r = compareNetlists(parse(divider('3k'), 'a.cir'), parse(renamed, 'b.cir'));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.file).toBe('modified');
    expect(r.conditions?.supply).toBe('inherited');
    expect(r.errors[0]!.pos).toMatchObject({ file: 'a.cir', line: 6 }); // line 6 of divider(): the .supply card naming V1
  });
});

describe('a figure one version cannot measure', () => {
  test('the load figure without load= on the modified .supply: not measured there, with the reason, and not compared', () => {
    const noLoad = divider('3k').replace('.supply in=V1 out=out load=ILOAD', '.supply in=V1 out=out');
    const r = compared(compareNetlists(parse(divider('3k'), 'a.cir'), parse(noLoad, 'b.cir')));
    for (const name of ['load.delta', 'load.pct', 'load.rout']) {
      const f = figure(r, name);
      expect([f.original.status, f.modified.status, f.verdict, f.absolute]).toEqual(['measured', 'not-measured', 'not-compared', undefined]);
    }
    expect(r.figures.some((f) => f.name === 'load')).toBe(false);
    const rout = r.limits.find((l) => l.figure === 'load.rout')!;
    expect([rout.original.status, rout.modified.status]).toEqual(['pass', 'not-evaluated']);
  });
});

describe('the circuit changes in engineering terms', () => {
  const base = (...ls: string[]) => lines('changes', '.param gain=2', 'V1 in 0 {6*gain}', 'R1 in out 3k', 'R2 out 0 1k', 'D1 out 0 DA', '.model DA D (IS=1e-14 BV=20)', ...ls, '.op');
  test('an element moved, added, removed; a model parameter and a .param changed', () => {
    const a = base('R3 out 0 10k');
    const b = lines('changes', '.param gain=2.5', 'V1 in 0 {6*gain}', 'R1 in mid 3k', 'R4 mid out 1', 'R2 out 0 1k', 'D1 out 0 DA', '.model DA D (IS=1e-14 BV=22)', '.op');
    const r = compared(compareNetlists(parse(a, 'a.cir'), parse(b, 'b.cir')));
    expect(r.changes.params).toEqual([{ change: 'modified', name: 'gain', original: 2, modified: 2.5 }]);
    expect(r.changes.models).toEqual([{ change: 'modified', model: 'DA', type: 'diode', params: [{ what: 'BV', unit: '', original: 20, modified: 22 }] }]);
    expect(r.changes.elements).toEqual([
      { change: 'modified', element: 'V1', kind: 'vsource', moved: undefined, values: [{ what: 'dc', unit: 'V', original: 12, modified: 15 }] },
      { change: 'modified', element: 'R1', kind: 'resistor', moved: { from: ['in', 'out'], to: ['in', 'mid'] }, values: [] },
      { change: 'removed', element: 'R3', kind: 'resistor', nodes: ['out', '0'] },
      { change: 'added', element: 'R4', kind: 'resistor', nodes: ['mid', 'out'] },
    ]);
    expect(r.nodesOnlyIn).toEqual({ original: [], modified: ['mid'] });
  });
});

describe('errors name the file', () => {
  test('an error in the original', () => {
    const r = compareNetlists(parse(lines('bad', 'R1 a 0'), 'a.cir'), parse(divider('3k'), 'b.cir'));
    expect(r.ok ? undefined : [r.file, r.path]).toEqual(['original', 'a.cir']);
  });
  test('a missing modified file', () => {
    const r = compareNetlistFiles('examples/sensor-rail-follower.cir', 'examples/no-such-file.cir');
    expect(r.ok ? undefined : [r.file, r.path]).toEqual(['modified', 'examples/no-such-file.cir']);
  });
  test('a parse result edited by hand (its cards not a list) is a bad-argument result, not an exception', () => {
    const good = parse(divider('3k'), 'b.cir');
    if (!good.ok) throw new Error('does not parse');
    const r = compareNetlists(parse(divider('3k'), 'a.cir'), { ...good, netlist: { ...good.netlist, cards: 7 as never } });
    expect(r.ok ? undefined : [r.file, r.errors[0]!.code]).toEqual(['modified', 'bad-argument']);
  });
  test('an argument that is no parse result', () => {
    const r = compareNetlists({} as never, parse(divider('3k'), 'b.cir'));
    expect(r.ok ? undefined : [r.file, r.errors[0]!.code]).toEqual(['original', 'bad-argument']);
  });
});
