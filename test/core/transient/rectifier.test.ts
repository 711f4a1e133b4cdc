/**
 * Rectifier with reservoir capacitor (a 12 V-peak, 50 Hz secondary feeding a
 * model-railway controller's unregulated rail; invented data) against ODEX
 * (Hairer and Wanner's extrapolation code, npm odex) at tolerance 1e-10 on the
 * same circuit written as an ODE here:
 *   C·dv/dt = Id(vs(t) − v) − v/R                          (half wave)
 * with the diode of models.md, I = IS·(exp(Vj/(N·Vt)) − 1), its series RS
 * solved inside the right-hand side by a scalar Newton on
 * Vj + RS·I(Vj) = vs − v; and a full-wave bridge (RS = 0) whose floating nodes
 * follow from KCL in closed form (see bridgeCurrent).
 *
 * Steady-state ripple against the handbook estimate ΔV ≈ I/(f·C) half wave,
 * I/(2f·C) full wave (Horowitz and Hill, The Art of Electronics, ch. 1,
 * power supplies — from memory). The estimate assumes the capacitor
 * discharges for the whole period, so it overstates the ripple: the
 * simulated ripple must be below it, by at most 25% (common practice, no
 * source).
 *
 * Safety: this is an extra-low-voltage secondary; the transformer's primary
 * is mains and is outside these tests (see docs/transient.md).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { BRIDGE, CAP, CLIP, FREQ, HALF, IS, RLOAD, bridgeCurrent, compareWithOdex, halfCurrent, junctionWithRs, rhsBridge, rhsHalf, shockley, vs, type Rhs } from './rectifier-model.js';

/** Both methods at their defaults. */
const compare = (netlist: string, rhs: Rhs, current: (t: number, v: number) => number) => {
  const r = compareWithOdex(netlist, rhs, current, [{ label: 'trap', opts: { method: 'trap' } }, { label: 'be', opts: { method: 'be' } }]);
  return { ...r, results: { trap: r.results[0]!, be: r.results[1]! } };
};

/**
 * Bounds per method, 2–3× the error observed (docs/transient.md gives the same runs):
 * `err` on the rail (V), `ripple` relative to the reference ripple.
 */
const BOUNDS = {
  // Observed 8.55 mV (trap), 13.5 mV (be); ripple 0.32 %, 0.13 % off.
  half: { trap: { err: 20e-3, ripple: 0.008 }, be: { err: 30e-3, ripple: 0.003 } },
  // Observed 9.11 mV (trap), 7.44 mV (be); ripple 0.53 %, 0.21 % off.
  bridge: { trap: { err: 20e-3, ripple: 0.015 }, be: { err: 20e-3, ripple: 0.005 } },
} as const;

describe.each([
  { name: 'half-wave rectifier', netlist: HALF, rhs: rhsHalf, current: halfCurrent, pulsesPerSecond: FREQ, bounds: BOUNDS.half },
  { name: 'full-wave bridge', netlist: BRIDGE, rhs: rhsBridge, current: (t: number, v: number) => bridgeCurrent(vs(t), v), pulsesPerSecond: 2 * FREQ, bounds: BOUNDS.bridge },
])('$name, 1 s of 50 Hz, against ODEX', ({ name, netlist, rhs, current, pulsesPerSecond, bounds }) => {
  let data: ReturnType<typeof compare>;
  beforeAll(() => {
    data = compare(netlist, rhs, current);
  });

  it('the reference never reaches the clip of its right-hand side', () => {
    console.log(`${name}: peak diode current on the reference ${data.peakCurrent.toFixed(2)} A`);
    expect(data.peakCurrent).toBeLessThan(CLIP / 100);
    expect(data.peakCurrent).toBeGreaterThan(0.5);
  });

  it.each(['trap', 'be'] as const)('%s follows the reference', (method) => {
    const { results, refRipple } = data;
    const r = results[method];
    console.log(`${name}, ${method}: ${r.stats.accepted} steps, ${r.stats.rejectedLte} rejected (LTE), ${r.stats.rejectedNewton} rejected (Newton), ${r.stats.newtonIterations} Newton iterations; max |error| ${(r.err * 1e3).toFixed(2)} mV; ripple ${r.ripple.toFixed(4)} V (reference ${refRipple.toFixed(4)} V); ${r.ms.toFixed(0)} ms`);
    // Set from the error observed (BOUNDS); far inside the 1 % of the peak (120 mV) a supply
    // designer reads a rail to (common practice, no source).
    expect(r.err).toBeLessThan(bounds[method].err);
    // Ripple from the accepted points alone (no interpolation), relative to the reference ripple (BOUNDS).
    expect(Math.abs(r.ripple - refRipple)).toBeLessThan(bounds[method].ripple * refRipple);
  });

  it('ripple is below the handbook estimate I/(pulses·C), by at most 25%', () => {
    const { results, refRipple, refMean } = data;
    // I is the load current at the mean rail voltage of the last five cycles.
    const estimate = refMean / RLOAD / (pulsesPerSecond * CAP);
    for (const r of [results.trap, results.be]) {
      const ratio = r.ripple / estimate;
      console.log(`${name}: ripple ${r.ripple.toFixed(3)} V vs estimate ${estimate.toFixed(3)} V (ratio ${ratio.toFixed(3)}); reference ratio ${(refRipple / estimate).toFixed(3)}`);
      expect(ratio).toBeLessThan(1);
      expect(ratio).toBeGreaterThan(0.75);
    }
  });
});

it('the ODE right-hand sides solve their diode equations (guards the reference)', () => {
  // Series RS: the drop splits into the junction and RS·I.
  for (const drop of [-12, -0.1, 0, 0.4, 0.9, 3, 12]) {
    const vj = junctionWithRs(drop, 0.05);
    // Observed 9.6e-16·(1 + |drop|) at most; bound 2.5e-15·(1 + |drop|).
    expect(Math.abs(vj + 0.05 * shockley(vj) - drop)).toBeLessThan(2.5e-15 * (1 + Math.abs(drop)));
  }
  // Bridge: KCL at both floating nodes holds at a = (u + v)/2, b = a − u, for either polarity.
  for (const [u, v] of [[12, 9], [-12, 9], [10.5, 9.7], [-3, 9], [0, 0.5]] as const) {
    const a = (u + v) / 2;
    const b = a - u;
    const intoA = shockley(-a) - shockley(a - v); // from D3, minus into D1
    const intoB = shockley(-b) - shockley(b - v);
    // Observed 0 in both (the pairs cancel exactly); bounds of 4 and 2 ulps of the terms.
    expect(Math.abs(intoA + intoB)).toBeLessThanOrEqual(4 * Number.EPSILON * (Math.abs(shockley(a - v)) + Math.abs(shockley(-b)) + IS));
    expect(Math.abs(bridgeCurrent(u, v) - (shockley(a - v) + shockley(b - v)))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(bridgeCurrent(u, v)));
  }
  expect(bridgeCurrent(12, 9)).toBeGreaterThan(1);
  // Observed 0 (the bridge is symmetric term by term); bound 2 ulps.
  expect(Math.abs(bridgeCurrent(-12, 9) - bridgeCurrent(12, 9))).toBeLessThanOrEqual(2 * Number.EPSILON * bridgeCurrent(12, 9));
});
