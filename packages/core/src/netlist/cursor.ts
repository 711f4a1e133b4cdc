/**
 * A cursor over one card's tokens, with the value readers every card
 * shares. A fatal mistake aborts the card (the reader then recovers at the
 * next logical line); lesser ones are reported and reading goes on.
 */
import type { Diagnostic } from '../errors.js';
import { errorAt } from '../errors.js';
import type { Assignments, CardOrigin, Value } from './ast.js';
import { parseExpr } from './expr.js';
import type { Located, LogicalLine, Token } from './lexer.js';
import { locate } from './lexer.js';
import { readNumberWord } from './numbers.js';

/** Thrown inside the reader to abandon the current card; never escapes it. */
export class CardAbort {
  constructor(readonly diagnostic: Diagnostic) {}
}

/** How a value position treats `%`. */
export interface ValueRules {
  /** `5%` reads as 0.05 here (ratios: tolerances, depths, falls). */
  readonly percent?: boolean;
  /** Message for a `%` where none is allowed, replacing the general one. */
  readonly percentMessage?: string;
}

/** An assignment key's token and its value token. */
export interface RawAssignment {
  readonly key: Token;
  readonly value: Token;
}

/** Cursor over the tokens of one logical line. */
export class Cursor {
  private i = 0;

  constructor(
    readonly line: LogicalLine,
    readonly tokens: readonly Token[],
    readonly report: (d: Diagnostic) => void,
  ) {}

  /** Where the card starts, for its {@link CardOrigin}. */
  origin(): CardOrigin {
    const first = this.tokens[0];
    const at = first ? { pos: first.pos, lineText: first.lineText } : locate(this.line, 0);
    return { pos: at.pos, lineText: this.line.segments[0]?.lineText ?? at.lineText };
  }

  peek(k = 0): Token | undefined {
    return this.tokens[this.i + k];
  }
  next(): Token | undefined {
    return this.tokens[this.i++];
  }
  get done(): boolean {
    return this.i >= this.tokens.length;
  }

  /** Just past the last token: where a missing item would have gone. */
  end(): Located {
    const last = this.tokens[this.tokens.length - 1];
    if (!last) return locate(this.line, this.line.text.length);
    return locate(this.line, last.start + last.text.length);
  }

  /** Builds an error at a token (or at the end of the card). */
  errorAt(code: string, message: string, at: Token | undefined, expected?: string): Diagnostic {
    const where = at ? { pos: at.pos, lineText: at.lineText } : this.end();
    return errorAt(code, message, where.pos, where.lineText, expected);
  }
  /** Reports an error and abandons the card. */
  fail(code: string, message: string, at: Token | undefined, expected?: string): never {
    throw new CardAbort(this.errorAt(code, message, at, expected));
  }
  /** Reports an error and goes on reading. */
  note(code: string, message: string, at: Token | undefined, expected?: string): void {
    this.report(this.errorAt(code, message, at, expected));
  }

  /** True when the next token is `word=` (an assignment). */
  atAssignment(): boolean {
    return this.peek()?.kind === 'word' && this.peek(1)?.kind === 'eq';
  }

  /** Reads a name (node, element, model...): a word. `what` names it in messages. */
  name(what: string, expected: string): Token {
    const t = this.peek();
    if (!t) this.fail('missing-item', `missing ${what}`, undefined, expected);
    if (t.kind !== 'word') this.fail('syntax', `expected ${what} but found ${show(t)}`, t, expected);
    this.i++;
    return t;
  }

  /** True when the token reads as a value (a number word or an expression). */
  isValue(t: Token | undefined, rules: ValueRules = {}): boolean {
    if (!t) return false;
    if (t.kind === 'expr') return true;
    return t.kind === 'word' && readNumberWord(t.text, rules.percent === true).ok;
  }

  /** Reads the next token as a value; `what` names it in messages. */
  value(what: string, expected: string, rules: ValueRules = {}): Value {
    const t = this.peek();
    if (!t) this.fail('missing-value', `missing ${what}`, undefined, expected);
    this.i++;
    return this.toValue(t, what, expected, rules);
  }

  /** Converts one token to a {@link Value}, aborting the card when it is not one. */
  toValue(t: Token, what: string, expected: string, rules: ValueRules = {}): Value {
    if (t.kind === 'expr') return this.expression(t);
    if (t.kind !== 'word') this.fail('bad-value', `expected ${what} but found ${show(t)}`, t, expected);
    const r = readNumberWord(t.text, rules.percent === true);
    if (r.ok) {
      return r.percent
        ? { kind: 'number', value: r.value, pos: t.pos, text: t.text, percent: true }
        : { kind: 'number', value: r.value, pos: t.pos, text: t.text };
    }
    if (r.reason === 'range') this.fail('bad-number', `the number "${t.text}" is out of range`, t, 'a finite number');
    if (r.reason === 'percent') {
      this.fail('bad-number', rules.percentMessage ?? `"${t.text}": a % sign is only allowed where a ratio is expected`, t, `${what} without %`);
    }
    const hint = /^[+-]?\d+[a-z\u00b5\u03bc]+\d+$/i.test(t.text) ? ' (a suffix ends a number: write 4.7k, not 4k7)' : '';
    this.fail('bad-number', `expected ${what} but found "${t.text}", which is not a number${hint}`, t, `${expected} (a number such as 4.7k or 10u, or a {expression})`);
  }

  private expression(t: Token): Value {
    const inner = t.text.slice(1, -1);
    const base = t.start + 1;
    const r = parseExpr(inner, (off) => locate(this.line, base + off).pos);
    if (r.ok) return { kind: 'expr', expr: r.expr, pos: t.pos, text: t.text };
    const at = locate(this.line, base + r.error.offset);
    throw new CardAbort(errorAt('bad-expression', r.error.message, at.pos, at.lineText, r.error.expected));
  }

  /** Reads `key = value` at the cursor (the caller checked {@link atAssignment}). */
  rawAssignment(): RawAssignment {
    const key = this.next() as Token;
    this.next(); // '='
    const value = this.peek();
    if (!value) this.fail('missing-value', `missing the value after "${key.text}="`, undefined, `a value for ${key.text}`);
    this.i++;
    return { key, value };
  }

  /**
   * Reads assignments up to the end of the card. `keyCase` folds the keys;
   * `accept` returns the value rules for a known key, or undefined for an
   * unknown one, reported with `known` as the expected list.
   */
  assignments(keyCase: 'lower' | 'upper', accept: (key: string) => ValueRules | undefined, known: string): Assignments {
    const out: Array<Assignments[number]> = [];
    const seen = new Set<string>();
    while (!this.done) {
      if (!this.atAssignment()) this.fail('syntax', `unexpected ${show(this.peek())}`, this.peek(), `name=value pairs (${known})`);
      const { key, value } = this.rawAssignment();
      const name = keyCase === 'lower' ? key.text.toLowerCase() : key.text.toUpperCase();
      const rules = accept(name);
      if (!rules) this.fail('unknown-key', `unknown name "${key.text}"`, key, known);
      if (seen.has(name)) this.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each name at most once');
      seen.add(name);
      out.push({ name, value: this.toValue(value, `a value for ${key.text}`, `${key.text}=<number or {expression}>`, rules), pos: key.pos });
    }
    return out;
  }

  /** Aborts unless the card has been read to its end. */
  expectEnd(expected: string): void {
    const t = this.peek();
    if (t) this.fail('syntax', `unexpected ${show(t)}`, t, expected);
  }
}

/** A token as quoted in messages. */
export function show(t: Token | undefined): string {
  if (!t) return 'end of line';
  return `"${t.text.length > 40 ? `${t.text.slice(0, 37)}...` : t.text}"`;
}
