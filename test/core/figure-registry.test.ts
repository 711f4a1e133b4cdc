/**
 * The figure registry (packages/core/src/figure-registry.ts) against the
 * places that must agree with it: docs/figures.md names every value with
 * its unit and direction, once for DC inputs and once for sine-fed stages;
 * the reader accepts exactly the registered names in `.limit`; and an
 * unknown name gets no unit at all. The registry itself restates
 * figures.md (the contract), so these are consistency checks, not checks
 * of the figures' values (those are in test/core/measure).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { BENCH_KINDS, FIGURES, FIGURE_KIND_INFO, FIGURE_KINDS, figureEntry, figureKindOf, figureUnit, parseNetlist, type BenchKind } from '@railcheck/core';
import { describeKeyRange } from '@railcheck/core/internal';
import type { FigureKind } from '@railcheck/core';

const doc = readFileSync(new URL('../../docs/figures.md', import.meta.url), 'utf8');
const SINE_FED_HEADING = '## Stages fed from a transformer secondary';

/** The table rows of a part of the page, as trimmed cells. */
function rows(text: string): string[][] {
  return text
    .split('\n')
    .filter((l) => l.startsWith('|'))
    .map((l) => l.split(/(?<!\\)\|/).slice(1, -1).map((c) => c.trim()));
}

const sineFedStart = doc.indexOf(SINE_FED_HEADING);
const sineFedEnd = doc.indexOf('\n## ', sineFedStart + 1);
const part: Record<BenchKind, string[][]> = {
  dc: rows(doc.slice(0, sineFedStart)),
  'sine-fed': rows(doc.slice(sineFedStart, sineFedEnd)),
};

describe('docs/figures.md restates the registry', () => {
  test('the page has a section for sine-fed stages', () => {
    expect(sineFedStart).toBeGreaterThan(0);
    expect(sineFedEnd).toBeGreaterThan(sineFedStart);
  });

  for (const entry of FIGURES) {
    for (const bench of BENCH_KINDS) {
      const unit = entry.units[bench];
      if (unit === undefined) continue;
      test(`${entry.name} on a ${bench} stage: unit ${unit}, better ${entry.better}`, () => {
        const row = part[bench].find((r) => r[0] === `\`${entry.name}\``);
        expect(row, `no table row for ${entry.name} in the ${bench} part of docs/figures.md`).toBeDefined();
        // Columns: name | definition | unit | better.
        expect(row!.slice(2)).toEqual([unit, entry.better]);
      });
    }
  }

  test('every value the page tabulates is in the registry, for that kind of stage', () => {
    for (const bench of BENCH_KINDS) {
      for (const r of part[bench]) {
        const name = /^`([^`]+)`$/.exec(r[0] ?? '')?.[1];
        if (!name || r.length !== 4) continue;
        const entry = FIGURES.find((e) => e.name === name);
        expect(entry, `${name} (${bench}) is in the page but not in the registry`).toBeDefined();
        expect(entry!.units[bench], `${name} is tabulated for ${bench} stages, which the registry says do not produce it`).toBeDefined();
      }
    }
  });
});

describe('docs/figures.md, "Key ranges", restates the registry', () => {
  const start = doc.indexOf('## Key ranges');
  const table = rows(doc.slice(start, doc.indexOf('\n## ', start + 1)));
  test('the page has the section', () => expect(start).toBeGreaterThan(0));
  for (const kind of FIGURE_KINDS) {
    for (const [name, key] of Object.entries(FIGURE_KIND_INFO[kind].keys)) {
      test(`${kind} ${name}`, () => {
        const row = table.find((r) => r[0] === kind && r[1] === `\`${name}\``);
        expect(row, `no row for ${kind} ${name}`).toBeDefined();
        const cells = key.value === 'number' ? BENCH_KINDS.map((b) => describeKeyRange(key, b)) : [`one of ${key.words.join(', ')}`, 'not used'];
        expect(row!.slice(2)).toEqual(cells);
      });
    }
  }
  test('every row of the table is a key of the registry', () => {
    for (const r of table.slice(2)) expect(FIGURE_KIND_INFO[r[0] as FigureKind]?.keys[(r[1] ?? '').replace(/`/g, '')], r.join(' | ')).toBeDefined();
  });
});

describe('lookup', () => {
  test('names are found in any case; pd.<element> stands for every element path', () => {
    expect(figureKindOf('LINE.Delta')).toBe('line');
    expect(figureKindOf('pd.Q1')).toBe('dissipation');
    expect(figureKindOf('pd.X1.X2.Q3')).toBe('dissipation');
    expect(figureEntry('pd.X1.Q2')?.name).toBe('pd.<element>');
  });

  test('an unknown name, or a name the bench kind does not produce, has no unit (never an empty one)', () => {
    expect(figureUnit('line.bogus', 'dc')).toBeUndefined();
    expect(figureUnit('pd.', 'dc')).toBeUndefined();
    expect(figureUnit('line.pct', 'dc')).toBeUndefined();
    expect(figureUnit('line.slope', 'sine-fed')).toBeUndefined();
    expect(figureUnit('dropout.headroom', 'dc')).toBe('V');
    expect(figureUnit('dropout.headroom', 'sine-fed')).toBe('ratio');
  });

  test('every entry names a kind the registry describes, and every kind has a title and produces a value', () => {
    for (const e of FIGURES) expect(FIGURE_KINDS).toContain(e.kind);
    for (const k of FIGURE_KINDS) {
      expect(FIGURE_KIND_INFO[k].title.length).toBeGreaterThan(0);
      expect(FIGURES.some((e) => e.kind === k)).toBe(true);
    }
  });

  test('a flag carries the words reports print beside 1 and 0', () => {
    for (const e of FIGURES) if (Object.values(e.units).includes('flag')) expect(e.flagWords).toBeDefined();
  });
});

describe('the reader takes its names from the registry', () => {
  const limitLine = (name: string): string =>
    ['registry stage', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', `.figure ${figureKindOf(name) ?? 'line'}`, `.limit ${name} < 1`, '.end', ''].join('\n');

  test('every registered name is accepted by .limit', () => {
    for (const e of FIGURES) {
      const name = e.pattern ? 'pd.R1' : e.name;
      const r = parseNetlist(limitLine(name));
      expect(r.ok, `.limit ${name} was refused`).toBe(true);
    }
  });

  test('an unregistered name is refused', () => {
    const r = parseNetlist(limitLine('line.bogus'));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((d) => d.code)).toContain('unknown-figure');
  });

  test('every registered key is accepted by .figure and a made-up one is refused', () => {
    const figureLine = (line: string): boolean => parseNetlist(['keys', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', line, '.end', ''].join('\n')).ok;
    for (const k of FIGURE_KINDS) {
      for (const [key, info] of Object.entries(FIGURE_KIND_INFO[k].keys)) {
        expect(figureLine(`.figure ${k} ${key}=${info.value === 'method' ? 'ac' : '1'}`), `.figure ${k} ${key}=`).toBe(true);
      }
      expect(figureLine(`.figure ${k} bogus=1`)).toBe(false);
    }
  });
});
