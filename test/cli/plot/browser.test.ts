/// <reference lib="dom" />
/**
 * The `--plot` page in a real browser: headless Chromium (Debian's
 * package, /usr/bin/chromium, or $CHROMIUM) driven with puppeteer-core
 * loads index.html from a written folder without console errors, draws
 * every inline SVG with a non-zero box, keeps the plots inside a narrow
 * screen, and opens each linked SVG file. One browser launch for all of it.
 * Skipped, saying so, when no Chromium executable is found.
 */
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, test } from 'vitest';
import { writePlots } from '../../../packages/cli/src/plot/write.js';
import { EXAMPLE_PAGE, EXAMPLES } from './examples.js';

const chromium = process.env['CHROMIUM'] ?? '/usr/bin/chromium';
const found = existsSync(chromium);

describe.skipIf(!found)(found ? 'the plot page in headless Chromium' : `the plot page in headless Chromium: SKIPPED, no Chromium at ${chromium} (apt-get install -y chromium, or set CHROMIUM)`, () => {
  test('loads without console errors, shows every plot, scales down, and opens every linked SVG', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'railcheck-plot-browser-')), 'plots');
    const written = writePlots(dir, EXAMPLE_PAGE, join(dir, '..', 'stage.cir'));
    expect(written.ok).toBe(true);
    const puppeteer = (await import('puppeteer-core')).default;
    const browser = await puppeteer.launch({ executablePath: chromium, headless: true, args: ['--no-sandbox', '--disable-gpu'] });
    try {
      const page = await browser.newPage();
      const problems: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error' || m.type() === 'warn') problems.push(`${m.type()}: ${m.text()}`);
      });
      page.on('pageerror', (e) => problems.push(`page error: ${String(e)}`));
      page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()}`));
      await page.setViewport({ width: 1200, height: 900 });
      await page.goto(pathToFileURL(join(dir, 'index.html')).href, { waitUntil: 'load' });
      const boxes = await page.$$eval('figure svg', (svgs) => svgs.map((s) => ({ id: s.closest('figure')?.getAttribute('data-plot'), w: s.getBoundingClientRect().width, h: s.getBoundingClientRect().height })));
      expect(boxes.map((b) => b.id)).toEqual(EXAMPLES.map((s) => s.id));
      for (const b of boxes) {
        expect(b.w, b.id ?? '').toBeGreaterThan(300);
        expect(b.h, b.id ?? '').toBeGreaterThan(150);
      }
      // Every series path is laid out (a drawn path has a box; an empty series is hidden, and the examples have none).
      const drawn = await page.$$eval('path[data-series]', (ps) => ps.map((p) => (p as SVGGraphicsElement).getBBox().width));
      expect(drawn.length).toBeGreaterThan(0);
      for (const w of drawn) expect(w).toBeGreaterThan(0);
      // The caution is visible at the top.
      const caution = await page.$eval('.caution', (c) => c.getBoundingClientRect().top);
      expect(caution).toBeLessThan(120);

      // A phone-sized screen: the plots shrink to fit, no sideways scrolling.
      await page.setViewport({ width: 380, height: 800 });
      const narrow = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, svgs: Array.from(document.querySelectorAll('figure svg')).map((s) => s.getBoundingClientRect().right) }));
      expect(narrow.scroll).toBeLessThanOrEqual(380);
      for (const r of narrow.svgs) expect(r).toBeLessThanOrEqual(380);

      // Each link leads to an SVG file the browser draws on its own.
      const links = await page.$$eval('figcaption a', (as) => as.map((a) => (a as HTMLAnchorElement).href));
      expect(links).toHaveLength(EXAMPLES.length);
      for (const href of links) {
        const r = await page.goto(href);
        expect(r?.ok(), href).toBe(true);
        const box = await page.$eval('svg', (s) => s.getBoundingClientRect().width);
        expect(box, href).toBeGreaterThan(0);
      }
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  });
});
