/**
 * Lines and tokens (netlist.md, Lines): the title, `*` and `;` comments,
 * `+` continuations, blank lines and `.end`; then tokens with the physical
 * line and column each came from, so that every message can point at it.
 */
import type { Diagnostic, SourcePos } from '../errors.js';
import { errorAt } from '../errors.js';
import { MAX_CARD_TOKENS } from '../budgets.js';

/** A stretch of a logical line that came from one physical line. */
export interface Segment {
  /** Offset of the stretch in the logical line's text. */
  readonly start: number;
  /** 1-based physical line number. */
  readonly line: number;
  /** 1-based column of the stretch's first character in its physical line. */
  readonly column: number;
  /** The whole physical line, for quoting. */
  readonly lineText: string;
}

/** A card's text with its continuations joined, and the map back to physical lines. */
export interface LogicalLine {
  readonly file: string;
  readonly text: string;
  readonly segments: readonly Segment[];
  /** A physical line of it held a character the reader refuses (already reported). */
  readonly bad: boolean;
}

/** A position with the physical line it lies on. */
export interface Located {
  readonly pos: SourcePos;
  readonly lineText: string;
}

/** Maps an offset of a logical line back to file, line and column. */
export function locate(ll: LogicalLine, offset: number): Located {
  // Binary search: a card may gather thousands of continuation lines.
  let lo = 0;
  let hi = ll.segments.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if ((ll.segments[mid]?.start ?? 0) <= offset) lo = mid;
    else hi = mid - 1;
  }
  const seg = ll.segments[lo];
  if (!seg) return { pos: { file: ll.file, line: 1, column: 1 }, lineText: '' };
  return { pos: { file: ll.file, line: seg.line, column: seg.column + offset - seg.start }, lineText: seg.lineText };
}

/** What {@link splitLines} found in one file. */
export interface SplitResult {
  /** Line 1 as written, when the file has a title line. */
  readonly title: string | undefined;
  readonly lines: readonly LogicalLine[];
  readonly errors: readonly Diagnostic[];
}

/** Index of the `;` that starts an end-of-line comment, outside double quotes; -1 when none. */
function commentStart(raw: string): number {
  let quoted = false;
  for (let i = 0; i < raw.length; i++) {
    const c = raw[i];
    if (c === '"') quoted = !quoted;
    else if (c === ';' && !quoted) return i;
  }
  return -1;
}

/**
 * Column (0-based) and description of the first character the reader
 * refuses: control characters other than tab, vertical tab and form feed,
 * and UTF-16 surrogates that do not pair up.
 */
export function badCharacter(s: string): { index: number; what: string } | undefined {
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if ((c < 0x20 && c !== 9 && c !== 11 && c !== 12) || c === 0x7f) {
      return { index: i, what: `control character U+${c.toString(16).toUpperCase().padStart(4, '0')}` };
    }
    if (c >= 0xd800 && c <= 0xdbff) {
      const d = s.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        i++;
        continue;
      }
      return { index: i, what: 'an unpaired UTF-16 surrogate (the text is not valid Unicode)' };
    }
    if (c >= 0xdc00 && c <= 0xdfff) return { index: i, what: 'an unpaired UTF-16 surrogate (the text is not valid Unicode)' };
  }
  return undefined;
}

const END_CARD = /^\s*\.end(?:\s|$)/i;

/** Builder for one logical line. */
interface Pending {
  text: string;
  segments: Segment[];
  bad: boolean;
}

/**
 * Splits a file into logical lines. Blank lines and comment lines (first
 * non-blank character `*`) may sit between a card and its `+` continuation.
 * Reading stops at `.end`. Included files (`hasTitle` false) have no title.
 */
export function splitLines(text: string, file: string, hasTitle: boolean): SplitResult {
  const physical = text.split(/\r\n|\r|\n/);
  const lines: LogicalLine[] = [];
  const errors: Diagnostic[] = [];
  let title: string | undefined;
  let current: Pending | undefined;
  const flush = (): boolean => {
    if (!current) return false;
    const done = END_CARD.test(current.text);
    if (!done) lines.push({ file, text: current.text, segments: current.segments, bad: current.bad });
    current = undefined;
    return done;
  };
  for (let i = 0; i < physical.length; i++) {
    const raw = physical[i] ?? '';
    const lineNo = i + 1;
    if (hasTitle && i === 0) {
      title = raw;
      const bad = badCharacter(raw);
      if (bad) errors.push(errorAt('bad-character', `the title line holds ${bad.what}`, { file, line: 1, column: bad.index + 1 }, raw));
      continue;
    }
    const cut = commentStart(raw);
    const content = cut < 0 ? raw : raw.slice(0, cut);
    const first = content.search(/\S/);
    if (first < 0 || content[first] === '*') continue;
    const isContinuation = content[first] === '+';
    if (!isContinuation && flush()) return { title, lines, errors };
    const bad = badCharacter(content);
    if (bad) errors.push(errorAt('bad-character', `this line holds ${bad.what}`, { file, line: lineNo, column: bad.index + 1 }, raw));
    if (isContinuation) {
      if (!current) {
        errors.push(errorAt('stray-continuation', 'a continuation line (+) with no card before it to continue', { file, line: lineNo, column: first + 1 }, raw, 'an element or directive line before the "+" line'));
        continue;
      }
      current.text += ' ';
      current.segments.push({ start: current.text.length, line: lineNo, column: first + 2, lineText: raw });
      current.text += content.slice(first + 1);
      current.bad ||= bad !== undefined;
    } else {
      current = { text: content, segments: [{ start: 0, line: lineNo, column: 1, lineText: raw }], bad: bad !== undefined };
    }
  }
  flush();
  return { title, lines, errors };
}

/** Kinds of token. `expr` is a whole `{...}`; `string` a whole `"..."`. */
export type TokenKind = 'word' | 'expr' | 'string' | 'lparen' | 'rparen' | 'eq' | 'op';

/** One token of a logical line. */
export interface Token {
  readonly kind: TokenKind;
  /** As written (an `expr` keeps its braces, a `string` its quotes). */
  readonly text: string;
  /** Offset in the logical line. */
  readonly start: number;
  readonly pos: SourcePos;
  readonly lineText: string;
}

const PUNCT: Readonly<Record<string, TokenKind>> = { '(': 'lparen', ')': 'rparen', '=': 'eq' };

/** True for white space, as JavaScript's `\s` defines it (one test per character, so kept cheap). */
function isSpace(c: string): boolean {
  const k = c.charCodeAt(0);
  return k === 32 || (k >= 9 && k <= 13) || (k > 127 && /\s/.test(c));
}

const BREAKS = new Set([',', '(', ')', '{', '}', '=', '"', '<', '>', ';']);

/** True for characters that end a word. */
function isBreak(c: string): boolean {
  return BREAKS.has(c) || isSpace(c);
}

/**
 * Tokenises a logical line. Words are runs of characters other than white
 * space and `, ( ) { } = " < >`; commas separate like white space.
 */
export function tokenize(ll: LogicalLine): { tokens: Token[]; error?: Diagnostic } {
  const s = ll.text;
  const tokens: Token[] = [];
  const push = (kind: TokenKind, start: number, end: number): void => {
    const at = locate(ll, start);
    tokens.push({ kind, text: s.slice(start, end), start, pos: at.pos, lineText: at.lineText });
  };
  const fail = (offset: number, message: string, expected: string): { tokens: Token[]; error: Diagnostic } => {
    const at = locate(ll, offset);
    return { tokens, error: errorAt('syntax', message, at.pos, at.lineText, expected) };
  };
  let i = 0;
  while (i < s.length) {
    if (tokens.length >= MAX_CARD_TOKENS) {
      const at = locate(ll, 0);
      return { tokens: [], error: errorAt('budget-card-tokens', `the card has more than MAX_CARD_TOKENS = ${MAX_CARD_TOKENS} items`, at.pos, at.lineText, 'a shorter card (a pwl of at most about 100 000 points)') };
    }
    const c = s[i] ?? '';
    if (isSpace(c) || c === ',') {
      i++;
    } else if (PUNCT[c] !== undefined) {
      push(PUNCT[c], i, i + 1);
      i++;
    } else if (c === '<' || c === '>') {
      const len = s[i + 1] === '=' ? 2 : 1;
      push('op', i, i + len);
      i += len;
    } else if (c === '{') {
      const close = s.indexOf('}', i + 1);
      if (close < 0) return fail(i, 'an expression "{" is never closed', 'a closing "}"');
      push('expr', i, close + 1);
      i = close + 1;
    } else if (c === '}') {
      return fail(i, 'a "}" with no "{" before it', 'a value, a name or "{expression}"');
    } else if (c === '"') {
      const close = s.indexOf('"', i + 1);
      if (close < 0) return fail(i, 'a quoted string is never closed', 'a closing double quote (")');
      push('string', i, close + 1);
      i = close + 1;
    } else {
      let j = i + 1;
      while (j < s.length && !isBreak(s[j] ?? '')) j++;
      push('word', i, j);
      i = j;
    }
  }
  return { tokens };
}
