/**
 * Bipolar transistor against the Ebers-Moll transport equations of models.md
 * written out independently (test/devices/reference.ts): pure function,
 * Jacobian, and what `load` stamps, for NPN and PNP with Early effect.
 */

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type BjtModel, bjtCharges, bjtCurrents, bjtModel, createBjt } from '@railcheck/devices';
import { DeviceHarness, fcSeed } from '../helpers/device-harness.js';
import { close, kelvinOf, refBjt, refDepletionC, refDepletionQ, refBjtIs, vt } from './reference.js';

const seed = fcSeed('devices/bjt');
const runs = { seed, numRuns: 300 };
const T_NOM_K = kelvinOf(27);

const logUniform = (lo: number, hi: number): fc.Arbitrary<number> =>
  fc.double({ min: Math.log10(lo), max: Math.log10(hi), noNaN: true }).map((e) => 10 ** e);

const modelArb: fc.Arbitrary<BjtModel> = fc
  .record({
    polarity: fc.constantFrom('npn' as const, 'pnp' as const),
    IS: logUniform(1e-17, 1e-12),
    BF: fc.double({ min: 20, max: 500, noNaN: true }),
    BR: fc.double({ min: 0.1, max: 10, noNaN: true }),
    NF: fc.double({ min: 0.9, max: 1.5, noNaN: true }),
    NR: fc.double({ min: 0.9, max: 1.5, noNaN: true }),
    VAF: fc.option(fc.double({ min: 5, max: 200, noNaN: true }), { nil: undefined }),
    VAR: fc.option(fc.double({ min: 2, max: 50, noNaN: true }), { nil: undefined }),
    XTB: fc.double({ min: 0, max: 2, noNaN: true }),
  })
  .map(({ polarity, ...r }) => {
    const given = new Map<string, number>(Object.entries(r).filter((e): e is [string, number] => e[1] !== undefined));
    return bjtModel(polarity, given);
  });

/** Junction voltages in the NPN frame; every exponent stays below the linearisation limit. */
const biasArb = fc.record({
  be: fc.double({ min: -5, max: 0.9, noNaN: true }),
  bc: fc.double({ min: -30, max: 0.8, noNaN: true }),
});
const celsiusArb = fc.double({ min: -40, max: 125, noNaN: true });
const areaArb = fc.double({ min: 0.1, max: 10, noNaN: true });

const sgn = (m: BjtModel): number => (m.polarity === 'npn' ? 1 : -1);

describe('transistor currents: pure function vs models.md', () => {
  it('matches Ic, Ib, Ie at random bias, temperature and area (NPN and PNP)', () => {
    fc.assert(
      fc.property(modelArb, biasArb, celsiusArb, areaArb, (m, b, c, area) => {
        const T = kelvinOf(c);
        const vbe = sgn(m) * b.be;
        const vbc = sgn(m) * b.bc;
        const ref = refBjt(vbe, vbc, m, T, area);
        const got = bjtCurrents(vbe, vbc, m, T, area);
        return (
          // Worst observed 2.0e-16, 2.0e-16, 1.6e-16 and 0 of the scale over FC_SEED 20261201, 1–13, 100–105,
          // 300 and 424242; bounds 5e-16, 5e-16, 4e-16, 2·eps.
          close(got.ic, ref.ic, 5e-16, ref.scale) &&
          close(got.ib, ref.ib, 5e-16, ref.scale) &&
          close(got.ie, ref.ie, 4e-16, ref.scale) &&
          close(got.ic + got.ib + got.ie, 0, 2 * Number.EPSILON, ref.scale)
        );
      }),
      runs,
    );
  });

  it('PNP is the NPN with every junction voltage and terminal current negated', () => {
    const given = new Map([['VAF', 40], ['VAR', 8], ['IS', 1e-15]]);
    const npn = bjtModel('npn', given);
    const pnp = bjtModel('pnp', given);
    for (const [vbe, vbc] of [[0.65, -5], [0.7, 0.6], [-2, 0.65], [0, 0]] as const) {
      const a = bjtCurrents(vbe, vbc, npn, T_NOM_K, 1);
      const b = bjtCurrents(-vbe, -vbc, pnp, T_NOM_K, 1);
      expect(b.ic).toBe(-a.ic);
      expect(b.ib).toBe(-a.ib);
      expect(b.ie).toBe(-a.ie);
    }
  });
});

describe('transistor Jacobian vs central differences', () => {
  it('all six derivatives match, Early factor included (NPN and PNP)', () => {
    fc.assert(
      fc.property(modelArb, biasArb, celsiusArb, (m, b, c) => {
        const T = kelvinOf(c);
        const vbe = sgn(m) * b.be;
        const vbc = sgn(m) * b.bc;
        const h = 1e-5;
        const at = bjtCurrents(vbe, vbc, m, T, 1);
        const pe = bjtCurrents(vbe + h, vbc, m, T, 1);
        const me = bjtCurrents(vbe - h, vbc, m, T, 1);
        const pc = bjtCurrents(vbe, vbc + h, m, T, 1);
        const mc = bjtCurrents(vbe, vbc - h, m, T, 1);
        const scale = refBjt(vbe, vbc, m, T, 1).scale;
        // Derivatives are sums of exponential terms that may cancel (gcc − gec at
        // saturation): judge truncation, (h/nVt)²/6 ≤ 5e-8 of each term, against
        // their conductance scale, and round-off eps·|I|/h against the currents.
        const slack = 1e-7 * (scale / (Math.min(m.NF, m.NR) * vt(T))) + (8e-16 * scale) / h;
        // That model overstates: worst observed 0.023 of it over FC_SEED 20261201, 1–13 and 424242; bound 0.06 of it.
        const ok = (fd: number, an: number): boolean => close(fd, an, 0.06 * 2e-6, an, 0.06 * slack);
        return (
          ok((pe.ic - me.ic) / (2 * h), at.dIcDvbe) &&
          ok((pc.ic - mc.ic) / (2 * h), at.dIcDvbc) &&
          ok((pe.ib - me.ib) / (2 * h), at.dIbDvbe) &&
          ok((pc.ib - mc.ib) / (2 * h), at.dIbDvbc) &&
          ok((pe.ie - me.ie) / (2 * h), at.dIeDvbe) &&
          ok((pc.ie - mc.ie) / (2 * h), at.dIeDvbc)
        );
      }),
      runs,
    );
  });

  it('forward-active output conductance is Ic/(VAF − Vbc), i.e. r_o ≈ (VA + VCE)/IC (Gray and Meyer, Analysis and Design of Analog ICs, ch. 1; from memory)', () => {
    const m = bjtModel('npn', new Map([['VAF', 60], ['IS', 1e-15]]));
    const vbe = 0.65;
    for (const vce of [1, 5, 20]) {
      const vbc = vbe - vce;
      const k = bjtCurrents(vbe, vbc, m, T_NOM_K, 1);
      const go = -k.dIcDvbc; // dIc/dVce at fixed Vbe
      // Observed 1.0e-15 A: the reverse term −Iec/BR ≈ IS/BR = 1e-15 A, which the relation leaves out; bound 2.5e-15 A.
      expect(Math.abs(go * (60 - vbc) - k.ic)).toBeLessThan(2.5e-15);
    }
  });
});

describe('transistor load stamps', () => {
  it('companion rows reproduce the terminal currents and node derivatives (central differences of the reference)', () => {
    fc.assert(
      fc.property(modelArb, biasArb, fc.double({ min: -5, max: 5, noNaN: true }), (m, b, ve) => {
        const s = sgn(m);
        const q = createBjt('Q1', 1, 2, 3, m, 1);
        const hz = new DeviceHarness(4, [q]);
        const vb = ve + s * b.be;
        const vc = vb - s * b.bc;
        hz.setX({ 1: vc, 2: vb, 3: ve });
        hz.settle();
        const r = hz.residual();
        const ref = refBjt(vb - ve, vb - vc, m, T_NOM_K, 1);
        // The residual M·x − rhs itself rounds by about eps·|J|·|x|, |J| ≤ scale/(n·Vt).
        const absV = ((4e-16 * ref.scale) / (Math.min(m.NF, m.NR) * vt(T_NOM_K))) * (Math.abs(ve) + Math.abs(vb) + Math.abs(vc));
        let ok =
          // The model 1e-12·scale + absV overstates: worst observed 0.021, 0.019 and 0.013 of it (c, b, e) over
          // FC_SEED 20261201, 1–13, 100–105, 300 and 424242; bounds 0.05, 0.05 and 0.035 of it.
          close(r[1] ?? NaN, ref.ic, 0.05 * 1e-12, ref.scale, 0.05 * absV) &&
          close(r[2] ?? NaN, ref.ib, 0.05 * 1e-12, ref.scale, 0.05 * absV) &&
          close(r[3] ?? NaN, ref.ie, 0.035 * 1e-12, ref.scale, 0.035 * absV);
        // Node derivatives by central differences of the independent equations.
        const h = 1e-5;
        const slack = 1e-7 * (ref.scale / (Math.min(m.NF, m.NR) * vt(T_NOM_K))) + (8e-16 * ref.scale) / h;
        const node = [vc, vb, ve];
        const currents = (v: number[]): number[] => {
          const k = refBjt((v[1] ?? 0) - (v[2] ?? 0), (v[1] ?? 0) - (v[0] ?? 0), m, T_NOM_K, 1);
          return [k.ic, k.ib, k.ie];
        };
        for (let j = 0; j < 3; j++) {
          const up = node.slice();
          const dn = node.slice();
          up[j] = (up[j] ?? 0) + h;
          dn[j] = (dn[j] ?? 0) - h;
          const iu = currents(up);
          const id = currents(dn);
          for (let i = 0; i < 3; i++) {
            const fd = ((iu[i] ?? 0) - (id[i] ?? 0)) / (2 * h);
            // The error model (2e-6·|fd| + slack) overstates: worst observed 0.028 of it over FC_SEED 20261201, 1–13 and 424242; bound 0.07 of it.
            ok = ok && close(hz.entry(i + 1, j + 1), fd, 0.07 * 2e-6, fd, 0.07 * slack);
          }
        }
        return ok;
      }),
      runs,
    );
  });

  it('adds gmin across b-e and b-c', () => {
    const m = bjtModel('npn', new Map());
    const a = new DeviceHarness(4, [createBjt('Q1', 1, 2, 3, m, 1)], { gmin: 0 });
    const b = new DeviceHarness(4, [createBjt('Q1', 1, 2, 3, m, 1)], { gmin: 1e-3 });
    for (const hz of [a, b]) {
      hz.setX({ 1: 5, 2: 0.6, 3: 0 });
      hz.settle();
    }
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(b.entry(2, 2) - a.entry(2, 2) - 2e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 2e-3);
    expect(Math.abs(b.entry(2, 3) - a.entry(2, 3) + 1e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 1e-3);
    expect(Math.abs(b.entry(1, 2) - a.entry(1, 2) + 1e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 1e-3);
    expect(Math.abs(b.entry(1, 3) - a.entry(1, 3))).toBe(0);
  });

  it('RB, RC, RE (divided by area) sit between terminals and internal nodes; report satisfies KCL and power = Σ V·I', () => {
    const m = bjtModel('pnp', new Map([['RB', 100], ['RC', 2], ['RE', 0.5], ['IS', 1e-15], ['VAF', 50]]));
    const q = createBjt('Q1', 1, 2, 3, m, 2);
    const hz = new DeviceHarness(4, [q]);
    expect(hz.size).toBe(7);
    hz.setX({ 1: -3, 2: -0.7, 3: 0, 4: -2.99, 5: -0.69, 6: -0.01 });
    hz.settle();
    const [ci, bi, ei] = [4, 5, 6];
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(hz.entry(1, ci) + 1)).toBeLessThanOrEqual(2 * Number.EPSILON * 1);
    expect(Math.abs(hz.entry(2, bi) - (-2 / 100))).toBeLessThanOrEqual(2 * Number.EPSILON * 0.02);
    expect(Math.abs(hz.entry(3, ei) + 4)).toBeLessThanOrEqual(2 * Number.EPSILON * 4);
    const rep = q.report(hz.x, hz.state);
    const sum = rep.currents.reduce((acc, [, i]) => acc + i, 0);
    const ref = refBjt(-0.69 + 0.01, -0.69 + 2.99, m, T_NOM_K, 2);
    expect(rep.currents.map(([l]) => l)).toEqual(['c', 'b', 'e']);
    expect(Math.abs(rep.currents[0]?.[1]! - ref.ic)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(ref.ic));
    expect(Math.abs(sum)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(ref.ic));
    expect(Math.abs(rep.power - (-3 * ref.ic + -0.7 * ref.ib))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(rep.power));
  });
});

describe('transistor charges', () => {
  const m = bjtModel(
    'npn',
    new Map([['CJE', 2e-12], ['CJC', 1e-12], ['VJE', 0.8], ['MJE', 0.35], ['TF', 0.4e-9], ['TR', 20e-9], ['IS', 1e-15]]),
  );

  it('Qbe, Qbc and their capacitances follow the depletion form plus TF·Icc and TR·Iec', () => {
    for (const [vbe, vbc] of [[0.7, -5], [0.2, 0.3], [0.6, 0.55], [-1, -1]] as const) {
      for (const area of [1, 3]) {
        const ch = bjtCharges(vbe, vbc, m, T_NOM_K, area);
        const is = area * refBjtIs(m, T_NOM_K);
        const icc = is * Math.expm1(vbe / vt(T_NOM_K));
        const iec = is * Math.expm1(vbc / vt(T_NOM_K));
        const qbe = area * refDepletionQ(vbe, 2e-12, 0.8, 0.35) + 0.4e-9 * icc;
        const qbc = area * refDepletionQ(vbc, 1e-12, 0.75, 0.33) + 20e-9 * iec;
        const cbe = area * refDepletionC(vbe, 2e-12, 0.8, 0.35) + (0.4e-9 * (icc + is)) / vt(T_NOM_K);
        const cbc = area * refDepletionC(vbc, 1e-12, 0.75, 0.33) + (20e-9 * (iec + is)) / vt(T_NOM_K);
        // Observed 2.2e-16, 2.2e-16, 4.4e-16, 2.2e-16 relative; bounds 5e-16, 5e-16, 1e-15, 5e-16.
        expect(Math.abs(ch.be.q / qbe - 1)).toBeLessThan(5e-16);
        expect(Math.abs(ch.bc.q / qbc - 1)).toBeLessThan(5e-16);
        expect(Math.abs(ch.be.c / cbe - 1)).toBeLessThan(1e-15);
        expect(Math.abs(ch.bc.c / cbc - 1)).toBeLessThan(5e-16);
      }
    }
  });

  it('transient and reactive loads stamp the charge companions between the internal junction nodes', () => {
    const q = createBjt('Q1', 1, 2, 3, m, 1);
    const hz = new DeviceHarness(4, [q], { step: 1e-8 });
    hz.setX({ 1: 5, 2: 0.65, 3: 0 });
    hz.settle();
    hz.statePrev.set(hz.state);
    hz.ctx.mode = 'tran';
    hz.setX({ 1: 5, 2: 0.66, 3: 0 });
    hz.settle();
    const c0 = bjtCharges(0.65, -4.35, m, T_NOM_K, 1);
    const c1 = bjtCharges(0.66, -4.34, m, T_NOM_K, 1);
    const ibe = (c1.be.q - c0.be.q) / 1e-8;
    const ibc = (c1.bc.q - c0.bc.q) / 1e-8;
    const dc = refBjt(0.66, -4.34, m, T_NOM_K, 1);
    const r = hz.residual();
    // Observed 2.0e-20 A, 1.8e-19 A and 0; bounds 5e-20 A, 4.4e-19 A and 2·eps·|I|.
    expect(Math.abs(r[2]! - (dc.ib + ibe + ibc))).toBeLessThan(5e-20);
    expect(Math.abs(r[1]! - (dc.ic - ibc))).toBeLessThan(4.4e-19);
    const rep = q.report(hz.x, hz.state);
    expect(Math.abs(rep.currents[1]?.[1]! - (dc.ib + ibe + ibc))).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(dc.ib + ibe + ibc));
    hz.loadReactive();
    // Observed 0; bounds 2·eps.
    expect(Math.abs(hz.cap(2, 3) / -c1.be.c - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(hz.cap(2, 1) / -c1.bc.c - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(hz.cap(2, 2) / (c1.be.c + c1.bc.c) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

describe('transistor numerical hygiene', () => {
  it('never produces NaN or infinity at absurd bias', () => {
    const m = bjtModel('pnp', new Map([['VAF', 10], ['VAR', 3], ['IS', 1e-12]]));
    const vs = [-1e100, -1e6, -1e3, 0, 1e3, 1e6, 1e100];
    for (const vbe of vs) {
      for (const vbc of vs) {
        const k = bjtCurrents(vbe, vbc, m, kelvinOf(-40), 10);
        for (const v of Object.values(k)) expect(Number.isFinite(v)).toBe(true);
      }
    }
  });
});
