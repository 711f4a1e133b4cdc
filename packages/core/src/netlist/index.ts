/**
 * The netlist reader (netlist.md): text → {@link Netlist}, with every
 * mistake reported as a {@link Diagnostic} naming file, line and column.
 *
 * Names keep their spelling. Node `0` is ground; `gnd` (any case) is left
 * as written and folded to ground by the elaborator. Parameters are not
 * evaluated here: values hold their `{expr}` for the elaborator, which knows
 * the scopes; the reader only checks expression syntax.
 */
import type { Diagnostic } from '../errors.js';
import { RailcheckError, errorAt, warningAt } from '../errors.js';
import { argumentDiagnostic, optionsProblem } from '../arguments.js';
import { NETLISTS } from './brand.js';
import type { Netlist } from './ast.js';
import { checkNetlist } from './checks.js';
import { Cursor } from './cursor.js';
import { DISK, callerSource, readTopFile, topFrame } from './include.js';
import { tokenize } from './lexer.js';
import { ELEMENT_LETTERS, parseElement } from './parse-elements.js';
import { DIRECTIVES, addError, checkSize, readCards } from './reader.js';
import type { ReadContext } from './reader.js';

export type * from './ast.js';
export { evaluateExpr, printExpr, parseExpr, EXPR_FUNCTIONS, MAX_EXPR_NESTING, MAX_EXPR_HEIGHT } from './expr.js';
export { parseScaledNumber } from './numbers.js';
export { printNetlist, printValue } from './print.js';
export { NETLISTS, netlistShapeProblem } from './brand.js';
export { figureKindOf, FIGURE_KINDS } from './parse-supply.js';
export { TRAN_FLAGS } from './parse-directives.js';
export { MAX_ERRORS, MAX_INPUT_LENGTH, MAX_SUBCKT_NESTING } from './reader.js';
export { MAX_FILE_BYTES, MAX_INCLUDE_DEPTH } from './include.js';

/** How to read a netlist. */
export interface ParseOptions {
  /** File name used in diagnostics and as the base for includes; default '<input>' (includes then resolve against the working folder). */
  file?: string;
  /**
   * Reads an included file (absolute path) → its text, or undefined if missing. Default: the disk, where
   * links are followed for the folder check, only regular files are read, and at most MAX_FILE_BYTES of each.
   */
  readFile?: (absolutePath: string) => string | undefined;
  /** Allow .include paths that leave the including file's folder tree. Default false. */
  allowOutsideIncludes?: boolean;
}

/** The outcome of reading: a netlist, or every error found; warnings either way. */
export type ParseResult =
  | { ok: true; netlist: Netlist; warnings: Diagnostic[] }
  | { ok: false; errors: Diagnostic[]; warnings: Diagnostic[] };

/**
 * True when the title line would read as a card: a known directive, or an
 * element line that parses without a single complaint. Titles such as
 * "Regulator test" (R + two words, no value) therefore do not warn.
 */
function looksLikeCard(title: string, file: string): boolean {
  const text = title.split(';')[0] ?? '';
  const line = { file, text, segments: [{ start: 0, line: 1, column: 1, lineText: title }], bad: false };
  const { tokens, error } = tokenize(line);
  const first = tokens[0];
  if (error || !first || first.kind !== 'word') return false;
  if (first.text.startsWith('.')) return DIRECTIVES.includes(first.text.slice(1).toLowerCase());
  if (!ELEMENT_LETTERS.includes((first.text[0] ?? '').toUpperCase())) return false;
  let complaints = 0;
  try {
    parseElement(new Cursor(line, tokens, () => complaints++));
    return complaints === 0;
  } catch {
    return false;
  }
}

function parseInner(text: string, options: ParseOptions): ParseResult {
  const file = options.file ?? '<input>';
  const source = options.readFile ? callerSource(options.readFile) : DISK;
  const ctx: ReadContext = {
    source,
    allowOutsideIncludes: options.allowOutsideIncludes === true,
    errors: [],
    warnings: [],
    stack: [],
    stopped: false,
    totals: { cards: 0, includes: 0, includedCharacters: 0 },
  };
  if (typeof text !== 'string') {
    return { ok: false, errors: [errorAt('bad-input', `the netlist must be text, not ${typeof text}`)], warnings: [] };
  }
  if (!checkSize(ctx, text, file)) return { ok: false, errors: ctx.errors, warnings: ctx.warnings };
  const body = text.startsWith('\ufeff') ? text.slice(1) : text;
  const { title, cards } = readCards(ctx, body, topFrame(file, source), true);
  if (title !== undefined && looksLikeCard(title, file)) {
    ctx.warnings.push(warningAt('title-looks-like-card', 'line 1 is always the title; this one looks like an element or directive and was read as the title only', { file, line: 1, column: 1 }, title));
  }
  if (!ctx.stopped) for (const d of checkNetlist(cards)) addError(ctx, d);
  if (ctx.errors.length > 0) return { ok: false, errors: ctx.errors, warnings: ctx.warnings };
  return { ok: true, netlist: NETLISTS.mark({ title: title ?? '', file, cards }), warnings: ctx.warnings };
}

/** The members of ParseOptions and their types, checked at the boundary. */
const PARSE_OPTIONS = { file: 'string', readFile: 'function', allowOutsideIncludes: 'boolean' } as const;

/**
 * Reads a netlist from text. Never throws: every problem, even an internal
 * failure, comes back as a diagnostic.
 */
export function parseNetlist(text: string, options: ParseOptions = {}): ParseResult {
  const wrong = typeof text !== 'string' ? argumentDiagnostic('parseNetlist', 'text', 'a string', text) : optionsProblem('parseNetlist', options, PARSE_OPTIONS);
  if (wrong) return { ok: false, errors: [wrong], warnings: [] };
  try {
    return parseInner(text, options);
  } catch (e) {
    const why = e instanceof RangeError ? 'the input is too deeply structured' : 'an internal error';
    return { ok: false, errors: [errorAt('internal', `the netlist could not be read (${why}): ${e instanceof Error ? e.message : String(e)}`)], warnings: [] };
  }
}

/**
 * Reads a netlist from text.
 * @throws {RailcheckError} carrying every error found (and nothing else is ever thrown).
 */
export function parseNetlistOrThrow(text: string, options: ParseOptions = {}): { netlist: Netlist; warnings: Diagnostic[] } {
  const r = parseNetlist(text, options);
  if (!r.ok) throw new RailcheckError(r.errors);
  return { netlist: r.netlist, warnings: r.warnings };
}

/**
 * Reads a netlist file (UTF-8) with `options.readFile` or from disk (a
 * regular file of at most MAX_FILE_BYTES bytes). An unreadable or refused
 * file is an ok:false result, not an exception.
 */
export function readNetlistFile(path: string, options: Omit<ParseOptions, 'file'> = {}): ParseResult {
  const wrong = typeof path !== 'string' ? argumentDiagnostic('readNetlistFile', 'path', 'a string', path) : optionsProblem('readNetlistFile', options, PARSE_OPTIONS);
  if (wrong) return { ok: false, errors: [wrong], warnings: [] };
  const top = readTopFile(path, options.readFile ? callerSource(options.readFile) : DISK);
  if (!top.ok) return { ok: false, errors: [errorAt(top.code, top.message, undefined, undefined, top.expected)], warnings: [] };
  return parseNetlist(top.text, { ...options, file: path });
}
