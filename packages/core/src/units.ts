/**
 * Engineering notation for reports: a value with an SI prefix chosen so the
 * mantissa lies in [1, 1000), e.g. 0.0047 A → "4.7 mA" (SI Brochure, 9th
 * ed., BIPM 2019, §3: prefixes). Only the prefixes from tera to femto are
 * used, the range a supply stage's quantities lie in; a magnitude outside
 * it is written in plain exponent notation ("1.5e+15 V"), never with a
 * stretched prefix, and a value that is not a finite number is written as
 * "not finite", never NaN or Infinity (docs/output.md, "Numbers").
 */
import { argumentError } from './arguments.js';

const PREFIXES: Readonly<Record<number, string>> = { 12: 'T', 9: 'G', 6: 'M', 3: 'k', 0: '', [-3]: 'm', [-6]: 'µ', [-9]: 'n', [-12]: 'p', [-15]: 'f' };

/** What formatSI prints for a value that is not a finite number. */
export const NOT_FINITE_TEXT = 'not finite';

/**
 * Formats `value` in `unit` with an SI prefix and `digits` significant
 * digits (an integer from 1 to 17, default 4), trailing zeros dropped.
 * Values below 1e-18 in magnitude print as 0 (numerical dust: gmin
 * currents, rounding); magnitudes from 1e-18 up to 1e-15 and from 1e15 up
 * print in exponent notation with the bare unit; NaN and ±Infinity print
 * as `not finite`. Throws RailcheckError (`bad-argument`) when
 * `value` is not a number, `unit` not a string or `digits` out of range.
 */
export function formatSI(value: number, unit: string, digits = 4): string {
  if (typeof value !== 'number') throw argumentError('formatSI', 'value', 'a number', value);
  if (typeof unit !== 'string') throw argumentError('formatSI', 'unit', 'a string', unit);
  if (typeof digits !== 'number' || !Number.isInteger(digits) || digits < 1 || digits > 17) throw argumentError('formatSI', 'digits', 'an integer from 1 to 17', digits);
  const sep = unit ? ' ' : '';
  if (!Number.isFinite(value)) return NOT_FINITE_TEXT;
  if (value === 0 || Math.abs(value) < 1e-18) return `0${sep}${unit}`;
  // Round first, so that a mantissa carried to 1000 takes the next prefix.
  const [mantissa, exponent] = value.toExponential(digits - 1).split('e') as [string, string];
  const power = Number(exponent);
  const engineering = 3 * Math.floor(power / 3);
  const prefix = PREFIXES[engineering];
  if (prefix === undefined) return `${Number(mantissa)}e${power >= 0 ? '+' : ''}${power}${sep}${unit}`;
  const m = Number(`${mantissa}e${power - engineering}`);
  return `${m}${prefix || unit ? ' ' : ''}${prefix}${unit}`;
}
