/**
 * A branch look-up that fails (an F or H whose controlling element has no
 * branch, a K naming something that is not an inductor) is an error at the
 * element's line, never a silent connection to ground. Elaboration already
 * refuses such netlists, so the flat circuits here are edited by hand to
 * reach the compiler's own check.
 */
import { describe, expect, test } from 'vitest';
import { compileCircuit, elaborate, parseNetlist, type FlatCircuit, type FlatElement } from '@railcheck/core';

function flat(text: string): FlatCircuit {
  const p = parseNetlist(text, { file: 'b.cir' });
  if (!p.ok) throw new Error(p.errors.map((e) => e.message).join('\n'));
  const r = elaborate(p.netlist);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return r.circuit;
}

function withElement(c: FlatCircuit, name: string, edit: (el: FlatElement) => FlatElement): FlatCircuit {
  return { ...c, elements: c.elements.map((el) => (el.name === name ? edit(el) : el)) };
}

describe('branch look-ups', () => {
  const MIRROR = 'mirror\nV1 a 0 5\nVs a m 0\nRm m 0 1k\nF1 0 out Vs 2\nRl out 0 500\n';

  test('F controlled by an element without a branch (a resistor): an error at the F line', () => {
    const c = withElement(flat(MIRROR), 'F1', (el) => (el.kind === 'cccs' ? { ...el, control: 'rm' } : el));
    const r = compileCircuit(c);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]).toMatchObject({ code: 'unknown-branch', pos: { file: 'b.cir', line: 5 } });
    expect(r.errors[0]!.message).toContain('has no branch current');
  });

  test('F controlled by a name that is no element: an error, not ground', () => {
    const c = withElement(flat(MIRROR), 'F1', (el) => (el.kind === 'cccs' ? { ...el, control: 'vnone' } : el));
    const r = compileCircuit(c);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]!.message).toContain('names no element');
  });

  test('K naming a voltage source (it has a branch, but is no inductor): an error at the K line', () => {
    const c = withElement(flat('pair\nV1 a 0 1\nR1 a p 1\nL1 p 0 1\nL2 s 0 1\nR2 s 0 1\nK1 L1 L2 0.5\n'), 'K1', (el) => (el.kind === 'coupling' ? { ...el, inductors: ['l1', 'v1'] } : el));
    const r = compileCircuit(c);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ code: 'unknown-branch', pos: { line: 7 } });
    expect(r.errors[0]!.message).toContain('not an inductor');
  });

  test('the same circuits unedited compile', () => {
    expect(compileCircuit(flat(MIRROR)).ok).toBe(true);
  });
});
