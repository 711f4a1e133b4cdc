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

  constructor(diagnostics: readonly Diagnostic[]) {
    super(diagnostics.map(formatDiagnostic).join('\n'));
    this.name = 'RailcheckError';
    this.diagnostics = diagnostics;
  }
}

/** Builds an error diagnostic. */
export function errorAt(code: string, message: string, pos?: SourcePos, lineText?: string, expected?: string): Diagnostic {
  return {
    severity: 'error',
    code,
    message,
    ...(expected !== undefined ? { expected } : {}),
    ...(pos !== undefined ? { pos } : {}),
    ...(lineText !== undefined ? { lineText } : {}),
  };
}

/** Builds a warning diagnostic. */
export function warningAt(code: string, message: string, pos?: SourcePos, lineText?: string): Diagnostic {
  return { ...errorAt(code, message, pos, lineText), severity: 'warning' };
}

/**
 * Renders a diagnostic as the user sees it:
 * `file:line:col: error: message` / the quoted line / a caret / `expected: ...`.
 */
export function formatDiagnostic(d: Diagnostic): string {
  const where = d.pos ? `${d.pos.file}:${d.pos.line}:${d.pos.column}: ` : '';
  const lines = [`${where}${d.severity}: ${d.message}`];
  if (d.lineText !== undefined && d.pos) {
    lines.push(`  | ${d.lineText}`);
    lines.push(`  | ${' '.repeat(Math.max(0, d.pos.column - 1))}^`);
  }
  if (d.expected !== undefined) lines.push(`  expected: ${d.expected}`);
  return lines.join('\n');
}
