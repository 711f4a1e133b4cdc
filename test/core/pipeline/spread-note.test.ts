/**
 * `.spread` lines are tolerances for tolerance runs (netlist.md,
 * docs/spread.md): `run` reads and checks them, simulates the nominal
 * values, and says in one note, at the first such line, that
 * `railcheck spread FILE` reads them.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';

const stage = (extra: readonly string[]): string =>
  ['spread stage', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 2k', '.op', ...extra, '.end', ''].join('\n');

describe('.spread in run', () => {
  test('two .spread lines: one note at the first, pointing at railcheck spread FILE', () => {
    const r = runNetlist(stage(['.spread R1 5%', '.spread R2 1% gauss']), { file: 'stage.cir' });
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
    const notes = r.report.warnings.filter((w) => w.code === 'spread-not-used');
    expect(notes).toHaveLength(1);
    expect(notes[0]!.message).toMatch(/run uses the nominal values; the 2 \.spread lines are read by `railcheck spread stage\.cir`/);
    // Line 6 of the text: title, V1, R1, R2, .op, then the first .spread.
    expect(notes[0]!.pos?.line).toBe(6);
  });

  test('without .spread there is no such note', () => {
    const r = runNetlist(stage([]));
    expect(r.ok && r.report.warnings.some((w) => w.code === 'spread-not-used')).toBe(false);
  });
});
