/**
 * The engine's work counters (engine/counters.ts), which bench/run.mjs reads:
 * a transient's Newton solves are its steps tried (accepted plus rejected,
 * from the stepper's own statistics) and their iterations the iterations it
 * reports; an operating point counts as DC solves only.
 */
import { describe, expect, it } from 'vitest';
import { parseNetlist, prepare } from '@railcheck/core';
import { ENGINE_COUNTS, resetEngineCounts, runTransient, solveOperatingPoint } from '@railcheck/core/internal';

const HALF_WAVE = `half-wave rectifier (a weather-station charger's raw rail; invented data)\nVS a 0 sin(0 9 50)\nD1 a out DR\nC1 out 0 470u\nR1 out 0 220\n.model DR D (IS=1e-9 N=1.8 RS=0.05 CJO=50p)\n.end\n`;

describe('engine counters', () => {
  it('count DC solves for an operating point and one transient solve per step tried', () => {
    const p = prepare(parseNetlist(HALF_WAVE));
    if (!p.ok) throw new Error('netlist does not compile');
    resetEngineCounts();
    const op = solveOperatingPoint(p.compiled);
    expect(op.ok).toBe(true);
    expect(ENGINE_COUNTS.dcSolves).toBeGreaterThan(0);
    expect(ENGINE_COUNTS.tranSolves).toBe(0);
    resetEngineCounts();
    const r = runTransient(p.compiled, { tstep: 1e-4, tstop: 0.04 });
    if (!r.ok) throw new Error(`transient failed: ${r.reason}`);
    expect(ENGINE_COUNTS.tranSolves).toBe(r.stats.accepted + r.stats.rejectedLte + r.stats.rejectedNewton);
    // The run starts from an operating point: its iterations are DC ones, the rest the steps'.
    expect(ENGINE_COUNTS.tranIterations + ENGINE_COUNTS.dcIterations).toBe(r.stats.newtonIterations);
    expect(ENGINE_COUNTS.dcSolves).toBeGreaterThan(0);
  });
});
