/**
 * Junction-voltage limiting of Nagel 1975 (UCB/ERL M520):
 * the critical voltage, the algorithm's properties, and its use by the
 * diode (both sides, Zener breakdown mirrored about −BV) and transistor.
 */

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bjtModel, createBjt, createDiode, criticalVoltage, diodeModel, pnjlim } from '@railcheck/devices';
import { DeviceHarness, fcSeed } from '../helpers/device-harness.js';
import { kelvinOf, refDiodeG, vt } from './reference.js';

const seed = fcSeed('devices/limiting');
const runs = { seed, numRuns: 500 };
const T = kelvinOf(27);

const logUniform = (lo: number, hi: number): fc.Arbitrary<number> =>
  fc.double({ min: Math.log10(lo), max: Math.log10(hi), noNaN: true }).map((e) => 10 ** e);

/** The algorithm as published (Nagel 1975), written out again for comparison. */
function nagel(vnew: number, vold: number, a: number, vcrit: number): number {
  if (!(vnew > vcrit) || !(Math.abs(vnew - vold) > 2 * a)) return vnew;
  if (vold > 0) {
    const arg = 1 + (vnew - vold) / a;
    return arg > 0 ? vold + a * Math.log(arg) : vcrit;
  }
  return a * Math.log(vnew / a);
}

describe('critical voltage', () => {
  it('equals nVt·ln(nVt/(√2·IS)) (Nagel 1975)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.015, max: 0.1, noNaN: true }), logUniform(1e-18, 1e-6), (a, is) => {
        const ref = a * Math.log(a / (Math.SQRT2 * is));
        // Observed 0 over FC_SEED 20261201, 1–13 and 424242; bound 2·eps.
        return Math.abs(criticalVoltage(a, is) - ref) <= 2 * Number.EPSILON * Math.abs(ref);
      }),
      runs,
    );
  });

  it('is where the curve I = IS·exp(V/nVt) has its greatest curvature (the definition behind the formula)', () => {
    const a = 0.0259;
    const is = 1e-14;
    const curvature = (v: number): number => {
      const d1 = (is / a) * Math.exp(v / a);
      return d1 / a / (1 + d1 * d1) ** 1.5;
    };
    // Golden-section search for the maximum on [0, 1.2] V.
    let lo = 0;
    let hi = 1.2;
    const g = (Math.sqrt(5) - 1) / 2;
    for (let k = 0; k < 200; k++) {
      const x1 = hi - g * (hi - lo);
      const x2 = lo + g * (hi - lo);
      if (curvature(x1) < curvature(x2)) lo = x1;
      else hi = x2;
    }
    // Observed 2.8e-10 V (golden section on a flat maximum); bound 7e-10 V.
    expect(Math.abs(criticalVoltage(a, is) - ((lo + hi) / 2))).toBeLessThan(7e-10);
  });
});

describe('pnjlim', () => {
  const a = 0.02585;
  const vcrit = criticalVoltage(a, 1e-14);
  const vArb = fc.double({ min: -5, max: 50, noNaN: true });

  it('is the published algorithm, never raises the voltage, and leaves steps within 2·nVt alone', () => {
    fc.assert(
      fc.property(vArb, vArb, (vnew, vold) => {
        const out = pnjlim(vnew, vold, a, vcrit);
        const small = Math.abs(vnew - vold) <= 2 * a || vnew <= vcrit;
        return out === nagel(vnew, vold, a, vcrit) && out <= vnew && (!small || out === vnew);
      }),
      runs,
    );
  });

  it('is monotone in the proposed voltage wherever it limits', () => {
    fc.assert(
      fc.property(vArb, fc.double({ min: 0, max: 50, noNaN: true }), fc.double({ min: 0, max: 50, noNaN: true }), (vold, d1, d2) => {
        const floor = Math.max(vcrit, vold + 2 * a) + 1e-9;
        const [lo, hi] = d1 < d2 ? [floor + d1, floor + d2] : [floor + d2, floor + d1];
        return pnjlim(lo, vold, a, vcrit) <= pnjlim(hi, vold, a, vcrit);
      }),
      runs,
    );
  });

  it('from a forward-biased iterate, puts the new exponential current on the old tangent line (Nagel 1975)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.3, max: 0.9, noNaN: true }), fc.double({ min: 0.5, max: 20, noNaN: true }), (vold, dv) => {
        // vold + dv > Vcrit ≈ 0.72 V, so the step is always limited.
        const out = pnjlim(vold + dv, vold, a, vcrit);
        const tangent = Math.exp(vold / a) * (1 + dv / a);
        // Worst observed 1.0e-14 relative over FC_SEED 20261201, 1–13 and 424242; bound 2.5e-14.
        return Math.abs(Math.exp(out / a) - tangent) <= 2.5e-14 * tangent;
      }),
      runs,
    );
  });
});

describe('limiting inside the devices', () => {
  const m = diodeModel(new Map([['IS', 1e-14], ['BV', 5.6], ['IBV', 1e-3]]));
  const a = vt(T);

  it('diode forward step: limited, flagged, and stamped at the limited voltage', () => {
    const d = createDiode('D1', 1, 0, m, 1);
    const hz = new DeviceHarness(2, [d]);
    hz.setX({ 1: 0.6 });
    hz.settle();
    hz.setX({ 1: 3 });
    hz.load();
    expect(hz.ctx.limited).toBe(true);
    const vl = 0.6 + a * Math.log(1 + (3 - 0.6) / a);
    // Observed 0; bound 2·eps.
    expect(Math.abs(hz.entry(1, 1) / refDiodeG(vl, m, T, 1) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });

  it('diode breakdown step: limited in the mirrored variable −(V + BV) with NBV·Vt and Vcrit(NBV·Vt, IBV)', () => {
    const d = createDiode('D1', 1, 0, m, 1);
    const hz = new DeviceHarness(2, [d]);
    hz.setX({ 1: -5.7 });
    hz.settle();
    hz.setX({ 1: -9 });
    hz.load();
    expect(hz.ctx.limited).toBe(true);
    const uOld = 0.1;
    const u = nagel(9 - 5.6, uOld, a, a * Math.log(a / (Math.SQRT2 * 1e-3)));
    expect(u).toBeLessThan(9 - 5.6);
    // Observed 3.4e-14; bound 8.5e-14.
    expect(Math.abs(hz.entry(1, 1) / refDiodeG(-(u + 5.6), m, T, 1) - 1)).toBeLessThan(8.5e-14);
  });

  it('initJunctions starts a diode at Vcrit and a transistor at Vbe = Vcrit, Vbc = 0', () => {
    const d = createDiode('D1', 1, 0, m, 1);
    const hz = new DeviceHarness(2, [d]);
    hz.ctx.initJunctions = true;
    hz.setX({ 1: 0 });
    hz.load();
    expect(hz.ctx.limited).toBe(true);
    // Observed 0; bound 2·eps.
    // Vcrit = nVt·ln(nVt/(√2·IS)) (Nagel 1975), written out rather than taken from the package.
    expect(Math.abs(hz.entry(1, 1) / refDiodeG(a * Math.log(a / (Math.SQRT2 * 1e-14)), m, T, 1) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);

    const qm = bjtModel('npn', new Map([['IS', 1e-16]]));
    const q = createBjt('Q1', 1, 2, 3, qm, 1);
    const hq = new DeviceHarness(4, [q]);
    hq.ctx.initJunctions = true;
    hq.load();
    expect(hq.ctx.limited).toBe(true);
    const vc = a * Math.log(a / (Math.SQRT2 * 1e-16));
    // At Vbc = 0 the base row's b-e derivative is gcc/BF = IS·exp(Vcrit/Vt)/(Vt·BF).
    // Observed 0; bound 2·eps.
    expect(Math.abs(hq.entry(2, 3) / (-(1e-16 * Math.exp(vc / a)) / a / 100) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });

  it('transistor junctions are limited from the previous iterate and flag it', () => {
    const q = createBjt('Q1', 1, 2, 3, bjtModel('pnp', new Map()), 1);
    const hz = new DeviceHarness(4, [q]);
    hz.setX({ 1: -5, 2: -0.7, 3: 0 });
    hz.settle();
    hz.setX({ 1: -5, 2: -4, 3: 0 });
    hz.load();
    expect(hz.ctx.limited).toBe(true);
    expect(hz.settle()).toBeGreaterThan(1);
  });
});
