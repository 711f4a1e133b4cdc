/**
 * What the fuzz worker is asked and answers, and the checks on a report's
 * text and numbers: no NaN or Infinity in the numbers of a successful
 * report, and no `NaN`, `Infinity` or out-of-range SI prefix (such as
 * "1.000e+21 TV") in what a person reads (house rule: a figure that
 * cannot be measured says so and why, never NaN/Infinity; docs/output.md,
 * "Numbers"). Text that merely repeats the netlist (a title, a node named
 * `nan`) is not held against the output.
 */

/** One case sent to the worker. */
export interface CaseRequest {
  readonly text: string;
  readonly lib: string;
  readonly flags: readonly string[];
  /** Also run the command line in-process on it. */
  readonly viaCommand: boolean;
}

/** The class of a case: clean result, clean error, or one of the three failures (hangs are decided by the pool). */
export type CaseOutcome =
  | { readonly kind: 'ok'; readonly detail: string }
  | { readonly kind: 'clean-error'; readonly detail: string; readonly unlocated: boolean }
  | { readonly kind: 'crash' | 'non-finite' | 'hang'; readonly detail: string };

const UNIT = String.raw`(?:[TGMkmµnpf]?(?:V|A|W|s|Hz|Ω|F|H)\b|dB|%|°C)`;
const NON_FINITE_WORD = /(?<![\w.])-?(?:NaN|Infinity)(?!\w)/g;
const NON_FINITE_NUMBER = new RegExp(String.raw`(?<![\w.])-?(?:NaN|Infinity)\s*${UNIT}`, 'g');
/** A number in exponent notation, or of four or more integer digits, in front of an SI prefix and unit: beyond the prefixes. */
const ABSURD_PREFIX = /(?<![\w.])-?(?:\d+(?:\.\d+)?e[+-]?\d+|\d{4,}(?:\.\d+)?) [TGMkmµnpf](?:V|A|W|s|Hz|Ω|F|H)\b/g;

/** The first offending piece of `out` that does not occur in the netlist `input`, or undefined. */
export function badText(out: string, input: string): string | undefined {
  const echoesWord = /(?<!\w)(nan|inf|infinity)(?!\w)/i.test(input);
  for (const re of [echoesWord ? NON_FINITE_NUMBER : NON_FINITE_WORD, ABSURD_PREFIX]) {
    for (const m of out.matchAll(re)) {
      if (input.includes(m[0])) continue;
      const at = m.index ?? 0;
      const lineStart = out.lastIndexOf('\n', at) + 1;
      const lineEnd = out.indexOf('\n', at);
      return out.slice(lineStart, lineEnd < 0 ? undefined : lineEnd).trim();
    }
  }
  return undefined;
}

/** The path of the first non-finite number (or bad text) in a JSON value, or undefined. */
export function nonFiniteIn(value: unknown, input: string, path = '$'): string | undefined {
  if (typeof value === 'number') return Number.isFinite(value) ? undefined : `${path} = ${value}`;
  if (typeof value === 'string') {
    const bad = badText(value, input);
    return bad ? `${path}: ${bad}` : undefined;
  }
  if (value === null || typeof value !== 'object') return undefined;
  // Typed arrays and plain arrays alike.
  const entries: [string, unknown][] = ArrayBuffer.isView(value) ? [...(value as unknown as ArrayLike<number> & Iterable<number>)].map((v, k) => [String(k), v]) : Object.entries(value);
  for (const [k, v] of entries) {
    const bad = nonFiniteIn(v, input, `${path}.${k}`);
    if (bad) return bad;
  }
  return undefined;
}
