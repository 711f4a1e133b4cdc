/**
 * Every card kind of docs/netlist.md reads into the expected AST, and
 * the line rules (title, comments, continuations, blank lines, .end, case)
 * hold. Expected values follow from docs/netlist.md and its suffix table;
 * the circuits are invented demo stages.
 */
import { describe, expect, test } from 'vitest';
import { cardsOf, mustParse, oneCard, strip } from './support.js';

const num = (value: number) => ({ kind: 'number', value });

describe('elements', () => {
  test('R, C, L with ic= and pmax=', () => {
    expect(strip(oneCard('RB in ref 820 pmax=0.25'))).toEqual({ kind: 'R', name: 'RB', nodes: ['in', 'ref'], value: num(820), pmax: num(0.25) });
    expect(strip(oneCard('COUT out 0 100u ic=5'))).toEqual({ kind: 'C', name: 'COUT', nodes: ['out', '0'], value: num(100e-6), ic: num(5) });
    expect(strip(oneCard('L1 a b 10mH IC = 0.1'))).toEqual({ kind: 'L', name: 'L1', nodes: ['a', 'b'], value: num(10e-3), ic: num(0.1) });
  });

  test('V and I: bare dc, dc keyword, ac with and without phase, waveforms', () => {
    expect(strip(oneCard('VBAT in 0 12'))).toEqual({ kind: 'V', name: 'VBAT', nodes: ['in', '0'], dc: num(12) });
    expect(strip(oneCard('V1 in 0 DC 12 AC 1 90'))).toEqual({ kind: 'V', name: 'V1', nodes: ['in', '0'], dc: num(12), ac: { mag: num(1), phase: num(90) } });
    expect(strip(oneCard('ILOAD out 0 ac 1m'))).toEqual({ kind: 'I', name: 'ILOAD', nodes: ['out', '0'], ac: { mag: num(1e-3) } });
    expect(strip(oneCard('VSENSE a b'))).toEqual({ kind: 'V', name: 'VSENSE', nodes: ['a', 'b'] });
  });

  test('sin, pulse and pwl; parentheses and commas optional', () => {
    const withParens = strip(oneCard('VAC sec 0 sin(0, 17, 50, 1m)'));
    const without = strip(oneCard('VAC sec 0 SIN 0 17 50 1m'));
    expect(withParens).toEqual({ kind: 'V', name: 'VAC', nodes: ['sec', '0'], waveform: { kind: 'sin', vo: num(0), va: num(17), freq: num(50), td: num(1e-3) } });
    expect(without).toEqual(withParens);
    expect(strip(oneCard('V2 in 0 dc 12 pulse (0 12 1m 10u 10u 5m 10m)'))).toEqual({
      kind: 'V', name: 'V2', nodes: ['in', '0'], dc: num(12),
      waveform: { kind: 'pulse', v1: num(0), v2: num(12), td: num(1e-3), tr: num(1e-5), tf: num(1e-5), pw: num(5e-3), per: num(1e-2) },
    });
    expect(strip(oneCard('I1 out 0 pwl(0 0 1m 50m 2m 50m)'))).toEqual({
      kind: 'I', name: 'I1', nodes: ['out', '0'],
      waveform: { kind: 'pwl', points: [{ t: num(0), v: num(0) }, { t: num(1e-3), v: num(0.05) }, { t: num(2e-3), v: num(0.05) }] },
    });
    // Unparenthesised arguments stop at the next keyword.
    expect(strip(oneCard('V3 a 0 sin 0 1 50 ac 1 pmax=2'))).toMatchObject({ waveform: { kind: 'sin' }, ac: { mag: num(1) }, pmax: num(2) });
  });

  test('D and Q with model, area (bare or area=) and pmax', () => {
    expect(strip(oneCard('DZ 0 ref ZREF'))).toEqual({ kind: 'D', name: 'DZ', nodes: ['0', 'ref'], model: 'ZREF' });
    expect(strip(oneCard('D2 a k dmod 2 pmax=1'))).toEqual({ kind: 'D', name: 'D2', nodes: ['a', 'k'], model: 'dmod', area: num(2), pmax: num(1) });
    expect(strip(oneCard('Q1 in ref out NPASS'))).toEqual({ kind: 'Q', name: 'Q1', nodes: ['in', 'ref', 'out'], model: 'NPASS' });
    expect(strip(oneCard('Q2 c b e qp area=3'))).toEqual({ kind: 'Q', name: 'Q2', nodes: ['c', 'b', 'e'], model: 'qp', area: num(3) });
  });

  test('E, G, F, H', () => {
    expect(strip(oneCard('E1 out 0 in 0 2'))).toEqual({ kind: 'E', name: 'E1', nodes: ['out', '0', 'in', '0'], gain: num(2) });
    expect(strip(oneCard('G1 out 0 in 0 10m'))).toEqual({ kind: 'G', name: 'G1', nodes: ['out', '0', 'in', '0'], gain: num(0.01) });
    expect(strip(oneCard('F1 out 0 VSENSE 100'))).toEqual({ kind: 'F', name: 'F1', nodes: ['out', '0'], control: 'VSENSE', gain: num(100) });
    expect(strip(oneCard('H1 out 0 Vsense 1k pmax=0.1'))).toEqual({ kind: 'H', name: 'H1', nodes: ['out', '0'], control: 'Vsense', gain: num(1000), pmax: num(0.1) });
  });

  test('X with nodes, subcircuit and parameters (keys lower-cased; pmax is the rating)', () => {
    expect(strip(oneCard('X1 in out 0 follower Gain=2 rb={rb*2} pmax=1'))).toEqual({
      kind: 'X', name: 'X1', nodes: ['in', 'out', '0'], subckt: 'follower',
      params: [{ name: 'gain', value: num(2) }, { name: 'rb', value: { kind: 'expr', expr: { kind: 'binary', op: '*', left: { kind: 'param', name: 'rb' }, right: { kind: 'num', value: 2 } } } }],
      pmax: num(1),
    });
    expect(strip(oneCard('X2 lonely'))).toEqual({ kind: 'X', name: 'X2', nodes: [], subckt: 'lonely', params: [] });
  });
});

describe('directives', () => {
  test('.model with and without parentheses and commas; parameters upper-cased', () => {
    const a = strip(oneCard('.model ZREF D (IS=1e-14 N=1 BV=5.6 IBV=5m)'));
    const b = strip(oneCard('.MODEL ZREF d is=1e-14, n=1, bv=5.6, ibv=5m'));
    expect(a).toEqual({ kind: 'model', name: 'ZREF', type: 'D', params: [{ name: 'IS', value: num(1e-14) }, { name: 'N', value: num(1) }, { name: 'BV', value: num(5.6) }, { name: 'IBV', value: num(5e-3) }] });
    expect(b).toEqual(a);
    expect(strip(oneCard('.model qn npn(BF=150 VAF=90)'))).toMatchObject({ type: 'NPN', params: [{ name: 'BF' }, { name: 'VAF' }] });
    expect(strip(oneCard('.model qp PNP'))).toEqual({ kind: 'model', name: 'qp', type: 'PNP', params: [] });
  });

  test('.param with numbers and expressions, names lower-cased', () => {
    expect(strip(oneCard('.param VBAT=12 half={vbat/2}'))).toEqual({
      kind: 'param',
      assignments: [{ name: 'vbat', value: num(12) }, { name: 'half', value: { kind: 'expr', expr: { kind: 'binary', op: '/', left: { kind: 'param', name: 'vbat' }, right: { kind: 'num', value: 2 } } } }],
    });
  });

  test('.subckt with ports and defaults, nested definitions, .ends with and without name', () => {
    const cards = cardsOf('.subckt outer a b k=2\n.subckt inner p\nR1 p 0 1k\n.ends\nX1 a inner\nR2 a b {k}\n.ends outer');
    expect(strip(cards)).toEqual([{
      kind: 'subckt', name: 'outer', ports: ['a', 'b'], defaults: [{ name: 'k', value: num(2) }],
      body: [
        { kind: 'subckt', name: 'inner', ports: ['p'], defaults: [], body: [{ kind: 'R', name: 'R1', nodes: ['p', '0'], value: num(1000) }] },
        { kind: 'X', name: 'X1', nodes: ['a'], subckt: 'inner', params: [] },
        { kind: 'R', name: 'R2', nodes: ['a', 'b'], value: { kind: 'expr', expr: { kind: 'param', name: 'k' } } },
      ],
    }]);
  });

  test('.op .dc .tran .ac .temp', () => {
    expect(strip(cardsOf('.op\n.dc VBAT 6 14 0.5\n.tran 10u 20m\n.tran 1u 5m 1m 2u FROMIC\n.ac dec 20 1 1meg\n.ac LIN 5 10 50\n.temp -20 27 60'))).toEqual([
      { kind: 'op' },
      { kind: 'dc', source: 'VBAT', start: num(6), stop: num(14), step: num(0.5) },
      { kind: 'tran', tstep: num(1e-5), tstop: num(0.02), flags: [] },
      { kind: 'tran', tstep: num(1e-6), tstop: num(5e-3), tstart: num(1e-3), tmax: num(2e-6), flags: ['fromic'] },
      { kind: 'ac', variation: 'dec', points: num(20), fstart: num(1), fstop: num(1e6) },
      { kind: 'ac', variation: 'lin', points: num(5), fstart: num(10), fstop: num(50) },
      { kind: 'temp', temps: [num(-20), num(27), num(60)] },
    ]);
  });

  test('.supply, .figure, .limit, .spread', () => {
    const cards = cardsOf([
      'VBAT in 0 12',
      '.supply in=VBAT out=out ref=0 load=ILOAD feed=res',
      '.figure line from=10 to=14',
      '.figure ripple freq=100 amp=0.1 method=AC',
      '.figure sag depth=30% dur=50m',
      '.figure dissipation',
      '.limit line.delta <= 20m',
      '.limit ripple.rr>=40',
      '.limit pd.Q1 < 1',
      '.limit efficiency > 0.3',
      '.spread RB 5%',
      '.spread ZREF.bv 2% gauss',
    ].join('\n'));
    expect(strip(cards.slice(1))).toEqual([
      { kind: 'supply', input: 'VBAT', out: 'out', ref: '0', load: 'ILOAD', feed: 'res' },
      { kind: 'figure', figure: 'line', keys: [{ name: 'from', value: num(10) }, { name: 'to', value: num(14) }] },
      { kind: 'figure', figure: 'ripple', keys: [{ name: 'freq', value: num(100) }, { name: 'amp', value: num(0.1) }], method: 'ac' },
      { kind: 'figure', figure: 'sag', keys: [{ name: 'depth', value: { ...num(0.3), percent: true } }, { name: 'dur', value: num(0.05) }] },
      { kind: 'figure', figure: 'dissipation', keys: [] },
      { kind: 'limit', figure: 'line.delta', op: '<=', value: num(0.02) },
      { kind: 'limit', figure: 'ripple.rr', op: '>=', value: num(40) },
      { kind: 'limit', figure: 'pd.Q1', op: '<', value: num(1) },
      { kind: 'limit', figure: 'efficiency', op: '>', value: num(0.3) },
      { kind: 'spread', target: 'RB', ratio: { ...num(0.05), percent: true }, distribution: 'uniform' },
      { kind: 'spread', target: 'ZREF.BV', ratio: { ...num(0.02), percent: true }, distribution: 'gauss' },
    ]);
  });
});

describe('lines', () => {
  test('line 1 is the title, never a card; blank lines, * and ; comments are skipped', () => {
    const { netlist, warnings } = mustParse('Bench reference: 10 V from a 15 V rail\n\n* a comment line\n   * an indented comment\nR1 a 0 1k ; the load\n\n');
    expect(netlist.title).toBe('Bench reference: 10 V from a 15 V rail');
    expect(warnings).toEqual([]);
    expect(strip(netlist.cards)).toEqual([{ kind: 'R', name: 'R1', nodes: ['a', '0'], value: num(1000) }]);
  });

  test('a title that looks like a card is read as the title, with a warning at line 1', () => {
    for (const title of ['R1 in out 1k', '.op', '.tran 1m', 'VBAT in 0 12']) {
      const { netlist, warnings } = mustParse(`${title}\nR2 a 0 1k`);
      expect(netlist.title).toBe(title);
      expect(netlist.cards).toHaveLength(1);
      expect(warnings).toMatchObject([{ severity: 'warning', code: 'title-looks-like-card', pos: { line: 1, column: 1 } }]);
    }
    // A title beginning with an element letter but not a valid card does not warn.
    for (const title of ['Regulator test bench', 'Zener shunt', 'Capacitance multiplier for a model-railway controller']) {
      expect(mustParse(`${title}\nR2 a 0 1k`).warnings, title).toEqual([]);
    }
  });

  test('+ continues the previous line, across blank and comment lines; positions stay on their physical line', () => {
    const c = oneCard('V1 in 0\n+ dc 12\n* between\n\n+ ac 1 ; trailing\n+ pmax=3');
    expect(strip(c)).toEqual({ kind: 'V', name: 'V1', nodes: ['in', '0'], dc: num(12), ac: { mag: num(1) }, pmax: num(3) });
    if (c.kind !== 'V' || !c.dc || !c.ac) throw new Error('expected a V card');
    expect(c.pos).toMatchObject({ line: 2, column: 1 });
    expect(c.dc.pos).toMatchObject({ line: 3, column: 6 });
    expect(c.ac.mag.pos).toMatchObject({ line: 6, column: 6 });
    expect(c.lineText).toBe('V1 in 0');
  });

  test('.end ends the netlist: anything after it, even garbage, is ignored', () => {
    const cards = cardsOf('R1 a 0 1k\n.END\nthis is not a netlist {((\n+ nor this');
    expect(cards).toHaveLength(1);
  });

  test('keywords and directives are case-insensitive; names keep their spelling', () => {
    const cards = cardsOf('.MODEL Zx D (Bv=5)\n.Param Rv=1K\nV1 IN 0 Dc 5 Ac 1 Sin(0 1 50)\n.TRAN 1U 1M FromIC\n.Figure Sag Depth=20%\n.Supply IN=V1 OUT=IN');
    expect(strip(cards)).toMatchObject([
      { kind: 'model', name: 'Zx', params: [{ name: 'BV' }] },
      { kind: 'param', assignments: [{ name: 'rv', value: num(1000) }] },
      { kind: 'V', nodes: ['IN', '0'], dc: num(5), ac: { mag: num(1) }, waveform: { kind: 'sin' } },
      { kind: 'tran', flags: ['fromic'] },
      { kind: 'figure', figure: 'sag' },
      { kind: 'supply', input: 'V1', out: 'IN' },
    ]);
  });

  test('gnd and 0 are kept as written (the elaborator folds both to ground)', () => {
    expect(strip(oneCard('R1 a GND 1k'))).toMatchObject({ nodes: ['a', 'GND'] });
  });

  test('an empty text and a title-only text read as empty netlists; CRLF and a BOM are accepted', () => {
    expect(mustParse('').netlist).toMatchObject({ title: '', cards: [] });
    expect(mustParse('only a title').netlist).toMatchObject({ title: 'only a title', cards: [] });
    const { netlist } = mustParse('\ufeffWindows file\r\nR1 a 0 1k\r\n.end\r\n');
    expect(netlist.title).toBe('Windows file');
    expect(netlist.cards).toHaveLength(1);
  });

  test('the file option names positions', () => {
    const { netlist } = mustParse('t\nR1 a 0 1k', { file: 'stage.cir' });
    expect(netlist.file).toBe('stage.cir');
    expect(netlist.cards[0]?.pos).toEqual({ file: 'stage.cir', line: 2, column: 1 });
  });
});
