/**
 * Budgets (docs/engine.md, "Budgets"): a netlist that asks for more than a
 * budget allows gets a located error naming the budget, before anything is
 * allocated; one just inside the budget still runs. The budget values are
 * our own choice (common practice, no source), so each case is checked on
 * both sides of its bound.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, runNetlist, type ParseOptions } from '@railcheck/core';
import { runTransient } from '@railcheck/core/internal';
import {
  MAX_AC_POINTS, MAX_ANALYSES, MAX_BREAKPOINTS, MAX_CARD_TOKENS, MAX_CARDS, MAX_DC_POINTS, MAX_INCLUDED_CHARACTERS, MAX_INCLUDES, MAX_OUTPUT_VALUES, MAX_TEMPERATURES,
  MAX_TRAN_GRID_POINTS, MAX_TRAN_STEPS, MAX_UNKNOWNS,
} from '../../packages/core/src/budgets.js';
import { MAX_FLAT_ELEMENTS } from '../../packages/core/src/elaborate/elaborate.js';
import { compile } from './transient/support.js';

const BASE = 'budget\nV1 a 0 dc 1 ac 1\nR1 a 0 1k\n';

function errorsOf(text: string, options: ParseOptions = {}): { code: string; line: number | undefined; message: string }[] {
  const r = runNetlist(text, options);
  if (r.ok) return [];
  return r.errors.map((e) => ({ code: e.code, line: e.pos?.line, message: e.message }));
}

describe('analysis budgets', () => {
  test('.ac lin 1e9 points is refused at its card, naming MAX_AC_POINTS', () => {
    const e = errorsOf(`${BASE}.ac lin 1e9 1 1k\n.end\n`);
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-ac-points', line: 4 });
    expect(e[0]!.message).toContain('MAX_AC_POINTS');
  });
  test('.ac dec over many decades is counted per decade', () => {
    expect(errorsOf(`${BASE}.ac dec ${MAX_AC_POINTS / 10} 1 1e12\n.end\n`)[0]?.code).toBe('budget-ac-points');
    expect(errorsOf(`${BASE}.ac dec 20 1 100k\n.end\n`)).toEqual([]);
  });
  test('.tran 1n 10 is refused at its card, naming MAX_TRAN_GRID_POINTS', () => {
    const e = errorsOf(`${BASE}.tran 1n 10\n.end\n`);
    expect(e[0]).toMatchObject({ code: 'budget-tran-points', line: 4 });
    expect(e[0]!.message).toContain('MAX_TRAN_GRID_POINTS');
    expect(errorsOf(`${BASE}.tran ${1 / (MAX_TRAN_GRID_POINTS * 2)} 1\n.end\n`)[0]?.code).toBe('budget-tran-points');
  });
  test('.dc with more than MAX_DC_POINTS points is refused at its card', () => {
    const e = errorsOf(`${BASE}.dc V1 0 1 ${1 / (MAX_DC_POINTS * 2)}\n.end\n`);
    expect(e[0]).toMatchObject({ code: 'budget-dc-points', line: 4 });
    expect(e[0]!.message).toContain('MAX_DC_POINTS');
    expect(errorsOf(`${BASE}.dc V1 0 1 0.1\n.end\n`)).toEqual([]);
  });
});

describe('matrix budget', () => {
  const chain = (n: number): string => {
    let s = 'chain\nV1 n0 0 dc 1\n';
    for (let i = 0; i < n; i++) s += `R${i} n${i} n${i + 1} 1\n`;
    return `${s}Rend n${n} 0 1\n.op\n.end\n`;
  };
  test('100 000 resistors in a chain give a located error naming MAX_UNKNOWNS, not a RangeError', () => {
    const e = errorsOf(chain(100_000));
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-unknowns', line: 100_003 });
    expect(e[0]!.message).toContain('MAX_UNKNOWNS');
  });
  test('a chain just under the budget still runs', () => {
    // n resistors give n + 1 nodes and one branch for V1.
    expect(errorsOf(chain(MAX_UNKNOWNS - 3))).toEqual([]);
    expect(errorsOf(chain(MAX_UNKNOWNS))[0]?.code).toBe('budget-unknowns');
  });
});

describe('transient budgets', () => {
  test('a 3 fs pulse train over 1 ms is refused at its source, naming MAX_BREAKPOINTS, before any corner is generated', () => {
    const e = errorsOf('budget\nR1 a 0 1k\nV1 a 0 pulse(0 1 0 1f 1f 1f 3f)\n.tran 10u 1m\n.end\n');
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-breakpoints', line: 3 });
    expect(e[0]!.message).toContain('MAX_BREAKPOINTS');
  });
  test('corners are counted per period: just over the budget is refused, a few periods run', () => {
    // 4 corners per period: MAX_BREAKPOINTS / 4 + 10 periods are over, 10 periods are not.
    const per = 1e-6;
    const over = (MAX_BREAKPOINTS / 4 + 10) * per;
    expect(errorsOf(`budget\nR1 a 0 1k\nV1 a 0 pulse(0 1 0 10n 10n 490n ${per})\n.tran ${over / 1000} ${over}\n.end\n`)[0]?.code).toBe('budget-breakpoints');
    expect(errorsOf(`budget\nR1 a 0 1k\nV1 a 0 pulse(0 1 0 10n 10n 490n ${per})\n.tran 100n ${10 * per}\n.end\n`)).toEqual([]);
  });
  test('a 1 GHz sine over 1 s needs more than MAX_TRAN_STEPS steps: refused at the sine source before the run', () => {
    const e = errorsOf('budget\nV1 a 0 sin(0 1 1g)\nR1 a b 1k\nC1 b 0 1n\n.tran 1m 1\n.end\n');
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-tran-steps', line: 2 });
    expect(e[0]!.message).toContain(`MAX_TRAN_STEPS = ${MAX_TRAN_STEPS}`);
  });
  test('a tmax that asks for more than MAX_TRAN_STEPS steps is refused at the .tran card', () => {
    const e = errorsOf(`${BASE}C1 a 0 1n\n.tran 1m 1 0 ${1 / (2 * MAX_TRAN_STEPS)}\n.end\n`);
    expect(e[0]).toMatchObject({ code: 'budget-tran-steps', line: 5 });
    // A tmax giving 10 000 steps runs (running near the budget would take seconds).
    expect(errorsOf(`${BASE}C1 a 0 1n\n.tran 1m 1 0 1e-4\n.end\n`)).toEqual([]);
  });
  test('a shared step allowance ends the run that exhausts it with that budget', () => {
    const c = compile('budget\nV1 a 0 pulse(0 1 1u 1u 1u 1m 2m)\nR1 a b 1k\nC1 b 0 1u\n.end\n');
    const shared = { left: 5, budget: 'MAX_FIGURE_STEPS' as const, limit: 5 };
    const r = runTransient(c, { tstep: 1e-5, tstop: 1e-3, shared });
    expect(r.ok).toBe(false);
    expect(!r.ok && r.reason === 'budget' && r.excess.budget).toBe('MAX_FIGURE_STEPS');
    // The same run with no allowance completes.
    expect(runTransient(c, { tstep: 1e-5, tstop: 1e-3 }).ok).toBe(true);
  });
});

describe('figure budgets', () => {
  const sag = (edge: string): string => `t\nV1 in 0 dc 12\nR1 in out 100\nR2 out 0 1k\nC1 out 0 1u\nI1 out 0 dc 1m\n.supply in=V1 out=out load=I1\n.figure sag depth=30% dur=1m edge=${edge}\n.end\n`;
  test('a sag with edge=1f is not measured, the reason naming MAX_TRAN_STEPS, instead of a run of 10^12 steps', () => {
    const r = runNetlist(sag('1f'));
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const f = r.report.figures?.figures[0];
    expect(f?.ok).toBe(false);
    expect(f && !f.ok && f.reason.message).toContain('MAX_TRAN_STEPS');
  });
});

describe('run budgets', () => {
  test(`more than MAX_TEMPERATURES = ${MAX_TEMPERATURES} temperatures are refused at the .temp card`, () => {
    const temps = (n: number): string => Array.from({ length: n }, (_, i) => i).join(' ');
    expect(errorsOf(`${BASE}.op\n.temp ${temps(MAX_TEMPERATURES + 1)}\n.end\n`)[0]).toMatchObject({ code: 'budget-temperatures', line: 5 });
    expect(errorsOf(`${BASE}.op\n.temp ${temps(5)}\n.temp ${temps(MAX_TEMPERATURES - 4)}\n.end\n`)[0]).toMatchObject({ code: 'budget-temperatures', line: 6 });
    expect(errorsOf(`${BASE}.op\n.temp ${temps(MAX_TEMPERATURES)}\n.end\n`)).toEqual([]);
  });
  test(`more than MAX_ANALYSES = ${MAX_ANALYSES} analysis cards are refused at the first over the budget`, () => {
    const e = errorsOf(`${BASE}${'.op\n'.repeat(MAX_ANALYSES + 1)}.end\n`);
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-analyses', line: 4 + MAX_ANALYSES });
  });
  test('analyses whose output together exceeds MAX_OUTPUT_VALUES are refused at the card that takes the total over, before any runs', () => {
    // 60 nodes + 1 branch; a .dc of 500 001 points is 3·10^7 values.
    let s = 'wide\nV1 n0 0 dc 1\n';
    for (let i = 0; i < 60; i++) s += `R${i} n${i} n${i + 1} 1\n`;
    const points = 500_000;
    expect(points * 61).toBeGreaterThan(MAX_OUTPUT_VALUES);
    const e = errorsOf(`${s}.op\n.dc V1 0 1 ${1 / points}\n.end\n`);
    expect(e).toHaveLength(1);
    expect(e[0]).toMatchObject({ code: 'budget-output', line: 64 });
    expect(e[0]!.message).toContain('MAX_OUTPUT_VALUES');
  });
});

describe('reader budgets', () => {
  test(`a netlist of more than MAX_CARDS = ${MAX_CARDS} cards stops reading at the first over the budget`, () => {
    let s = 'many\n';
    for (let i = 0; i <= MAX_CARDS; i++) s += `R${i} a 0 1k\n`;
    const p = parseNetlist(s);
    expect(p.ok).toBe(false);
    if (p.ok) return;
    expect(p.errors).toHaveLength(1);
    expect(p.errors[0]).toMatchObject({ code: 'budget-cards', pos: { line: MAX_CARDS + 2 } });
  });
  test(`a card of more than MAX_CARD_TOKENS = ${MAX_CARD_TOKENS} items is refused at its line; a pwl of 100 000 points is read`, () => {
    const pwl = (n: number): string => `pwl\nR1 a 0 1k\nV1 a 0 pwl(${Array.from({ length: n }, (_, i) => `${i}u ${i % 2}`).join(' ')})\n.end\n`;
    const p = parseNetlist(pwl(MAX_CARD_TOKENS));
    expect(p.ok).toBe(false);
    if (p.ok) return;
    expect(p.errors.map((e) => [e.code, e.pos?.line])).toEqual([['budget-card-tokens', 3]]);
    expect(parseNetlist(pwl(100_000)).ok).toBe(true);
  });
  const files = (map: Record<string, string>): ParseOptions => ({ file: '/n/top.cir', readFile: (path) => map[path] });
  test(`a file included more than MAX_INCLUDES = ${MAX_INCLUDES} times is refused at the include over the budget`, () => {
    const top = `top\n${'.include small.inc\n'.repeat(MAX_INCLUDES + 1)}.end\n`;
    const p = parseNetlist(top, files({ '/n/small.inc': '* nothing\n' }));
    expect(p.ok).toBe(false);
    if (p.ok) return;
    expect(p.errors.map((e) => e.code)).toEqual(['budget-includes']);
    expect(p.errors[0]!.pos?.line).toBe(MAX_INCLUDES + 2);
  });
  test('a fan-out tree of includes (10 per level, 4 levels: 11 110 expansions) is stopped by MAX_INCLUDES', () => {
    const level = (next: string): string => '.include ' + next + '\n';
    const map = { '/n/a.inc': level('b.inc').repeat(10), '/n/b.inc': level('c.inc').repeat(10), '/n/c.inc': level('d.inc').repeat(10), '/n/d.inc': '* a leaf\n' };
    const p = parseNetlist(`top\n${level('a.inc').repeat(10)}.end\n`, files(map));
    expect(p.ok).toBe(false);
    if (p.ok) return;
    // Every include past the budget is refused, so the first error is the budget and no error is anything else.
    expect(p.errors[0]?.code).toBe('budget-includes');
    expect(p.errors.every((e) => e.code === 'budget-includes' || e.code === 'too-many-errors')).toBe(true);
  });
  test('included files holding more than MAX_INCLUDED_CHARACTERS together are refused at the include that takes it over', () => {
    const big = `* ${'x'.repeat(1024 * 1024)}\n`;
    const n = Math.floor(MAX_INCLUDED_CHARACTERS / big.length) + 1;
    const p = parseNetlist(`top\n${'.include big.inc\n'.repeat(n)}.end\n`, files({ '/n/big.inc': big }));
    expect(p.ok).toBe(false);
    if (p.ok) return;
    expect(p.errors.map((e) => e.code)).toEqual(['budget-included-characters']);
    expect(p.errors[0]!.pos?.line).toBe(n + 1);
  });
});

describe('subcircuit expansion', () => {
  test('nested instances that multiply by 10 per level stop at MAX_FLAT_ELEMENTS without expanding the rest', () => {
    // 8 levels of 10 instances each would be 10^8 resistors.
    let s = 'fan\n.subckt L0 a\nR1 a 0 1k\n.ends\n';
    for (let k = 1; k <= 8; k++) {
      s += `.subckt L${k} a\n`;
      for (let i = 0; i < 10; i++) s += `X${i} a L${k - 1}\n`;
      s += '.ends\n';
    }
    const e = errorsOf(`${s}V1 a 0 dc 1\nXtop a L8\n.op\n.end\n`);
    expect(e.map((x) => x.code)).toEqual(['too-many-elements']);
    expect(e[0]!.message).toContain(String(MAX_FLAT_ELEMENTS));
  });
});
