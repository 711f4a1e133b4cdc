/**
 * Two-level corner designs for tolerance runs (issue 12): which of the 2^k
 * corners of k toleranced parts to simulate. A shared-layer file: it
 * imports only arguments.ts.
 *
 * Construction (G. E. P. Box, J. S. Hunter, W. G. Hunter, Statistics for
 * Experimenters, 2nd ed., Wiley 2005, ch. 5 and 6, two-level factorial and
 * fractional factorial designs; chapter numbers from memory): a full
 * factorial in m base factors, N = 2^m runs, gives one column per nonempty
 * subset S of the base factors, the product of the base columns in S (the
 * S interaction). A 2^(k−p) design, p = k − m, takes k such columns as its
 * factors; the columns beyond the base factors are its generators
 * (e.g. D = ABC). Every column is balanced and any two distinct columns are
 * orthogonal, so every main effect is estimable (resolution III) as long as
 * no column repeats.
 *
 * Resolution IV: when only odd-order columns (S of odd size) are taken,
 * the product of any three of them is again odd-order, never the identity,
 * so no defining word has length 3 or less: main effects are clear of
 * two-factor interactions. There are N/2 odd-order columns, so k factors
 * need N ≥ 2k runs (the size of a foldover of a resolution III design).
 */
import { argumentError } from './arguments.js';

/** A two-level design for k factors: each row gives every factor −1 (its low corner) or +1 (its high corner). */
export interface CornerDesign {
  /** 'full': all 2^k corners; 'fractional': a two-level fractional factorial */
  readonly kind: 'full' | 'fractional';
  /** a name for reports, e.g. 'full factorial 2^3' or 'two-level fractional factorial 2^(7−4), resolution III' */
  readonly name: string;
  /** the number of factors, k */
  readonly factors: number;
  /** the runs; each row has `factors` entries, −1 or +1 */
  readonly rows: ReadonlyArray<ReadonlyArray<-1 | 1>>;
}

/** The default largest number of runs of {@link cornerDesign}. */
const DEFAULT_MAX_RUNS = 256;
/** The largest number of factors {@link cornerDesign} builds a design for. */
const MAX_FACTORS = 1024;
/** The largest maxRuns {@link cornerDesign} accepts. */
const MAX_RUNS_CAP = 65536;

/** Subsets of {0..m−1} as bit masks, by size (only the sizes `sizeOk` admits) and, within a size, in lexicographic order of their members; at most `count` of them. */
function subsetsBySize(m: number, sizeOk: (size: number) => boolean, count: number): number[] {
  const out: number[] = [];
  const members: number[] = [];
  const visit = (size: number, from: number): void => {
    if (out.length >= count) return;
    if (members.length === size) {
      out.push(members.reduce((mask, j) => mask | (1 << j), 0));
      return;
    }
    for (let j = from; j <= m - (size - members.length) && out.length < count; j++) {
      members.push(j);
      visit(size, j + 1);
      members.pop();
    }
  };
  for (let size = 1; size <= m && out.length < count; size++) if (sizeOk(size)) visit(size, 0);
  return out;
}

/** The number of set bits of a 32-bit word. */
function popcount(x: number): number {
  let c = 0;
  for (let v = x >>> 0; v !== 0; v &= v - 1) c++;
  return c;
}

/** The N = 2^m runs of the columns `masks`: in run i base factor j is +1 when bit j of i is set, and column S is the product of its base factors. */
function runsOf(m: number, masks: readonly number[]): Array<Array<-1 | 1>> {
  return Array.from({ length: 2 ** m }, (_, i) => masks.map((s): -1 | 1 => (popcount(s & ~i) % 2 === 0 ? 1 : -1)));
}

/**
 * A two-level corner design for k factors: the full factorial 2^k when 2^k ≤ maxRuns, else a regular two-level fractional factorial 2^(k−p) (Box, Hunter & Hunter, Statistics for Experimenters, 2nd ed., 2005, ch. 6), always with the all −1 and all +1 rows.
 *
 * - Full factorial: 2^k rows in standard (Yates) order, factor j = +1 in row
 *   i when bit j of i is set; row 0 is all −1, the last all +1.
 * - Otherwise resolution IV when N = 2^⌈log2 2k⌉ ≤ maxRuns: the first k
 *   odd-order columns of the full factorial in m = log2 N base factors (the
 *   base factors, then the three-factor interactions in lexicographic order,
 *   then five-factor...); its first row is all −1 and its last all +1.
 * - Otherwise resolution III, N = 2^⌈log2(k+1)⌉: the first k columns by
 *   order (base factors, then two-factor interactions, ...), and the all −1
 *   row, which such a design lacks, added as the first row (N + 1 runs, so
 *   N + 1 ≤ maxRuns is needed; the columns are then balanced and orthogonal
 *   over the N rows of the design proper).
 *
 * The all −1 and all +1 rows reach the extremes of a figure monotone in
 * each part. Rows and columns come in a fixed order, the same on every call.
 *
 * @param k - the number of factors, an integer from 1 to 1024
 * @param maxRuns - the largest number of rows allowed, an integer from 2 to 65536; default 256
 * @returns the design; `name` says which it is and, for a fractional design, its resolution
 * @throws RailcheckError `bad-argument` when k or maxRuns is not such an integer, or maxRuns is too small for a resolution III design of k factors
 * @example
 * ```ts
 * cornerDesign(3).rows.length; // 8, the full factorial
 * cornerDesign(20).name; // 'two-level fractional factorial 2^(20−14), resolution IV' (64 runs)
 * ```
 */
export function cornerDesign(k: number, maxRuns: number = DEFAULT_MAX_RUNS): CornerDesign {
  if (typeof k !== 'number' || !Number.isInteger(k) || k < 1 || k > MAX_FACTORS) throw argumentError('cornerDesign', 'k', `an integer from 1 to ${MAX_FACTORS}`, k);
  if (typeof maxRuns !== 'number' || !Number.isInteger(maxRuns) || maxRuns < 2 || maxRuns > MAX_RUNS_CAP) throw argumentError('cornerDesign', 'maxRuns', `an integer from 2 to ${MAX_RUNS_CAP}`, maxRuns);
  if (2 ** k <= maxRuns) {
    return { kind: 'full', name: `full factorial 2^${k}`, factors: k, rows: runsOf(k, subsetsBySize(k, (size) => size === 1, k)) };
  }
  const m4 = Math.ceil(Math.log2(2 * k));
  if (2 ** m4 <= maxRuns) {
    return { kind: 'fractional', name: `two-level fractional factorial 2^(${k}−${k - m4}), resolution IV`, factors: k, rows: runsOf(m4, subsetsBySize(m4, (size) => size % 2 === 1, k)) };
  }
  const m3 = Math.ceil(Math.log2(k + 1));
  if (2 ** m3 + 1 > maxRuns) {
    throw argumentError('cornerDesign', 'maxRuns', `at least ${2 ** m3 + 1} for ${k} factors (a resolution III design of ${2 ** m3} runs and the all −1 row)`, maxRuns);
  }
  const rows = runsOf(m3, subsetsBySize(m3, () => true, k));
  const lacksLow = !rows.some((row) => row.every((v) => v === -1));
  return {
    kind: 'fractional',
    name: `two-level fractional factorial 2^(${k}−${k - m3}), resolution III${lacksLow ? `, with the all −1 row added (${2 ** m3 + 1} runs)` : ''}`,
    factors: k,
    rows: lacksLow ? [new Array<-1 | 1>(k).fill(-1), ...rows] : rows,
  };
}
