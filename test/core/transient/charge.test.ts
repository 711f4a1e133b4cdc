/**
 * Charge conservation. The charge a source delivers, ∫ i dt from its branch
 * current, must equal the change of the charges stored in the circuit:
 * C·ΔV for a capacitor, and for a diode its depletion charge Q(V) plus the
 * integral of its conduction current, both written out below from the
 * published equations (not from the device code).
 *
 * Two quadratures of the source current over the accepted points:
 *  - the trapezoidal rule, as an independent measurement (agreement within
 *    1e-4 of the charge moved; common practice, no source: what is left is
 *    the quadrature error of the steps that the integrator takes as
 *    backward Euler);
 *  - the integrator's own rule on each step: a charge-based companion model
 *    updates q exactly by h·i_n (backward Euler) or h·(i_n + i_(n−1))/2
 *    (trapezoidal), so with that rule the balance holds to the Newton
 *    tolerance, to rounding with tight Newton tolerances (bounds 2–3× the
 *    mismatch observed; the updates telescope to q_N − q_0 whatever the charge law;
 *    the reason integration on charges rather than on capacitances is
 *    preferred, Ward and Dutton, IEEE J. Solid-State Circuits 13(5), 1978 —
 *    from memory). The steps that are backward Euler in a
 *    trapezoidal run (the first one after t = 0 and after every breakpoint)
 *    are worked out here from the netlist's pulse corners (netlist.md).
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_NEWTON, FINAL_GMIN, type IntegrationMethod, type TransientTrace } from '@railcheck/core/internal';
import { at, branch, compile, node, run } from './support.js';

const KELVIN = 300.15; // 27 °C, the default temperature and Tnom (models.md)

/**
 * The varactor of the test, `.model DV D (IS=1e-14 CJO=2n VJ=0.7 M=0.5)`, by the published
 * equations: Shockley's law I = IS·(exp(V/Vt) − 1) (Shockley, Bell Syst. Tech. J. 28, 1949) and
 * the depletion charge Q = CJO·VJ·(1 − (1 − V/VJ)^(1−M))/(1 − M), the integral of the graded-
 * junction capacitance Cj = CJO·(1 − V/VJ)^(−M) (Sze, Physics of Semiconductor Devices, ch. 2 —
 * from memory; models.md states both). Q holds below VJ/2; every junction voltage here lies
 * between −8 V and 0.
 */
const DV = { IS: 1e-14, CJO: 2e-9, VJ: 0.7, M: 0.5 };
/** Vt = kT/q at 27 °C, CODATA 2018 exact k and q, V. */
const VT = (1.380649e-23 * KELVIN) / 1.602176634e-19;
/** The conductance engine.md keeps across every junction, S. */
const JUNCTION_GMIN = 1e-12;
const shockley = (v: number): number => DV.IS * Math.expm1(v / VT);
const depletionCharge = (v: number): number => (DV.CJO * DV.VJ * (1 - (1 - v / DV.VJ) ** (1 - DV.M))) / (1 - DV.M);

/** Corners of pulse(v1 v2 td tr tf pw per) in (0, tstop] (netlist.md: each is a breakpoint). */
function pulseCorners(td: number, tr: number, tf: number, pw: number, per: number, tstop: number): number[] {
  const out: number[] = [];
  for (let base = td; base <= tstop; base += per) for (const c of [0, tr, tr + pw, tr + pw + tf]) if (base + c <= tstop) out.push(base + c);
  return out;
}

/**
 * Cumulative charge through unknown `index` (a branch current, A) at every
 * accepted point: trapezoidal everywhere, and the integrator's rule.
 */
function cumulative(trace: TransientTrace, index: number, method: IntegrationMethod, corners: readonly number[]): { trap: number[]; own: number[] } {
  const trap = [0];
  const own = [0];
  const isCorner = (t: number): boolean => t === 0 || corners.some((c) => Math.abs(c - t) <= 1e-12 * Math.max(c, 1e-30));
  for (let k = 1; k < trace.count; k++) {
    const h = trace.times[k]! - trace.times[k - 1]!;
    const i0 = at(trace, k - 1, index);
    const i1 = at(trace, k, index);
    trap.push(trap[k - 1]! + (h * (i0 + i1)) / 2);
    const backwardEuler = method === 'be' || isCorner(trace.times[k - 1]!);
    own.push(own[k - 1]! + (backwardEuler ? h * i1 : (h * (i0 + i1)) / 2));
  }
  return { trap, own };
}

describe.each(['trap', 'be'] as const)('charge conservation, method %s', (method) => {
  it('RC driven by a pulse train: delivered charge = C·ΔV', () => {
    const c = compile('rc\nV1 in 0 pulse(0 5 0.1m 50u 50u 0.5m 2m)\nR1 in out 1k\nC1 out 0 1u\n.end\n');
    const { trace } = run(c, { tstep: 1e-5, tstop: 5e-3, method });
    const corners = pulseCorners(1e-4, 5e-5, 5e-5, 5e-4, 2e-3, 5e-3);
    // Passive sign convention (netlist.md): the source's current enters its n+; delivered charge is −∫ i.
    const q = cumulative(trace, branch(c, 'V1'), method, corners);
    const out = node(c, 'out');
    let moved = 0;
    let worstTrap = 0;
    let worstOwn = 0;
    for (let k = 0; k < trace.count; k++) {
      const stored = 1e-6 * (at(trace, k, out) - at(trace, 0, out));
      moved = Math.max(moved, Math.abs(stored));
      worstTrap = Math.max(worstTrap, Math.abs(-q.trap[k]! - stored));
      worstOwn = Math.max(worstOwn, Math.abs(-q.own[k]! - stored));
    }
    console.log(`${method} RC: charge moved up to ${moved.toExponential(3)} C; trapezoidal-quadrature mismatch ${worstTrap.toExponential(2)} C, integrator-rule mismatch ${worstOwn.toExponential(2)} C`);
    // About C·5·(1 − e^(−0.55)) ≈ 2.1 µC at the end of the first pulse, more with its ramps.
    expect(moved).toBeGreaterThan(2e-6);
    // Backward Euler's own rule is the rectangle h·i_n: the trapezoidal quadrature of its points differs
    // from it by Σ h·(i_(n−1) − i_n)/2, a first-order term, so only the trapezoidal run is held to it.
    if (method === 'trap') expect(worstTrap).toBeLessThan(1e-4 * moved);
    // Rounding of the sums: observed 2.8e-15 (trap) and 2.5e-15 (be) of the charge moved; bound 7e-15.
    expect(worstOwn).toBeLessThan(7e-15 * moved);
  });

  // Tight Newton tolerances isolate the integrator: a device stores the charge of the iterate it was
  // loaded at, one Newton update behind the final x, so with the default tolerances the balance closes
  // only to the Newton tolerance. `bound`: the integrator-rule mismatch allowed (C), 2–3× the one
  // observed (default tolerances 6.7e-15 trap, 4.0e-15 be; reltol 1e-10 1.5e-19 trap, 1.1e-18 be).
  it.each([
    { newtonLabel: 'default Newton tolerances', newton: DEFAULT_NEWTON, bound: { trap: 1.7e-14, be: 1e-14 } },
    { newtonLabel: 'Newton reltol 1e-10', newton: { reltol: 1e-10, vntol: 1e-12, abstol: 1e-18, maxIterations: 200 }, bound: { trap: 4e-19, be: 2.8e-18 } },
  ])('capacitor in parallel with a reverse-biased CJO diode: delivered charge = C·ΔV − ΔQd − ∫Id ($newtonLabel)', ({ newton, bound }) => {
    // Node a: C1 to ground, and D1 with anode at ground, cathode at a (junction voltage −V(a)).
    const c = compile('varactor\nV1 in 0 pulse(0 8 0.1m 0.1m 0.1m 0.5m 2m)\nR1 in a 1k\nC1 a 0 1n\nD1 0 a DV\n.model DV D (IS=1e-14 CJO=2n VJ=0.7 M=0.5)\n.end\n');
    const { trace } = run(c, { tstep: 1e-6, tstop: 4e-3, method, newton });
    const a = node(c, 'a');
    const corners = pulseCorners(1e-4, 1e-4, 1e-4, 5e-4, 2e-3, 4e-3);
    const q = cumulative(trace, branch(c, 'V1'), method, corners);
    // Conduction current integrated with the same two rules, from the junction voltage of the trace;
    // it includes the 1e-12 S the engine keeps across every junction (engine.md; models.md,
    // "Numerical safeguards"), which at −8 V carries more than the Shockley leakage.
    expect(FINAL_GMIN).toBe(JUNCTION_GMIN);
    const idc: number[] = [];
    for (let k = 0; k < trace.count; k++) {
      const vj = -at(trace, k, a);
      idc.push(shockley(vj) + JUNCTION_GMIN * vj);
    }
    let trapI = 0;
    let ownI = 0;
    const qd0 = depletionCharge(-at(trace, 0, a));
    let moved = 0;
    let worstTrap = 0;
    let worstOwn = 0;
    let depletionShare = 0;
    for (let k = 0; k < trace.count; k++) {
      if (k > 0) {
        const h = trace.times[k]! - trace.times[k - 1]!;
        trapI += (h * (idc[k]! + idc[k - 1]!)) / 2;
        const be = method === 'be' || trace.times[k - 1] === 0 || corners.some((t) => Math.abs(t - trace.times[k - 1]!) <= 1e-12 * t);
        ownI += be ? h * idc[k]! : (h * (idc[k]! + idc[k - 1]!)) / 2;
      }
      const va = at(trace, k, a);
      const dQd = depletionCharge(-va) - qd0;
      const stored = 1e-9 * (va - at(trace, 0, a)) - dQd;
      moved = Math.max(moved, Math.abs(stored));
      depletionShare = Math.max(depletionShare, Math.abs(dQd));
      worstTrap = Math.max(worstTrap, Math.abs(-q.trap[k]! - (stored - trapI)));
      worstOwn = Math.max(worstOwn, Math.abs(-q.own[k]! - (stored - ownI)));
    }
    console.log(`${method} CJO diode, Newton reltol ${newton.reltol}: charge moved up to ${moved.toExponential(3)} C (depletion part ${depletionShare.toExponential(3)} C); trapezoidal mismatch ${worstTrap.toExponential(2)} C, integrator-rule mismatch ${worstOwn.toExponential(2)} C`);
    // The depletion charge is a real share of the total (it is nonlinear: Cj falls from 2 nF at 0 V).
    expect(depletionShare).toBeGreaterThan(0.2 * moved);
    if (method === 'trap') expect(worstTrap).toBeLessThan(1e-4 * moved);
    expect(worstOwn).toBeLessThan(bound[method]);
  });
});

it('the depletion charge above is the integral of Cj = CJO·(1 − V/VJ)^(−M) (guards the reference)', () => {
  for (const v of [-8, -3, -0.5, 0, 0.3]) {
    const d = 1e-6;
    const slope = (depletionCharge(v + d) - depletionCharge(v - d)) / (2 * d);
    // Truncation and rounding of the central difference: observed 1.0e-18 F at most; bound 2.5e-18 F.
    expect(Math.abs(slope - DV.CJO * (1 - v / DV.VJ) ** -DV.M)).toBeLessThan(2.5e-18);
  }
});
