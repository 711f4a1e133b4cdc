/**
 * `.include "path"` (netlist.md, Includes) and the reading of netlist files:
 * resolution relative to the including file, cycle detection, refusal of
 * paths whose real location (symbolic links followed) leaves the including
 * file's folder tree unless the caller allows them, refusal of anything
 * that is not a regular file, and a cap on the bytes read from each file;
 * `.include "parts:NAME"`, a file of the parts library shipped with the
 * package (docs/parts.md), found beside the running code.
 */
import { closeSync, constants, existsSync, fstatSync, openSync, readdirSync, readFileSync, readSync, realpathSync } from 'node:fs';
import { dirname, isAbsolute, join, normalize, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { match } from 'ts-pattern';
import type { Cursor } from './cursor.js';
import type { Token } from './lexer.js';

/** A file being read: its name for messages and its absolute path. */
export interface IncludeFrame {
  /** As shown in messages: the top file's name as given, includes joined onto it. */
  readonly display: string;
  /** Absolute, normalised path as written (links not followed), used to resolve includes. */
  readonly abs: string;
  /** Identity of the file for cycle detection: its real path on disk, `abs` for a caller-supplied reader. */
  readonly key: string;
  /** True for a file of the parts library: read from disk, its includes resolved within the library folder. */
  readonly library: boolean;
}

/** Deepest chain of includes accepted (a guard against runaway generated files). */
export const MAX_INCLUDE_DEPTH = 32;

/**
 * Most bytes read from one netlist or included file on disk (16 MiB); a
 * larger file is refused before its text is decoded. The cap also bounds
 * files whose size the file system does not report (it is counted while
 * reading, not taken from the size on record).
 */
export const MAX_FILE_BYTES = 16 * 1024 * 1024;

/** Why a file was not read. */
export type ReadRefusal =
  | { readonly kind: 'unreadable'; readonly detail: string }
  | { readonly kind: 'not-regular'; readonly detail: string }
  | { readonly kind: 'too-large'; readonly bytes: number };

/** The outcome of reading one file: its text, or why it was refused. */
export type ReadOutcome = { readonly kind: 'text'; readonly text: string } | { readonly kind: 'refused'; readonly refusal: ReadRefusal };

/** How the reader reaches files: the disk, or a caller's own reader. */
export interface FileSource {
  /** Real path of an absolute path (symbolic links resolved), or the path itself when it cannot be resolved. */
  readonly realPath: (absolutePath: string) => string;
  /** Reads a file whole. */
  readonly read: (absolutePath: string) => ReadOutcome;
}

function realOrSelf(p: string): string {
  try {
    return realpathSync(p);
  } catch {
    return p;
  }
}

/**
 * What a node:fs error says, for messages: the operating system's code and
 * reason ("ENOENT: no such file or directory", "EACCES: permission
 * denied"), without the path node appends (the message names it already).
 */
function describeFsError(e: unknown): string {
  const text = e instanceof Error ? e.message : String(e);
  const m = /^([A-Z][A-Z0-9_]*): ([^,]+)/.exec(text);
  return m ? `${m[1]}: ${m[2]}` : text;
}

/** Names the kind of a non-regular file from its status. */
function fileKind(st: ReturnType<typeof fstatSync>): string {
  if (st.isDirectory()) return 'a folder';
  if (st.isCharacterDevice()) return 'a character device';
  if (st.isBlockDevice()) return 'a block device';
  if (st.isFIFO()) return 'a named pipe';
  if (st.isSocket()) return 'a socket';
  return 'not a regular file';
}

/**
 * Reads a regular file from disk as UTF-8, at most {@link MAX_FILE_BYTES}
 * bytes. The file is opened without blocking (a named pipe with no writer
 * would otherwise wait for ever) and its status taken from the open
 * descriptor, so what is checked is what is read.
 */
export function readDiskFile(absolutePath: string): ReadOutcome {
  const refused = (refusal: ReadRefusal): ReadOutcome => ({ kind: 'refused', refusal });
  let fd: number;
  try {
    fd = openSync(absolutePath, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (e) {
    return refused({ kind: 'unreadable', detail: describeFsError(e) });
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) return refused({ kind: 'not-regular', detail: fileKind(st) });
    if (st.size > MAX_FILE_BYTES) return refused({ kind: 'too-large', bytes: st.size });
    const chunks: Buffer[] = [];
    let total = 0;
    for (;;) {
      const buf = Buffer.allocUnsafe(Math.min(1024 * 1024, MAX_FILE_BYTES + 1 - total));
      const n = readSync(fd, buf, 0, buf.length, null);
      if (n === 0) break;
      chunks.push(buf.subarray(0, n));
      total += n;
      if (total > MAX_FILE_BYTES) return refused({ kind: 'too-large', bytes: total });
    }
    return { kind: 'text', text: Buffer.concat(chunks, total).toString('utf8') };
  } catch (e) {
    return refused({ kind: 'unreadable', detail: describeFsError(e) });
  } finally {
    closeSync(fd);
  }
}

/** The disk: real paths through fs.realpathSync, files through {@link readDiskFile}. */
export const DISK: FileSource = { realPath: realOrSelf, read: readDiskFile };

/**
 * A caller's reader (`ParseOptions.readFile`) as a source: paths are taken
 * as they are (there are no links to follow), undefined or a throw is an
 * unreadable file.
 */
export function callerSource(readFile: (absolutePath: string) => string | undefined): FileSource {
  return {
    realPath: (p) => p,
    read: (p) => {
      let text: string | undefined;
      try {
        text = readFile(p);
      } catch {
        text = undefined;
      }
      return typeof text === 'string' ? { kind: 'text', text } : { kind: 'refused', refusal: { kind: 'unreadable', detail: 'the reader returned nothing' } };
    },
  };
}

/** The reason of a refusal, for messages, and the diagnostic code suffix. */
export function describeRefusal(r: ReadRefusal): { suffix: string; reason: string } {
  return match(r)
    .with({ kind: 'unreadable' }, (x) => ({ suffix: 'unreadable', reason: `cannot be read (${x.detail})` }))
    .with({ kind: 'not-regular' }, (x) => ({ suffix: 'not-regular', reason: `is not a regular file (${x.detail})` }))
    .with({ kind: 'too-large' }, (x) => ({ suffix: 'too-large', reason: `is larger than the ${MAX_FILE_BYTES} bytes read from one file (${x.bytes} bytes or more)` }))
    .exhaustive();
}

/** The frame of the top file. */
export function topFrame(file: string, source: FileSource): IncludeFrame {
  const abs = resolve(file);
  return { display: file, abs, key: source.realPath(abs), library: false };
}

/** Prefix of an include path that names a file of the parts library (`.include "parts:zeners"`). */
export const LIBRARY_PREFIX = 'parts:';
/** Characters a library name may hold: letters, digits, `-` and `_`. */
const LIBRARY_NAME = /^[A-Za-z0-9_-]+$/;
/** Text the library's README.md holds, which tells the library folder from any other `parts/` folder. */
export const LIBRARY_MARK = 'railcheck parts library';

let libraryFolderFound: string | null | undefined;
let libraryFolderOverride: string | undefined;

/**
 * Runs `fn` with `folder` taken as the parts library folder (for tests of
 * nested library includes on a library of their own), then restores the
 * search. Not for use outside tests.
 */
export function withPartsLibraryFolder<T>(folder: string, fn: () => T): T {
  const before = libraryFolderOverride;
  libraryFolderOverride = realOrSelf(folder);
  try {
    return fn();
  } finally {
    libraryFolderOverride = before;
  }
}

/**
 * The parts library folder: the first `parts/` folder holding the
 * library's README.md (with {@link LIBRARY_MARK}) found searching upward
 * from `start` (default: this module's own folder, so it works from the
 * sources, packages/core/src/netlist → packages/core/parts, from the core
 * bundle, packages/core/dist → packages/core/parts, and from the CLI
 * bundle, packages/cli/dist → packages/cli/parts). Undefined when none is
 * found. The default search is done once.
 */
export function partsLibraryFolder(start?: string): string | undefined {
  if (start === undefined && libraryFolderOverride !== undefined) return libraryFolderOverride;
  if (start === undefined && libraryFolderFound !== undefined) return libraryFolderFound ?? undefined;
  let dir = start ?? dirname(fileURLToPath(import.meta.url));
  let found: string | undefined;
  for (;;) {
    const readme = join(dir, 'parts', 'README.md');
    try {
      if (existsSync(readme) && readFileSync(readme, 'utf8').includes(LIBRARY_MARK)) {
        found = realOrSelf(join(dir, 'parts'));
        break;
      }
    } catch {
      // an unreadable README is not the library's: search on
    }
    const up = dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  if (start === undefined) libraryFolderFound = found ?? null;
  return found;
}

/** Names of the library files in `folder` (`zeners` for zeners.lib), sorted. */
export function libraryNames(folder: string): string[] {
  try {
    return readdirSync(folder).filter((f) => f.endsWith('.lib') && LIBRARY_NAME.test(f.slice(0, -4))).map((f) => f.slice(0, -4)).sort();
  } catch {
    return [];
  }
}

/** What an include needs from the reader's state. */
interface IncludeState {
  readonly source: FileSource;
  readonly allowOutsideIncludes: boolean;
  readonly stack: readonly IncludeFrame[];
}

/** True when `abs` lies inside the folder `dir` (compared as given; callers pass real paths). */
function inside(dir: string, abs: string): boolean {
  const rel = relative(dir, abs);
  return rel !== '..' && !rel.startsWith(`..${sep}`) && !isAbsolute(rel);
}

/**
 * Resolves an include against the file being read and reads it; aborts the
 * card (through `c`) on a refused path, a cycle, a file that is not a
 * regular file, one too large, or one that cannot be read. Containment is
 * judged on real paths: the target with its links followed must lie in the
 * real folder the include is resolved against.
 */
export function resolveInclude(ctx: IncludeState, c: Cursor, path: string, at: Token): IncludeFrame & { text: string } {
  const including = ctx.stack[ctx.stack.length - 1];
  if (!including) c.fail('internal', 'include outside any file', at);
  if (path.startsWith(LIBRARY_PREFIX) || including.library) return resolveLibraryInclude(ctx, c, path, at, including);
  const dir = dirname(including.abs);
  const abs = resolve(dir, path);
  const display = isAbsolute(path) ? normalize(path) : join(dirname(including.display), path);
  const real = ctx.source.realPath(abs);
  if (!ctx.allowOutsideIncludes) {
    const realDir = ctx.source.realPath(dir);
    if (!inside(dir, abs)) {
      c.fail('include-outside', `"${path}" leaves the folder of ${including.display}; includes outside it are refused unless the caller allows them`, at, `a path inside ${dir}`);
    }
    if (!inside(realDir, real)) {
      c.fail('include-outside', `"${path}" is a link to ${real}, outside the folder of ${including.display}; includes outside it are refused unless the caller allows them`, at, `a path whose real location is inside ${realDir}`);
    }
  }
  checkStack(ctx, c, real, display, at);
  const got = ctx.source.read(abs);
  if (got.kind === 'refused') {
    const { suffix, reason } = describeRefusal(got.refusal);
    c.fail(`include-${suffix}`, `the included file ${display} (${real}) ${reason}`, at, `an existing, readable regular file of at most ${MAX_FILE_BYTES} bytes`);
  }
  return { display, abs, key: real, library: false, text: got.text };
}

/** Cycle and depth checks shared by every include. */
function checkStack(ctx: IncludeState, c: Cursor, real: string, display: string, at: Token): void {
  const seen = ctx.stack.findIndex((f) => f.key === real);
  if (seen >= 0) {
    const cycle = [...ctx.stack.slice(seen).map((f) => f.display), display].join(' → ');
    c.fail('include-cycle', `include cycle: ${cycle}`, at, 'includes that do not lead back to a file being read');
  }
  if (ctx.stack.length >= MAX_INCLUDE_DEPTH) c.fail('include-too-deep', `includes nest more than ${MAX_INCLUDE_DEPTH} deep`, at, 'fewer nested includes');
}

/**
 * An include of the parts library: `parts:NAME` from any file, or a plain
 * relative path inside a library file (resolved within the library folder,
 * and refused if it leaves it). Library files are ours: they are read from
 * disk whatever reader the caller supplied, and the containment rule of
 * the including file does not apply to `parts:NAME`.
 */
function resolveLibraryInclude(ctx: IncludeState, c: Cursor, path: string, at: Token, including: IncludeFrame): IncludeFrame & { text: string } {
  const folder = partsLibraryFolder();
  if (folder === undefined) {
    c.fail('include-library-missing', `"${path}" names the parts library, but no parts/ folder with its README.md was found above ${dirname(fileURLToPath(import.meta.url))}`, at, 'an installation of railcheck that ships its parts/ folder');
  }
  const available = (): string => {
    const names = libraryNames(folder);
    return names.length > 0 ? names.map((n) => `"${LIBRARY_PREFIX}${n}"`).join(', ') : `none (the folder ${folder} holds no .lib file)`;
  };
  let abs: string;
  let display: string;
  if (path.startsWith(LIBRARY_PREFIX)) {
    const name = path.slice(LIBRARY_PREFIX.length);
    if (!LIBRARY_NAME.test(name)) {
      c.fail('include-library-name', `"${path}" is not a library name: after ${LIBRARY_PREFIX} come letters, digits, - and _ only; the library files are ${available()}`, at, available());
    }
    const file = libraryNames(folder).find((n) => n === name);
    if (file === undefined) c.fail('include-library-unknown', `there is no library file "${path}"; the library files are ${available()}`, at, available());
    abs = join(folder, `${file}.lib`);
    display = `${LIBRARY_PREFIX}${file}`;
  } else {
    abs = resolve(dirname(including.abs), path);
    const rel = relative(folder, abs).split(sep).join('/');
    // A library file reached by its file name is shown as the name that includes it.
    display = `${LIBRARY_PREFIX}${rel.endsWith('.lib') && LIBRARY_NAME.test(rel.slice(0, -4)) ? rel.slice(0, -4) : rel}`;
    if (!inside(folder, abs) || !inside(folder, realOrSelf(abs))) {
      c.fail('include-outside', `"${path}" in the library file ${including.display} leaves the library folder ${folder}`, at, `a path inside ${folder}`);
    }
  }
  const real = realOrSelf(abs);
  checkStack(ctx, c, real, display, at);
  const got = readDiskFile(abs);
  if (got.kind === 'refused') {
    const { suffix, reason } = describeRefusal(got.refusal);
    c.fail(`include-${suffix}`, `the library file ${display} (${real}) ${reason}`, at, `an existing, readable regular file of at most ${MAX_FILE_BYTES} bytes`);
  }
  return { display, abs, key: real, library: true, text: got.text };
}

/**
 * Reads the top netlist file through `source`: its text, or the
 * diagnostic fields of the refusal (code `file-…`, located at no line).
 */
export function readTopFile(path: string, source: FileSource): { ok: true; text: string } | { ok: false; code: string; message: string; expected: string } {
  const abs = resolve(path);
  const got = source.read(abs);
  if (got.kind === 'text') return { ok: true, text: got.text };
  const { suffix, reason } = describeRefusal(got.refusal);
  const where = abs === path ? path : `${path} (looked for ${abs})`;
  return { ok: false, code: `file-${suffix}`, message: `the netlist file ${where} ${reason}`, expected: `an existing, readable regular file of at most ${MAX_FILE_BYTES} bytes` };
}
