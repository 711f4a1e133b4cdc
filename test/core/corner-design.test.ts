/**
 * The corner designs of tolerance runs (packages/core/src/corner-design.ts)
 * against the defining properties of two-level designs (Box, Hunter &
 * Hunter, Statistics for Experimenters, 2nd ed., 2005, ch. 5 and 6; chapter
 * numbers from memory): a full factorial holds all 2^k corners; in a
 * fractional factorial every column is balanced and any two columns are
 * orthogonal (resolution III at least: every main effect estimable), and
 * for resolution IV no main-effect column equals a product of two others
 * (a defining word of length 3 would make it so). The matrix rank comes from
 * ml-matrix (an outside linear-algebra library).
 */
import { describe, expect, test } from 'vitest';
import { RailcheckError } from '@railcheck/core';
import { cornerDesign, type CornerDesign } from '../../packages/core/src/corner-design.js';
import { ml } from '../helpers/ml-matrix.js';

/** Expects fn to throw a RailcheckError of code `bad-argument`. */
const expectBadArgument = (fn: () => unknown): void => {
  expect(fn).toThrow(RailcheckError);
  expect(() => {
    try {
      fn();
    } catch (e) {
      throw new Error((e as RailcheckError).diagnostics.map((d) => d.code).join(','));
    }
  }).toThrow('bad-argument');
};

const isLow = (row: readonly number[]): boolean => row.every((v) => v === -1);
const isHigh = (row: readonly number[]): boolean => row.every((v) => v === 1);
const column = (rows: ReadonlyArray<ReadonlyArray<number>>, j: number): number[] => rows.map((r) => r[j]!);
const dot = (a: readonly number[], b: readonly number[]): number => a.reduce((s, x, i) => s + x * b[i]!, 0);

/** The rows of the design proper: without the all −1 row the resolution III design adds (its name says so). */
function designProper(d: CornerDesign): ReadonlyArray<ReadonlyArray<-1 | 1>> {
  return d.name.includes('row added') ? d.rows.slice(1) : d.rows;
}

describe('cornerDesign: full factorials', () => {
  test('k = 1..8 with the default 256 runs: all 2^k corners, each once, all −1 first and all +1 last', () => {
    for (let k = 1; k <= 8; k++) {
      const d = cornerDesign(k);
      expect(d.kind).toBe('full');
      expect(d.factors).toBe(k);
      expect(d.name).toBe(`full factorial 2^${k}`);
      expect(d.rows.length).toBe(2 ** k);
      for (const r of d.rows) {
        expect(r.length).toBe(k);
        for (const v of r) expect(v === -1 || v === 1).toBe(true);
      }
      expect(new Set(d.rows.map((r) => r.join(','))).size).toBe(2 ** k);
      expect(isLow(d.rows[0]!)).toBe(true);
      expect(isHigh(d.rows.at(-1)!)).toBe(true);
    }
  });

  test('the same call gives the same rows in the same order', () => {
    expect(cornerDesign(5)).toEqual(cornerDesign(5));
    expect(cornerDesign(40)).toEqual(cornerDesign(40));
  });

  test('maxRuns decides: 2^4 = 16 ≤ 16 is full, with 15 it is fractional', () => {
    expect(cornerDesign(4, 16).kind).toBe('full');
    expect(cornerDesign(4, 15).kind).toBe('fractional');
  });
});

describe('cornerDesign: fractional factorials', () => {
  const cases: Array<[number, number | undefined]> = [];
  // default maxRuns 256: every k from 9 to 24, then either side of each power of two up to 128
  for (let k = 9; k <= 24; k++) cases.push([k, undefined]);
  for (const k of [31, 32, 33, 48, 63, 64, 65, 100, 127, 128]) cases.push([k, undefined]);
  // resolution III: maxRuns too small for resolution IV (2k rounded up to a power of 2)
  for (const [k, m] of [[3, 7], [5, 9], [7, 9], [7, 12], [11, 17], [15, 17], [20, 33], [31, 40], [64, 129], [100, 200], [129, 300]] as const) cases.push([k, m]);
  // resolution IV below the default: maxRuns smaller than 2^k
  for (const [k, m] of [[4, 8], [5, 16], [6, 16], [8, 16], [9, 32], [16, 32]] as const) cases.push([k, m]);

  test('balanced columns, orthogonal main effects, both extreme rows, run count within maxRuns', () => {
    const seen: string[] = [];
    for (const [k, maxRuns] of cases) {
      const d = cornerDesign(k, maxRuns);
      const limit = maxRuns ?? 256;
      expect(d.kind).toBe('fractional');
      expect(d.factors).toBe(k);
      expect(d.rows.length).toBeLessThanOrEqual(limit);
      expect(d.rows.length).toBeLessThan(2 ** k);
      expect(d.rows.some(isLow)).toBe(true);
      expect(d.rows.some(isHigh)).toBe(true);
      for (const r of d.rows) {
        expect(r.length).toBe(k);
        for (const v of r) expect(v === -1 || v === 1).toBe(true);
      }
      const rows = designProper(d);
      // a regular two-level fraction has a power of two runs (BHH ch. 6)
      expect(Number.isInteger(Math.log2(rows.length))).toBe(true);
      expect(new Set(rows.map((r) => r.join(','))).size).toBe(rows.length);
      const cols = Array.from({ length: k }, (_, j) => column(rows, j));
      for (let i = 0; i < k; i++) {
        expect(cols[i]!.reduce((a, b) => a + b, 0)).toBe(0); // balanced
        for (let j = i + 1; j < k; j++) expect(dot(cols[i]!, cols[j]!)).toBe(0); // orthogonal
      }
      // main effects estimable: the model matrix [1, x1..xk] has full column rank (ml-matrix),
      // over all the rows (the added extreme row included)
      if (k <= 64) {
        const model = new ml.Matrix(d.rows.map((r) => [1, ...r]));
        expect(new ml.SingularValueDecomposition(model, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).rank).toBe(k + 1);
      }
      // resolution: IV when no column is the product of two others (no word of length 3)
      const resolutionIV = !cols.some((c, a) =>
        cols.some((x, b) => b !== a && cols.some((y, e) => e > b && e !== a && c.every((v, r) => v === x[r]! * y[r]!))),
      );
      expect(d.name).toContain(resolutionIV ? 'resolution IV' : 'resolution III');
      // the name 2^(k−p) states k and the 2^(k−p) runs of the design proper
      const m = /2\^\((\d+)−(\d+)\)/.exec(d.name);
      expect(m).not.toBeNull();
      expect(Number(m![1])).toBe(k);
      expect(2 ** (k - Number(m![2]))).toBe(rows.length);
      // resolution IV needs at least 2k runs (foldover bound); resolution III at least k + 1
      expect(rows.length).toBeGreaterThanOrEqual(resolutionIV ? 2 * k : k + 1);
      seen.push(`k ${k}${maxRuns === undefined ? '' : ` max ${maxRuns}`}: ${d.rows.length} runs, ${resolutionIV ? 'IV' : 'III'}`);
    }
    console.log(`cornerDesign: ${seen.join('; ')}`);
  });

  test('resolution IV is used whenever 2k rounded up to a power of two fits, else III with the all −1 row added', () => {
    // k = 9 with the default: 2^9 = 512 > 256; resolution IV needs 2·9 → 32 runs
    const d9 = cornerDesign(9);
    expect(d9.rows.length).toBe(32);
    expect(d9.name).toBe('two-level fractional factorial 2^(9−4), resolution IV');
    // k = 7 in at most 9 runs: the saturated 2^(7−4) of BHH (8 runs) and the all −1 row
    const d7 = cornerDesign(7, 9);
    expect(d7.rows.length).toBe(9);
    expect(d7.name).toBe('two-level fractional factorial 2^(7−4), resolution III, with the all −1 row added (9 runs)');
    expect(isLow(d7.rows[0]!)).toBe(true);
  });

  test('k = 64 with the default: 128 runs, resolution IV', () => {
    const d = cornerDesign(64);
    expect(d.rows.length).toBe(128);
    expect(d.name).toContain('resolution IV');
  });
});

describe('cornerDesign: arguments', () => {
  test('refuses k < 1, non-integers and a maxRuns too small for k', () => {
    for (const bad of [0, -1, 1.5, Number.NaN, Infinity, 1025, '3' as unknown as number]) expectBadArgument(() => cornerDesign(bad));
    for (const bad of [1, 2.5, Number.NaN, 65537]) expectBadArgument(() => cornerDesign(3, bad));
    // 129 factors need 256 + 1 runs for resolution III
    expectBadArgument(() => cornerDesign(129));
    expectBadArgument(() => cornerDesign(7, 8));
  });
});
