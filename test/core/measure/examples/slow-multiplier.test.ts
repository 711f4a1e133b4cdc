/**
 * The case the old settling rule got wrong: a capacitance multiplier whose
 * base filter settles over tens of mains cycles, behind a bridge and a
 * reservoir. `runNetlist` (periodic steady state by shooting; Aprille and
 * Trick, Proc. IEEE 60(1), 1972) against a brute-force transient of twenty
 * base-filter time constants, where what is left of the start-up (e^-20 of
 * it) is far below the differences compared.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';
import { compile, lastCycleOfBruteForce, node } from '../../transient/support.js';

const netlist = (cb: string): string => `slow capacitance multiplier
VSEC a b sin(0 17 50)
RW b 0 1meg
D1 a res dbr
D2 b res dbr
D3 0 a dbr
D4 0 b dbr
CRES res 0 3300u
RB res base 1k
CB base 0 ${cb}
Q1 res base out npn1
ILOAD out 0 300m
.model dbr D (IS=1n N=1.8 RS=0.05 CJO=100p)
.model npn1 NPN (IS=1e-13 BF=200 VAF=80 CJE=50p CJC=20p)
.supply in=VSEC out=out load=ILOAD feed=res
.figure ripple
`;

/** Mean and peak-to-peak of nodes over the last of `cycles` periods of a plain transient from the operating point. */
function bruteForce(text: string, cycles: number): { outMean: number; outPp: number; feedPp: number } {
  const c = compile(text);
  const out = node(c, 'out');
  const res = node(c, 'res');
  const period = 0.02;
  let integral = 0;
  let lastT = Number.NaN;
  let lastV = Number.NaN;
  const range = { outMin: Infinity, outMax: -Infinity, resMin: Infinity, resMax: -Infinity };
  lastCycleOfBruteForce(c, period, cycles, (t, x) => {
    const v = x[out]!;
    const w = x[res]!;
    if (!Number.isNaN(lastT)) integral += 0.5 * (v + lastV) * (t - lastT);
    lastT = t;
    lastV = v;
    range.outMin = Math.min(range.outMin, v);
    range.outMax = Math.max(range.outMax, v);
    range.resMin = Math.min(range.resMin, w);
    range.resMax = Math.max(range.resMax, w);
  });
  return { outMean: integral / period, outPp: range.outMax - range.outMin, feedPp: range.resMax - range.resMin };
}

describe('slow capacitance multiplier (RB·CB = 0.47 s, 23.5 cycles)', () => {
  test('run gives the figures of a 20·τ brute-force transient', () => {
    const text = netlist('470u');
    const run = runNetlist(text);
    if (!run.ok) throw new Error(JSON.stringify(run.errors));
    const f = run.report.figures!;
    const ref = bruteForce(text, 470);
    const v = f.values;
    // Observed: mean output 1.9 µV apart on 12.4 V; out p-p 1.1e-4 and feed p-p 4.3e-6 apart relative (two
    // adaptive runs, truncation-error tolerance 1e-3); rr 0.0009 dB apart. Bounds about 2.5 times those.
    expect(Math.abs(f.voutNominal! - ref.outMean)).toBeLessThan(5e-6);
    expect(Math.abs(v['ripple.out_pp']! - ref.outPp) / ref.outPp).toBeLessThan(3e-4);
    expect(Math.abs(v['ripple.feed_pp']! - ref.feedPp) / ref.feedPp).toBeLessThan(1.2e-5);
    expect(Math.abs(v['ripple.rr']! - 20 * Math.log10(ref.feedPp / ref.outPp))).toBeLessThan(2.5e-3);
    // The report says how the steady state was found.
    const cycle = f.cycleOperatingPoint!;
    expect(cycle.steady.method).toBe('shooting');
    expect(cycle.steady.residual).toBeLessThanOrEqual(1);
    const ripple = f.figures[0]!;
    expect(ripple.ok && ripple.conditions).toContain('shooting');
    // The operating point is the cycle average, not the switch-on instant.
    expect(Math.abs(cycle.nodes['out']!.mean - ref.outMean)).toBeLessThan(5e-6);
  });
});
