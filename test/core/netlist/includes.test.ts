/**
 * `.include` (docs/netlist.md, Includes): resolution relative to the
 * including file, cycles shown, folder containment and the option that
 * lifts it. Files live in an in-memory map; paths are POSIX.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, readNetlistFile } from '../../../packages/core/src/netlist/index.js';
import { mustFail, mustParse, strip } from './support.js';

function files(map: Record<string, string>): (p: string) => string | undefined {
  return (p) => map[p];
}

const LIB = {
  '/proj/lib/parts.lib': '* parts for the bench reference\n.include "zeners.lib"\n.model NPASS NPN (BF=150)\n',
  '/proj/lib/zeners.lib': '.model ZREF D (BV=5.6)\n',
  '/proj/other/x.lib': 'R9 a 0 1k\n',
};

describe('includes', () => {
  test('paths resolve against the including file, nested includes against theirs; cards land in place', () => {
    const { netlist } = mustParse('Bench reference\nR1 a 0 1k\n.include "lib/parts.lib"\nR2 b 0 2k', { file: '/proj/main.cir', readFile: files(LIB) });
    expect((strip(netlist.cards) as Array<{ name: string }>).map((c) => c.name)).toEqual(['R1', 'ZREF', 'NPASS', 'R2']);
    // Positions in included files name those files, not the top one.
    expect(netlist.cards[1]?.pos).toEqual({ file: '/proj/lib/zeners.lib', line: 1, column: 1 });
    expect(netlist.cards[2]?.pos).toEqual({ file: '/proj/lib/parts.lib', line: 3, column: 1 });
  });

  test('an included file has no title line: its line 1 is a card', () => {
    const { netlist } = mustParse('t\n.include sub.cir', { file: '/p/main.cir', readFile: files({ '/p/sub.cir': 'R1 a 0 1k' }) });
    expect(netlist.cards).toHaveLength(1);
  });

  test('a relative top file name gives relative names in messages', () => {
    const errs = mustFail('t\n.include "lib/bad.lib"', { file: 'main.cir', readFile: (p) => (p.endsWith('/lib/bad.lib') ? 'R1 a 0 0' : undefined) });
    expect(errs[0]).toMatchObject({ code: 'zero-resistance', pos: { file: 'lib/bad.lib', line: 1, column: 8 } });
  });

  test('an include inside a subcircuit definition adds to its body', () => {
    const { netlist } = mustParse('t\n.subckt ref a k\n.include "zeners.lib"\nD1 a k ZREF\n.ends', { file: '/proj/lib/main.cir', readFile: files(LIB) });
    const def = netlist.cards[0];
    expect(def?.kind === 'subckt' && def.body.map((c) => c.kind)).toEqual(['model', 'D']);
  });

  test('an include cycle is an error that shows the cycle', () => {
    const map = { '/p/a.lib': '.include "b.lib"\n', '/p/b.lib': '.include "a.lib"\n' };
    const errs = mustFail('t\n.include "a.lib"', { file: '/p/main.cir', readFile: files(map) });
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'include-cycle', pos: { file: '/p/b.lib', line: 1, column: 10 } });
    expect(errs[0]?.message).toContain('/p/a.lib → /p/b.lib → /p/a.lib');
    const self = mustFail('t\n.include "main.cir"', { file: '/p/main.cir', readFile: files({ '/p/main.cir': 'x' }) });
    expect(self[0]?.message).toContain('/p/main.cir → /p/main.cir');
  });

  test('including the same file twice without a cycle is not a cycle (its models then clash)', () => {
    const errs = mustFail('t\n.include "z.lib"\n.include "z.lib"', { file: '/p/m.cir', readFile: files({ '/p/z.lib': '.model Z D' }) });
    expect(errs.map((e) => e.code)).toEqual(['duplicate-name']);
  });

  test('a path leaving the including file\'s folder tree is refused, unless allowed', () => {
    const text = 't\n.include "../other/x.lib"';
    const errs = mustFail(text, { file: '/proj/lib/main.cir', readFile: files(LIB) });
    expect(errs[0]).toMatchObject({ code: 'include-outside', pos: { line: 2, column: 10 } });
    const abs = mustFail('t\n.include "/proj/other/x.lib"', { file: '/proj/lib/main.cir', readFile: files(LIB) });
    expect(abs[0]?.code).toBe('include-outside');
    const ok = mustParse(text, { file: '/proj/lib/main.cir', readFile: files(LIB), allowOutsideIncludes: true });
    expect(ok.netlist.cards).toHaveLength(1);
    // Going down and back up stays inside.
    expect(mustParse('t\n.include "other/../lib/zeners.lib"', { file: '/proj/main.cir', readFile: files(LIB) }).netlist.cards).toHaveLength(1);
  });

  test('a nested include is checked against its own including file', () => {
    const map = { '/p/sub/a.lib': '.include "../b.lib"', '/p/b.lib': 'R1 a 0 1' };
    expect(mustFail('t\n.include "sub/a.lib"', { file: '/p/main.cir', readFile: files(map) })[0]?.code).toBe('include-outside');
  });

  test('a missing file, an empty path and a readFile that throws are errors at the include', () => {
    expect(mustFail('t\n.include "nope.lib"', { file: '/p/m.cir', readFile: files({}) })[0]).toMatchObject({ code: 'include-unreadable', pos: { line: 2, column: 10 } });
    expect(mustFail('t\n.include ""', { file: '/p/m.cir', readFile: files({}) })[0]?.code).toBe('missing-item');
    const r = parseNetlist('t\n.include "x.lib"', { file: '/p/m.cir', readFile: () => { throw new Error('disk on fire'); } });
    expect(r.ok).toBe(false);
    expect(!r.ok && r.errors[0]?.code).toBe('include-unreadable');
  });

  test('readNetlistFile reads through readFile and reports an unreadable file as a value', () => {
    const map = { '/p/m.cir': 'Stage\n.include "z.lib"\nD1 a 0 Z', '/p/z.lib': '.model Z D' };
    const r = readNetlistFile('/p/m.cir', { readFile: files(map) });
    expect(r.ok && r.netlist.file).toBe('/p/m.cir');
    const missing = readNetlistFile('/p/none.cir', { readFile: files(map) });
    expect(missing).toMatchObject({ ok: false, errors: [{ code: 'file-unreadable' }] });
    expect(readNetlistFile('/definitely/not/here.cir').ok).toBe(false);
  });

  test('an unterminated .subckt in an included file is reported there', () => {
    const errs = mustFail('t\n.include "s.lib"\n.ends', { file: '/p/m.cir', readFile: files({ '/p/s.lib': '.subckt s a\nR1 a 0 1k' }) });
    expect(errs.map((e) => [e.code, e.pos?.file, e.pos?.line])).toEqual([
      ['unterminated-subckt', '/p/s.lib', 1],
      ['stray-ends', '/p/m.cir', 3],
    ]);
  });
});
