/**
 * Notes a run adds from what its analyses reached: the mains caution,
 * judged on node levels (IEC 61140 extra-low voltage: 50 V a.c. r.m.s.,
 * 120 V ripple-free d.c.; ripple-free per IEC 61201, ripple at most 10 %
 * r.m.s., 140 V peak for 120 V, from memory); every rating exceeded; and
 * currents and powers no discrete part survives. Also where an
 * operating-point failure is reported when the netlist has no `.op` line.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist, ELV_AC_RMS, ELV_DC, type RunResult } from '@railcheck/core';

const lines = (...ls: string[]): string => [...ls, '.end', ''].join('\n');
const report = (r: RunResult) => {
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return r.report;
};
const cautioned = (text: string): boolean => report(runNetlist(text)).warnings.some((w) => w.code === 'above-elv');

describe('the mains caution judges the levels the circuit reaches', () => {
  test('the limits are the IEC 61140 ones', () => {
    expect([ELV_AC_RMS, ELV_DC]).toEqual([50, 120]);
  });

  test('a 40 V sine on a 100 V offset: 104 V r.m.s. of a level that is not ripple-free', () => {
    // Neither the offset (100 V < 120 V) nor the amplitude (28 V r.m.s. < 50 V) exceeds ELV alone.
    expect(cautioned(lines('offset sine', 'V1 a 0 sin(100 40 50)', 'R1 a 0 1k', '.tran 100u 40m'))).toBe(true);
  });

  test('a current source driving a node to 1 kV earns it though no voltage source is above ELV', () => {
    const r = report(runNetlist(lines('current source', 'I1 0 a dc 1', 'R1 a 0 1k', '.op')));
    const w = r.warnings.find((x) => x.code === 'above-elv');
    expect(w?.message).toMatch(/node a reaches 1 kV peak in the operating point/);
  });

  test('a 48 V ripple-free d.c. rail stays without it, a 130 V one earns it', () => {
    expect(cautioned(lines('48 V', 'V1 a 0 48', 'R1 a 0 1k', '.op'))).toBe(false);
    expect(cautioned(lines('130 V', 'V1 a 0 130', 'R1 a 0 1k', '.op'))).toBe(true);
  });

  test('a 60 V r.m.s. sine earns it, a 45 V r.m.s. one does not', () => {
    expect(cautioned(lines('60 Vrms', `V1 a 0 sin(0 ${60 * Math.SQRT2} 50)`, 'R1 a 0 1k', '.tran 200u 40m'))).toBe(true);
    expect(cautioned(lines('45 Vrms', `V1 a 0 sin(0 ${45 * Math.SQRT2} 50)`, 'R1 a 0 1k', '.tran 200u 40m'))).toBe(false);
  });

  test('±80 V rails: each node is below 120 V, the 160 V between them is not', () => {
    expect(cautioned(lines('split rails', 'V1 p 0 80', 'V2 0 n 80', 'R1 p n 10k', '.op'))).toBe(true);
    expect(cautioned(lines('split rails, low', 'V1 p 0 50', 'V2 0 n 50', 'R1 p n 10k', '.op'))).toBe(false);
  });

  test('two 49.5 V r.m.s. sines in antiphase: each node is below 50 V r.m.s., the 99 V between them is not', () => {
    const sines = (peak: number): string => lines('antiphase', `V1 p 0 sin(0 ${peak} 50)`, `V2 0 n sin(0 ${peak} 50)`, 'R1 p n 10k', '.tran 200u 40m');
    expect(cautioned(sines(70))).toBe(true);
    // 2 × 17 V peak is 24 V r.m.s. between the nodes.
    expect(cautioned(sines(17))).toBe(false);
  });
});

describe('sanity notes', () => {
  test('a part over its rating is named under the notes, with the ratio', () => {
    // 12 V across 10 Ω: P = V²/R = 14.4 W (Ohm's and Joule's laws) against pmax = 1 W.
    const r = report(runNetlist(lines('rating', 'V1 a 0 12', 'R1 a 0 10 pmax=1', '.op')));
    const w = r.warnings.find((x) => x.code === 'over-rating');
    expect(w?.pos?.line).toBe(3);
    expect(w?.message).toMatch(/R1 absorbs 14\.4 W .* over its rating of 1 W \(14\.4×\)/);
  });

  test('a resistor written 1M (1 mΩ) across 12 V: 12 kA is absurd, and the note names the suffix', () => {
    const r = report(runNetlist(lines('suffix', 'V1 a 0 12', 'R1 a 0 1M', '.op')));
    const w = r.warnings.find((x) => x.code === 'absurd-stress');
    expect(w?.pos?.line).toBe(3);
    expect(w?.message).toMatch(/R1 carries a current of 12 kA/);
    expect(w?.message).toMatch(/M suffix is milli .* write meg/);
    // 1meg: 12 µA, nothing to note.
    expect(report(runNetlist(lines('suffix', 'V1 a 0 12', 'R1 a 0 1meg', '.op'))).warnings.some((x) => x.code === 'absurd-stress')).toBe(false);
  });
});

describe('an operating point that fails is located without an .op line', () => {
  // Two diodes with IS = 1e-300 and N = 0.001 across a stiff source: Newton has no usable Jacobian.
  const failing = ['V1 in 0 dc 12', 'R1 in out 1', 'D1 out 0 DZ', 'D2 0 out DZ', '.model DZ D IS=1e-300 N=0.001'];
  test('at the first analysis that needs it', () => {
    const r = runNetlist(lines('op for tran', ...failing, '.tran 1m 10m'));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]!.pos?.line).toBe(7);
    expect(r.errors[0]!.message).toMatch(/needed by this \.tran/);
  });
  test('at the title line when nothing else asks for it', () => {
    const r = runNetlist(lines('op alone', ...failing));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]!.pos?.line).toBe(1);
  });
});
