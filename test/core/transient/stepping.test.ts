/**
 * Step control, read from the accepted time points (trace.times) and the
 * counters. What is checked comes from the stepper's contract
 * (TransientOptions and the engine docs) and from netlist.md ("every corner
 * of a pulse or pwl is a breakpoint: transient stepping lands on it"):
 *  - steps grow in quiet stretches and shrink where the waveform bends, also
 *    where nothing but the circuit itself bends (a diode starting to conduct);
 *  - no step exceeds tmax (default tstop/50), nor a sine period divided by
 *    stepsPerCycle (default 100 trapezoidal, 400 backward Euler);
 *  - consecutive steps grow by at most 2× (the growth limit);
 *  - every pulse and pwl corner, computed here from the netlist.md
 *    definitions, is an accepted time (to 2 ulps; observed exact), with
 *    adaptive and with fixed steps;
 *  - a demanding run rejects steps and still completes;
 *  - an unsolvable circuit ends with reason 'step-too-small' and its time.
 */
import { describe, expect, it } from 'vitest';
import { runNetlist } from '@railcheck/core';
import { runTransient } from '@railcheck/core/internal';
import { compile, run, times } from './support.js';

/** Accepted step lengths. */
function steps(ts: readonly number[]): number[] {
  return ts.slice(1).map((t, k) => t - ts[k]!);
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

// RC (τ = 0.1 ms) driven by one 10 µs-edged pulse from 1 ms to 4 ms.
const RC_PULSE = 'rc pulse\nV1 in 0 pulse(0 5 1m 10u 10u 3m)\nR1 in out 100\nC1 out 0 1u\n.end\n';

describe('step size follows the waveform', () => {
  it.each(['trap', 'be'] as const)('%s: long steps in a quiet stretch, short ones after an edge', (method) => {
    const tstop = 8e-3;
    const ts = times(run(compile(RC_PULSE), { tstep: 1e-5, tstop, method }).trace);
    const tmax = tstop / 50;
    const quiet = steps(ts).filter((_, k) => ts[k]! > 2.5e-3 && ts[k + 1]! < 3.9e-3);
    const edge = steps(ts).filter((_, k) => ts[k]! >= 1.01e-3 && ts[k + 1]! <= 1.2e-3);
    // Settled to within 5 V·e^(−15) of its final value: the step is capped by tmax alone.
    expect(median(quiet)).toBeGreaterThan(0.99 * tmax);
    expect(Math.max(...edge)).toBeLessThan(tmax / 4);
    expect(edge.length).toBeGreaterThan(5);
  });

  it('shrinks where a diode conducts (no breakpoint there)', () => {
    // Half-wave rectifier: the rail bends sharply at each conduction start; the sine has no corners.
    const c = compile('hw\nVS sec 0 sin(0 12 50)\nD1 sec out DR\n.model DR D (IS=1e-9 N=1.8 RS=0.05)\nC1 out 0 1000u\nR1 out 0 100\n.end\n');
    // At 50 steps per cycle the cap leaves room for the truncation-error control to act.
    const { trace } = run(c, { tstep: 1e-4, tstop: 0.1, method: 'trap', stepsPerCycle: 50 });
    const ts = times(trace);
    const out = c.nodeIndex.get('out')!;
    const sec = c.nodeIndex.get('sec')!;
    const tmax = 20e-3 / 50; // the sine's period / 50 is below tstop/50 here
    for (let cycle = 1; cycle < 5; cycle++) {
      const conducting: number[] = [];
      const discharging: number[] = [];
      steps(ts).forEach((h, k) => {
        if (ts[k]! < cycle * 0.02 || ts[k + 1]! > (cycle + 1) * 0.02) return;
        const forward = trace.values[(k + 1) * trace.size + sec]! - trace.values[(k + 1) * trace.size + out]!;
        (forward > 0.3 ? conducting : discharging).push(h);
      });
      expect(conducting.length).toBeGreaterThan(3);
      expect(Math.min(...conducting)).toBeLessThan(0.6 * tmax);
      expect(median(discharging)).toBeGreaterThan(0.99 * tmax);
    }
  });
});

describe('step limits', () => {
  it.each(['trap', 'be'] as const)('%s: no step exceeds an explicit tmax, nor the default tstop/50', (method) => {
    for (const [tmax, cap] of [[37e-6, 37e-6], [undefined, 8e-3 / 50]] as const) {
      const { stats } = run(compile(RC_PULSE), { tstep: 1e-5, tstop: 8e-3, method, tmax });
      expect(stats.maxStep).toBeLessThanOrEqual(cap * (1 + 1e-9));
      expect(stats.maxStep).toBeGreaterThan(0.99 * cap);
    }
  });

  it.each([
    ['trap', 100],
    ['be', 400],
  ] as const)('%s: a sine source caps the step at its period / %i', (method, perCycle) => {
    const { trace, stats } = run(compile('rc sine\nV1 in 0 sin(0 1 1k)\nR1 in out 1k\nC1 out 0 0.1u\n.end\n'), { tstep: 1e-5, tstop: 5e-3, method });
    expect(stats.maxStep).toBeLessThanOrEqual((1e-3 / perCycle) * (1 + 1e-9));
    expect(stats.maxStep).toBeGreaterThan(0.99 * (1e-3 / perCycle));
    expect(trace.count).toBeGreaterThan(5 * perCycle);
  });

  it('consecutive accepted steps grow by at most 2×', () => {
    const circuits = [RC_PULSE, 'rlc\nV1 in 0 pulse(0 5 0 0 0 1)\nR1 in a 20\nL1 a b 10m\nC1 b 0 1u\n.end\n'];
    for (const netlist of circuits) {
      for (const method of ['trap', 'be'] as const) {
        const h = steps(times(run(compile(netlist), { tstep: 1e-5, tstop: 5e-3, method }).trace));
        for (let k = 1; k < h.length; k++) expect(h[k]! / h[k - 1]!).toBeLessThanOrEqual(2 * (1 + 1e-9));
      }
    }
  });
});

describe('breakpoints', () => {
  // pulse(v1 v2 td tr tf pw per): corners at td + k·per + {0, tr, tr + pw, tr + pw + tf} (netlist.md).
  const [td, tr, tf, pw, per] = [0.3e-3, 20e-6, 30e-6, 0.2e-3, 1e-3];
  const PWL: ReadonlyArray<readonly [number, number]> = [[0, 0], [0.15e-3, 1e-3], [0.4e-3, 1e-3], [0.45e-3, -2e-3], [1.7e-3, 0]];
  const netlist = `corners\nV1 a 0 pulse(0 1 ${td} ${tr} ${tf} ${pw} ${per})\nR1 a 0 1k\nI1 0 b pwl(${PWL.map(([t, v]) => `${t} ${v}`).join(' ')})\nR2 b 0 1k\n.end\n`;
  const tstop = 2e-3;
  const corners: number[] = [];
  for (let base = td; base < tstop; base += per) for (const c of [0, tr, tr + pw, tr + pw + tf]) corners.push(base + c);
  for (const [t] of PWL) if (t > 0) corners.push(t);

  it.each([
    { label: 'adaptive trap', opts: { method: 'trap' as const } },
    { label: 'adaptive be', opts: { method: 'be' as const } },
    { label: 'fixed step 70 µs (not a divisor of any corner)', opts: { method: 'trap' as const, fixedStep: 70e-6 } },
  ])('every pulse and pwl corner is an accepted time ($label)', ({ opts }) => {
    const ts = times(run(compile(netlist), { tstep: 1e-5, tstop, ...opts }).trace);
    expect(corners.length).toBe(12);
    for (const c of corners) {
      const nearest = ts.reduce((best, t) => (Math.abs(t - c) < Math.abs(best - c) ? t : best), Infinity);
      // Observed 0 (landed exactly); bound 2·eps·t.
      expect(Math.abs(nearest - c)).toBeLessThanOrEqual(2 * Number.EPSILON * c);
    }
    expect(ts[ts.length - 1]).toBe(tstop);
    for (let k = 1; k < ts.length; k++) expect(ts[k]!).toBeGreaterThan(ts[k - 1]!);
  });
});

describe('rejection and failure', () => {
  it('a lightly damped RLC makes the controller reject steps, and the run completes', () => {
    const { stats, trace } = run(compile('rlc\nV1 in 0 pulse(0 5 0 0 0 1)\nR1 in a 20\nL1 a b 10m\nC1 b 0 1u\n.end\n'), { tstep: 1e-5, tstop: 5e-3, method: 'trap' });
    expect(stats.rejectedLte).toBeGreaterThan(0);
    expect(trace.times[trace.count - 1]).toBe(5e-3);
    // A rejected step is retried shorter: the shortest accepted step is far below the longest.
    expect(stats.minStep).toBeLessThan(stats.maxStep / 10);
  });

  it('an ideal 100 V step straight across a diode (no resistance anywhere) ends as step-too-small at the step', () => {
    // Newton's junction limiting (Nagel 1975) lets the junction voltage climb about 0.2 V per
    // iteration, so no time point after the edge converges within the iteration limit, however short.
    const c = compile('hard\nV1 a 0 pulse(0 100 1m 0 0 1m)\nD1 a 0 DX\n.model DX D (IS=1e-14)\n.end\n');
    const t0 = performance.now();
    const r = runTransient(c, { tstep: 1e-5, tstop: 3e-3 });
    expect(performance.now() - t0).toBeLessThan(5000);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.reason).toBe('step-too-small');
    expect(r.time).toBeGreaterThan(1e-3);
    expect(r.time).toBeLessThan(1e-3 + 1e-5);
    expect(r.stats.rejectedNewton).toBeGreaterThan(5);
    // Through a whole run: an error value (no exception) that names the failure and the time.
    const run2 = runNetlist('hard\nV1 a 0 pulse(0 100 1m 0 0 1m)\nD1 a 0 DX\n.model DX D (IS=1e-14)\n.tran 10u 3m\n.end\n');
    expect(run2.ok).toBe(false);
    if (run2.ok) return;
    const msg = run2.errors.map((e) => e.message).join('\n');
    expect(msg).toMatch(/time step fell below its floor/);
    expect(msg).toMatch(/t = 1(\.0+)?\d* ?ms/);
  });
});
