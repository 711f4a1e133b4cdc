/**
 * The page and the folder of `--plot DIR` (packages/cli/src/plot/page.ts,
 * write.ts): the page embeds and links every plot, carries the facts and
 * the caution, and is HTML5 with lang and charset; the folder is written
 * whole, and a failure is a message, never a thrown error or stack trace.
 */
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { MAINS_CAUTION } from '@railcheck/core';
import { renderPage } from '../../../packages/cli/src/plot/page.js';
import { renderSvg } from '../../../packages/cli/src/plot/svg.js';
import { plotFiles, writePlots, type PlotFolder } from '../../../packages/cli/src/plot/write.js';
import { EXAMPLE_PAGE, EXAMPLES, LINE } from './examples.js';
import { parseXml, seriesCounts } from './support.js';

const folder: PlotFolder = EXAMPLE_PAGE;
const scratch = (): string => mkdtempSync(join(tmpdir(), 'railcheck-plot-'));

describe('renderPage', () => {
  const page = renderPage({ title: EXAMPLE_PAGE.title, caution: MAINS_CAUTION, sections: EXAMPLE_PAGE.sections.map((s) => ({ heading: s.heading, plots: s.specs.map((spec) => ({ spec, svg: renderSvg(spec), file: `${spec.id}.svg` })), ...('facts' in s ? { facts: s.facts } : {}) })) });

  test('is an HTML5 document with lang, charset, viewport, and no external resource or script', () => {
    expect(page.startsWith('<!DOCTYPE html>\n<html lang="en">')).toBe(true);
    expect(page).toContain('<meta charset="utf-8">');
    expect(page).toContain('<meta name="viewport"');
    expect(page).not.toMatch(/<script|<link|src=|@import|url\(http/i);
  });

  test('embeds every plot inline and links each to its file', () => {
    for (const s of EXAMPLES) {
      expect(page).toContain(`href="${s.id}.svg"`);
      expect(page).toContain(`data-plot="${s.id}"`);
      // The inline drawing is the renderer's own, whole.
      expect(page).toContain(renderSvg(s).trim());
    }
    expect(page.match(/<svg /g)).toHaveLength(EXAMPLES.length);
  });

  test('shows the caution first and every fact with its status', () => {
    const caution = page.indexOf('class="caution"');
    expect(caution).toBeGreaterThan(0);
    expect(caution).toBeLessThan(page.indexOf('<section'));
    expect(page).toContain(MAINS_CAUTION.replace(/&/g, '&amp;'));
    for (const s of EXAMPLE_PAGE.sections) for (const f of 'facts' in s ? s.facts : []) expect(page).toContain(`<td>${f.name}</td><td class="value">${f.value}</td>`);
    expect(page).toContain('<span class="status status-fail">FAIL</span>');
    expect(page).toContain('<span class="status status-pass">pass</span>');
  });

  test('has no caution block when none is given, and escapes its text', () => {
    const p = renderPage({ title: 'a <b> & "c"', sections: [{ heading: '<h>', plots: [], facts: [{ name: 'x<y', value: '1 & 2' }] }] });
    expect(p).not.toContain('class="caution"');
    expect(p).toContain('<title>a &lt;b&gt; &amp; &quot;c&quot;</title>');
    expect(p).toContain('<td>x&lt;y</td><td class="value">1 &amp; 2</td>');
  });
});

describe('writePlots', () => {
  test('writes every <id>.svg and index.html into a new nested folder, and returns the paths', () => {
    const dir = join(scratch(), 'a', 'plots');
    const netlist = join(dir, '..', 'stage.cir');
    const r = writePlots(dir, folder, netlist);
    expect(r).toEqual({ ok: true, paths: [...EXAMPLES.map((s) => join(dir, `${s.id}.svg`)), join(dir, 'index.html')] });
    for (const s of EXAMPLES) expect(seriesCounts(parseXml(readFileSync(join(dir, `${s.id}.svg`), 'utf8'))).size).toBe(s.series.length + (s.histogram ? 1 : 0));
    expect(readFileSync(join(dir, 'index.html'), 'utf8')).toContain('href="line.svg"');
  });

  test('refuses two plots with one id, an id that is no file stem, and a folder that is a file, writing nothing', () => {
    const base = scratch();
    const twice = writePlots(join(base, 'p'), { title: 't', sections: [{ heading: 'h', specs: [LINE, LINE] }] }, join(base, 'n.cir'));
    expect(twice).toEqual({ ok: false, message: 'two plots have the id line' });
    const bad = writePlots(join(base, 'p'), { title: 't', sections: [{ heading: 'h', specs: [{ ...LINE, id: '../up' }] }] }, join(base, 'n.cir'));
    expect(bad.ok).toBe(false);
    expect(existsSync(join(base, 'p'))).toBe(false);
    writeFileSync(join(base, 'file'), 'x');
    expect(writePlots(join(base, 'file'), folder, join(base, 'n.cir'))).toEqual({ ok: false, message: `${join(base, 'file')} exists and is not a folder` });
  });

  test('a folder that cannot be made is a message with the system reason, no stack trace', () => {
    const base = scratch();
    writeFileSync(join(base, 'file'), 'x');
    const r = writePlots(join(base, 'file', 'plots'), folder, join(base, 'n.cir'));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.message).toMatch(/^cannot make the folder .*file\/plots \(.*ENOTDIR: not a directory\); no plot was written$/);
    expect(r.message).not.toMatch(/\n\s+at /);
  });

  test('never writes over the netlist (the --csv rule)', () => {
    const dir = scratch();
    const netlist = join(dir, 'line.svg');
    writeFileSync(netlist, '* a netlist\n');
    const r = writePlots(dir, folder, netlist);
    expect(r.ok).toBe(false);
    expect(readFileSync(netlist, 'utf8')).toBe('* a netlist\n');
  });

  test('plotFiles lists the SVGs in section order, then the page', () => {
    const r = plotFiles('d', folder);
    expect(r.ok && r.files.map((f) => f.path)).toEqual([...EXAMPLES.map((s) => join('d', `${s.id}.svg`)), join('d', 'index.html')]);
  });
});
