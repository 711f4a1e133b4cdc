/**
 * The junction evaluations made cheaper (one exponential per junction,
 * depletion constants computed once, one power function where there were
 * two, a square root for M = 1/2) against the
 * published equations written out the plain way: Shockley's current with
 * expm1 and exp of the same argument (Shockley, Bell Syst. Tech. J. 28,
 * 1949; models.md), and the depletion charge and capacitance with the power
 * function (test/devices/reference.ts: Massobrio and Antognetti,
 * Semiconductor Device Modeling with SPICE, 2nd ed., ch. 1, from memory).
 * The bounds are a few ulps, set from the worst error observed.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EXP_LINEAR_LIMIT, EXPM1_DIRECT_BELOW, depletionAt, depletionForm, expm1From, junctionCurrent, safeExpSlope, safeExpm1 } from '@railcheck/devices';
import { fcSeed } from '../helpers/device-harness.js';
import { refDepletionC, refDepletionQ } from './reference.js';

const seed = fcSeed('devices/junction-fast');
const EPS = Number.EPSILON;
const worst = { expm1: 0, i: 0, g: 0, c: 0, q: 0 };

describe('one exponential per junction', () => {
  it('expm1From(x, exp x) is expm1 to within 2 ulps at |x| ≥ 4, expm1 itself below, the tangent beyond 80', () => {
    fc.assert(
      fc.property(fc.oneof(fc.double({ min: -800, max: 200, noNaN: true }), fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: 1, max: 80, noNaN: true }), fc.double({ min: -40, max: -1, noNaN: true })), (x) => {
        const got = expm1From(x, safeExpSlope(x));
        const want = safeExpm1(x);
        if (x > EXP_LINEAR_LIMIT || Math.abs(x) < EXPM1_DIRECT_BELOW) {
          // The same expression or the same call: equal.
          expect(got).toBe(want);
          return;
        }
        const err = Math.abs(got - want) / Math.abs(want);
        worst.expm1 = Math.max(worst.expm1, err / EPS);
        // Worst observed 0.80 eps over FC_SEED 20261201, 1, 2, 3, 424242 (the argument in junction.ts
        // bounds it by about two ulps); bound 2·eps.
        expect(err).toBeLessThanOrEqual(2 * EPS);
      }),
      { seed, numRuns: 2000 },
    );
  });

  it('junctionCurrent is Shockley with breakdown (expm1 and exp of each argument) to a few ulps', () => {
    const arb = fc.record({
      is: fc.double({ min: 1e-16, max: 1e-6, noNaN: true }),
      n: fc.double({ min: 0.8, max: 3, noNaN: true }),
      bv: fc.option(fc.double({ min: 1, max: 100, noNaN: true }), { nil: undefined }),
      ibv: fc.double({ min: 1e-9, max: 1e-2, noNaN: true }),
      nbv: fc.double({ min: 0.8, max: 3, noNaN: true }),
      v: fc.double({ min: -120, max: 3, noNaN: true }),
    });
    const vt = 0.025865;
    fc.assert(
      fc.property(arb, ({ is, n, bv, ibv, nbv, v }) => {
        const nvt = n * vt;
        const nb = nbv * vt;
        const out = { i: 0, g: 0 };
        junctionCurrent(v, is, nvt, bv, ibv, nb, out);
        // The plain evaluation of models.md: expm1 for the Shockley term, exp again for its slope.
        const x = v / nvt;
        let i = is * safeExpm1(x);
        let g = (is * safeExpSlope(x)) / nvt;
        // Magnitudes of the terms: IS·exp(x) and IS (the −1), and the breakdown term.
        let scale = is * safeExpSlope(x) + is;
        if (bv !== undefined) {
          const xb = -(v + bv) / nb;
          const eb = xb <= EXP_LINEAR_LIMIT ? Math.exp(xb) : Math.exp(EXP_LINEAR_LIMIT) * (1 + (xb - EXP_LINEAR_LIMIT));
          i -= ibv * eb;
          g += (ibv * safeExpSlope(xb)) / nb;
          scale += ibv * eb;
        }
        const di = Math.abs(out.i - i) / scale;
        worst.i = Math.max(worst.i, di / EPS);
        expect(out.g).toBe(g);
        // Worst observed 0.93 eps of the terms' magnitudes over FC_SEED 20261201, 1, 2, 3, 424242; the
        // conductance is the same expression, equal bit for bit; bound 2·eps.
        expect(di).toBeLessThanOrEqual(2 * EPS);
      }),
      { seed, numRuns: 2000 },
    );
  });
});

describe('depletion charge with one power function, or a square root', () => {
  const arb = fc.record({
    cj0: fc.double({ min: 1e-14, max: 1e-8, noNaN: true }),
    vj: fc.double({ min: 0.3, max: 1.2, noNaN: true }),
    m: fc.oneof(fc.constantFrom(0, 0.5, 0.33, 1 / 3), fc.double({ min: 0, max: 0.95, noNaN: true })),
    // Reverse bias to 150·VJ, forward across FC·VJ up to 1.5·VJ.
    u: fc.double({ min: -150, max: 1.5, noNaN: true }),
  });

  it('c and q agree with the power-function form of models.md (reference.ts), below and above FC·VJ', () => {
    fc.assert(
      fc.property(arb, ({ cj0, vj, m, u }) => {
        const v = u * vj;
        const out = { q: 0, c: 0 };
        depletionAt(v, depletionForm(cj0, vj, m), out);
        const c = refDepletionC(v, cj0, vj, m);
        const q = refDepletionQ(v, cj0, vj, m);
        const dc = Math.abs(out.c - c) / c;
        // q = CJ0·VJ·(1 − r^(1−M))/(1 − M) cancels near zero bias in both forms, so its error is one
        // of CJ0·VJ/(1 − M), not of q.
        const dq = Math.abs(out.q - q) / (Math.abs(q) + (cj0 * vj) / (1 - m));
        worst.c = Math.max(worst.c, dc / EPS);
        worst.q = Math.max(worst.q, dq / EPS);
        // Worst observed 2.5 eps (c: r^(1−M)/r against r^(−M), each power function within an ulp, plus
        // the division) and 0.95 eps (q: only M = 1/2 differs, √r against r^0.5; every other M gives the
        // reference's value bit for bit) over FC_SEED 20261201, 1, 2, 3, 424242; bounds 6·eps and 2·eps.
        expect(dc).toBeLessThanOrEqual(6 * EPS);
        expect(dq).toBeLessThanOrEqual(2 * EPS);
        if (v < vj / 2 && m !== 0.5) expect(out.q).toBe(q);
      }),
      { seed, numRuns: 3000 },
    );
    console.log(`junction-fast worst errors in eps: ${JSON.stringify(worst)}`);
  });

  it('above FC·VJ, and for CJ0 = 0, the values are those of the per-call form bit for bit', () => {
    // The linear continuation uses the same expressions with its constants taken once (junction.ts).
    const cj0 = 3e-12;
    const vj = 0.8;
    const m = 0.41;
    const f = depletionForm(cj0, vj, m);
    for (const v of [0.4, 0.5, 0.79, 1.3]) {
      const out = { q: 0, c: 0 };
      depletionAt(v, f, out);
      const f2 = Math.pow(0.5, 1 + m);
      const f3 = 1 - 0.5 * (1 + m);
      const qfc = (cj0 * vj * (1 - Math.pow(0.5, 1 - m))) / (1 - m);
      expect(out.c).toBe((cj0 / f2) * (f3 + (m * v) / vj));
      expect(out.q).toBe(qfc + (cj0 / f2) * (f3 * (v - 0.4) + (m / (2 * vj)) * (v * v - 0.4 * 0.4)));
    }
    const zero = { q: 1, c: 1 };
    depletionAt(0.3, depletionForm(0, vj, m), zero);
    expect(zero).toEqual({ q: 0, c: 0 });
  });
});
