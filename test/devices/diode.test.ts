/**
 * Diode model against the models.md equations written out independently
 * (test/devices/reference.ts), both through the pure functions and through
 * what `load` stamps.
 */

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type DiodeModel, createDiode, diodeCharge, diodeCurrent, diodeModel, EXP_LINEAR_LIMIT } from '@railcheck/devices';
import { DeviceHarness, fcSeed } from '../helpers/device-harness.js';
import { close, kelvinOf, refDepletionC, refDepletionQ, refDiodeBv, refDiodeG, refDiodeI, refDiodeIs, vt } from './reference.js';

const seed = fcSeed('devices/diode');
const runs = { seed, numRuns: 300 };

const logUniform = (lo: number, hi: number): fc.Arbitrary<number> =>
  fc.double({ min: Math.log10(lo), max: Math.log10(hi), noNaN: true }).map((e) => 10 ** e);

/** Random diode models over the range real parts cover, with or without breakdown. */
const modelArb: fc.Arbitrary<DiodeModel> = fc
  .record({
    IS: logUniform(1e-16, 1e-8),
    N: fc.double({ min: 0.8, max: 2, noNaN: true }),
    BV: fc.option(fc.double({ min: 2, max: 60, noNaN: true }), { nil: undefined }),
    IBV: logUniform(1e-6, 1e-2),
    NBV: fc.double({ min: 0.5, max: 3, noNaN: true }),
    XTI: fc.double({ min: 0, max: 4, noNaN: true }),
    EG: fc.double({ min: 0.6, max: 1.5, noNaN: true }),
    TBV: fc.double({ min: -1e-3, max: 1e-3, noNaN: true }),
  })
  .map((r) => {
    const given = new Map<string, number>(Object.entries(r).filter((e): e is [string, number] => e[1] !== undefined));
    return diodeModel(given);
  });

const celsiusArb = fc.double({ min: -40, max: 125, noNaN: true });
const areaArb = fc.double({ min: 0.1, max: 10, noNaN: true });
const fracArb = fc.double({ min: 0, max: 1, noNaN: true });

/** A bias from 0.5 V beyond breakdown (or −5 V) up to 0.9 V, where every exponent stays below the linearisation limit. */
function biasFor(m: DiodeModel, T: number, frac: number): number {
  const bv = refDiodeBv(m, T);
  const lo = bv === undefined ? -5 : -bv - 0.5;
  return lo + frac * (0.9 - lo);
}

describe('diode current: pure function vs models.md', () => {
  it('matches I(V) and dI/dV at random bias, temperature and area', () => {
    fc.assert(
      fc.property(modelArb, celsiusArb, areaArb, fracArb, (m, c, area, frac) => {
        const T = kelvinOf(c);
        const v = biasFor(m, T, frac);
        const ref = refDiodeI(v, m, T, area);
        const got = diodeCurrent(v, m, T, area);
        const scale = Math.abs(ref.fwd) + ref.bd + area * refDiodeIs(m, T);
        const g = refDiodeG(v, m, T, area);
        return close(got.i, ref.i, 1e-12, scale) && close(got.g, g, 1e-12, g);
      }),
      runs,
    );
  });

  it('carries exactly IBV at V = −BV (models.md)', () => {
    const m = diodeModel(new Map([['BV', 5.6], ['IBV', 2e-3], ['IS', 1e-14]]));
    const { i } = diodeCurrent(-5.6, m, T_NOM_K, 1);
    // At −BV the Shockley term is −IS, the breakdown term exactly −IBV.
    expect(i).toBeCloseTo(-2e-3 - 1e-14, 15);
  });
});

const T_NOM_K = kelvinOf(27);

describe('diode Jacobian vs central differences', () => {
  it('dI/dV equals the central difference in forward, reverse and breakdown', () => {
    fc.assert(
      fc.property(modelArb, celsiusArb, areaArb, fracArb, (m, c, area, frac) => {
        const T = kelvinOf(c);
        const v = biasFor(m, T, frac);
        const h = 1e-5;
        const up = diodeCurrent(v + h, m, T, area).i;
        const dn = diodeCurrent(v - h, m, T, area).i;
        const fd = (up - dn) / (2 * h);
        const { g } = diodeCurrent(v, m, T, area);
        // Truncation (h/nVt)²/6 ≈ 1e-7 relative at N·Vt ≈ 16 mV; round-off eps·|I|/h.
        return close(fd, g, 2e-6, g, (8e-16 * (Math.abs(up) + Math.abs(dn))) / h);
      }),
      runs,
    );
  });
});

describe('diode load stamps', () => {
  it('stamps G and Ieq so that the companion reproduces I(V) and dI/dV (cathode not grounded, with gmin)', () => {
    fc.assert(
      fc.property(modelArb, fracArb, fc.double({ min: -3, max: 3, noNaN: true }), (m, frac, vk) => {
        const gmin = 1e-12;
        const d = createDiode('D1', 1, 2, m, 1);
        const hz = new DeviceHarness(3, [d], { gmin });
        const v = biasFor(m, T_NOM_K, frac);
        hz.setX({ 1: vk + v, 2: vk });
        hz.settle();
        const r = hz.residual();
        const ref = refDiodeI(v, m, T_NOM_K, 1);
        const g = refDiodeG(v, m, T_NOM_K, 1) + gmin;
        const scale = Math.abs(ref.fwd) + ref.bd + m.IS;
        const i = ref.i + gmin * v;
        // The residual M·x − rhs itself rounds by about eps·G·|x|.
        const slack = 4e-16 * g * (Math.abs(vk + v) + Math.abs(vk));
        return (
          close(r[1] ?? NaN, i, 1e-12, scale, slack) &&
          close(r[2] ?? NaN, -i, 1e-12, scale, slack) &&
          close(hz.entry(1, 1), g, 1e-12, g) &&
          close(hz.entry(2, 2), g, 1e-12, g) &&
          close(hz.entry(1, 2), -g, 1e-12, g) &&
          close(hz.entry(2, 1), -g, 1e-12, g)
        );
      }),
      runs,
    );
  });

  it('puts RS/area between the anode and an internal node, and reports I and power incl. the RS loss', () => {
    const m = diodeModel(new Map([['RS', 4], ['IS', 1e-12]]));
    const d = createDiode('D1', 1, 0, m, 2);
    const hz = new DeviceHarness(2, [d]);
    expect(hz.size).toBe(3);
    const vj = 0.55;
    const T = T_NOM_K;
    const i = refDiodeI(vj, m, T, 2).i;
    const va = vj + i * (4 / 2);
    hz.setX({ 1: va, 2: vj });
    hz.settle();
    expect(hz.entry(1, 1)).toBeCloseTo(2 / 4, 14);
    expect(hz.entry(1, 2)).toBeCloseTo(-2 / 4, 14);
    const r = hz.residual();
    // KCL is satisfied at the internal node: the RS current equals the junction current.
    expect(Math.abs(r[2] ?? NaN)).toBeLessThan(1e-12 * i);
    expect(r[1]).toBeCloseTo(i, 12);
    const rep = d.report(hz.x, hz.state);
    expect(rep.currents[0]?.[1]).toBeCloseTo(i, 12);
    expect(rep.power).toBeCloseTo(va * i, 12);
    expect(d.topology().dcPaths.length).toBe(2);
  });
});

describe('diode charge (models.md depletion + transit form)', () => {
  const chargeArb = fc.record({
    CJO: logUniform(1e-13, 1e-9),
    VJ: fc.double({ min: 0.3, max: 1.2, noNaN: true }),
    M: fc.double({ min: 0.2, max: 0.9, noNaN: true }),
    TT: fc.oneof(fc.constant(0), logUniform(1e-10, 1e-6)),
  });

  it('q and dq/dv match the closed forms below and above VJ/2', () => {
    fc.assert(
      fc.property(chargeArb, fc.double({ min: -20, max: 0.85, noNaN: true }), areaArb, (p, v, area) => {
        const m = diodeModel(new Map(Object.entries(p)));
        const got = diodeCharge(v, m, T_NOM_K, area);
        const i = refDiodeI(v, m, T_NOM_K, area);
        const q = area * refDepletionQ(v, p.CJO, p.VJ, p.M) + p.TT * i.i;
        const c = area * refDepletionC(v, p.CJO, p.VJ, p.M) + p.TT * refDiodeG(v, m, T_NOM_K, area);
        const qScale = Math.abs(area * refDepletionQ(v, p.CJO, p.VJ, p.M)) + p.TT * (Math.abs(i.fwd) + area * m.IS);
        return close(got.q, q, 1e-11, qScale) && close(got.c, c, 1e-11, c);
      }),
      runs,
    );
  });

  it('capacitance is the central difference of the charge, and continuous at VJ/2', () => {
    const m = diodeModel(new Map([['CJO', 10e-12], ['VJ', 0.7], ['M', 0.4], ['TT', 5e-9]]));
    for (const v of [-10, -1, 0, 0.2, 0.3499, 0.35, 0.3501, 0.5, 0.7, 0.8]) {
      const h = 1e-6;
      const fd = (diodeCharge(v + h, m, T_NOM_K, 1).q - diodeCharge(v - h, m, T_NOM_K, 1).q) / (2 * h);
      const { c } = diodeCharge(v, m, T_NOM_K, 1);
      expect(Math.abs(fd - c)).toBeLessThan(1e-6 * c);
    }
    const below = diodeCharge(0.35 - 1e-12, m, T_NOM_K, 1);
    const above = diodeCharge(0.35 + 1e-12, m, T_NOM_K, 1);
    expect(Math.abs(below.c - above.c)).toBeLessThan(1e-9 * below.c);
  });

  it('transient load adds the backward-Euler companion of the charge; reactive load stamps dq/dv', () => {
    const m = diodeModel(new Map([['CJO', 20e-12], ['TT', 10e-9], ['IS', 1e-14]]));
    const d = createDiode('D1', 1, 0, m, 1);
    const hz = new DeviceHarness(2, [d], { step: 1e-7 });
    hz.setX({ 1: 0.5 });
    hz.settle();
    hz.statePrev.set(hz.state);
    hz.ctx.mode = 'tran';
    const v1 = 0.56;
    hz.setX({ 1: v1 });
    hz.settle();
    const q0 = diodeCharge(0.5, m, T_NOM_K, 1).q;
    const q1 = diodeCharge(v1, m, T_NOM_K, 1);
    const iRef = refDiodeI(v1, m, T_NOM_K, 1).i + (q1.q - q0) / 1e-7;
    const gRef = refDiodeG(v1, m, T_NOM_K, 1) + q1.c / 1e-7;
    expect(hz.residual()[1]).toBeCloseTo(iRef, 14);
    expect(Math.abs(hz.entry(1, 1) - gRef)).toBeLessThan(1e-12 * gRef);
    expect(d.report(hz.x, hz.state).currents[0]?.[1]).toBeCloseTo(iRef, 14);
    hz.loadReactive();
    expect(Math.abs(hz.cap(1, 1) - q1.c)).toBeLessThan(1e-12 * q1.c);
  });
});

describe('numerical hygiene', () => {
  it('never produces NaN or infinity, even at absurd bias', () => {
    const m = diodeModel(new Map([['BV', 6], ['IS', 1e-9], ['N', 0.8]]));
    for (const v of [-1e100, -1e12, -1e6, -1e3, -6, 0, 1e3, 1e6, 1e12, 1e100]) {
      const { i, g } = diodeCurrent(v, m, kelvinOf(-40), 10);
      expect(Number.isFinite(i) && Number.isFinite(g)).toBe(true);
    }
  });

  it('beyond argument 80 the exponential continues along its tangent (value and slope continuous)', () => {
    const m = diodeModel(new Map([['IS', 1e-14]]));
    const T = T_NOM_K;
    const v80 = EXP_LINEAR_LIMIT * vt(T);
    const below = diodeCurrent(v80 * (1 - 1e-12), m, T, 1);
    const above = diodeCurrent(v80 * (1 + 1e-12), m, T, 1);
    expect(Math.abs(above.i - below.i)).toBeLessThan(1e-9 * below.i);
    expect(Math.abs(above.g - below.g)).toBeLessThan(1e-9 * below.g);
    // The tangent line e^80·(1 + x − 80), evaluated here directly.
    const x = 100;
    const tangent = 1e-14 * (Math.exp(80) * (1 + x - 80) - 1);
    expect(diodeCurrent(x * vt(T), m, T, 1).i / tangent).toBeCloseTo(1, 12);
  });
});
