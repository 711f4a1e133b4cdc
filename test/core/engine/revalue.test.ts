/**
 * revalueCircuit (engine/compile.ts): a circuit with other part values compiled on an earlier
 * circuit's unknowns and workspace. The references are outside the function under test:
 * compileCircuit of the same flat circuit (its result must be equal bit for bit, whatever the
 * workspace held before), and Ohm's law for a divider (exact in floating point to a few ulp).
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { compileCircuit, elaborate, measureRun, parseNetlist, revalueCircuit, solveOperatingPoint, spreadSetup, type CompiledCircuit, type FlatCircuit } from '@railcheck/core/internal';

function flatOf(text: string): FlatCircuit {
  const p = parseNetlist(text);
  if (!p.ok) throw new Error(p.errors.map((d) => d.message).join('; '));
  const e = elaborate(p.netlist);
  if (!e.ok) throw new Error(e.errors.map((d) => d.message).join('; '));
  return e.circuit;
}
const compiled = (f: FlatCircuit): CompiledCircuit => {
  const c = compileCircuit(f);
  if (!c.ok) throw new Error('no compile');
  return c.circuit;
};
// A Zener shunt with an emitter follower (models with RS, so devices have internal nodes and charge state).
const stage = (rs: number, rb: number, bf: number, bv: number): string => [
  'revalue stage',
  'V1 in 0 12',
  `RS in b ${rs}`,
  `DZ 0 b dz`,
  `RB in c ${rb}`,
  'Q1 c b out qn',
  'RL out 0 100',
  'C1 out 0 10u',
  `.model dz D(IS=1e-14 RS=2 BV=${bv} IBV=1m NBV=1.5 CJO=20p)`,
  `.model qn NPN(IS=1e-14 BF=${bf} VAF=80 RB=10 RC=1 RE=0.5 CJE=10p CJC=5p)`,
  '.end',
].join('\n');

describe('revalueCircuit', () => {
  test('the operating point of a revalued circuit equals a fresh compile of it bit for bit, after the workspace was used for other values', () => {
    const seed = Date.now() % 2 ** 31;
    console.log(`revalue property seed ${seed}`);
    const base = compiled(flatOf(stage(470, 47, 100, 5.6)));
    expect(solveOperatingPoint(base).ok).toBe(true); // the workspace now holds a solution and junction state
    const part = fc.record({ rs: fc.double({ min: 100, max: 2000, noNaN: true }), rb: fc.double({ min: 10, max: 200, noNaN: true }), bf: fc.double({ min: 30, max: 300, noNaN: true }), bv: fc.double({ min: 3, max: 9, noNaN: true }) });
    fc.assert(fc.property(part, part, (p, q) => {
      const other = revalueCircuit(base, flatOf(stage(q.rs, q.rb, q.bf, q.bv)));
      if (!other.ok) return false;
      solveOperatingPoint(other.circuit); // leave the other values' state behind
      const flat = flatOf(stage(p.rs, p.rb, p.bf, p.bv));
      const again = revalueCircuit(base, flat);
      const fresh = compiled(flat);
      if (!again.ok) return false;
      expect(again.circuit.ws).toBe(base.ws); // reused, not a compile
      // A warm start reads whatever the workspace holds: equal only when the revalue left nothing of the other values.
      const a = solveOperatingPoint(again.circuit, true);
      const b = solveOperatingPoint(fresh, true);
      expect(a).toEqual(b);
      expect(Array.from(again.circuit.ws.x)).toEqual(Array.from(fresh.ws.x));
      return true;
    }), { seed, numRuns: 40 });
  });

  test('a divider revalued gives Ohm\'s law for its new values', () => {
    const div = (r1: number, r2: number): string => ['d', 'V1 in 0 10', `R1 in out ${r1}`, `R2 out 0 ${r2}`, '.end'].join('\n');
    const base = compiled(flatOf(div(1000, 1000)));
    const c = revalueCircuit(base, flatOf(div(1000, 3000)));
    expect(c.ok).toBe(true);
    if (!c.ok) return;
    expect(solveOperatingPoint(c.circuit).ok).toBe(true);
    const out = c.circuit.nodeIndex.get('out')!;
    // Divider formula: 10·3000/4000 = 7.5 V; relative error observed 0 to 1e-16, bound 1e-14 (a few ulp of a Newton update).
    expect(Math.abs(c.circuit.ws.x[out]! - 7.5) / 7.5).toBeLessThan(1e-14);
  });

  test('values that change the structure (a series resistance to zero) are compiled afresh, with their own workspace', () => {
    const withRs = (rs: number): string => ['d', 'V1 in 0 1', 'R1 in a 100', 'D1 a 0 dd', `.model dd D(IS=1e-14 RS=${rs})`, '.end'].join('\n');
    const base = compiled(flatOf(withRs(5)));
    const c = revalueCircuit(base, flatOf(withRs(0)));
    expect(c.ok).toBe(true);
    if (c.ok) {
      expect(c.circuit.ws).not.toBe(base.ws);
      expect(c.circuit.unknowns.length).toBe(base.unknowns.length - 1); // no internal anode
    }
  });

  test('a spread run measured after other runs in the same thread equals the run measured first, bit for bit (no leakage between runs)', () => {
    const text = [stage(470, 47, 100, 5.6).replace('.end', ''), '.supply in=V1 out=out load=RL', '.figure line', '.figure load', '.figure ripple', '.spread RS 5%', '.spread RB 10%', '.spread qn.BF 50% gauss', '.spread dz.BV 5%', '.end'].join('\n');
    const flat = flatOf(text);
    const fresh = measureRun(spreadSetup(flat, { runs: 20, seed: 3 }), 7);
    const used = spreadSetup(flat, { runs: 20, seed: 3 });
    for (const r of [0, 1, 2, 19]) measureRun(used, r);
    expect(measureRun(used, 7)).toEqual(fresh);
    expect(Object.keys(fresh.at[0]!.values).length).toBeGreaterThan(3);
  });
});
