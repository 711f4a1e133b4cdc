/**
 * `.spread` lines are tolerances for tolerance runs (netlist.md), which
 * are not implemented yet: `run` reads and checks them, and says in one
 * note, at the first such line, that it does not use them and which
 * command will.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';

const stage = (extra: readonly string[]): string =>
  ['spread stage', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 2k', '.op', ...extra, '.end', ''].join('\n');

describe('.spread in run', () => {
  test('two .spread lines: one note at the first, saying run does not use them', () => {
    const r = runNetlist(stage(['.spread R1 5%', '.spread R2 1% gauss']));
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
    const notes = r.report.warnings.filter((w) => w.code === 'spread-not-used');
    expect(notes).toHaveLength(1);
    expect(notes[0]!.message).toMatch(/tolerance runs are not implemented yet; \.spread lines are read but not used by run/);
    expect(notes[0]!.message).toMatch(/2 \.spread lines; a later `railcheck spread` command will read them/);
    // Line 6 of the text: title, V1, R1, R2, .op, then the first .spread.
    expect(notes[0]!.pos?.line).toBe(6);
  });

  test('without .spread there is no such note', () => {
    const r = runNetlist(stage([]));
    expect(r.ok && r.report.warnings.some((w) => w.code === 'spread-not-used')).toBe(false);
  });
});
