/**
 * Numbers with scale suffixes and ignored units. Source for every expected
 * value: the suffix table of docs/netlist.md (Numbers and expressions), which follows
 * the SI prefixes (BIPM, The International System of Units, 9th ed., table 7)
 * except that `meg` is mega and `m` is milli.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { parseScaledNumber } from '../../../packages/core/src/netlist/index.js';
import { cardsOf, oneCard, seedFor } from './support.js';

const seed = seedFor('numbers.test.ts');

/** netlist.md, Numbers: suffix → power of ten. */
const TABLE: ReadonlyArray<[string, number]> = [
  ['f', -15], ['p', -12], ['n', -9], ['u', -6], ['µ', -6], ['m', -3], ['k', 3], ['meg', 6], ['g', 9], ['t', 12],
];

function close(actual: number | undefined, expected: number): void {
  expect(actual).toBeDefined();
  // Worst observed 0.76·eps relative over FC_SEED 20261201, 1–13 and 424242; bound 2·eps.
  expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(Math.abs(expected) * 2 * Number.EPSILON);
}

describe('suffix table (netlist.md)', () => {
  test.each(TABLE)('1%s = 1e%d, any case', (sfx, exp) => {
    close(parseScaledNumber(`1${sfx}`), 10 ** exp);
    close(parseScaledNumber(`2.5${sfx.toUpperCase()}`), 2.5 * 10 ** exp);
  });

  test('m is milli and meg is mega, in every case', () => {
    expect(parseScaledNumber('1m')).toBe(1e-3);
    expect(parseScaledNumber('1M')).toBe(1e-3);
    expect(parseScaledNumber('1meg')).toBe(1e6);
    expect(parseScaledNumber('1MEG')).toBe(1e6);
    expect(parseScaledNumber('1Meg')).toBe(1e6);
    expect(parseScaledNumber('2.2megohm')).toBe(2.2e6);
    expect(parseScaledNumber('2.2mohm')).toBe(2.2e-3);
  });

  test('the micro sign and the Greek mu are both micro', () => {
    expect(parseScaledNumber('47µF')).toBe(47e-6); // U+00B5, as netlist.md writes it
    expect(parseScaledNumber('47μF')).toBe(47e-6); // U+03BC
  });

  test('the examples of netlist.md: 10uF, 4.7kohm, 5V, 100mA', () => {
    expect(parseScaledNumber('10uF')).toBe(1e-5);
    expect(parseScaledNumber('4.7kohm')).toBe(4700);
    expect(parseScaledNumber('5V')).toBe(5);
    expect(parseScaledNumber('100mA')).toBe(0.1);
    expect(parseScaledNumber('4.7k')).toBe(4700);
    expect(parseScaledNumber('1meg')).toBe(1e6);
  });

  test('an F after the digits is femto, as the table says (10F is 10 fF, not 10 farads)', () => {
    expect(parseScaledNumber('10F')).toBe(1e-14);
  });

  test('signs, exponents and decimal points', () => {
    expect(parseScaledNumber('-12')).toBe(-12);
    expect(parseScaledNumber('+3.3')).toBe(3.3);
    expect(parseScaledNumber('1e3')).toBe(1000);
    expect(parseScaledNumber('1E-3')).toBe(1e-3);
    expect(parseScaledNumber('2.5e-3k')).toBe(2.5);
    expect(parseScaledNumber('.5')).toBe(0.5);
    expect(parseScaledNumber('5.')).toBe(5);
    expect(parseScaledNumber('  7  ')).toBe(7);
  });

  test('things that are not numbers', () => {
    for (const s of ['', 'k', 'abc', '1.2.3', '1k2', '--1', '5%', '1e999', 'e5', '1 2', '0x10']) {
      expect(parseScaledNumber(s), s).toBeUndefined();
    }
  });
});

describe('numbers in value positions', () => {
  test('element values read with suffix and unit', () => {
    const c = oneCard('C1 a 0 100nF');
    expect(c.kind === 'C' && c.value.kind === 'number' && c.value.value).toBe(1e-7);
  });

  test('a % reads as a ratio where a ratio is expected (.spread, .figure depth and fall)', () => {
    const cards = cardsOf('V1 in 0 5\n.supply in=V1 out=in\n.spread R1 5%\n.figure sag depth=20% fall=1.5%\n.figure dropout fall=100m');
    const spread = cards.find((c) => c.kind === 'spread');
    expect(spread?.kind === 'spread' && spread.ratio).toMatchObject({ kind: 'number', value: 0.05, percent: true });
    const sag = cards.find((c) => c.kind === 'figure' && c.figure === 'sag');
    expect(sag?.kind === 'figure' && sag.keys.map((k) => [k.name, k.value.kind === 'number' ? k.value.value : NaN])).toEqual([['depth', 0.2], ['fall', 0.015]]);
    const dropout = cards.find((c) => c.kind === 'figure' && c.figure === 'dropout');
    // A fall written without % is in volts: no percent mark.
    expect(dropout?.kind === 'figure' && dropout.keys[0]?.value).toEqual(expect.not.objectContaining({ percent: true }));
  });
});

describe('property: formatted numbers read back (netlist.md suffix table)', () => {
  // Units that cannot be mistaken for a suffix when written straight after the digits.
  const SAFE_UNITS = ['', 'V', 'A', 'Hz', 'ohm', 'Ω', 'W', 's', 'H'];
  // After a suffix any letters are a unit, except ones that would turn m into meg.
  const ANY_UNITS = [...SAFE_UNITS, 'F', 'mA', 'uF', 'kHz'];

  test('parseScaledNumber(mantissa e exp suffix unit) ≈ mantissa·10^(exp+suffix)', () => {
    const arb = fc.record({
      sign: fc.constantFrom('', '+', '-'),
      int: fc.integer({ min: 0, max: 99999 }),
      frac: fc.option(fc.integer({ min: 0, max: 9999 }), { nil: undefined }),
      exp: fc.option(fc.integer({ min: -30, max: 30 }), { nil: undefined }),
      suffix: fc.option(fc.constantFrom(...TABLE), { nil: undefined }),
      unitIndex: fc.nat(),
      upper: fc.boolean(),
    });
    fc.assert(
      fc.property(arb, (g) => {
        const mantissa = `${g.int}${g.frac === undefined ? '' : `.${g.frac}`}`;
        const units = g.suffix ? ANY_UNITS : SAFE_UNITS;
        const unit = units[g.unitIndex % units.length] ?? '';
        const sfx = g.suffix ? (g.upper ? g.suffix[0].toUpperCase() : g.suffix[0]) : '';
        const text = `${g.sign}${mantissa}${g.exp === undefined ? '' : `e${g.exp}`}${sfx}${unit}`;
        const expected = (g.sign === '-' ? -1 : 1) * Number(mantissa) * 10 ** ((g.exp ?? 0) + (g.suffix ? g.suffix[1] : 0));
        const got = parseScaledNumber(text);
        if (got === undefined) return false;
        // Worst observed 3.4e-16 relative over FC_SEED 20261201, 1–13 and 424242; bound 8.5e-16.
        return Math.abs(got - expected) <= Math.abs(expected) * 8.5e-16;
      }),
      { seed, numRuns: 2000 },
    );
  });
});
