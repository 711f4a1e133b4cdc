/**
 * Model binding, F/H control resolution and directive resolution
 * (docs/netlist.md: Models, Elements, Analyses, Power-supply directives).
 * Model defaults are checked against the values docs/models.md lists (the
 * defaults of the published models), written out here, not against the
 * code's parameter tables. Controlled-source results are worked by hand from
 * Ohm's law and the element definitions of netlist.md.
 */
import { describe, expect, test } from 'vitest';
import { element, elaborationErrors, flatten, solve } from './support.js';

/** docs/models.md, Diode, "Defaults:" (BV, PMAX and the ratings VRRM, IFAV, IFRM: none). */
const DIODE_DEFAULTS = {
  IS: 1e-14, N: 1, RS: 0, BV: undefined, IBV: 1e-3, NBV: 1, CJO: 0, VJ: 1, M: 0.5, TT: 0, EG: 1.11, XTI: 3, TBV: 0, PMAX: undefined,
  VRRM: undefined, IFAV: undefined, IFRM: undefined,
};

/** docs/models.md, Bipolar transistor, "Defaults:" (VAF, VAR and PMAX: none). */
const BJT_DEFAULTS = {
  IS: 1e-16, BF: 100, BR: 1, NF: 1, NR: 1, VAF: undefined, VAR: undefined, RB: 0, RC: 0, RE: 0, CJE: 0, CJC: 0,
  VJE: 0.75, VJC: 0.75, MJE: 0.33, MJC: 0.33, TF: 0, TR: 0, EG: 1.11, XTI: 3, XTB: 0, PMAX: undefined,
};

function modelOf(text: string, name: string): Record<string, unknown> {
  const el = element(flatten(text), name);
  if (el.kind !== 'diode' && el.kind !== 'bjt') throw new Error(`${name} is a ${el.kind}`);
  return el.model as unknown as Record<string, unknown>;
}

describe('model binding', () => {
  test('a diode model without parameters has the defaults netlist.md lists', () => {
    const m = modelOf('Bare diode\nV1 a 0 1\nR1 a b 1k\nD1 b 0 dflt\n.model dflt D', 'D1');
    for (const [k, v] of Object.entries(DIODE_DEFAULTS)) expect(m[k], `diode ${k}`).toBe(v);
  });

  test('NPN and PNP models without parameters have the defaults netlist.md lists, and their polarity', () => {
    const text = 'Bare transistors\nV1 c 0 5\nR1 c b 100k\nQ1 c b 0 qn\nQ2 0 b c qp\n.model qn NPN\n.model qp PNP ()';
    const n = modelOf(text, 'Q1');
    const p = modelOf(text, 'Q2');
    for (const [k, v] of Object.entries(BJT_DEFAULTS)) {
      expect(n[k], `NPN ${k}`).toBe(v);
      expect(p[k], `PNP ${k}`).toBe(v);
    }
    expect(n['polarity']).toBe('npn');
    expect(p['polarity']).toBe('pnp');
  });

  test('given parameters override the defaults, the rest stay; names are case-insensitive', () => {
    const text = 'Zener reference\nV1 a 0 12\nR1 a k 1k\nD1 0 k ZREF\nQ1 a k e Npass\nR2 e 0 1k\n.model zref D (bv=5.6 IBV=5m, RS=3)\n.model NPASS npn BF=150 vaf=90';
    const d = modelOf(text, 'D1');
    expect(d).toMatchObject({ ...DIODE_DEFAULTS, BV: 5.6, IBV: 5e-3, RS: 3 });
    const q = modelOf(text, 'Q1');
    expect(q).toMatchObject({ ...BJT_DEFAULTS, BF: 150, VAF: 90 });
    const c = flatten(text);
    expect(element(c, 'D1')).toMatchObject({ modelName: 'zref' });
  });

  test('area: the optional number after the model, bare or area=; 1 when absent', () => {
    // netlist.md gives `[area]`; 1 when absent is the customary meaning (common practice, no source).
    const c = flatten('Areas\nV1 a 0 1\nR1 a b 1k\nD1 b 0 dm 2\nD2 b 0 dm\nQ1 a b 0 qn area=3\nQ2 a b 0 qn\n.model dm D\n.model qn NPN');
    expect(element(c, 'D1')).toMatchObject({ kind: 'diode', area: 2 });
    expect(element(c, 'D2')).toMatchObject({ kind: 'diode', area: 1 });
    expect(element(c, 'Q1')).toMatchObject({ kind: 'bjt', area: 3 });
    expect(element(c, 'Q2')).toMatchObject({ kind: 'bjt', area: 1 });
  });

  test('PMAX of a model is the rating of its devices unless the element gives pmax=', () => {
    const c = flatten('Ratings\nV1 a 0 1\nR1 a b 1k pmax=0.25\nD1 b 0 dm\nD2 b 0 dm pmax=2\nR2 b 0 1k\n.model dm D (PMAX=0.5)');
    expect(element(c, 'R1').pmax).toBe(0.25);
    expect(element(c, 'R2').pmax).toBeUndefined();
    expect(element(c, 'D1').pmax).toBe(0.5);
    expect(element(c, 'D2').pmax).toBe(2);
  });

  test('a model defined inside a subcircuit is used there and shadows a top-level one of the same name', () => {
    const c = flatten(`Shadowed model
.model dm D (IS=1e-14)
.subckt clamp p
.model dm D (IS=2e-14)
D1 p 0 dm
.ends
V1 a 0 1
R1 a b 1k
D1 b 0 dm
X1 b clamp
`);
    expect(element(c, 'D1')).toMatchObject({ kind: 'diode', model: { IS: 1e-14 } });
    expect(element(c, 'X1.D1')).toMatchObject({ kind: 'diode', model: { IS: 2e-14 } });
  });

  test('model parameters may be expressions over .param', () => {
    const c = flatten('Expr model\n.param bv0=5 \nV1 a 0 1\nR1 a b 1k\nD1 0 b dz\n.model dz D (BV={bv0+0.6} IBV={1m*5})');
    expect(element(c, 'D1')).toMatchObject({ model: { BV: 5.6, IBV: 5e-3 } });
  });
});

describe('F and H controls', () => {
  const MIRROR = `Current mirror model for a model-railway controller
.subckt sense in out
Vs in m 0
Rm m 0 1k
F1 0 out Vs 2
Rl out 0 500
H1 h 0 VS 100
Rh h 0 1k
.ends
V1 a 0 5
X1 a o1 sense
X2 a o2 sense
`;

  test('inside a subcircuit, F and H name the instance\'s own source', () => {
    const c = flatten(MIRROR);
    expect(element(c, 'X1.F1')).toMatchObject({ kind: 'cccs', control: 'x1.vs', gain: 2 });
    expect(element(c, 'X2.F1')).toMatchObject({ kind: 'cccs', control: 'x2.vs' });
    expect(element(c, 'X2.H1')).toMatchObject({ kind: 'ccvs', control: 'x2.vs', gain: 100 });
  });

  test('and the values follow from the definitions of F and H', () => {
    // Ohm's law: I(Vs) = 5 V / 1k = 5 mA. netlist.md: F's current, entering at n+ = 0 and
    // leaving at n- = out, is 2·I(Vs) = 10 mA, so 10 mA flows into out: V = 10 mA · 500 Ω.
    // H: V(h) − V(0) = 100 Ω · 5 mA = 0.5 V.
    const op = solve(MIRROR);
    for (const [x, out] of [['X1', 'o1'], ['X2', 'o2']] as const) {
      // Observed 0 (exact); bounds 2·eps·|value|.
      expect(Math.abs(op.currents[`${x}.Vs`]! - 5e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 5e-3);
      expect(Math.abs(op.nodes[out]! - 5)).toBeLessThanOrEqual(2 * Number.EPSILON * 5);
      expect(Math.abs(op.nodes[`${x}.h`]! - 0.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.5);
    }
  });

  test('a control not found in the instance is looked for at the top level', () => {
    const text = `Top-level sense
VSENSE a b 0
V1 a 0 3
R1 b 0 1k
.subckt follow out
F1 0 out VSENSE 1
Rl out 0 2k
.ends
X1 o follow
`;
    expect(element(flatten(text), 'X1.F1')).toMatchObject({ control: 'vsense' });
    // 3 mA through VSENSE (Ohm's law), copied into 2 kΩ: 6 V.
    // Observed 0; bound 2·eps·6 V.
    expect(Math.abs(solve(text).nodes['o']! - 6)).toBeLessThanOrEqual(2 * Number.EPSILON * 6);
  });

  test('a control that is not an independent voltage source is an error naming it', () => {
    const errs = elaborationErrors('Bad control\nV1 a 0 1\nR1 a 0 1k\nF1 a 0 VNONE 2');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'unknown-control', pos: { line: 4 } });
    expect(errs[0]!.message).toContain('VNONE');
  });
});

describe('directives', () => {
  const STAGE = `Sensor rail bench check
.param vmax=14
V1 in 0 12
R1 in out 1k
R2 out 0 1k
ILOAD out 0 1m
.dc V1 6 {vmax} 2
.temp -20 27 {25*2}
.supply in=v1 out=OUT ref=gnd load=iload
.figure line from=10 to={vmax}
.figure ripple freq=1k method=ac
.limit LINE.DELTA <= 20m
`;

  test('.dc: source by key, values evaluated', () => {
    const c = flatten(STAGE);
    expect(c.analyses.map(({ origin: _o, ...a }) => a)).toEqual([{ kind: 'dc', source: 'v1', start: 6, stop: 14, step: 2 }]);
  });

  test('.temp: every temperature in order; 27 °C when absent (netlist.md, Analyses)', () => {
    expect(flatten(STAGE).temperatures).toEqual([-20, 27, 50]);
    expect(flatten('No temp\nV1 a 0 1\nR1 a 0 1').temperatures).toEqual([27]);
  });

  test('.supply: names resolved to keys, ref defaults to ground', () => {
    const { origin: _o, ...supply } = flatten(STAGE).supply!;
    expect(supply).toMatchObject({ input: 'v1', out: 'out', ref: '0', load: 'iload' });
    const bare = flatten('Bare supply\nV1 in 0 5\nR1 in 0 1k\n.supply in=V1 out=in').supply!;
    expect([bare.ref, bare.load]).toEqual(['0', undefined]);
  });

  test('.supply may name a node inside a subcircuit by its path', () => {
    const c = flatten('Path\n.subckt s p\nR1 p mid 1k\nR2 mid 0 1k\n.ends\nV1 a 0 2\nX1 a s\n.supply in=V1 out=X1.mid ref=0');
    expect(c.supply).toMatchObject({ out: 'x1.mid', ref: '0' });
  });

  test('.figure keys and .limit values evaluated with their suffixes', () => {
    const c = flatten(STAGE);
    expect(c.figures.map((f) => [f.figure, Object.fromEntries(f.keys)])).toEqual([
      ['line', { from: 10, to: 14 }],
      ['ripple', { freq: 1000 }],
    ]);
    expect(c.figures[1]).toMatchObject({ method: 'ac' });
    expect(c.limits.map(({ origin: _o, ...l }) => ({ ...l, figure: l.figure.toLowerCase() }))).toEqual([{ figure: 'line.delta', op: '<=', value: 0.02 }]);
  });
});
