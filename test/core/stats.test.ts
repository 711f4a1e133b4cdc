/**
 * The statistics of tolerance runs (packages/core/src/stats.ts) against
 * outside references: the normal and chi-square distributions of stdlib
 * (@stdlib/stats-base-dists-normal-cdf, -normal-quantile,
 * -chisquare-quantile), mathjs (mean, std, quantileSeq), worked examples of
 * the Wilson interval (Newcombe 1998) and the asymptotic Kolmogorov
 * distribution.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { mean as mjMean, quantileSeq, std as mjStd } from 'mathjs';
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantileRef from '@stdlib/stats-base-dists-normal-quantile';
import chisquareQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import { RailcheckError } from '@railcheck/core';
import { histogram, ksStatistic, normalQuantile, runStream, standardNormal, summarise, toleranceFactor, wilsonInterval } from '../../packages/core/src/stats.js';
import { fcSeed } from '../helpers/device-harness.js';

const seed = fcSeed('core/stats');

/** Expects fn to throw a RailcheckError whose first diagnostic is `bad-argument`. */
function expectBadArgument(fn: () => unknown): void {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(RailcheckError);
  expect((caught as RailcheckError).diagnostics[0]?.code).toBe('bad-argument');
}

/**
 * The critical value of the one-sample KS statistic D for n values at level
 * alpha, from the asymptotic Kolmogorov distribution: P(√n·D > c) ≈ 2·exp(−2c²)
 * (first term of Kolmogorov's series; Smirnov 1948), so c = √(−ln(α/2)/2).
 * For alpha = 0.001, c = 1.9495 (the tables give 1.95 for large n).
 */
function ksCritical(n: number, alpha: number): number {
  return Math.sqrt(-Math.log(alpha / 2) / 2) / Math.sqrt(n);
}

/** Pearson's chi-square statistic of counts against equal expected counts. */
function chiSquareUniform(counts: readonly number[]): number {
  const total = counts.reduce((a, b) => a + b, 0);
  const e = total / counts.length;
  return counts.reduce((s, c) => s + (c - e) ** 2 / e, 0);
}

const uniformCdf = (x: number): number => Math.min(1, Math.max(0, x));

describe('runStream', () => {
  test('the same (seed, run) gives the same sequence; other runs and seeds another', () => {
    fc.assert(
      fc.property(fc.maxSafeNat(), fc.integer({ min: 0, max: 2 ** 53 - 2 }), (s, r) => {
        const a = runStream(s, r);
        const b = runStream(s, r);
        const first = Array.from({ length: 16 }, () => a());
        expect(Array.from({ length: 16 }, () => b())).toEqual(first);
        for (const u of first) expect(u >= 0 && u < 1).toBe(true);
        // 53-bit numbers: two streams agreeing on their first two numbers by chance has
        // probability about 2^-106, so any agreement is a keying fault
        const other = runStream(s, r + 1);
        const seedOther = runStream(s === 0 ? 1 : s - 1, r);
        expect([other(), other()]).not.toEqual(first.slice(0, 2));
        expect([seedOther(), seedOther()]).not.toEqual(first.slice(0, 2));
      }),
      { seed, numRuns: 300 },
    );
  });

  test('the order of the runs does not matter', () => {
    const forward = Array.from({ length: 50 }, (_, r) => runStream(99, r)());
    const backward = Array.from({ length: 50 }, (_, i) => runStream(99, 49 - i)()).reverse();
    expect(backward).toEqual(forward);
  });

  test('one long stream is uniform: chi-square over 100 bins and KS against U(0,1)', () => {
    const n = 1_000_000;
    const next = runStream(20261202, 3);
    const counts = new Array<number>(100).fill(0);
    const sample = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const u = next();
      sample[i] = u;
      counts[Math.floor(u * 100)]!++;
    }
    const chi2 = chiSquareUniform(counts);
    // critical value: the 0.999 quantile of chi-square with 99 degrees of freedom, from stdlib (148.23)
    const chi2Crit = chisquareQuantile(0.999, 99);
    const d = ksStatistic(Array.from(sample), uniformCdf);
    console.log(`runStream, one stream of ${n}: chi-square ${chi2.toFixed(1)} (critical ${chi2Crit.toFixed(1)} at 0.001), KS D ${d.toExponential(2)} (critical ${ksCritical(n, 0.001).toExponential(2)})`);
    expect(chi2).toBeLessThan(chi2Crit);
    expect(d).toBeLessThan(ksCritical(n, 0.001));
  });

  test('consecutive pairs of one stream are uniform on the square: chi-square over 20 × 20 cells', () => {
    const pairs = 400_000;
    const next = runStream(5, 0);
    const counts = new Array<number>(400).fill(0);
    for (let i = 0; i < pairs; i++) counts[Math.floor(next() * 20) * 20 + Math.floor(next() * 20)]!++;
    const chi2 = chiSquareUniform(counts);
    // critical value: chi-square 0.999 quantile, 399 degrees of freedom, from stdlib
    const crit = chisquareQuantile(0.999, 399);
    console.log(`runStream, pairs: chi-square ${chi2.toFixed(1)} (critical ${crit.toFixed(1)})`);
    expect(chi2).toBeLessThan(crit);
  });

  test('the first numbers of successive runs are uniform (what a spread of few parts draws)', () => {
    for (const s of [0, 1, 20261202]) {
      const n = 200_000;
      const counts = new Array<number>(100).fill(0);
      const firsts: number[] = [];
      for (let r = 0; r < n; r++) {
        const u = runStream(s, r)();
        firsts.push(u);
        counts[Math.floor(u * 100)]!++;
      }
      const chi2 = chiSquareUniform(counts);
      const crit = chisquareQuantile(0.999, 99); // stdlib, as above
      const d = ksStatistic(firsts, uniformCdf);
      console.log(`runStream seed ${s}, first number of ${n} runs: chi-square ${chi2.toFixed(1)} (critical ${crit.toFixed(1)}), KS D ${d.toExponential(2)} (critical ${ksCritical(n, 0.001).toExponential(2)})`);
      expect(chi2).toBeLessThan(crit);
      expect(d).toBeLessThan(ksCritical(n, 0.001));
    }
  });

  test('refuses a seed or run that is not a non-negative safe integer', () => {
    for (const bad of [-1, 1.5, Number.NaN, Infinity, 2 ** 53, '3' as unknown as number]) {
      expectBadArgument(() => runStream(bad, 0));
      expectBadArgument(() => runStream(0, bad));
    }
  });
});

/** n standard normal deviates drawn the way a spread draws them: `perRun` from each of n/perRun runs. */
function normals(n: number, perRun: number, draw: (next: () => number) => number): number[] {
  const out: number[] = [];
  for (let r = 0; out.length < n; r++) {
    const next = runStream(424242, r);
    for (let i = 0; i < perRun && out.length < n; i++) out.push(draw(next));
  }
  return out;
}

describe('standardNormal and toleranceFactor', () => {
  const n = 200_000;

  test('standard normal deviates: mean, variance and KS against the normal CDF of stdlib', () => {
    const z = normals(n, 10, standardNormal);
    const m = z.reduce((a, b) => a + b, 0) / n;
    const v = z.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1);
    // bounds: 5 standard errors (CLT): SE of the mean 1/√n, of the variance √(2/n) for a normal sample
    expect(Math.abs(m)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(v - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
    const d = ksStatistic(z, (x) => normalCdf(x, 0, 1));
    console.log(`standardNormal, ${n}: mean ${m.toExponential(2)}, variance ${v.toFixed(5)}, KS D ${d.toExponential(2)} (critical ${ksCritical(n, 0.001).toExponential(2)})`);
    expect(d).toBeLessThan(ksCritical(n, 0.001));
    for (const x of z) expect(Number.isFinite(x)).toBe(true);
  });

  test('gauss factors: ratio is 3 sigma, KS against N(1, ratio/3) of stdlib', () => {
    const ratio = 0.06;
    const f = normals(n, 3, (next) => toleranceFactor(next, ratio, 'gauss'));
    const m = f.reduce((a, b) => a + b, 0) / n;
    const sd = Math.sqrt(f.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1));
    const sigma = ratio / 3;
    // 5 standard errors (CLT): SE of the mean σ/√n; SE of the standard deviation σ/√(2n) for a normal sample
    expect(Math.abs(m - 1)).toBeLessThan((5 * sigma) / Math.sqrt(n));
    expect(Math.abs(sd - sigma)).toBeLessThan((5 * sigma) / Math.sqrt(2 * n));
    const d = ksStatistic(f, (x) => normalCdf(x, 1, sigma));
    console.log(`toleranceFactor gauss 6 %: mean ${m.toFixed(6)}, std ${sd.toFixed(6)} (σ ${sigma}), KS D ${d.toExponential(2)}`);
    expect(d).toBeLessThan(ksCritical(n, 0.001));
  });

  test('uniform factors stay within 1 ± ratio with the uniform mean and variance ratio²/3', () => {
    const ratio = 0.1;
    const f = normals(n, 7, (next) => toleranceFactor(next, ratio, 'uniform'));
    for (const x of f) expect(x >= 1 - ratio && x <= 1 + ratio).toBe(true);
    const m = f.reduce((a, b) => a + b, 0) / n;
    const v = f.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1);
    // U(1−a, 1+a): variance a²/3, fourth central moment a⁴/5 (the moments of the uniform
    // distribution, e.g. Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions
    // vol. 2, ch. 26; from memory). Bounds: 5 standard errors (CLT), SE of the mean √(a²/3n),
    // SE of the variance √((a⁴/5 − a⁴/9)/n).
    const a = ratio;
    expect(Math.abs(m - 1)).toBeLessThan(5 * Math.sqrt((a * a) / 3 / n));
    expect(Math.abs(v - (a * a) / 3)).toBeLessThan(5 * Math.sqrt((a ** 4 / 5 - a ** 4 / 9) / n));
    const d = ksStatistic(f, (x) => uniformCdf((x - (1 - a)) / (2 * a)));
    console.log(`toleranceFactor uniform 10 %: mean ${m.toFixed(6)}, variance ${v.toExponential(4)} (a²/3 = ${((a * a) / 3).toExponential(4)}), KS D ${d.toExponential(2)}`);
    expect(d).toBeLessThan(ksCritical(n, 0.001));
  });

  test('a zero tolerance gives exactly 1', () => {
    const next = runStream(1, 1);
    expect(toleranceFactor(next, 0, 'uniform')).toBe(1);
    expect(toleranceFactor(next, 0, 'gauss')).toBe(1);
  });

  test('refuses a wrong ratio, distribution or stream', () => {
    const next = runStream(1, 1);
    for (const bad of [-0.01, Number.NaN, Infinity]) expectBadArgument(() => toleranceFactor(next, bad, 'uniform'));
    expectBadArgument(() => toleranceFactor(next, 0.1, 'triangle' as 'gauss'));
    expectBadArgument(() => toleranceFactor(next, 0.1, 'toString' as 'gauss'));
    expectBadArgument(() => toleranceFactor(() => 1, 0.1, 'uniform'));
    expectBadArgument(() => standardNormal(() => Number.NaN));
    expectBadArgument(() => standardNormal(() => 0));
    expectBadArgument(() => standardNormal(undefined as unknown as () => number));
  });
});

describe('summarise', () => {
  // subnormal values become 0: mathjs quantileSeq fails or hangs on arrays holding them (found
  // with FC_SEED=2), a limit of the reference, not of summarise (subnormals are kept in the histogram test)
  const value = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true }).map((v) => (Math.abs(v) < 2.3e-308 ? 0 : v));
  // percentiles to 0.001 (mathjs quantileSeq refuses subnormal probabilities, which no report asks for)
  const percentile = fc.oneof(fc.integer({ min: 0, max: 100 }), fc.integer({ min: 0, max: 100_000 }).map((i) => i / 1000));

  test('mean, std, min, max and percentiles against mathjs (quantileSeq is Hyndman & Fan type 7)', () => {
    let worstMean = 0;
    let worstStd = 0;
    let worstQ = 0;
    fc.assert(
      fc.property(fc.array(value, { minLength: 1, maxLength: 300 }), fc.array(percentile, { maxLength: 6 }), (values, ps) => {
        const s = summarise(values, ps);
        const scale = Math.max(1, ...values.map(Math.abs));
        expect(s.count).toBe(values.length);
        expect(s.min).toBe(Math.min(...values));
        expect(s.max).toBe(Math.max(...values));
        const dm = Math.abs(s.mean - (mjMean(values) as number)) / scale;
        worstMean = Math.max(worstMean, dm);
        // mathjs std: sample standard deviation ('unbiased', n − 1); for one value it is NaN and ours is 0 by definition
        const refStd = values.length > 1 ? (mjStd(values) as unknown as number) : 0;
        const ds = Math.abs(s.std - refStd) / scale;
        worstStd = Math.max(worstStd, ds);
        // observed worst 1.6e-16 (mean) and 2.3e-16 (std) relative to the largest magnitude
        // over FC_SEED 20261201 and 1–8; bounds 1e-15 (a few roundings of the result)
        expect(dm).toBeLessThan(1e-15);
        expect(ds).toBeLessThan(1e-15);
        for (const p of ps) {
          // mathjs quantileSeq(prob): linear interpolation at (n − 1)·prob, Hyndman & Fan definition 7
          const ref = quantileSeq(values, p / 100) as number;
          const got = s.percentiles[String(p)];
          expect(got).toBeDefined();
          const dq = Math.abs(got! - ref) / scale;
          worstQ = Math.max(worstQ, dq);
          // observed worst 1.1e-15 relative to the largest magnitude over FC_SEED 20261201 and 1–8; bound 3e-15
          expect(dq).toBeLessThan(3e-15);
        }
      }),
      { seed, numRuns: 500 },
    );
    console.log(`summarise vs mathjs: worst relative difference mean ${worstMean.toExponential(2)}, std ${worstStd.toExponential(2)}, percentile ${worstQ.toExponential(2)}`);
  });

  test("Welford's variance holds on a large offset where the textbook one-pass formula fails", () => {
    // 1e9 + small noise: Σx² − n·mean² loses all digits in doubles (Chan, Golub & LeVeque,
    // The American Statistician 37, 1983). Reference: the definition evaluated exactly in
    // integers (each value here is a multiple of 2^-23, its ulp): n(n−1)·2^46·s² = nΣX² − (ΣX)²
    // with X = x·2^23. (mathjs std is no reference here: it is off by 1.2e-8 relative on these
    // values, checked against the same exact sum in Python fractions.)
    const values = Array.from({ length: 1000 }, (_, i) => 1e9 + Math.sin(i) * 1e-3);
    const ints = values.map((x) => {
      const X = x * 2 ** 23;
      expect(Number.isInteger(X)).toBe(true);
      return BigInt(X);
    });
    const n = BigInt(values.length);
    const sum = ints.reduce((a, b) => a + b, 0n);
    const sumSq = ints.reduce((a, b) => a + b * b, 0n);
    const exact = Math.sqrt(Number(n * sumSq - sum * sum) / Number(n * (n - 1n)) / 2 ** 46);
    const s = summarise(values, [50]);
    const rel = Math.abs(s.std - exact) / exact;
    console.log(`summarise, offset 1e9: std ${s.std.toExponential(10)} vs exact ${exact.toExponential(10)}, relative difference ${rel.toExponential(2)}`);
    // observed 1.5e-16 (the shifted differences are exact; without the shift it was 4.9e-6,
    // the condition |mean|/std being 1.4e12); bound 5e-16, a few roundings
    expect(rel).toBeLessThan(5e-16);
  });

  test('one value: std 0, every percentile the value; keys are the numbers as strings', () => {
    const s = summarise([4.7], [1, 50, 99, 99.9]);
    expect(s).toEqual({ count: 1, min: 4.7, max: 4.7, mean: 4.7, std: 0, percentiles: { '1': 4.7, '50': 4.7, '99': 4.7, '99.9': 4.7 } });
  });

  test('values near the largest double give finite results', () => {
    // by hand: the mean of ±1.5e308 is 0; the std √2·1.5e308 passes the largest double and is held there
    const s = summarise([1.5e308, -1.5e308], [50, 75]);
    expect(s.mean).toBe(0);
    expect(s.std).toBe(Number.MAX_VALUE);
    expect(s.percentiles['50']).toBe(0);
    expect(s.percentiles['75']).toBe(0.75e308);
    const h = histogram([1.5e308, -1.5e308, 0], 2);
    expect(h.edges).toEqual([-1.5e308, 0, 1.5e308]);
    expect(h.counts).toEqual([1, 2]);
  });

  test('refuses an empty list, a non-finite value and a percentile outside 0..100', () => {
    expectBadArgument(() => summarise([], [50]));
    expectBadArgument(() => summarise([1, Number.NaN], [50]));
    expectBadArgument(() => summarise([1, Infinity], [50]));
    expectBadArgument(() => summarise([1, 2], [101]));
    expectBadArgument(() => summarise([1, 2], [-1]));
    expectBadArgument(() => summarise([1, 2], [Number.NaN]));
    expectBadArgument(() => summarise('12' as unknown as number[], [50]));
  });
});

describe('wilsonInterval', () => {
  test('worked examples of Newcombe (1998), Stat. Med. 17, table I, method 3 (values from memory)', () => {
    // Newcombe, "Two-sided confidence intervals for the single proportion: comparison of
    // seven methods", Statistics in Medicine 17 (1998) 857–872, table I, the score method
    // at 95 %; the four-decimal values are from memory, and agree with the score-test
    // definition checked in the next test.
    const cases: Array<[number, number, number, number]> = [
      [81, 263, 0.2553, 0.3662],
      [15, 148, 0.0624, 0.1605],
      [0, 20, 0, 0.1611],
      [1, 29, 0.0061, 0.1718],
    ];
    for (const [x, n, low, high] of cases) {
      const w = wilsonInterval(x, n);
      // published to 4 decimals: half a unit of the last place
      expect(Math.abs(w.low - low)).toBeLessThanOrEqual(5e-5);
      expect(Math.abs(w.high - high)).toBeLessThanOrEqual(5e-5);
    }
  });

  test('the ends solve the score test (Wilson 1927): (p̂ − p)² = z²·p(1 − p)/n, z from stdlib', () => {
    let worst = 0;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 100_000 }), fc.double({ min: 0, max: 1, noNaN: true }), fc.constantFrom(0.8, 0.9, 0.95, 0.99, 0.999), (n, f, conf) => {
        const x = Math.round(f * n);
        const { low, high } = wilsonInterval(x, n, conf);
        const phat = x / n;
        const z = normalQuantileRef(0.5 + conf / 2, 0, 1);
        expect(low).toBeLessThanOrEqual(phat);
        expect(high).toBeGreaterThanOrEqual(phat);
        expect(low).toBeGreaterThanOrEqual(0);
        expect(high).toBeLessThanOrEqual(1);
        for (const p of [low, high]) {
          if (p === 0 || p === 1) continue; // the clamped ends of 0/n and n/n, checked below
          // one Newton step on g(p) = (p̂ − p)² − z²p(1 − p)/n gives the end's error δp = g/g'
          const g = (phat - p) ** 2 - (z * z * p * (1 - p)) / n;
          const dg = -2 * (phat - p) - (z * z * (1 - 2 * p)) / n;
          const rel = Math.abs(g / dg) / p;
          worst = Math.max(worst, rel);
          // observed worst 1.03e-14 relative to the end (a low end near 1e-5, where centre − half
          // cancels) over FC_SEED 20261201 and 1–8; bound 3e-14
          expect(rel).toBeLessThan(3e-14);
        }
      }),
      { seed, numRuns: 1000 },
    );
    console.log(`wilsonInterval, score equation: worst relative error of an end ${worst.toExponential(2)}`);
  });

  test('0 of n and n of n: the end at 0 or 1 exactly, the other z²/(n + z²) from the score equation', () => {
    for (const n of [1, 7, 100, 10_000]) {
      const z = normalQuantileRef(0.975, 0, 1); // stdlib
      const zero = wilsonInterval(0, n);
      const all = wilsonInterval(n, n);
      expect(zero.low).toBe(0);
      expect(all.high).toBe(1);
      // solving p² = z²·p(1−p)/n for p > 0 gives p = z²/(n + z²); observed 1e-16; bound 1e-15
      expect(Math.abs(zero.high - (z * z) / (n + z * z))).toBeLessThan(1e-15);
      expect(Math.abs(all.low - n / (n + z * z))).toBeLessThan(1e-15);
    }
  });

  test('refuses wrong counts and confidences', () => {
    expectBadArgument(() => wilsonInterval(0, 0));
    expectBadArgument(() => wilsonInterval(5, 4));
    expectBadArgument(() => wilsonInterval(-1, 4));
    expectBadArgument(() => wilsonInterval(1.5, 4));
    expectBadArgument(() => wilsonInterval(1, 4, 1));
    expectBadArgument(() => wilsonInterval(1, 4, 0));
    expectBadArgument(() => wilsonInterval(1, 4, Number.NaN));
  });
});

/** Calls check on p = 10^e and 1 − 10^e for e from −10 to log10(0.5) in steps of 0.01, then on 5000 random p in [1e-10, 1 − 1e-10]. */
function overProbabilities(check: (p: number) => void): void {
  for (let e = -10; e <= -0.30103; e += 0.01) {
    check(10 ** e);
    check(1 - 10 ** e);
  }
  fc.assert(
    fc.property(fc.double({ min: 1e-10, max: 1 - 1e-10, noNaN: true }), (p) => {
      check(p);
    }),
    { seed, numRuns: 5000 },
  );
}

describe('normalQuantile', () => {
  test('round trip through the normal CDF of stdlib over p from 1e-10 to 1 − 1e-10', () => {
    // stdlib's CDF (erfc of the Sun/FreeBSD libm, ~1 ulp) gives back p: an error δz in z shows
    // as a relative error |z|·δz·φ/Φ ≈ |z|²·δz/|z| in the tail probability q = min(p, 1 − p)
    let worst = 0;
    let worstP = 0;
    const check = (p: number): void => {
      const z = normalQuantile(p);
      const q = p < 0.5 ? p : 1 - p; // 1 − p is exact for p ≥ 0.5 (Sterbenz)
      const back = p < 0.5 ? normalCdf(z, 0, 1) : normalCdf(-z, 0, 1);
      const d = Math.abs(back - q) / q;
      if (d > worst) [worst, worstP] = [d, p];
    };
    overProbabilities(check);
    console.log(`normalQuantile, round trip through stdlib's CDF: worst relative error ${worst.toExponential(2)} at p = ${worstP}`);
    // observed worst 3.3e-14 at p ≈ 1.4e-10 over FC_SEED 20261201 and 1–8 (|z| ≈ 6.3: one rounding of z or of z/√2 inside the
    // reference moves the tail probability by z²·2^-53 = 4.4e-15 relative); bound 6e-14
    expect(worst).toBeLessThan(6e-14);
  });

  test("against stdlib's quantile function over p from 1e-10 to 1 − 1e-10", () => {
    // stdlib's quantile (through its erfinv) differs from 40-digit mpmath by up to 6e-9 relative
    // near p = 1e-10 and 7.7e-14 at p = 1.5e-5, where ours agrees with mpmath to 2e-16 (the next
    // test), so the bound is stdlib's own error: observed 6.6e-9 relative to max(1, |z|) over FC_SEED 20261201 and 1–8; bound 1.5e-8
    let worst = 0;
    const check = (p: number): void => {
      const ref = normalQuantileRef(p, 0, 1);
      worst = Math.max(worst, Math.abs(normalQuantile(p) - ref) / Math.max(1, Math.abs(ref)));
    };
    overProbabilities(check);
    console.log(`normalQuantile vs stdlib quantile: worst ${worst.toExponential(2)}`);
    expect(worst).toBeLessThan(1.5e-8);
  });

  test('against 40-digit values of −√2·erfinv(1 − 2p) from mpmath 1.3.0 (computed for this test, 20 digits kept)', () => {
    // mpmath (F. Johansson et al., arbitrary-precision library for Python), mp.dps = 40
    const table: Array<[number, number]> = [
      [1e-10, -6.3613409024040562047],
      [1.0634523955502119e-10, -6.3518863241135107292],
      [1e-8, -5.6120012441747887315],
      [1e-5, -4.2648907939228246285],
      [0.01, -2.3263478740408411009],
      [0.2, -0.84162123357291420518],
      [0.3, -0.52440051270804081597],
      [0.45, -0.12566134685507400616],
      [0.49, -0.025068908258711058033],
      [0.6, 0.25334710313579974132],
      [0.9, 1.2815515655446005935],
      [0.999, 3.0902323061678132778],
      [0.99999, 4.2648907939238407699],
      [1 - 1e-8, 5.6120012433055049826],
      [1e-9, -5.9978070150076868614],
      [1e-7, -5.19933758219281694],
      [1e-3, -3.0902323061678135354],
      [0.000014999900000000002, -4.1734678585997456099],
    ];
    let worst = 0;
    for (const [p, z] of table) {
      const rel = Math.abs(normalQuantile(p) - z) / Math.abs(z);
      worst = Math.max(worst, rel);
      expect(rel).toBeLessThan(6e-16); // observed worst 2.8e-16 (about one ulp); bound 6e-16
    }
    console.log(`normalQuantile vs mpmath: worst relative error ${worst.toExponential(2)}`);
  });

  test('a table value: the 97.5 % point is 1.959963984540054 (e.g. Abramowitz & Stegun, table 26.5; digits from memory)', () => {
    expect(Math.abs(normalQuantile(0.975) - 1.959963984540054)).toBeLessThan(1e-15);
    expect(normalQuantile(0.5)).toBe(0);
  });

  test('refuses p outside (0, 1)', () => {
    for (const bad of [0, 1, -0.1, 1.1, Number.NaN]) expectBadArgument(() => normalQuantile(bad));
  });
});

describe('histogram', () => {
  test('counts sum to n, edges run from min to max, and every value is in the bin whose edges hold it', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 300 }), fc.option(fc.integer({ min: 1, max: 50 }), { nil: undefined }), (values, bins) => {
        const h = histogram(values, bins);
        const min = Math.min(...values);
        const max = Math.max(...values);
        expect(h.counts.reduce((a, b) => a + b, 0)).toBe(values.length);
        expect(h.edges.length).toBe(h.counts.length + 1);
        expect(h.edges[0] === min).toBe(true); // === : -0 and 0 are the same least value
        expect(h.edges.at(-1) === max).toBe(true);
        if (min === max) {
          expect(h.counts).toEqual([values.length]);
          return;
        }
        // Sturges (1926): k = ⌈log2 n⌉ + 1 bins by default
        expect(h.counts.length).toBe(bins ?? Math.ceil(Math.log2(values.length)) + 1);
        for (let i = 0; i < h.counts.length; i++) {
          // non-decreasing: edges coincide only when the span is a few ulps (subnormal spans)
          expect(h.edges[i + 1]!).toBeGreaterThanOrEqual(h.edges[i]!);
          const last = i === h.counts.length - 1;
          const inBin = values.filter((v) => v >= h.edges[i]! && (last ? v <= h.edges[i + 1]! : v < h.edges[i + 1]!)).length;
          expect(h.counts[i]).toBe(inBin);
        }
      }),
      { seed, numRuns: 500 },
    );
  });

  test('equal widths: 0..10 in 5 bins', () => {
    const h = histogram([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 5);
    expect(h.edges).toEqual([0, 2, 4, 6, 8, 10]);
    expect(h.counts).toEqual([2, 2, 2, 2, 3]);
  });

  test('refuses an empty list, a non-finite value and a wrong bin count', () => {
    expectBadArgument(() => histogram([]));
    expectBadArgument(() => histogram([1, Number.NaN]));
    expectBadArgument(() => histogram([1, 2], 0));
    expectBadArgument(() => histogram([1, 2], 2.5));
    expectBadArgument(() => histogram([1, 2], 1e9));
  });
});

describe('ksStatistic', () => {
  test('closed forms: one value x gives max(F(x), 1 − F(x)); the sample {1/2n, 3/2n, ...} against U(0,1) gives 1/2n', () => {
    // the definition D = sup |F_n − F| evaluated by hand (Kolmogorov 1933)
    expect(ksStatistic([0.3], uniformCdf)).toBeCloseTo(0.7, 15);
    const n = 40;
    const midpoints = Array.from({ length: n }, (_, i) => (2 * i + 1) / (2 * n)).reverse();
    expect(Math.abs(ksStatistic(midpoints, uniformCdf) - 1 / (2 * n))).toBeLessThan(1e-15);
  });

  test('a shifted sample is rejected: N(0.05, 1) against N(0, 1), stdlib CDF', () => {
    // 1 − Φ(…) difference at the centre: sup |Φ(x − 0.05) − Φ(x)| = 2Φ(0.025) − 1 = 0.01994 (stdlib);
    // with 200000 draws D is that within a few 1/√n, above the 0.001 critical value 0.0044
    const z = normals(200_000, 10, (next) => standardNormal(next) + 0.05);
    const d = ksStatistic(z, (x) => normalCdf(x, 0, 1));
    const shift = 2 * normalCdf(0.025, 0, 1) - 1;
    console.log(`ksStatistic, shifted sample: D ${d.toFixed(5)} (population value ${shift.toFixed(5)})`);
    expect(d).toBeGreaterThan(ksCritical(z.length, 0.001));
    expect(Math.abs(d - shift)).toBeLessThan(3 * ksCritical(z.length, 0.001));
  });

  test('refuses a CDF value outside [0, 1]', () => {
    expectBadArgument(() => ksStatistic([1, 2], () => 2));
    expectBadArgument(() => ksStatistic([1, 2], () => Number.NaN));
    expectBadArgument(() => ksStatistic([], uniformCdf));
  });
});
