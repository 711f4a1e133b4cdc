/**
 * Numbers as netlists write them (netlist.md, Numbers): a decimal mantissa,
 * an optional scale suffix, and unit letters that are ignored. The suffixes
 * are the SI prefixes (BIPM, The International System of Units, 9th ed.,
 * 2019, table 7) in the trade's spelling: `u`/`µ` micro, and `meg` for mega
 * because `m` (any case) is milli.
 */
import { checkString } from '../arguments.js';

/** Scale suffixes (netlist.md, Numbers) as powers of ten; `meg` is handled apart because `m` is milli. */
const SUFFIX_EXP: Readonly<Record<string, number>> = {
  f: -15,
  p: -12,
  n: -9,
  u: -6,
  '\u00b5': -6, // MICRO SIGN, as in the contract
  '\u03bc': -6, // GREEK SMALL LETTER MU, which keyboards often produce instead
  m: -3,
  k: 3,
  g: 9,
  t: 12,
};

const MANTISSA = /([+-]?)(\d+\.?\d*|\.\d+)(?:[eE]([+-]?\d+))?/y;
const UNIT_LETTERS = /\p{L}*/uy;

/** Result of scanning a number at some offset of a string. */
export interface NumberScan {
  /** The value with the suffix applied; may be ±Infinity when the written number is out of range. */
  readonly value: number;
  /** Offset just past the mantissa, suffix and unit letters. */
  readonly end: number;
}

/**
 * Combines mantissa digits with a decimal exponent through one string
 * conversion, so that `4.7k` gives exactly the double nearest 4700 (no
 * rounding from a separate multiplication).
 */
function compose(sign: string, digits: string, exponent: number): number {
  // Beyond ±1e9 the exponent would print in e-notation itself; the value is 0 or infinite anyway.
  const v = Math.abs(exponent) > 1e9 || !Number.isFinite(exponent)
    ? (exponent > 0 && Number(digits) !== 0 ? Infinity : 0)
    : Number(`${digits}e${exponent}`);
  return sign === '-' ? -v : v;
}

/**
 * Scans a number (mantissa, optional suffix, unit letters) starting at
 * `start`; undefined when no mantissa starts there. Used by value tokens and
 * by the expression lexer alike.
 */
export function scanNumber(s: string, start: number): NumberScan | undefined {
  MANTISSA.lastIndex = start;
  const m = MANTISSA.exec(s);
  if (!m) return undefined;
  const sign = m[1] ?? '';
  const digits = m[2] ?? '0';
  let exponent = m[3] === undefined ? 0 : Number(m[3]);
  let pos = MANTISSA.lastIndex;
  if (s.slice(pos, pos + 3).toLowerCase() === 'meg') {
    exponent += 6;
    pos += 3;
  } else {
    const ch = s[pos];
    const sfx = ch === undefined ? undefined : SUFFIX_EXP[ch.toLowerCase()];
    if (sfx !== undefined) {
      exponent += sfx;
      pos += 1;
    }
  }
  UNIT_LETTERS.lastIndex = pos;
  const unit = UNIT_LETTERS.exec(s);
  pos += unit ? unit[0].length : 0;
  return { value: compose(sign, digits, exponent), end: pos };
}

/**
 * Parses a number with scale suffix and ignored unit letters
 * (netlist.md, Numbers): `'4.7k'` → 4700, `'10uF'` → 1e-5, `'1meg'` → 1e6,
 * `'100mA'` → 0.1. Surrounding white space is ignored.
 * @returns the value, or undefined when the text is not a finite number.
 * Throws RailcheckError (`bad-argument`) when `text` is not a string.
 */
export function parseScaledNumber(text: string): number | undefined {
  checkString('parseScaledNumber', 'text', text);
  const s = text.trim();
  const scan = scanNumber(s, 0);
  if (!scan || scan.end !== s.length || !Number.isFinite(scan.value)) return undefined;
  return scan.value;
}

/** How a word in a value position reads as a number. */
export type NumberReading =
  | { readonly ok: true; readonly value: number; readonly percent: boolean }
  | { readonly ok: false; readonly reason: 'syntax' | 'range' | 'percent' };

const PERCENT = /^([+-]?)(\d+\.?\d*|\.\d+)(?:[eE]([+-]?\d+))?%$/;

/**
 * Reads a word as a number; where `allowPercent`, `5%` reads as the ratio
 * 0.05 (netlist.md, Numbers). Distinguishes a malformed word, an
 * out-of-range number and a `%` where none is allowed, for messages.
 */
export function readNumberWord(text: string, allowPercent: boolean): NumberReading {
  const pm = PERCENT.exec(text);
  if (pm) {
    if (!allowPercent) return { ok: false, reason: 'percent' };
    const exp = pm[3] === undefined ? 0 : Number(pm[3]);
    const value = compose(pm[1] ?? '', pm[2] ?? '0', exp - 2);
    return Number.isFinite(value) ? { ok: true, value, percent: true } : { ok: false, reason: 'range' };
  }
  const scan = scanNumber(text, 0);
  if (!scan || scan.end !== text.length) return { ok: false, reason: text.includes('%') ? 'percent' : 'syntax' };
  if (!Number.isFinite(scan.value)) return { ok: false, reason: 'range' };
  return { ok: true, value: scan.value, percent: false };
}

/** Splits a finite number into decimal mantissa digits and exponent such that `${m}e${e}` reads back exactly. */
function splitExponent(value: number): { mantissa: string; exponent: number } {
  const [m, e] = value.toExponential().split('e');
  return { mantissa: m ?? '0', exponent: Number(e ?? '0') };
}

/** Shortest text that {@link parseScaledNumber} reads back as exactly `value` (finite values only). */
export function formatNumber(value: number): string {
  if (Object.is(value, -0)) return '-0';
  return String(value);
}

/** Text `N%` that {@link readNumberWord} reads back (as a ratio) as exactly `value`. */
export function formatPercent(value: number): string {
  if (value === 0) return Object.is(value, -0) ? '-0%' : '0%';
  const { mantissa, exponent } = splitExponent(value);
  return `${mantissa}e${exponent + 2}%`;
}
