/**
 * Statistics for Monte Carlo tolerance runs (`.spread`, issue 12): the
 * random streams of the runs, the sampled tolerance factors and the
 * summaries of the figures over the runs. A shared-layer file: it imports
 * only errors.ts and arguments.ts.
 *
 * Sources of the methods:
 * - SplitMix64: G. L. Steele, D. Lea, C. H. Flood, "Fast splittable
 *   pseudorandom number generators", OOPSLA 2014.
 * - xoshiro128**: D. Blackman, S. Vigna, "Scrambled linear pseudorandom
 *   number generators", ACM Trans. Math. Softw. 47(4), 2021.
 * - the normal quantile: M. J. Wichura, "Algorithm AS 241: The percentage
 *   points of the normal distribution", Applied Statistics 37(3), 1988,
 *   pp. 477–484 (PPND16).
 * - Welford's online mean and variance: B. P. Welford, Technometrics 4(3),
 *   1962; D. E. Knuth, TAOCP vol. 2, 3rd ed., §4.2.2.
 * - percentiles: R. J. Hyndman, Y. Fan, "Sample quantiles in statistical
 *   packages", The American Statistician 50(4), 1996, definition 7.
 * - the Wilson score interval: E. B. Wilson, J. Am. Stat. Assoc. 22, 1927.
 * - the default number of histogram bins: H. A. Sturges, J. Am. Stat.
 *   Assoc. 21, 1926.
 * - the one-sample Kolmogorov–Smirnov statistic: A. N. Kolmogorov, 1933;
 *   N. Smirnov, Ann. Math. Stat. 19, 1948.
 */
import { argumentError } from './arguments.js';

const MASK64 = (1n << 64n) - 1n;
const GOLDEN_GAMMA = 0x9e3779b97f4a7c15n;

/** The SplitMix64 finaliser (Steele, Lea & Flood 2014): a bijection of 64-bit words. */
function mix64(z: bigint): bigint {
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

function checkIndex(fn: string, parameter: string, v: unknown): asserts v is number {
  if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < 0) throw argumentError(fn, parameter, 'a non-negative safe integer', v);
}

/**
 * A deterministic stream of uniform numbers in [0, 1) for run `run` of a spread with seed `seed` (dimensionless).
 *
 * It depends only on (seed, run), so runs can be done in any order, on any
 * thread or shard. The key h = SplitMix64(SplitMix64(seed) xor run) (the
 * SplitMix64 finaliser of Steele, Lea & Flood, OOPSLA 2014) seeds a
 * SplitMix64 sequence whose first two outputs fill the 128-bit state of
 * xoshiro128** (Blackman & Vigna, ACM TOMS 47(4), 2021); each number takes
 * two 32-bit outputs a, b, 53 bits, as u = ((a >>> 5)·2^26 + (b >>> 6)) / 2^53
 * (genrand_res53 of Matsumoto & Nishimura's MT19937 reference code, 2002). For one seed, distinct runs get distinct
 * keys (the finaliser is a bijection).
 *
 * @param seed - the spread's seed, a non-negative safe integer
 * @param run - the run's index, a non-negative safe integer
 * @returns a function giving the next number of the stream on each call
 * @throws RailcheckError `bad-argument` when seed or run is not a non-negative safe integer
 * @example
 * ```ts
 * const next = runStream(12, 0);
 * const u = next(); // 0 <= u < 1, the same for every call of runStream(12, 0)
 * ```
 */
export function runStream(seed: number, run: number): () => number {
  checkIndex('runStream', 'seed', seed);
  checkIndex('runStream', 'run', run);
  const key = mix64(mix64(BigInt(seed)) ^ BigInt(run));
  const w0 = mix64((key + GOLDEN_GAMMA) & MASK64);
  const w1 = mix64((key + 2n * GOLDEN_GAMMA) & MASK64);
  let s0 = Number(w0 & 0xffffffffn) | 0;
  let s1 = Number(w0 >> 32n) | 0;
  let s2 = Number(w1 & 0xffffffffn) | 0;
  let s3 = Number(w1 >> 32n) | 0;
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is xoshiro's only fixed point
  const step = (): number => {
    const x = Math.imul(s1, 5);
    const result = Math.imul((x << 7) | (x >>> 25), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    return result;
  };
  return () => ((step() >>> 5) * 67108864 + (step() >>> 6)) / 9007199254740992;
}

/**
 * A standard normal deviate (mean 0, standard deviation 1) drawn from the stream, by the inverse CDF: {@link normalQuantile} (Wichura, AS 241) of one uniform number.
 *
 * A zero from the stream is skipped (its quantile is −∞), so the deviate is
 * always finite: |z| < 8.3.
 *
 * @param next - a stream of uniform numbers in [0, 1), such as {@link runStream} gives
 * @returns the deviate (dimensionless)
 * @throws RailcheckError `bad-argument` when next is not a function or gives a number outside [0, 1)
 */
export function standardNormal(next: () => number): number {
  if (typeof next !== 'function') throw argumentError('standardNormal', 'next', 'a function giving numbers in [0, 1)', next);
  let u = next();
  for (let tries = 0; u === 0 && tries < 64; tries++) u = next();
  if (!(u > 0 && u < 1)) throw argumentError('standardNormal', 'next()', 'a number in (0, 1)', u);
  return normalQuantile(u);
}

const FACTOR_SAMPLERS: Readonly<Record<'uniform' | 'gauss', (next: () => number, ratio: number) => number>> = {
  uniform: (next, ratio) => {
    const u = next();
    if (!(u >= 0 && u < 1)) throw argumentError('toleranceFactor', 'next()', 'a number in [0, 1)', u);
    return 1 + ratio * (2 * u - 1);
  },
  gauss: (next, ratio) => 1 + (ratio / 3) * standardNormal(next),
};

/**
 * A sample factor (dimensionless) of a tolerance: uniform → 1 + ratio·(2u − 1); gauss → 1 + (ratio/3)·z with z from {@link standardNormal}, so ratio is 3σ.
 *
 * @param next - a stream of uniform numbers in [0, 1)
 * @param ratio - the tolerance as a fraction (0.05 for 5 %), finite and ≥ 0
 * @param distribution - 'uniform' (within ±ratio) or 'gauss' (ratio is three standard deviations)
 * @returns the factor to multiply the nominal value by
 * @throws RailcheckError `bad-argument` on a wrong ratio, distribution or stream
 * @example
 * ```ts
 * const value = 4700 * toleranceFactor(runStream(1, 7), 0.05, 'uniform'); // within 4465..4935 ohm
 * ```
 */
export function toleranceFactor(next: () => number, ratio: number, distribution: 'uniform' | 'gauss'): number {
  if (typeof next !== 'function') throw argumentError('toleranceFactor', 'next', 'a function giving numbers in [0, 1)', next);
  if (typeof ratio !== 'number' || !(ratio >= 0) || !Number.isFinite(ratio)) throw argumentError('toleranceFactor', 'ratio', 'a finite number >= 0', ratio);
  if (typeof distribution !== 'string' || !Object.hasOwn(FACTOR_SAMPLERS, distribution)) throw argumentError('toleranceFactor', 'distribution', "'uniform' or 'gauss'", distribution);
  return FACTOR_SAMPLERS[distribution](next, ratio);
}

/** Summary statistics of a list of values, in the values' own unit. */
export interface Summary {
  /** how many values */
  readonly count: number;
  /** the smallest value */
  readonly min: number;
  /** the largest value */
  readonly max: number;
  /** the arithmetic mean (Welford 1962) */
  readonly mean: number;
  /** sample standard deviation (n−1 in the denominator); 0 for one value */
  readonly std: number;
  /** percentile p (0..100, the key is the number written as a string: '1', '50', '99.9') → value, by Hyndman & Fan (1996) definition 7, linear interpolation between order statistics */
  readonly percentiles: Readonly<Record<string, number>>;
}

function checkValues(fn: string, values: unknown): asserts values is readonly number[] {
  if (!Array.isArray(values)) throw argumentError(fn, 'values', 'an array of finite numbers', values);
  if (values.length === 0) throw argumentError(fn, 'values', 'at least one value', 'an empty array');
  for (let i = 0; i < values.length; i++) {
    const v: unknown = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) throw argumentError(fn, `values[${i}]`, 'a finite number', v);
  }
}

/**
 * Summary statistics of finite values: count, min, max, mean and sample standard deviation by Welford's online algorithm (Welford, Technometrics 4, 1962; Knuth, TAOCP vol. 2, §4.2.2), and percentiles by Hyndman & Fan (1996) definition 7.
 *
 * Welford's recurrence runs on the values less the first (shifted data,
 * Chan, Golub & LeVeque, The American Statistician 37, 1983), so values
 * far from zero and close together keep their spread to full precision.
 *
 * Definition 7 (linear interpolation): with the values sorted x[0..n−1] and
 * h = (n − 1)·p/100, the percentile is x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]).
 * Percentile keys are the numbers given written as strings (String(p):
 * '1', '50', '99', '99.9').
 *
 * @param values - the values, finite, in any unit (the results are in the same unit)
 * @param percentiles - the percentiles wanted, each from 0 to 100
 * @returns the {@link Summary}
 * @throws RailcheckError `bad-argument` on an empty list, a non-finite value or a percentile outside 0..100
 * @example
 * ```ts
 * summarise([4.98, 5.01, 5.02], [50]).percentiles['50']; // 5.01
 * ```
 */
export function summarise(values: readonly number[], percentiles: readonly number[]): Summary {
  checkValues('summarise', values);
  if (!Array.isArray(percentiles)) throw argumentError('summarise', 'percentiles', 'an array of numbers from 0 to 100', percentiles);
  for (let i = 0; i < percentiles.length; i++) {
    const p: unknown = percentiles[i];
    if (typeof p !== 'number' || !(p >= 0 && p <= 100)) throw argumentError('summarise', `percentiles[${i}]`, 'a number from 0 to 100', p);
  }
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const n = values.length;
  const [mean, m2] = welford(values, 1);
  const std = n > 1 ? Math.sqrt(m2 / (n - 1)) : 0;
  if (Number.isFinite(mean) && Number.isFinite(std)) return finish(values, percentiles, min, max, mean, std);
  // deviations beyond the largest double: again on the values scaled by 2^-600 (exact for all
  // but values below 2^-474, negligible beside these), scaled back, std held to the largest double
  const [meanScaled, m2Scaled] = welford(values, 2 ** -600);
  const stdScaled = n > 1 ? Math.sqrt(m2Scaled / (n - 1)) : 0;
  return finish(values, percentiles, min, max, meanScaled * 2 ** 600, Math.min(Number.MAX_VALUE, stdScaled * 2 ** 600));
}

/**
 * Welford's recurrence for the mean and the sum of squared deviations M2 of values·scale,
 * run on the values less the first one (the shifted data of Chan, Golub & LeVeque, The
 * American Statistician 37, 1983): values close together, such as 1e9 + small changes,
 * then keep their differences exactly.
 */
function welford(values: readonly number[], scale: number): [mean: number, m2: number] {
  const shift = values[0]! * scale;
  let mean = 0;
  let m2 = 0;
  for (let i = 0; i < values.length; i++) {
    const x = values[i]! * scale - shift;
    const delta = x - mean;
    mean += delta / (i + 1);
    m2 += delta * (x - mean);
  }
  return [mean + shift, m2];
}

/** The percentiles (Hyndman & Fan definition 7) and the summary. */
function finish(values: readonly number[], percentiles: readonly number[], min: number, max: number, mean: number, std: number): Summary {
  const n = values.length;
  const sorted = Float64Array.from(values).sort();
  const out: Record<string, number> = {};
  for (const p of percentiles) {
    const h = ((n - 1) * p) / 100;
    const lo = Math.floor(h);
    const hi = Math.min(lo + 1, n - 1);
    const a = sorted[lo]!;
    const b = sorted[hi]!;
    const f = h - lo;
    const d = b - a;
    out[String(p)] = f === 0 ? a : Number.isFinite(d) ? a + f * d : a * (1 - f) + b * f;
  }
  // the mean of values all equal can drift by an ulp; keep it inside [min, max]
  return { count: n, min, max, mean: Math.min(max, Math.max(min, mean)), std, percentiles: out };
}

/**
 * Wilson score interval for a binomial proportion (Wilson 1927, J. Am. Stat. Assoc. 22, pp. 209–212), two-sided at `confidence`, for `passes` of `n`.
 *
 * With p̂ = passes/n and z the (1 + confidence)/2 quantile of the standard
 * normal ({@link normalQuantile}): (p̂ + z²/2n ± z·√(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n).
 * The ends are clamped to [0, 1], and are exactly 0 for 0 passes and exactly 1 for n passes.
 *
 * @param passes - the number of passes, an integer from 0 to n
 * @param n - the number of trials, an integer ≥ 1
 * @param confidence - the two-sided confidence level, in (0, 1); default 0.95
 * @returns the low and high ends of the interval, as proportions (0..1)
 * @throws RailcheckError `bad-argument` on a wrong count or confidence
 * @example
 * ```ts
 * wilsonInterval(81, 263); // { low: 0.2553…, high: 0.3662… }
 * ```
 */
export function wilsonInterval(passes: number, n: number, confidence = 0.95): { readonly low: number; readonly high: number } {
  if (typeof n !== 'number' || !Number.isSafeInteger(n) || n < 1) throw argumentError('wilsonInterval', 'n', 'an integer >= 1', n);
  if (typeof passes !== 'number' || !Number.isSafeInteger(passes) || passes < 0 || passes > n) throw argumentError('wilsonInterval', 'passes', `an integer from 0 to n (${n})`, passes);
  if (typeof confidence !== 'number' || !(confidence > 0 && confidence < 1)) throw argumentError('wilsonInterval', 'confidence', 'a number between 0 and 1 (exclusive)', confidence);
  const z = normalQuantile(0.5 + confidence / 2);
  const z2 = z * z;
  const phat = passes / n;
  const denom = 1 + z2 / n;
  const centre = (phat + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((phat * (1 - phat)) / n + z2 / (4 * n * n))) / denom;
  const low = passes === 0 ? 0 : Math.max(0, centre - half);
  const high = passes === n ? 1 : Math.min(1, centre + half);
  return { low, high };
}

/** A polynomial's value by Horner's rule, coefficients from the highest power down. */
function horner(c: readonly number[], x: number): number {
  let v = 0;
  for (let i = 0; i < c.length; i++) v = v * x + c[i]!;
  return v;
}

// Wichura (1988), AS 241, PPND16: the coefficients of the three rational approximations, highest power first.
const AS241_A = [2509.0809287301226727, 33430.575583588128105, 67265.770927008700853, 45921.953931549871457, 13731.693765509461125, 1971.5909503065514427, 133.14166789178437745, 3.387132872796366608];
const AS241_B = [5226.495278852545925, 28729.085735721942674, 39307.89580009271061, 21213.794301586595867, 5394.1960214247511077, 687.1870074920579083, 42.313330701600911252, 1];
const AS241_C = [7.7454501427834140764e-4, 0.0227238449892691845833, 0.24178072517745061177, 1.27045825245236838258, 3.64784832476320460504, 5.7694972214606914055, 4.6303378461565452959, 1.42343711074968357734];
const AS241_D = [1.05075007164441684324e-9, 5.475938084995344946e-4, 0.0151986665636164571966, 0.14810397642748007459, 0.68976733498510000455, 1.6763848301838038494, 2.05319162663775882187, 1];
const AS241_E = [2.01033439929228813265e-7, 2.71155556874348757815e-5, 0.0012426609473880784386, 0.026532189526576123093, 0.29656057182850489123, 1.7848265399172913358, 5.4637849111641143699, 6.6579046435011037772];
const AS241_F = [2.04426310338993978564e-15, 1.4215117583164458887e-7, 1.8463183175100546818e-5, 7.868691311456132591e-4, 0.0148753612908506148525, 0.13692988092273580531, 0.59983220655588793769, 1];

/**
 * The standard normal quantile (inverse CDF; dimensionless) of a probability p in (0, 1), by Wichura's Algorithm AS 241 (PPND16, Applied Statistics 37(3), 1988), accurate to about 1 part in 10^16.
 *
 * Three rational approximations of degree 7: one for |p − 0.5| ≤ 0.425, two
 * in r = √(−ln min(p, 1−p)) for the tails (r ≤ 5 and r > 5).
 *
 * @param p - the probability, strictly between 0 and 1
 * @returns z with Φ(z) = p
 * @throws RailcheckError `bad-argument` when p is not in (0, 1)
 * @example
 * ```ts
 * normalQuantile(0.975); // 1.959963984540054
 * ```
 */
export function normalQuantile(p: number): number {
  if (typeof p !== 'number' || !(p > 0 && p < 1)) throw argumentError('normalQuantile', 'p', 'a probability strictly between 0 and 1', p);
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (q * horner(AS241_A, r)) / horner(AS241_B, r);
  }
  let r = Math.sqrt(-Math.log(q < 0 ? p : 1 - p));
  let v: number;
  if (r <= 5) {
    r -= 1.6;
    v = horner(AS241_C, r) / horner(AS241_D, r);
  } else {
    r -= 5;
    v = horner(AS241_E, r) / horner(AS241_F, r);
  }
  return q < 0 ? -v : v;
}

/** The largest number of histogram bins a caller may ask for. */
const MAX_BINS = 100_000;

/**
 * Histogram of finite values: `bins` equal-width bins from the least value to the greatest (the values' unit for the edges; counts are numbers of values).
 *
 * Bin i holds edges[i] ≤ v < edges[i+1], the last bin also v = max. The
 * default count is Sturges' rule ⌈log2 n⌉ + 1 (Sturges, J. Am. Stat. Assoc.
 * 21, 1926). When all values are equal there is one bin, with both edges at
 * that value.
 *
 * @param values - the values, finite, at least one
 * @param bins - the number of bins, an integer from 1 to 100000; default Sturges' rule
 * @returns the bins+1 edges, non-decreasing (equal only for a span of a few ulps), and the bins counts, which sum to the number of values
 * @throws RailcheckError `bad-argument` on an empty list, a non-finite value or a wrong bin count
 */
export function histogram(values: readonly number[], bins?: number): { readonly edges: readonly number[]; readonly counts: readonly number[] } {
  checkValues('histogram', values);
  if (bins !== undefined && (typeof bins !== 'number' || !Number.isInteger(bins) || bins < 1 || bins > MAX_BINS)) throw argumentError('histogram', 'bins', `an integer from 1 to ${MAX_BINS}`, bins);
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (min === max) return { edges: [min, max], counts: [values.length] };
  const k = bins ?? Math.ceil(Math.log2(values.length)) + 1;
  // halves when the span passes the largest double (values near ±1.8e308); halving is exact for these
  const half = Number.isFinite(max - min) ? 1 : 0.5;
  const span = max * half - min * half;
  const edges = Array.from({ length: k + 1 }, (_, i) => (i === 0 ? min : i === k ? max : (min * half + (span * i) / k) / half));
  const counts = new Array<number>(k).fill(0);
  for (const v of values) {
    let i = Math.max(0, Math.min(k - 1, Math.floor(((v * half - min * half) / span) * k)));
    // the edges are rounded: move to the bin whose edges hold v
    while (i > 0 && v < edges[i]!) i--;
    while (i < k - 1 && v >= edges[i + 1]!) i++;
    counts[i]!++;
  }
  return { edges, counts };
}

/**
 * One-sample Kolmogorov–Smirnov statistic D = sup |F_n(x) − F(x)| (dimensionless, 0..1) of values against a CDF (Kolmogorov 1933; Smirnov, Ann. Math. Stat. 19, 1948), for tests and documentation.
 *
 * With the values sorted x[0..n−1]: D = max over i of max(F(x[i]) − i/n, (i+1)/n − F(x[i])).
 *
 * @param values - the sample, finite, at least one
 * @param cdf - the reference CDF, giving a number in [0, 1] for each value
 * @returns D
 * @throws RailcheckError `bad-argument` on an empty list, a non-finite value, or a CDF value outside [0, 1]
 */
export function ksStatistic(values: readonly number[], cdf: (x: number) => number): number {
  checkValues('ksStatistic', values);
  if (typeof cdf !== 'function') throw argumentError('ksStatistic', 'cdf', 'a function', cdf);
  const sorted = Float64Array.from(values).sort();
  const n = sorted.length;
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f: unknown = cdf(sorted[i]!);
    if (typeof f !== 'number' || !(f >= 0 && f <= 1)) throw argumentError('ksStatistic', `cdf(${sorted[i]})`, 'a number from 0 to 1', f);
    d = Math.max(d, f - i / n, (i + 1) / n - f);
  }
  return d;
}
