/**
 * Output files of the command (docs/output.md, "Output files"): a set of
 * files written whole or not at all. Each file's text is handed over
 * whole or as pieces made while it is written (a long waveform is never one
 * string); each goes to a temporary name in its own folder and is
 * renamed into place (a rename within one folder replaces the old file in
 * one step on POSIX file systems, rename(2)), so a failed or interrupted
 * run never leaves a truncated file under the name asked for. A target
 * that is the netlist itself, or is not a regular file, is refused.
 */
import { closeSync, lstatSync, openSync, realpathSync, renameSync, statSync, unlinkSync, writeFileSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

/** One file to write: where, and its whole text. */
export interface OutputFile {
  /** The path as the user gave it (or derived from it), for messages. */
  readonly path: string;
  /** Its complete contents (UTF-8): one string, or pieces in order, each written as it is made. */
  readonly text: string | Iterable<string>;
}

/** Writes `text` to the new file `path` (flag `wx`: never over an existing file), piece by piece when it comes in pieces. */
function writeNew(path: string, text: string | Iterable<string>): void {
  if (typeof text === 'string') {
    writeFileSync(path, text, { flag: 'wx' });
    return;
  }
  const fd = openSync(path, 'wx');
  // One buffer for every piece (grown when a piece needs more): a fresh buffer per piece would be
  // memory outside the heap that the collector frees late, and the process would grow with the file.
  let buffer = Buffer.allocUnsafe(1 << 16);
  try {
    for (const piece of text) {
      const need = Buffer.byteLength(piece, 'utf8');
      if (need > buffer.length) buffer = Buffer.allocUnsafe(need);
      const length = buffer.write(piece, 'utf8');
      // writeSync may write fewer bytes than asked (POSIX write(2)); the rest goes in further calls.
      for (let at = 0; at < length; ) at += writeSync(fd, buffer, at, length - at);
    }
  } finally {
    closeSync(fd);
  }
}

/** The outcome of writing a set: done, or why nothing (or, after a failed rename, not all) was written. */
export type WriteOutcome = { readonly ok: true } | { readonly ok: false; readonly message: string };

/** Real path of `p`; for a file that does not exist yet, its real folder joined with its name. */
function realTarget(p: string): string {
  const abs = resolve(p);
  try {
    return realpathSync(abs);
  } catch {
    try {
      return join(realpathSync(dirname(abs)), basename(abs));
    } catch {
      return abs;
    }
  }
}

/**
 * Why `path` may not be written over, or undefined when it may: it is the
 * netlist `protect` (compared on real paths, so a link or another spelling
 * of the netlist's name is caught), or it exists and is not a regular file.
 */
export function refuseOutput(path: string, protect: string): string | undefined {
  const target = realTarget(path);
  if (target === realTarget(protect)) return `${path} is the netlist ${protect}; choose another name for the output`;
  try {
    if (!statSync(target).isFile()) return `${path} exists and is not a regular file`;
  } catch {
    // Does not exist yet: fine.
  }
  return undefined;
}

/**
 * Why a write failed, for messages: the absolute path it was meant for and
 * the operating system's code and reason ("EACCES: permission denied"),
 * without the temporary name node's message carries.
 */
export function writeFailure(real: string, e: unknown): string {
  const text = e instanceof Error ? e.message : String(e);
  const m = /^([A-Z][A-Z0-9_]*): ([^,]+)/.exec(text);
  return `${real}: ${m ? `${m[1]}: ${m[2]}` : text}`;
}

/** A temporary name beside `real`, hidden and unlikely to clash. */
function temporaryName(real: string, k: number): string {
  return join(dirname(real), `.${basename(real)}.railcheck-${process.pid}-${Date.now().toString(36)}-${k}.tmp`);
}

function removeQuietly(p: string): void {
  try {
    if (lstatSync(p).isFile()) unlinkSync(p);
  } catch {
    // Already gone.
  }
}

/**
 * Writes every file of `files`, or none: each is refused when
 * {@link refuseOutput} objects (against the netlist `protect`), then
 * written in full to a temporary name beside its target, and only when all
 * are written are they renamed into place. A link as target is followed:
 * the file it points to is replaced, the link stays.
 */
export function writeOutputFiles(files: readonly OutputFile[], protect: string): WriteOutcome {
  for (const f of files) {
    const why = refuseOutput(f.path, protect);
    if (why) return { ok: false, message: why };
  }
  const staged: Array<{ path: string; real: string; temp: string }> = [];
  const discard = (): void => {
    for (const s of staged) removeQuietly(s.temp);
  };
  for (const [k, f] of files.entries()) {
    const real = realTarget(f.path);
    const temp = temporaryName(real, k);
    try {
      staged.push({ path: f.path, real, temp });
      writeNew(temp, f.text);
    } catch (e) {
      discard();
      return { ok: false, message: `cannot write ${f.path} (${writeFailure(real, e)}); no output file was written` };
    }
  }
  for (const [k, s] of staged.entries()) {
    try {
      renameSync(s.temp, s.real);
    } catch (e) {
      for (const rest of staged.slice(k)) removeQuietly(rest.temp);
      const done = staged.slice(0, k).map((d) => d.path);
      return { ok: false, message: `cannot put ${s.path} in place (${writeFailure(s.real, e)})${done.length ? `; already written: ${done.join(', ')}` : '; no output file was written'}` };
    }
  }
  return { ok: true };
}
