/**
 * Budgets (docs/engine.md, "Budgets"): a netlist that asks for more than a
 * budget allows gets a located error naming the budget, before anything is
 * allocated; one just inside the budget still runs. The budget values are
 * our own choice (common practice, no source), so each case is checked on
 * both sides of its bound.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';
import { MAX_AC_POINTS, MAX_DC_POINTS, MAX_TRAN_GRID_POINTS, MAX_UNKNOWNS } from '../../packages/core/src/budgets.js';

const BASE = 'budget\nV1 a 0 dc 1 ac 1\nR1 a 0 1k\n';

function errorsOf(text: string): { code: string; line: number | undefined; message: string }[] {
  const r = runNetlist(text);
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
