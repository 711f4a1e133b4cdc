/**
 * Subcircuit flattening, parameters and names (docs/netlist.md:
 * Subcircuits, Numbers and expressions, Lines). Structure is checked on the flat circuit;
 * where numbers are involved, the expected voltages and currents are worked
 * by hand from Ohm's law and the series/voltage-divider rule, never taken
 * from the engine. Circuits are invented bench-reference dividers.
 */
import { describe, expect, test } from 'vitest';
import { element, flatten, ohms, solve } from './support.js';

describe('subcircuit flattening', () => {
  const PAIR = `Two-stage divider for a bench reference
.subckt half top bot
R1 top mid 1k
R2 mid bot 1k
.ends half
.subckt pair a b
X2 a c half
Rc c b 2k
.ends pair
V1 in 0 8
X1 in 0 pair
.end`;

  test('ports map to the caller\'s nodes, local nodes and elements take the instance path', () => {
    const c = flatten(PAIR);
    expect(c.nodes.map((n) => n.name).sort()).toEqual(['X1.X2.mid', 'X1.c', 'in']);
    expect(c.elements.map((e) => e.name)).toEqual(['V1', 'X1.X2.R1', 'X1.X2.R2', 'X1.Rc']);
    // X2's ports a→in (X1's port a), c→X1.c (local to X1); X1's port b is ground.
    expect(element(c, 'X1.X2.R1').nodes).toEqual(['in', 'x1.x2.mid']);
    expect(element(c, 'X1.X2.R2').nodes).toEqual(['x1.x2.mid', 'x1.c']);
    expect(element(c, 'X1.Rc').nodes).toEqual(['x1.c', '0']);
  });

  test('the flattened chain solves as the series circuit it is', () => {
    // Ohm's law: 1k + 1k + 2k in series across 8 V carry 2 mA; the drops are 2 V, 2 V, 4 V.
    const op = solve(PAIR);
    // Observed 8.9e-16, 4.4e-16, 8.7e-19 and 4.3e-19; bounds 2–3× that.
    expect(Math.abs(op.nodes['X1.X2.mid']! - 6)).toBeLessThan(2e-15);
    expect(Math.abs(op.nodes['X1.c']! - 4)).toBeLessThan(1e-15);
    expect(Math.abs(op.currents['X1.X2.R1']! - 2e-3)).toBeLessThan(2e-18);
    expect(Math.abs(op.currents['X1.Rc']! - 2e-3)).toBeLessThan(1e-18);
  });

  test('two instances of one definition have separate local nodes', () => {
    const op = solve(`Twin dividers
.subckt half top bot
R1 top mid 1k
R2 mid bot 3k
.ends
V1 in 0 8
X1 in 0 half
X2 in 0 half
`);
    // Voltage divider: 8 V · 3k/(1k+3k) = 6 V in each instance.
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(op.nodes['X1.mid']! - 6)).toBeLessThanOrEqual(2 * Number.EPSILON * 6);
    expect(Math.abs(op.nodes['X2.mid']! - 6)).toBeLessThanOrEqual(2 * Number.EPSILON * 6);
    expect(Math.abs(op.currents['X1.R1']! - 2e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 2e-3);
    expect(Math.abs(op.currents['X2.R2']! - 2e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 2e-3);
  });

  test('three levels of nesting name elements X1.X2.X3.R1', () => {
    const c = flatten(`Deep
.subckt l3 p
R1 p 0 1k
.ends
.subckt l2 p
X3 p l3
.ends
.subckt l1 p
X2 p l2
.ends
V1 a 0 1
X1 a l1
`);
    expect(element(c, 'X1.X2.X3.R1').nodes).toEqual(['a', '0']);
  });

  test('a definition nested inside another is usable from it', () => {
    const c = flatten(`Nested definition
.subckt outer p
.subckt inner q
Rq q 0 2k
.ends inner
Xi p inner
.ends outer
V1 a 0 1
Xo a outer
`);
    expect(ohms(c, 'Xo.Xi.Rq')).toBe(2000);
  });
});

describe('parameters', () => {
  test('instance parameters override the defaults; omitted ones keep them', () => {
    const c = flatten(`Divider variants
.param k=1k
.subckt div top bot rt=1k rb=1k
R1 top mid {rt}
R2 mid bot {rb}
.ends
V1 in 0 10
XA in 0 div
XB in 0 div rb=4k
XC in 0 div rt={k*3} rb={k}
`);
    expect([ohms(c, 'XA.R1'), ohms(c, 'XA.R2')]).toEqual([1000, 1000]);
    expect([ohms(c, 'XB.R1'), ohms(c, 'XB.R2')]).toEqual([1000, 4000]);
    expect([ohms(c, 'XC.R1'), ohms(c, 'XC.R2')]).toEqual([3000, 1000]);
    // Voltage divider: 10 V · rb/(rt+rb).
    const op = solve(`Divider variants
.param k=1k
.subckt div top bot rt=1k rb=1k
R1 top mid {rt}
R2 mid bot {rb}
.ends
V1 in 0 10
XB in 0 div rb=4k
XC in 0 div rt={k*3} rb={k}
`);
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(op.nodes['XB.mid']! - 8)).toBeLessThanOrEqual(2 * Number.EPSILON * 8);
    expect(Math.abs(op.nodes['XC.mid']! - 2.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 2.5);
  });

  test('parameters pass down through nested instances; the innermost binding wins', () => {
    const c = flatten(`Passing down
.subckt leg p r=1
R1 p 0 {r}
.ends
.subckt pairleg p r=2k
XL p leg r={r*2}
R2 p 0 {r}
.ends
V1 a 0 1
X1 a pairleg
X2 a pairleg r=5k
`);
    expect([ohms(c, 'X1.XL.R1'), ohms(c, 'X1.R2')]).toEqual([4000, 2000]);
    expect([ohms(c, 'X2.XL.R1'), ohms(c, 'X2.R2')]).toEqual([10000, 5000]);
  });

  test('a subcircuit default may use an earlier default, and follows the instance\'s value of it', () => {
    // netlist.md, Numbers: "later definitions may use earlier ones" (.param); the same
    // reading for the defaults on a .subckt line is our choice where netlist.md is silent.
    const c = flatten(`Default chain
.subckt s p a=1 b={a*2}
R1 p 0 {b}
.ends
V1 x 0 1
X1 x s
X2 x s a=5
X3 x s a=5 b=7
`);
    expect([ohms(c, 'X1.R1'), ohms(c, 'X2.R1'), ohms(c, 'X3.R1')]).toEqual([2, 10, 7]);
  });

  test('.param: later definitions use earlier ones, on one line or several', () => {
    const c = flatten(`Chain
.param a=2 b={a*3}
.param c={b+a} d={c*1k}
V1 x 0 1
R1 x 0 {d}
R2 x 0 {c}
`);
    // a = 2, b = 6, c = 8, d = 8000
    expect(ohms(c, 'R1')).toBe(8000);
    expect(ohms(c, 'R2')).toBe(8);
  });

  test('expressions in values: operators, suffixes and the functions of netlist.md', () => {
    const c = flatten(`Expressions
.param a=2 b=3
V1 x 0 {a*b}
R1 x 0 {1k + 500}
R2 x 0 {10meg/2}
R3 x 0 {-a+5}
R4 x 0 {2^3*(a+b)}
R5 x 0 {sqrt(16)+max(a,b)+min(a,b)+abs(-1)+pow(2,2)}
R6 x 0 {log10(1k)*exp(0)+ln(1)}
C1 x 0 {a*1u}
`);
    // Hand arithmetic with the suffix table of netlist.md (k = 1e3, meg = 1e6, u = 1e-6).
    expect(element(c, 'V1')).toMatchObject({ kind: 'vsource', spec: { dc: 6 } });
    expect(ohms(c, 'R1')).toBe(1500);
    expect(ohms(c, 'R2')).toBe(5e6);
    expect(ohms(c, 'R3')).toBe(3);
    expect(ohms(c, 'R4')).toBe(40);
    expect(ohms(c, 'R5')).toBe(4 + 3 + 2 + 1 + 4);
    // Observed 0; bound 2·eps·|value|.
    expect(Math.abs(ohms(c, 'R6') - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3);
    expect(element(c, 'C1')).toMatchObject({ kind: 'capacitor', farads: 2e-6 });
  });

  test('a subcircuit body can define its own .param from its instance parameters', () => {
    const c = flatten(`Body params
.subckt s p g=1
.param twice={g*2}
R1 p 0 {twice}
.ends
V1 a 0 1
X1 a s g=21
`);
    expect(ohms(c, 'X1.R1')).toBe(42);
  });
});

describe('ground and names', () => {
  test('0, gnd and GND are all ground, at the top and inside subcircuits', () => {
    const c = flatten(`Grounds
.subckt s p
R1 p gnd 1k
R2 p 0 1k
.ends
V1 a 0 5
R3 a GND 1k
R4 a gnd 1k
X1 a s
`);
    expect(c.nodes.map((n) => n.name)).toEqual(['a']);
    for (const name of ['R3', 'R4', 'X1.R1', 'X1.R2']) expect(element(c, name).nodes[1]).toBe('0');
  });

  test('node and element names are case-insensitive; reports keep the first spelling', () => {
    const text = `Case
V1 Rail 0 6
R1 RAIL out 1k
r2 OUT 0 2k
Xamp rail Out ld
.subckt LD p q
Rload P Q 1meg
.ends
`;
    const c = flatten(text);
    expect(c.nodes.map((n) => n.name)).toEqual(['Rail', 'out']);
    expect(element(c, 'xamp.rload').name).toBe('Xamp.Rload');
    expect(element(c, 'xamp.rload').nodes).toEqual(['rail', 'out']);
    // Voltage divider: 6 V · 2k/(1k+2k) = 4 V (the 1 MΩ across R1 is accounted for:
    // R1 ∥ 1M = 999.001 Ω, so out = 6 · 2000/2999.001).
    const op = solve(text);
    expect(Object.keys(op.nodes)).toEqual(['Rail', 'out']);
    // Observed 0; bound 2·eps·6 V.
    expect(Math.abs(op.nodes['out']! - ((6 * 2000) / (2000 + 1 / (1 / 1000 + 1 / 1e6))))).toBeLessThanOrEqual(2 * Number.EPSILON * 6);
    expect(Object.keys(op.currents)).toEqual(['V1', 'R1', 'r2', 'Xamp.Rload']);
  });
});
