/**
 * The operating point of a sine-fed stage is its cycle average at periodic
 * steady state (figures.md, "Stages fed from a transformer secondary"): for
 * a half-wave rectifier into a reservoir and a resistor load, the reported
 * mean voltage, current and power of the load equal the averages of the
 * steady-state waveform of a brute-force transient (twenty RC time
 * constants from switch-on), computed here from the waveform itself:
 * mean(v), mean(v)/R and mean(v²)/R (Joule's law).
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';
import { compile, lastCycleOfBruteForce, node } from '../../transient/support.js';

const R = 470;
const text = `half-wave rectifier for a level-crossing lamp driver
VS a 0 sin(0 12 50)
D1 a res dr
CRES res 0 470u
RL res 0 ${R}
.model dr D (IS=1e-9 N=1.8 CJO=20p)
.supply in=VS out=res load=RL
`;

describe('cycle-average operating point', () => {
  test('load voltage, current and power equal the averages of the steady waveform', () => {
    const run = runNetlist(text);
    if (!run.ok) throw new Error(JSON.stringify(run.errors));
    const op = run.report.figures!.cycleOperatingPoint!;
    const c = compile(text);
    const res = node(c, 'res');
    const period = 0.02;
    const cycles = Math.ceil((20 * R * 470e-6) / period) + 1;
    let sv = 0;
    let sv2 = 0;
    let lastT = Number.NaN;
    let lastV = Number.NaN;
    lastCycleOfBruteForce(c, period, cycles, (t, x) => {
      const v = x[res]!;
      if (!Number.isNaN(lastT)) {
        sv += 0.5 * (v + lastV) * (t - lastT);
        sv2 += 0.5 * (v * v + lastV * lastV) * (t - lastT);
      }
      lastT = t;
      lastV = v;
    });
    const mean = sv / period;
    const power = sv2 / period / R;
    // Observed: 8.1e-9, 8.1e-9 and 1.5e-8 relative (the reservoir recharges fully every cycle, so both
    // runs reach the same cycle); bounds about 2.5 times those.
    expect(Math.abs(op.nodes['res']!.mean - mean) / mean).toBeLessThan(2e-8);
    expect(Math.abs(op.currents['RL']! - mean / R) / (mean / R)).toBeLessThan(2e-8);
    expect(Math.abs(op.power['RL']! - power) / power).toBeLessThan(4e-8);
    // The switch-on DC solution (everything discharged) is not what is shown: it has 0 V on the reservoir.
    expect(run.report.operatingPoints[0]!.nodes['res']!).toBeLessThan(0.01);
    expect(op.nodes['res']!.min).toBeLessThan(op.nodes['res']!.mean);
    expect(op.nodes['res']!.max).toBeGreaterThan(op.nodes['res']!.mean);
  });
});
