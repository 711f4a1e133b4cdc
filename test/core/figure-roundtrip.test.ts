/**
 * The registry round trip: every value the figure registry lists for a kind
 * of stage is accepted by the reader, measured on a stage of that kind, and
 * printed by the text report (docs/figures.md is checked against the
 * registry in figure-registry.test.ts). The stages are the examples, which
 * between them ask for every figure on both kinds of stage.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { FIGURES, parseNetlist, runNetlist, type BenchKind } from '@railcheck/core';
import { formatReport } from '@railcheck/cli';

const example = (name: string): string => readFileSync(fileURLToPath(new URL(`../../examples/${name}`, import.meta.url)), 'utf8');
/** The stages of each kind, with figure lines added before `.end` where an example does not ask for every figure. */
const STAGES: Readonly<Record<BenchKind, ReadonlyArray<readonly [string, string]>>> = {
  dc: [['sensor-rail-follower.cir', '.figure startup\n.figure step\n.figure stress\n.figure short\n'], ['railway-capacitance-multiplier.cir', ''], ['sensor-rail-thermal.cir', '.figure short\n']],
  'sine-fed': [['railway-transformer-follower.cir', '.figure sag depth=10% dur=40m\n.figure startup\n.figure thermal\n'], ['greenhouse-valve-stress.cir', '.figure step\n']],
};
/** Thermal data the thermal figure needs on a stage whose example has none (docs/thermal.md). */
const withRth = (file: string, text: string): string => (file === 'railway-transformer-follower.cir' ? text.replace(/^(Q1 res ref out NPASS)/m, '$1 rth=5 rthsink=20') : file === 'sensor-rail-follower.cir' ? withRating(text) : text);
/** A rating the stress figure needs on a stage whose example has none (docs/stress.md). */
const withRating = (text: string): string => text.replace(/^(COUT out 0 100u)/m, '$1 vmax=16');

describe('every registered value is read, measured and printed', () => {
  for (const bench of ['dc', 'sine-fed'] as const) {
    test(`on a ${bench} stage`, () => {
      const values = new Set<string>();
      let text = '';
      for (const [file, extra] of STAGES[bench]) {
        const r = runNetlist(withRth(file, example(file)).replace(/^\.end\b/im, `${extra}.end`), { file });
        if (!r.ok) throw new Error(`${file}: ${r.errors.map((e) => e.message).join('; ')}`);
        expect(r.report.figures?.bench).toBe(bench);
        for (const name of Object.keys(r.report.figures!.values)) values.add(name);
        text += formatReport(r.report);
      }
      const names = [...values];
      for (const entry of FIGURES) {
        if (entry.units[bench] === undefined) continue;
        const found = entry.pattern ? names.filter((n) => entry.pattern!.test(n.toLowerCase())) : names.filter((n) => n === entry.name);
        expect(found.length, `${entry.name} measured on a ${bench} stage`).toBeGreaterThan(0);
        for (const n of found) expect(text, `${n} printed`).toContain(n);
        // The reader accepts it in a .limit line.
        const limit = parseNetlist(`t\nV1 a 0 1\nR1 a 0 1\n.supply in=V1 out=a\n.figure ${entry.kind}\n.limit ${found[0]} <= 1\n`);
        expect(limit.ok ? [] : limit.errors.map((e) => e.message), `${found[0]} read`).toEqual([]);
      }
    });
  }
});
