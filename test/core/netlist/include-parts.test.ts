/**
 * `.include "parts:NAME"` (docs/netlist.md, Includes; docs/parts.md): the
 * name reads <library folder>/NAME.lib, an unknown name is an error listing
 * the library files, library files are read from disk whatever reader the
 * caller gives, the containment rule still holds for every other include,
 * an include inside a library file stays in the library folder, and
 * cycles are still found. The expected outcomes are the rules stated in
 * those docs, not railcheck's output.
 */
import { mkdirSync, realpathSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { parseNetlist, partsLibraryFolder, readNetlistFile, runNetlistFile, withPartsLibraryFolder } from '@railcheck/core/internal';
import { freshDir } from '../diagnostics/support.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));
/** The library files docs/parts.md lists. */
const LIBRARY_FILES = ['leds', 'rectifiers', 'transistors', 'zeners'];

function errorsOf(path: string): Array<{ code: string; message: string; pos?: { line: number; file?: string } }> {
  const r = readNetlistFile(path);
  return r.ok ? [] : r.errors;
}

describe('.include "parts:NAME"', () => {
  test('from the sources, the library folder is packages/core/parts', () => {
    expect(partsLibraryFolder()).toBe(realpathSync(join(root, 'packages/core/parts')));
  });

  test('the search upward takes the first parts/ folder whose README.md is the library\'s, and passes over another parts/ folder', () => {
    const top = freshDir('parts-search');
    mkdirSync(join(top, 'a', 'parts'), { recursive: true });
    writeFileSync(join(top, 'a', 'parts', 'README.md'), '# railcheck parts library\n');
    mkdirSync(join(top, 'a', 'b', 'parts'), { recursive: true });
    writeFileSync(join(top, 'a', 'b', 'parts', 'README.md'), '# some other parts list\n');
    mkdirSync(join(top, 'a', 'b', 'c', 'dist'), { recursive: true });
    expect(partsLibraryFolder(join(top, 'a', 'b', 'c', 'dist'))).toBe(realpathSync(join(top, 'a', 'parts')));
    expect(partsLibraryFolder(join(top))).toBeUndefined();
  });

  test('a netlist in a temporary folder that includes parts:zeners runs, and the shunt Zener sits where its datasheet values put it', () => {
    const dir = freshDir('parts-run');
    const main = join(dir, 'shunt.cir');
    writeFileSync(main, 'Weather-station sensor rail: shunt reference\n.include "parts:zeners"\nV1 in 0 12\nR1 in out 1k\nD1 0 out zener_5v6_500mw\n.op\n');
    const r = runNetlistFile(main);
    expect(r.ok ? [] : r.errors.map((e) => e.message)).toEqual([]);
    if (!r.ok) return;
    const v = r.report.operatingPoints[0]!.nodes['out']!;
    // The linear Zener model of a datasheet, V = VZ + ZZT·(I − IZT), with
    // I = (12 − V)/R: V = (VZ − ZZT·IZT + ZZT·12/R)/(1 + ZZT/R), VZ 5.6 V,
    // ZZT 25 Ω, IZT 5 mA as zeners.lib writes them: 5.634 V. The model's
    // curve is logarithmic about IZT; its second-order term
    // ZZT·IZT·x²/2 at x = I/IZT − 1 ≈ 0.27 is about 5 mV, so bound 10 mV.
    const linear = (5.6 - 25 * 5e-3 + (25 * 12) / 1000) / (1 + 25 / 1000);
    expect(Math.abs(v - linear)).toBeLessThanOrEqual(10e-3);
  });

  test('an unknown library name fails at the include line, listing the library files', () => {
    const dir = freshDir('parts-nope');
    const main = join(dir, 'main.cir');
    writeFileSync(main, 'Sensor rail\n.include "parts:nope"\nR1 a 0 1k\n');
    const errs = errorsOf(main);
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'include-library-unknown', pos: { line: 2 } });
    expect(errs[0]!.message).toContain('parts:nope');
    for (const f of LIBRARY_FILES) expect(errs[0]!.message).toContain(`"parts:${f}"`);
  });

  test.each(['../zeners', 'zeners.lib', 'a/b', '', 'zen ers'])('a library name with other characters than letters, digits, - and _ is refused: "parts:%s"', (name) => {
    const r = parseNetlist(`Sensor rail\n.include "parts:${name}"\n`, { file: join(freshDir('parts-name'), 'main.cir') });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]!.code).toBe('include-library-name');
  });

  test('containment still refuses ../x.cir beside a library include', () => {
    const top = freshDir('parts-contain');
    const dir = join(top, 'proj');
    mkdirSync(dir);
    writeFileSync(join(top, 'x.cir'), 'R9 z 0 1k\n');
    const main = join(dir, 'main.cir');
    writeFileSync(main, 'Sensor rail\n.include "parts:leds"\n.include "../x.cir"\nR1 a 0 1k\n');
    const errs = errorsOf(main);
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'include-outside', pos: { line: 3 } });
  });

  test('library files are read from disk even when the caller supplies its own reader, which is never asked for them', () => {
    const asked: string[] = [];
    const r = parseNetlist('Sensor rail\n.include "parts:leds"\nI1 0 a 20m\nD1 a 0 led_red\n', {
      file: '/virtual/main.cir',
      readFile: (p) => {
        asked.push(p);
        return undefined;
      },
    });
    expect(r.ok ? [] : r.errors.map((e) => e.message)).toEqual([]);
    expect(asked).toEqual([]);
    if (r.ok) expect(r.netlist.cards.some((c) => c.kind === 'model' && c.name === 'led_red')).toBe(true);
  });

  test('messages name the include as parts:NAME', () => {
    const lib = freshDir('parts-lib');
    writeFileSync(join(lib, 'README.md'), '# railcheck parts library\n');
    writeFileSync(join(lib, 'broken.lib'), '* a broken card\n.model m D (IS=oops)\n');
    const main = join(freshDir('parts-msg'), 'main.cir');
    writeFileSync(main, 'Sensor rail\n.include "parts:broken"\n');
    const errs = withPartsLibraryFolder(lib, () => errorsOf(main));
    expect(errs.length).toBeGreaterThan(0);
    expect(errs[0]!.pos?.file).toBe('parts:broken');
  });

  test('an include inside a library file resolves within the library folder, and one that leaves it is refused', () => {
    const lib = freshDir('parts-nested');
    writeFileSync(join(lib, 'README.md'), '# railcheck parts library\n');
    writeFileSync(join(lib, 'common.inc'), '.model shared D (IS=1e-14)\n');
    writeFileSync(join(lib, 'top.lib'), '.include "common.inc"\n.model own D (IS=2e-14)\n');
    writeFileSync(join(lib, 'escape.lib'), '.include "../outside.inc"\n');
    writeFileSync(join(lib, '..', 'outside.inc'), '.model stray D (IS=1e-14)\n');
    const dir = freshDir('parts-user');
    // A file of the same name beside the user's netlist must not be the one read.
    writeFileSync(join(dir, 'common.inc'), '.model wrong D (IS=1e-14)\n');
    const main = join(dir, 'main.cir');
    writeFileSync(main, 'Sensor rail\n.include "parts:top"\n');
    const good = withPartsLibraryFolder(lib, () => readNetlistFile(main, { allowOutsideIncludes: true }));
    expect(good.ok ? [] : good.errors.map((e) => e.message)).toEqual([]);
    if (good.ok) expect(good.netlist.cards.map((c) => (c.kind === 'model' ? c.name : '')).filter(Boolean).sort()).toEqual(['own', 'shared']);
    writeFileSync(main, 'Sensor rail\n.include "parts:escape"\n');
    // Refused even when the caller allows outside includes: the library's own rule.
    const bad = withPartsLibraryFolder(lib, () => readNetlistFile(main, { allowOutsideIncludes: true }));
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.errors[0]).toMatchObject({ code: 'include-outside', pos: { file: 'parts:escape', line: 1 } });
  });

  test('a cycle through library files is still found, named by parts:NAME', () => {
    const lib = freshDir('parts-cycle');
    writeFileSync(join(lib, 'README.md'), '# railcheck parts library\n');
    writeFileSync(join(lib, 'a.lib'), '.include "parts:b"\n');
    writeFileSync(join(lib, 'b.lib'), '.include "a.lib"\n');
    const main = join(freshDir('parts-cycle-user'), 'main.cir');
    writeFileSync(main, 'Sensor rail\n.include "parts:a"\n');
    const errs = withPartsLibraryFolder(lib, () => errorsOf(main));
    expect(errs).toHaveLength(1);
    expect(errs[0]!.code).toBe('include-cycle');
    expect(errs[0]!.message).toContain('parts:a → parts:b → parts:a');
  });
});
