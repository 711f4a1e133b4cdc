/**
 * `.include "path"` (netlist.md, Includes): resolution relative to the
 * including file, cycle detection, and refusal of paths that leave the
 * including file's folder tree unless the caller allows them.
 */
import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, join, normalize, relative, resolve, sep } from 'node:path';
import type { Cursor } from './cursor.js';
import type { Token } from './lexer.js';

/** A file being read: its name for messages and its absolute path. */
export interface IncludeFrame {
  /** As shown in messages: the top file's name as given, includes joined onto it. */
  readonly display: string;
  /** Absolute, normalised path, used to resolve includes and detect cycles. */
  readonly abs: string;
}

/** Deepest chain of includes accepted (a guard against runaway generated files). */
export const MAX_INCLUDE_DEPTH = 32;

/** Reads a file as UTF-8; undefined when it cannot be read (missing, a folder, no permission). */
export function defaultReadFile(absolutePath: string): string | undefined {
  try {
    return readFileSync(absolutePath, 'utf8');
  } catch {
    return undefined;
  }
}

/** The frame of the top file. */
export function topFrame(file: string): IncludeFrame {
  return { display: file, abs: resolve(file) };
}

/** What an include needs from the reader's state. */
interface IncludeState {
  readonly readFile: (absolutePath: string) => string | undefined;
  readonly allowOutsideIncludes: boolean;
  readonly stack: readonly IncludeFrame[];
}

/** True when `abs` lies inside the folder `dir` (lexically; links are not followed). */
function inside(dir: string, abs: string): boolean {
  const rel = relative(dir, abs);
  return rel !== '..' && !rel.startsWith(`..${sep}`) && !isAbsolute(rel);
}

/**
 * Resolves an include against the file being read and reads it; aborts the
 * card (through `c`) on a refused path, a cycle or an unreadable file.
 */
export function resolveInclude(ctx: IncludeState, c: Cursor, path: string, at: Token): IncludeFrame & { text: string } {
  const including = ctx.stack[ctx.stack.length - 1];
  if (!including) c.fail('internal', 'include outside any file', at);
  const dir = dirname(including.abs);
  const abs = resolve(dir, path);
  const display = isAbsolute(path) ? normalize(path) : join(dirname(including.display), path);
  if (!ctx.allowOutsideIncludes && !inside(dir, abs)) {
    c.fail('include-outside', `"${path}" leaves the folder of ${including.display}; includes outside it are refused unless the caller allows them`, at, `a path inside ${dir}`);
  }
  const seen = ctx.stack.findIndex((f) => f.abs === abs);
  if (seen >= 0) {
    const cycle = [...ctx.stack.slice(seen).map((f) => f.display), display].join(' → ');
    c.fail('include-cycle', `include cycle: ${cycle}`, at, 'includes that do not lead back to a file being read');
  }
  if (ctx.stack.length >= MAX_INCLUDE_DEPTH) c.fail('include-too-deep', `includes nest more than ${MAX_INCLUDE_DEPTH} deep`, at, 'fewer nested includes');
  let text: string | undefined;
  try {
    text = ctx.readFile(abs);
  } catch {
    text = undefined;
  }
  if (typeof text !== 'string') c.fail('include-unreadable', `cannot read the included file ${display} (${abs})`, at, 'an existing, readable file');
  return { display, abs, text };
}
