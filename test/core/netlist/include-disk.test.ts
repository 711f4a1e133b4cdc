/**
 * `.include` and `readNetlistFile` on a real disk (docs/netlist.md,
 * Includes): containment judged on real paths with symbolic links
 * followed, only regular files read, and the per-file byte cap. Each case
 * builds its own temporary folder with real links; the expected outcomes
 * are the rules stated in netlist.md, not railcheck's output.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, openSync, closeSync, ftruncateSync, realpathSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { MAX_FILE_BYTES, parseNetlist, readNetlistFile } from '../../../packages/core/src/netlist/index.js';
import { freshDir } from '../diagnostics/support.js';

/** A project folder with a netlist including `target`, and a secret file outside it. */
function project(target: string): { dir: string; main: string; secret: string } {
  const root = freshDir('incl');
  const dir = join(root, 'proj');
  mkdirSync(dir);
  const secret = join(root, 'secret.txt');
  writeFileSync(secret, 'R1 hunter2 0 1k\nthe private line\n');
  const main = join(dir, 'main.cir');
  writeFileSync(main, `Sensor rail\n.include "${target}"\nR2 a 0 1k\n`);
  return { dir, main, secret };
}

function errorsOf(path: string, allowOutsideIncludes = false): Array<{ code: string; message: string; pos?: { line: number } }> {
  const r = readNetlistFile(path, { allowOutsideIncludes });
  return r.ok ? [] : r.errors;
}

describe('includes on disk', () => {
  test('a link inside the folder to a file outside it is refused at the .include line, naming the real path; its text is not quoted', () => {
    const p = project('lib.cir');
    symlinkSync(p.secret, join(p.dir, 'lib.cir'));
    const errs = errorsOf(p.main);
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'include-outside', pos: { line: 2 } });
    expect(errs[0]?.message).toContain(realpathSync(p.secret));
    expect(JSON.stringify(errs)).not.toContain('hunter2');
    // The caller may lift the folder rule; then the link is followed.
    expect(errorsOf(p.main, true).map((e) => e.code)).not.toContain('include-outside');
  });

  test('a linked folder leading out is refused just the same', () => {
    const p = project('parts/x.lib');
    const outside = join(p.dir, '..', 'elsewhere');
    mkdirSync(outside);
    writeFileSync(join(outside, 'x.lib'), 'R9 b 0 1k\n');
    symlinkSync(outside, join(p.dir, 'parts'));
    expect(errorsOf(p.main)[0]?.code).toBe('include-outside');
  });

  test('a link to /dev/zero is refused as not a regular file, even where outside includes are allowed', () => {
    if (!existsSync('/dev/zero')) return;
    const p = project('zero.lib');
    symlinkSync('/dev/zero', join(p.dir, 'zero.lib'));
    expect(errorsOf(p.main)[0]?.code).toBe('include-outside');
    const errs = errorsOf(p.main, true);
    expect(errs[0]).toMatchObject({ code: 'include-not-regular', pos: { line: 2 } });
    expect(errs[0]?.message).toContain('character device');
  });

  test('a named pipe inside the folder is refused without waiting for a writer', () => {
    const p = project('pipe.lib');
    try {
      execFileSync('mkfifo', [join(p.dir, 'pipe.lib')]);
    } catch {
      return; // no mkfifo on this system
    }
    const errs = errorsOf(p.main);
    expect(errs[0]).toMatchObject({ code: 'include-not-regular', pos: { line: 2 } });
    expect(errs[0]?.message).toContain('named pipe');
    // A folder is not a regular file either.
    const q = project('sub');
    mkdirSync(join(q.dir, 'sub'));
    expect(errorsOf(q.main)[0]?.code).toBe('include-not-regular');
  });

  test('a link inside the folder to a file inside it is read', () => {
    const p = project('alias.lib');
    mkdirSync(join(p.dir, 'lib'));
    writeFileSync(join(p.dir, 'lib', 'parts.lib'), 'R3 c 0 2k\n');
    symlinkSync(join(p.dir, 'lib', 'parts.lib'), join(p.dir, 'alias.lib'));
    const r = readNetlistFile(p.main);
    expect(r.ok && r.netlist.cards.map((c) => ('name' in c ? c.name : c.kind))).toEqual(['R3', 'R2']);
  });

  test('a cycle through a link is found on the real path', () => {
    const p = project('a.lib');
    writeFileSync(join(p.dir, 'a.lib'), '.include "b.lib"\n');
    symlinkSync(join(p.dir, 'a.lib'), join(p.dir, 'b.lib'));
    expect(errorsOf(p.main)[0]?.code).toBe('include-cycle');
  });

  test('an included file over MAX_FILE_BYTES is refused at the .include line; one at the cap is read', () => {
    const p = project('big.lib');
    // A sparse file: its size on record is over the cap without writing the bytes.
    const fd = openSync(join(p.dir, 'big.lib'), 'w');
    ftruncateSync(fd, MAX_FILE_BYTES + 1);
    closeSync(fd);
    const errs = errorsOf(p.main);
    expect(errs[0]).toMatchObject({ code: 'include-too-large', pos: { line: 2 } });
    expect(errs[0]?.message).toContain(String(MAX_FILE_BYTES));
    // Exactly at the cap: read (and then rejected as text, not for its size).
    writeFileSync(join(p.dir, 'big.lib'), Buffer.alloc(MAX_FILE_BYTES, 0x0a));
    expect(errorsOf(p.main).map((e) => e.code)).toEqual([]);
  });

  test('the top file: a folder, a device and an oversized file are refused; a missing one is unreadable', () => {
    const dir = freshDir('top');
    expect(errorsOf(dir)[0]?.code).toBe('file-not-regular');
    if (existsSync('/dev/zero')) expect(errorsOf('/dev/zero')[0]?.code).toBe('file-not-regular');
    const big = join(dir, 'big.cir');
    const fd = openSync(big, 'w');
    ftruncateSync(fd, MAX_FILE_BYTES + 1);
    closeSync(fd);
    expect(errorsOf(big)[0]).toMatchObject({ code: 'file-too-large' });
    expect(errorsOf(join(dir, 'none.cir'))[0]).toMatchObject({ code: 'file-unreadable' });
    expect(errorsOf(join(dir, 'none.cir'))[0]?.message).toContain('no such file');
  });

  test('parseNetlist on text with a file name on disk applies the same rules to its includes', () => {
    const p = project('lib.cir');
    symlinkSync(p.secret, join(p.dir, 'lib.cir'));
    const r = parseNetlist('t\n.include "lib.cir"', { file: p.main });
    expect(!r.ok && r.errors[0]?.code).toBe('include-outside');
  });
});
