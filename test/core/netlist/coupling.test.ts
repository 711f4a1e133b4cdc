/**
 * The K card (shared/spec/netlist.md, Elements: `Kname Lname1 Lname2 k`,
 * 0 < k ≤ 1): how it reads, prints and elaborates, and the located errors
 * for every way it can be wrong.
 */
import { describe, expect, test } from 'vitest';
import { elaborate, parseNetlist, printNetlist, type Diagnostic } from '@railcheck/core';
import { mustFail, oneCard, strip } from './support.js';

const num = (value: number): { kind: 'number'; value: number } => ({ kind: 'number', value });

function elaborationErrors(text: string): readonly Diagnostic[] {
  const parsed = parseNetlist(text, { file: 'k.cir' });
  if (!parsed.ok) throw new Error(parsed.errors.map((e) => e.message).join('\n'));
  const r = elaborate(parsed.netlist);
  expect(r.ok, 'elaboration should fail').toBe(false);
  return r.ok ? [] : r.errors;
}

describe('reading K', () => {
  test('two inductor names and a coefficient', () => {
    expect(strip(oneCard('Kmains Lpri Lsec 0.98'))).toEqual({ kind: 'K', name: 'Kmains', inductors: ['Lpri', 'Lsec'], coupling: num(0.98) });
  });

  test('prints back as written', () => {
    const text = 'Accessory supply windings\nV1 a 0 sin(0 325 50)\nR1 a p 2\nLpri p 0 10\nLsec s 0 100m\nKmains Lpri Lsec 0.98\nRL s 0 100\n.end\n';
    const parsed = parseNetlist(text);
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(printNetlist(parsed.netlist)).toBe(text);
  });

  const cases: ReadonlyArray<{ name: string; body: string; code: string; column: number }> = [
    { name: 'an element that is not an inductor', body: 'K1 R1 L2 0.5', code: 'bad-coupling', column: 4 },
    { name: 'the same inductor twice (names are case-insensitive)', body: 'K1 Lpri LPRI 0.5', code: 'bad-coupling', column: 9 },
    { name: 'k above 1', body: 'K1 L1 L2 1.5', code: 'bad-value', column: 10 },
    { name: 'k of zero', body: 'K1 L1 L2 0', code: 'bad-value', column: 10 },
    { name: 'a negative k', body: 'K1 L1 L2 -0.2', code: 'bad-value', column: 10 },
    { name: 'a missing inductor name', body: 'K1 L1 0.5', code: 'wrong-node-count', column: 10 },
  ];
  for (const c of cases) {
    test(`error: ${c.name}`, () => {
      const errs = mustFail(`title\n${c.body}`);
      expect(errs).toHaveLength(1);
      expect(errs[0]).toMatchObject({ code: c.code, pos: { line: 2, column: c.column } });
      expect(errs[0]!.expected).toBeDefined();
    });
  }
});

describe('elaborating K', () => {
  test('names resolve in the instance scope: each instance couples its own windings', () => {
    const parsed = parseNetlist('windings\n.subckt xfmr a b\nLp a 0 1\nLs b 0 4\nK1 Lp Ls 0.9\n.ends\nV1 in 0 1\nR1 in p 1\nX1 p s1 xfmr\nX2 p s2 xfmr\nR2 s1 0 1\nR3 s2 0 1\n');
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const r = elaborate(parsed.netlist);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const ks = r.circuit.elements.filter((e) => e.kind === 'coupling');
    expect(ks.map((k) => (k.kind === 'coupling' ? [k.name, ...k.inductors] : []))).toEqual([
      ['X1.K1', 'x1.lp', 'x1.ls'],
      ['X2.K1', 'x2.lp', 'x2.ls'],
    ]);
  });

  test('an inductor that does not exist is an error at the K line', () => {
    const errs = elaborationErrors('missing\nV1 a 0 1\nR1 a p 1\nL1 p 0 1\nK1 L1 L9 0.5\n');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'unknown-inductor', pos: { file: 'k.cir', line: 5, column: 1 } });
    expect(errs[0]!.message).toContain('L9');
  });

  test('a coefficient given by an expression is range-checked once evaluated', () => {
    const errs = elaborationErrors('expr k\n.param kk=0.7\nV1 a 0 1\nR1 a p 1\nL1 p 0 1\nL2 s 0 1\nR2 s 0 1\nK1 L1 L2 {2*kk}\n');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'out-of-range', pos: { line: 8 } });
    expect(errs[0]!.expected).toMatch(/> 0 and ≤ 1/);
  });

  test('a pair coupled twice is an error naming the first coupling', () => {
    const errs = elaborationErrors('twice\nV1 a 0 1\nR1 a p 1\nL1 p 0 1\nL2 s 0 1\nR2 s 0 1\nK1 L1 L2 0.5\nK2 L2 L1 0.5\n');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'duplicate-coupling', pos: { line: 8 } });
    expect(errs[0]!.message).toContain('K1');
  });
});
