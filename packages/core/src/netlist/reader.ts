/**
 * The reading loop: logical lines → cards, with `.subckt` nesting and
 * `.include` expansion in place. Each card that fails is reported and
 * skipped, so one pass reports every mistake in a file.
 */
import type { Diagnostic } from '../errors.js';
import { errorAt } from '../errors.js';
import { MAX_CARDS, MAX_INCLUDED_CHARACTERS, MAX_INCLUDES } from '../budgets.js';
import type { Card, CardOrigin } from './ast.js';
import { CardAbort, Cursor } from './cursor.js';
import { resolveInclude } from './include.js';
import type { FileSource, IncludeFrame } from './include.js';
import type { LogicalLine } from './lexer.js';
import { splitLines, tokenize } from './lexer.js';
import { parseElement } from './parse-elements.js';
import { parseAnalysis, parseEnds, parseIncludePath, parseModel, parseParam, parseSubcktHeader } from './parse-directives.js';
import type { SubcktHeader } from './parse-directives.js';
import { parseFigure, parseLimit, parseSpread, parseSupply } from './parse-supply.js';

/** Most errors collected before reading stops (a binary file would otherwise yield one per line). */
export const MAX_ERRORS = 1000;
/** Deepest `.subckt` nesting accepted. */
export const MAX_SUBCKT_NESTING = 64;
/** Largest file accepted, in UTF-16 code units. */
export const MAX_INPUT_LENGTH = 32 * 1024 * 1024;

/** Directives the reader knows, for messages. */
export const DIRECTIVES: readonly string[] = [
  'model', 'param', 'subckt', 'ends', 'include', 'op', 'dc', 'tran', 'ac', 'temp', 'supply', 'figure', 'limit', 'spread', 'end',
];

/** State shared by a file and everything it includes. */
export interface ReadContext {
  /** Where files come from: the disk, or the caller's reader. */
  readonly source: FileSource;
  readonly allowOutsideIncludes: boolean;
  readonly errors: Diagnostic[];
  readonly warnings: Diagnostic[];
  /** Files being read, outermost first (for include cycles). */
  readonly stack: IncludeFrame[];
  stopped: boolean;
  /** Cards read, includes expanded and characters read from included files so far, for MAX_CARDS, MAX_INCLUDES and MAX_INCLUDED_CHARACTERS. */
  readonly totals: { cards: number; includes: number; includedCharacters: number };
}

interface OpenSubckt {
  readonly origin: CardOrigin;
  readonly header: SubcktHeader;
  readonly body: Card[];
}

/** Adds an error, stopping the read once {@link MAX_ERRORS} have piled up. */
export function addError(ctx: ReadContext, d: Diagnostic): void {
  if (ctx.stopped) return;
  ctx.errors.push(d);
  if (ctx.errors.length >= MAX_ERRORS) {
    ctx.errors.push(errorAt('too-many-errors', `more than ${MAX_ERRORS} errors; reading stopped`));
    ctx.stopped = true;
  }
}

/** Refuses texts too large to be a netlist before any work is done on them. */
export function checkSize(ctx: ReadContext, text: string, file: string): boolean {
  if (text.length <= MAX_INPUT_LENGTH) return true;
  addError(ctx, errorAt('input-too-large', `${file} is ${text.length} characters long; the reader accepts at most ${MAX_INPUT_LENGTH}`, undefined, undefined, 'a netlist file of reasonable size'));
  return false;
}

/**
 * Reads one file's cards. `frame` names the file (its display name for
 * messages and its absolute path for includes); `hasTitle` is true for the
 * top file only.
 */
export function readCards(ctx: ReadContext, text: string, frame: IncludeFrame, hasTitle: boolean): { title: string | undefined; cards: Card[] } {
  const split = splitLines(text, frame.display, hasTitle);
  for (const e of split.errors) addError(ctx, e);
  const root: Card[] = [];
  const open: OpenSubckt[] = [];
  ctx.stack.push(frame);
  for (const line of split.lines) {
    if (ctx.stopped) break;
    if (!line.bad) readLine(ctx, line, root, open);
  }
  ctx.stack.pop();
  while (open.length > 0) {
    const s = open[open.length - 1] as OpenSubckt;
    addError(ctx, errorAt('unterminated-subckt', `.subckt ${s.header.name} is never closed in this file`, s.origin.pos, s.origin.lineText, `.ends ${s.header.name}`));
    closeSubckt(open, root);
  }
  return { title: split.title, cards: root };
}

function closeSubckt(open: OpenSubckt[], root: Card[]): void {
  const s = open.pop();
  if (!s) return;
  const parent = open.length > 0 ? (open[open.length - 1] as OpenSubckt).body : root;
  parent.push({ ...s.origin, kind: 'subckt', name: s.header.name, ports: s.header.ports, defaults: s.header.defaults, body: s.body });
}

function readLine(ctx: ReadContext, line: LogicalLine, root: Card[], open: OpenSubckt[]): void {
  const { tokens, error } = tokenize(line);
  if (error) {
    addError(ctx, error);
    return;
  }
  if (tokens.length === 0) return;
  const c = new Cursor(line, tokens, (d) => addError(ctx, d));
  if (++ctx.totals.cards > MAX_CARDS) {
    // Reading stops here: past the budget nothing more is read, included or kept.
    const at = c.origin();
    addError(ctx, errorAt('budget-cards', `the netlist and its includes have more than MAX_CARDS = ${MAX_CARDS} cards; reading stopped here`, at.pos, at.lineText, 'a smaller netlist'));
    ctx.stopped = true;
    return;
  }
  const target = open.length > 0 ? (open[open.length - 1] as OpenSubckt).body : root;
  try {
    const card = readCard(ctx, c, root, open, target);
    if (card) target.push(card);
  } catch (e) {
    if (!(e instanceof CardAbort)) throw e;
    addError(ctx, e.diagnostic);
  }
}

/** Reads one card; returns it, or undefined for block and include lines handled here. */
function readCard(ctx: ReadContext, c: Cursor, root: Card[], open: OpenSubckt[], target: Card[]): Card | undefined {
  const first = c.peek();
  if (!first || first.kind !== 'word') {
    return c.fail('syntax', `a line cannot start with "${first?.text ?? ''}"`, first, 'an element name (R1, Q2, ...) or a directive (.model, .param, ...)');
  }
  if (!first.text.startsWith('.')) return parseElement(c);
  const kw = first.text.slice(1).toLowerCase();
  switch (kw) {
    case 'model': return parseModel(c);
    case 'param': return parseParam(c);
    case 'op': case 'dc': case 'tran': case 'ac': case 'temp': return parseAnalysis(c, kw);
    case 'supply': return parseSupply(c);
    case 'figure': return parseFigure(c);
    case 'limit': return parseLimit(c);
    case 'spread': return parseSpread(c);
    case 'subckt': {
      const origin = c.origin();
      if (open.length >= MAX_SUBCKT_NESTING) c.fail('nesting-too-deep', `subcircuit definitions nest more than ${MAX_SUBCKT_NESTING} deep`, first, 'fewer nested .subckt definitions');
      open.push({ origin, header: parseSubcktHeader(c), body: [] });
      return undefined;
    }
    case 'ends': {
      const name = parseEnds(c);
      const top = open[open.length - 1];
      if (!top) c.fail('stray-ends', '.ends with no open .subckt', first, 'a .subckt line before it');
      if (name && name.text.toLowerCase() !== top.header.name.toLowerCase()) {
        c.note('ends-mismatch', `.ends ${name.text} closes .subckt ${top.header.name} (opened at line ${top.origin.pos.line})`, name, `.ends ${top.header.name}`);
      }
      closeSubckt(open, root);
      return undefined;
    }
    case 'include': {
      const { path, at } = parseIncludePath(c);
      if (++ctx.totals.includes > MAX_INCLUDES) {
        c.fail('budget-includes', `more than MAX_INCLUDES = ${MAX_INCLUDES} includes expanded, all levels together`, at, 'fewer includes');
      }
      const frame = resolveInclude(ctx, c, path, at);
      const text = frame.text;
      ctx.totals.includedCharacters += text.length;
      if (ctx.totals.includedCharacters > MAX_INCLUDED_CHARACTERS) {
        c.fail('budget-included-characters', `the included files hold more than MAX_INCLUDED_CHARACTERS = ${MAX_INCLUDED_CHARACTERS} characters together (${ctx.totals.includedCharacters} with ${frame.display})`, at, 'fewer or smaller included files');
      }
      if (!checkSize(ctx, text, frame.display)) return undefined;
      const sub = readCards(ctx, text, frame, false);
      for (const card of sub.cards) target.push(card);
      return undefined;
    }
    default:
      return c.fail('unknown-directive', `unknown directive "${first.text}"`, first, DIRECTIVES.map((d) => `.${d}`).join(' '));
  }
}
