/**
 * The stress example as a user runs it (docs/stress.md): the table in the
 * text report marks the reservoir past its ripple-current rating, the same
 * rows come out in --json, the part's line carries the note, the shorted
 * output has a table of its own with the part that fails first named, and
 * the example has no limit, so it passes (exit 0). Presentation checks: the values behind
 * them are checked against outside references in test/core/measure/stress.test.ts.
 */
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { cli } from '../support.js';

const example = fileURLToPath(new URL('../../../examples/greenhouse-valve-stress.cir', import.meta.url));

describe('examples/greenhouse-valve-stress.cir', () => {
  test('text: the reservoir is OVER its irms rating, a note at its line; no limit, so exit 0 (a note is not a failure)', async () => {
    const r = await cli(['run', example]);
    expect(r.status).toBe(0);
    expect(r.out).toMatch(/part stress/);
    expect(r.out).toMatch(/stress\.CRES\.irms\s+\S+ mA\s+500 mA irms=\s+\S+\s+OVER/);
    expect(r.out).toMatch(/greenhouse-valve-stress\.cir:\d+:1: warning: CRES goes through \S+ mA \(irms\)/);
    // The short: its own section and table; the reservoir's ripple current, already past its rating in use, is the
    // first to go; the library rectifiers are judged by their model ratings.
    expect(r.out).toMatch(/output short — output shorted to its reference through 10 mΩ/);
    expect(r.out).toMatch(/short\.CRES\.irms\s+\S+ A\s+500 mA irms=\s+\S+\s+OVER\s+the shorted output, settled cycle/);
    expect(r.out).toMatch(/short\.D1\.iavg\s+\S+ mA\s+1 A model IFAV/);
    expect(r.out).toMatch(/warning: short: with the output shorted through 10 mΩ, CRES reaches \S+× its irms rating/);
  }, 120_000);

  test('json: one stress row per rated quantity, ratio = worst / rating, status from the ratio', async () => {
    const r = await cli(['run', example, '--json']);
    const j = JSON.parse(r.out) as { stress: { element: string; quantity: string; worst: number; rating: number; ratio: number; status: string; derate: number }[]; figures: Record<string, number> };
    const cres = j.stress.find((s) => s.element === 'CRES' && s.quantity === 'irms')!;
    expect(cres.status).toBe('over');
    for (const s of j.stress) {
      expect(s.ratio).toBeCloseTo(s.worst / s.rating, 12);
      expect(s.status).toBe(s.ratio > 1 ? 'over' : s.ratio > s.derate ? 'margin' : 'ok');
      expect(j.figures[`stress.${s.element}.${s.quantity}`]).toBeCloseTo(s.ratio, 12);
    }
    expect(j.figures['stress.worst']).toBe(Math.max(...j.stress.map((s) => s.ratio)));
    // The short's rows are its own: their ratios are the short.* values, and its worst is the largest of them.
    const short = (JSON.parse(r.out) as { short_stress: { element: string; quantity: string; ratio: number }[] }).short_stress;
    expect(short.length).toBeGreaterThan(0);
    for (const s of short) expect(j.figures[`short.${s.element}.${s.quantity}`]).toBe(s.ratio);
    expect(j.figures['short.worst']).toBe(Math.max(...short.map((s) => s.ratio)));
    expect(j.figures['short.worst']).toBeGreaterThan(j.figures['stress.worst']!);
  }, 120_000);
});
