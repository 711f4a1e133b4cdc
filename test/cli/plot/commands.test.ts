/**
 * `--plot DIR` and the figures' waveforms in `--csv` as a user runs them
 * (docs/plots.md, docs/output.md): the files written, each SVG parsed back
 * as XML (fast-xml-parser) with the series the report's curves give (the
 * same curves measured here through the library: a consistency check
 * between our own layers, the curves themselves are checked against closed
 * forms in test/core/measure/curves.test.ts), and the page embedding and
 * linking every plot.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { XMLParser } from 'fast-xml-parser';
import { describe, expect, test } from 'vitest';
import { measureCurves, runNetlistFile } from '@railcheck/core';
import { cli, freshDir, netlistFile } from '../support.js';

const example = (name: string): string => fileURLToPath(new URL(`../../../examples/${name}`, import.meta.url));

/** Every element with a `data-series` attribute: its name and point count. */
function seriesOf(svg: string): Map<string, number> {
  const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@' }).parse(svg) as unknown;
  const out = new Map<string, number>();
  const walk = (n: unknown): void => {
    if (Array.isArray(n)) return n.forEach(walk);
    if (n === null || typeof n !== 'object') return;
    const o = n as Record<string, unknown>;
    if (typeof o['@data-series'] === 'string') out.set(o['@data-series'], Number(o['@data-points']));
    for (const v of Object.values(o)) walk(v);
  };
  walk(doc);
  return out;
}

describe('railcheck run --plot', () => {
  test('the follower: line, load, rejection, ripple and dip plots, each with the curve\'s points, and a page of them all', async () => {
    const dir = freshDir('plot');
    const r = await cli(['run', example('sensor-rail-follower.cir'), '--plot', dir]);
    expect(r.status).toBe(0);
    expect(r.err).toMatch(/--plot: 5 plots and .*index\.html written/);
    const files = readdirSync(dir).sort();
    expect(files).toEqual(['index.html', 'line.svg', 'load.svg', 'rejection.svg', 'ripple-waveform.svg', 'sag-waveform.svg']);
    const run = runNetlistFile(example('sensor-rail-follower.cir'));
    if (!run.ok) throw new Error('the example does not run');
    const m = measureCurves(run.report.compiled);
    if (!m.ok) throw new Error('no curves');
    const c = m.curves;
    expect(seriesOf(readFileSync(join(dir, 'line.svg'), 'utf8')).get('output (mean)')).toBe(c.line!.x.length);
    expect(seriesOf(readFileSync(join(dir, 'load.svg'), 'utf8')).get('output (mean)')).toBe(c.load!.x.length);
    expect(seriesOf(readFileSync(join(dir, 'rejection.svg'), 'utf8')).get('rejection')).toBe(c.rejection!.x.length);
    const ripple = seriesOf(readFileSync(join(dir, 'ripple-waveform.svg'), 'utf8'));
    expect([ripple.get('input'), ripple.get('output')]).toEqual([c.ripple!.time.length, c.ripple!.time.length]);
    const page = readFileSync(join(dir, 'index.html'), 'utf8');
    for (const f of files.filter((x) => x.endsWith('.svg'))) {
      expect(page, f).toContain(`href="${f}"`);
    }
    expect((page.match(/<svg[\s>]/g) ?? []).length).toBeGreaterThanOrEqual(5);
    // The figures and limits beside the plots, as the text report words them.
    expect(page).toContain('dropout.v');
    expect(page).toMatch(/dropout\.v &lt;= 1\.9/);
  }, 120_000);

  test('a sine-fed stage above extra-low voltage: no rejection curve (no small-signal method), the caution on the page', async () => {
    const dir = freshDir('plot-mains');
    const stage = netlistFile(
      ['mains-fed bench rail, half-wave reservoir', 'VSEC sec 0 sin(0 325 50)', 'RW sec a 20', 'D1 a out DR', '.model DR D (IS=1e-9 N=1.8)', 'C1 out 0 47u', 'RL out 0 10k', '.supply in=VSEC out=out load=RL', '.figure line', '.figure ripple', '.end', ''].join('\n'),
    );
    const r = await cli(['run', stage, '--plot', dir]);
    expect(r.status).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['index.html', 'line.svg', 'ripple-waveform.svg']);
    expect(readFileSync(join(dir, 'index.html'), 'utf8')).toMatch(/extra-low voltage/);
  }, 120_000);

  test('.tran, .dc and .ac analyses get a plot each, the supply\'s nodes first', async () => {
    const dir = freshDir('plot-analyses');
    const stage = netlistFile(['model-railway filter', 'V1 in 0 12 ac 1', 'R1 in out 100', 'C1 out 0 10u', '.tran 0.1m 5m', '.dc V1 0 12 1', '.ac dec 5 10 100k', '.end', ''].join('\n'));
    const r = await cli(['run', stage, '--plot', dir]);
    expect(r.status).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['ac-1.svg', 'dc-1.svg', 'index.html', 'tran-1.svg']);
    const ac = seriesOf(readFileSync(join(dir, 'ac-1.svg'), 'utf8'));
    // 5 points a decade over 4 decades and both ends: 21 frequencies.
    expect(ac.get('V(out)')).toBe(21);
    expect(seriesOf(readFileSync(join(dir, 'dc-1.svg'), 'utf8')).get('V(out)')).toBe(13);
  }, 120_000);

  test('a folder that is a file is refused with a message, no stack trace', async () => {
    const dir = freshDir('plot-bad');
    const file = netlistFile('t\nV1 a 0 1\nR1 a 0 1\n.supply in=V1 out=a\n.figure line\n.end\n');
    const r = await cli(['run', file, '--plot', file]);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/railcheck run: --plot: .* exists and is not a folder/);
    expect(r.err).not.toMatch(/\n\s+at /);
    expect(readdirSync(dir)).toEqual([]);
    // A folder that cannot be made under /proc on Linux: a message at once (node's own recursive mkdir never returns there).
    if (process.platform === 'linux') {
      const proc = await cli(['run', file, '--plot', '/proc/railcheck-no-such/plots']);
      expect(proc.status).toBe(2);
      expect(proc.err).toMatch(/railcheck run: --plot: cannot make the folder \/proc\/railcheck-no-such\/plots .*no plot was written/);
    }
  }, 60_000);
});

describe('railcheck run --csv with the figures\' waveforms', () => {
  test('OUT-ripple.csv and OUT-sag.csv: time, input, output, one row per accepted point of the figure\'s run', async () => {
    const dir = freshDir('csv-waves');
    const out = join(dir, 'w.csv');
    const r = await cli(['run', example('sensor-rail-follower.cir'), '--csv', out]);
    expect(r.status).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['w-ripple.csv', 'w-sag.csv']);
    const rows = readFileSync(join(dir, 'w-ripple.csv'), 'utf8').trim().split('\n');
    expect(rows[0]).toBe('time,input,output');
    const run = runNetlistFile(example('sensor-rail-follower.cir'));
    if (!run.ok) throw new Error('the example does not run');
    const m = measureCurves(run.report.compiled);
    if (!m.ok) throw new Error('no curves');
    expect(rows.length - 1).toBe(m.curves.ripple!.time.length);
    // Three whole cycles of 100 Hz from the settled start.
    expect(Number(rows[rows.length - 1]!.split(',')[0])).toBeCloseTo(0.03, 9);
  }, 120_000);
});

describe('compare and spread --plot', () => {
  test('compare: both stages on the same axes; spread: a histogram per limited figure and temperature with its limit drawn', async () => {
    const dir = freshDir('plot-compare');
    const c = await cli(['compare', example('sensor-rail-follower.cir'), example('sensor-rail-follower-modified.cir'), '--plot', dir]);
    expect(c.status).toBe(1);
    const line = seriesOf(readFileSync(join(dir, 'compare-line.svg'), 'utf8'));
    expect([...line.keys()].sort()).toEqual(['output (mean), modified', 'output (mean), original']);
    const sdir = freshDir('plot-spread');
    const s = await cli(['spread', example('sensor-rail-spread.cir'), '--runs', '40', '--jobs', '1', '--plot', sdir]);
    expect(s.status).toBeLessThanOrEqual(1);
    // Four limited figures at three temperatures.
    const svgs = readdirSync(sdir).filter((f) => f.endsWith('.svg'));
    expect(svgs.length).toBe(12);
    const one = readFileSync(join(sdir, 'spread-3-dropout-v.svg'), 'utf8');
    expect(one).toContain('limit &lt;= 2');
  }, 180_000);
});
