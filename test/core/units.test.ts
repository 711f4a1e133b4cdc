/**
 * formatSI: engineering notation with the SI prefixes tera to femto (SI
 * Brochure, 9th ed., BIPM 2019, §3, Table 7: T = 1e12, G = 1e9, M = 1e6,
 * k = 1e3, m = 1e-3, µ = 1e-6, n = 1e-9, p = 1e-12, f = 1e-15), plain
 * exponent notation outside that range, "not finite" for NaN and
 * ±Infinity (docs/output.md, "Numbers"). The property reads every output
 * back with the Brochure's prefix values and compares it with the input.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { formatSI, RailcheckError } from '@railcheck/core';
import { fcSeed } from '../helpers/device-harness.js';

const seed = fcSeed('core/units.test.ts');

/** SI Brochure, 9th ed., Table 7 (the prefixes formatSI uses). */
const PREFIX_VALUE: Readonly<Record<string, number>> = { T: 1e12, G: 1e9, M: 1e6, k: 1e3, '': 1, m: 1e-3, µ: 1e-6, n: 1e-9, p: 1e-12, f: 1e-15 };

/** Reads formatSI's output in volts back to a number, or undefined when it is not of the documented form. */
function readBack(text: string): { value: number; mantissa: number; prefixed: boolean } | undefined {
  const prefixed = /^(-?\d+(?:\.\d+)?) ([TGMkmµnpf]?)V$/.exec(text);
  if (prefixed) return { value: Number(prefixed[1]) * PREFIX_VALUE[prefixed[2]!]!, mantissa: Math.abs(Number(prefixed[1])), prefixed: true };
  const exponent = /^(-?\d+(?:\.\d+)?)e([+-]\d+) V$/.exec(text);
  if (exponent) return { value: Number(`${exponent[1]}e${exponent[2]}`), mantissa: Math.abs(Number(exponent[1])), prefixed: false };
  return undefined;
}

describe('formatSI', () => {
  test('worked values: one per prefix, rounding carried to the next prefix', () => {
    expect(formatSI(0.0047, 'A')).toBe('4.7 mA');
    expect(formatSI(83.333e-6, 'A')).toBe('83.33 µA');
    expect(formatSI(4700, 'Ω')).toBe('4.7 kΩ');
    expect(formatSI(2.2e9, 'Hz')).toBe('2.2 GHz');
    expect(formatSI(1.5e12, 'W')).toBe('1.5 TW');
    expect(formatSI(3.3e-15, 'A')).toBe('3.3 fA');
    expect(formatSI(999.96, 'V')).toBe('1 kV');
    expect(formatSI(12, 'V')).toBe('12 V');
    expect(formatSI(-4.7e-9, 's')).toBe('-4.7 ns');
  });

  test('beyond tera and below femto: exponent notation with the bare unit, never a stretched prefix', () => {
    expect(formatSI(1e21, 'V')).toBe('1e+21 V');
    expect(formatSI(999.99e12, 'V')).toBe('1e+15 V');
    expect(formatSI(1.5e-16, 'A')).toBe('1.5e-16 A');
    expect(formatSI(1e300, '')).toBe('1e+300');
  });

  test('below an atto-unit a value prints as 0; NaN and Infinity as "not finite"', () => {
    expect(formatSI(1e-19, 'A')).toBe('0 A');
    expect(formatSI(NaN, 'V')).toBe('not finite');
    expect(formatSI(Infinity, 'W')).toBe('not finite');
    expect(formatSI(-Infinity, 'W')).toBe('not finite');
  });

  test('wrong arguments are RailcheckError, not RangeError', () => {
    for (const digits of [0, 101, 2.5, NaN]) expect(() => formatSI(1, 'V', digits)).toThrow(RailcheckError);
    expect(() => formatSI('1' as unknown as number, 'V')).toThrow(RailcheckError);
    expect(() => formatSI(1, undefined as unknown as string)).toThrow(RailcheckError);
  });

  // Below 1e307: near the largest double, rounding up (1.5e308 → "2e+308") is right but reads back as Infinity.
  test('every finite value reads back within its rounding, mantissa in [1, 1000)', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }).filter((v) => Math.abs(v) >= 1e-18 && Math.abs(v) < 1e307), fc.integer({ min: 1, max: 17 }), (v, digits) => {
        const r = readBack(formatSI(v, 'V', digits));
        expect(r).toBeDefined();
        // Rounding to `digits` significant digits moves a value by at most half a unit in the last digit; 1e-15 of slack for the decimal read-back.
        expect(Math.abs(r!.value - v)).toBeLessThanOrEqual(Math.abs(v) * (5 * 10 ** -digits + 1e-15));
        expect(r!.mantissa).toBeGreaterThanOrEqual(1);
        expect(r!.mantissa).toBeLessThan(r!.prefixed ? 1000 : 10);
      }),
      { seed, numRuns: 2000 },
    );
  });
});
