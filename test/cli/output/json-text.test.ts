/**
 * railcheck's JSON text (present/json-text.ts): the same values as
 * JSON.stringify writes (the platform's JSON.parse, ECMA-404, reads both to
 * equal values), arrays of plain values on one line, everything else as
 * JSON.stringify(value, null, 2) lays it out.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { jsonText } from '../../../packages/cli/src/present/json-text.js';
import { seedFor } from '../../core/measure/linear/support.js';

const seed = seedFor('cli/output/json-text');

describe('jsonText', () => {
  test('parses back to what JSON.stringify gives, for any JSON value', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (v) => {
        expect(JSON.parse(jsonText(v))).toStrictEqual(JSON.parse(JSON.stringify(v)));
      }),
      { seed, numRuns: 300 },
    );
  });

  test('an array of numbers is one line; nested objects are laid out as JSON.stringify(v, null, 2) does', () => {
    const v = { times: [0, 0.0001, 2e-7], nodes: { out: [4.9, 4.95] }, op: { basis: 'dc', list: [{ a: 1 }] }, empty: [], none: {} };
    const text = jsonText(v);
    expect(text).toContain('"times": [0, 0.0001, 2e-7]');
    expect(text).toContain('"out": [4.9, 4.95]');
    // Without arrays of plain values the layout is JSON.stringify's own.
    const nested = { op: { basis: 'dc', list: [{ a: 1 }, { b: 'x' }] }, empty: [], none: {} };
    expect(jsonText(nested)).toBe(JSON.stringify(nested, null, 2));
    // Values JSON.stringify leaves out or writes as null.
    expect(JSON.parse(jsonText({ a: undefined, b: [undefined, 1], c: Number.NaN }))).toStrictEqual({ b: [null, 1], c: null });
  });
});
