/**
 * Engineering notation for reports: a value with an SI prefix chosen so the
 * mantissa lies in [1, 1000), e.g. 0.0047 A → "4.7 mA" (SI Brochure, 9th
 * ed., BIPM 2019, §3: prefixes).
 */

const PREFIXES: ReadonlyArray<readonly [number, string]> = [
  [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f'],
];

/**
 * Formats `value` in `unit` with an SI prefix and `digits` significant
 * digits (default 4), trailing zeros dropped. Values below 1e-18 print as
 * 0; non-finite values print plainly.
 */
export function formatSI(value: number, unit: string, digits = 4): string {
  const sep = unit ? ' ' : '';
  // Below an atto-unit a value is numerical dust (gmin currents, rounding): show it as zero.
  if (value === 0 || Math.abs(value) < 1e-18) return `0${sep}${unit}`;
  if (!Number.isFinite(value)) return `${value}${sep}${unit}`;
  for (const [scale, prefix] of PREFIXES) {
    const m = value / scale;
    if (Math.abs(m) >= 1 || scale === 1e-15) {
      let text = Number(m.toPrecision(digits)).toString();
      // Rounding can carry a mantissa to 1000: step up one prefix.
      if (Math.abs(Number(text)) >= 1000 && scale < 1e12) {
        const up = PREFIXES[PREFIXES.findIndex(([s]) => s === scale) - 1]!;
        return `${Number((value / up[0]).toPrecision(digits))}${unit || up[1] ? ' ' : ''}${up[1]}${unit}`;
      }
      if (text.includes('e')) text = m.toPrecision(digits);
      return `${text}${prefix || unit ? ' ' : ''}${prefix}${unit}`;
    }
  }
  return `${value}${sep}${unit}`;
}
