/**
 * The project's own error type and diagnostics. Every problem a user can
 * cause (a netlist mistake, an analysis that cannot be solved) is reported as
 * a {@link Diagnostic}; code that throws, throws only {@link RailcheckError}.
 */

/** A place in a netlist file: 1-based line and column. */
export interface SourcePos {
  /** File name as given to the reader (or `<input>`). */
  readonly file: string;
  /** 1-based physical line number. */
  readonly line: number;
  /** 1-based column of the offending token. */
  readonly column: number;
}

/** One message for the user: an error stops the run, a warning does not. */
export interface Diagnostic {
  readonly severity: 'error' | 'warning';
  /** Short stable identifier of the kind of problem, e.g. `unknown-model`. */
  readonly code: string;
  /** What is wrong, naming the offending input. */
  readonly message: string;
  /** What the reader expected at that place, when that can be said. */
  readonly expected?: string;
  /** Where it is; absent only for problems that belong to no line. */
  readonly pos?: SourcePos;
  /** The physical source line, quoted in reports. */
  readonly lineText?: string;
}

/** The only exception type railcheck throws; carries one or more diagnostics. */
export class RailcheckError extends Error {
  /** Every problem found, in source order. */
  readonly diagnostics: readonly Diagnostic[];

  /** Throws a RailcheckError (`bad-argument`) itself when `diagnostics` is not a list of diagnostics. */
  constructor(diagnostics: readonly Diagnostic[]) {
    const wrong = Array.isArray(diagnostics) ? diagnostics.map(diagnosticProblem).find((p) => p !== undefined) : 'diagnostics is not an array';
    if (wrong !== undefined) throw new RailcheckError([badArgument('RailcheckError', wrong)]);
    super(diagnostics.map(formatDiagnostic).join('\n'));
    this.name = 'RailcheckError';
    this.diagnostics = diagnostics;
  }
}

/** A diagnostic for a wrong argument of a public function in this file (arguments.ts has the general ones; it imports this file). */
function badArgument(fn: string, what: string): Diagnostic {
  return { severity: 'error', code: 'bad-argument', message: `${fn}: ${what}`, expected: 'the documented argument types (see its TSDoc)' };
}

/** What is wrong with `p` as a SourcePos, or undefined: a string file and whole line and column numbers of at least 1. */
function posProblem(p: unknown): string | undefined {
  if (typeof p !== 'object' || p === null) return 'pos is not an object';
  const { file, line, column } = p as Record<string, unknown>;
  if (typeof file !== 'string') return 'pos.file is not a string';
  for (const [name, v] of [['line', line], ['column', column]] as const) {
    if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < 1) return `pos.${name} is not a whole number of at least 1`;
  }
  return undefined;
}

/** What is wrong with `d` as a Diagnostic, or undefined. */
function diagnosticProblem(d: unknown): string | undefined {
  if (typeof d !== 'object' || d === null) return 'a diagnostic is not an object';
  const r = d as Record<string, unknown>;
  if (r['severity'] !== 'error' && r['severity'] !== 'warning') return "a diagnostic's severity is neither 'error' nor 'warning'";
  for (const name of ['code', 'message'] as const) if (typeof r[name] !== 'string') return `a diagnostic's ${name} is not a string`;
  for (const name of ['expected', 'lineText'] as const) if (r[name] !== undefined && typeof r[name] !== 'string') return `a diagnostic's ${name} is neither absent nor a string`;
  return r['pos'] === undefined ? undefined : posProblem(r['pos']);
}

/** Checks the arguments of errorAt and warningAt. */
function checkParts(fn: string, code: unknown, message: unknown, pos: unknown, lineText: unknown, expected: unknown): void {
  const wrong =
    typeof code !== 'string' ? 'code is not a string'
    : typeof message !== 'string' ? 'message is not a string'
    : pos !== undefined ? posProblem(pos)
    : undefined;
  const extra = wrong ?? (lineText !== undefined && typeof lineText !== 'string' ? 'lineText is neither absent nor a string' : expected !== undefined && typeof expected !== 'string' ? 'expected is neither absent nor a string' : undefined);
  if (extra !== undefined) throw new RailcheckError([badArgument(fn, extra)]);
}

/** Builds an error diagnostic. Throws RailcheckError (`bad-argument`) when a part has the wrong type or `pos` is not a place (file, line ≥ 1, column ≥ 1). */
export function errorAt(code: string, message: string, pos?: SourcePos, lineText?: string, expected?: string): Diagnostic {
  checkParts('errorAt', code, message, pos, lineText, expected);
  return {
    severity: 'error',
    code,
    message,
    ...(expected !== undefined ? { expected } : {}),
    ...(pos !== undefined ? { pos } : {}),
    ...(lineText !== undefined ? { lineText } : {}),
  };
}

/** Builds a warning diagnostic; throws as {@link errorAt} does. */
export function warningAt(code: string, message: string, pos?: SourcePos, lineText?: string): Diagnostic {
  checkParts('warningAt', code, message, pos, lineText, undefined);
  return { ...errorAt(code, message, pos, lineText), severity: 'warning' };
}

/**
 * Renders a diagnostic as the user sees it:
 * `file:line:col: error: message` / the quoted line / a caret / `expected: ...`.
 * Throws RailcheckError (`bad-argument`) when `d` is not a diagnostic.
 */
export function formatDiagnostic(d: Diagnostic): string {
  const wrong = diagnosticProblem(d);
  if (wrong !== undefined) throw new RailcheckError([badArgument('formatDiagnostic', wrong)]);
  const where = d.pos ? `${d.pos.file}:${d.pos.line}:${d.pos.column}: ` : '';
  const lines = [`${where}${d.severity}: ${d.message}`];
  if (d.lineText !== undefined && d.pos) {
    lines.push(`  | ${d.lineText}`);
    // The caret stands at most one past the quoted line, however large the column.
    lines.push(`  | ${' '.repeat(Math.min(Math.max(0, d.pos.column - 1), d.lineText.length))}^`);
  }
  if (d.expected !== undefined) lines.push(`  expected: ${d.expected}`);
  return lines.join('\n');
}
