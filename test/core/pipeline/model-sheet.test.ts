/**
 * resolveModelCard and resolveNetlistModel (pipeline/model-sheet.ts): the
 * physical parameters of a datasheet-form card against Shockley's equation
 * by hand, a line that reads back to the same numbers, `.param` values,
 * and errors with the card's file, line and column.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, readModelLine, resolveModelCard, resolveNetlistModel, type ModelCard } from '@railcheck/core';
import { thermalVoltage } from '../../helpers/diode-closed-form.js';

const card = (line: string): ModelCard => {
  const r = readModelLine(line);
  if (!r.ok) throw new Error(r.errors[0]!.message);
  return r.card;
};

describe('resolveModelCard', () => {
  test('two forward points: N and IS satisfy Shockley\'s equation at both (Sze, the ideal diode equation)', () => {
    const r = resolveModelCard(card('.model dx D (VF=0.62 IF=1m VF2=0.74 IF2=100m)'));
    if (!r.ok) throw new Error('not resolved');
    const vt = thermalVoltage(300.15);
    const [is, n] = [r.params.get('IS')!, r.params.get('N')!];
    // Observed 0 V at both points (the resolver inverts this equation); 1e-12 V allows a Vt rounded another way.
    expect(Math.abs(n * vt * Math.log1p(1e-3 / is) - 0.62)).toBeLessThan(1e-12);
    expect(Math.abs(n * vt * Math.log1p(100e-3 / is) - 0.74)).toBeLessThan(1e-12);
    expect(r.filled).toEqual([]);
    expect(r.given.get('VF')).toBe(0.62);
    // The printed line reads back to the same doubles.
    const again = resolveModelCard(card(r.line));
    expect(again.ok && [...again.params]).toEqual([...r.params]);
  });

  test('.param values through options.params and a netlist', () => {
    const r = resolveModelCard(card('.model z D (VZ={vz} IZT=5m)'), { params: new Map([['VZ', 3.3]]) });
    expect(r.ok && r.params.get('BV')).toBe(3.3);
    const parsed = parseNetlist('rail\n.param vz=4.7\n.model z D (VZ={vz})\n');
    if (!parsed.ok) throw new Error('parse');
    const n = resolveNetlistModel(parsed.netlist, 'Z');
    expect(n.ok && n.params.get('BV')).toBe(4.7);
    expect(n.ok && n.filled.join()).toMatch(/IZT = 0\.005 A/);
  });

  test('errors carry the place; a wrong argument is bad-argument', () => {
    const r = resolveModelCard(card('.model z D (VZ=5.6 ZZK=3)'));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]!.pos).toMatchObject({ file: '(model line)', line: 2 });
    expect(r.errors[0]!.message).toMatch(/ZZK is given without IZK/);
    const missing = resolveModelCard(card('.model z D (VZ={nope})'));
    expect(!missing.ok && missing.errors[0]!.code).toBe('undefined-parameter');
    const bad = resolveModelCard(null as unknown as ModelCard);
    expect(!bad.ok && bad.errors[0]!.code).toBe('bad-argument');
  });
});
