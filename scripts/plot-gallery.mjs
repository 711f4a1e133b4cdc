// The plot gallery of docs/plots/ (docs/plots.md, "The gallery"): renders
// plots and screenshots each one in headless Chromium as a PNG.
//
//   node scripts/plot-gallery.mjs                 the built-in examples (test/cli/plot/examples.ts)
//   node scripts/plot-gallery.mjs --svgs DIR      every DIR/*.svg as it is (a --plot folder)
//   node scripts/plot-gallery.mjs --specs DIR     every DIR/*.json, a PlotSpec each, rendered here
//   options: --out DIR (default docs/plots), --page FILE.png (also the whole page
//   of the examples or specs), --scale N (device pixels per px, default 1),
//   --chromium PATH (default /usr/bin/chromium, or $CHROMIUM)
//
// Each PNG is named after its SVG file or spec id. The sources are bundled
// on the fly with esbuild (no build of the packages needed).
import { build } from 'esbuild';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const { values } = parseArgs({
  options: {
    svgs: { type: 'string' },
    specs: { type: 'string' },
    out: { type: 'string', default: join(root, 'docs', 'plots') },
    page: { type: 'string' },
    scale: { type: 'string', default: '1' },
    chromium: { type: 'string', default: process.env.CHROMIUM ?? '/usr/bin/chromium' },
  },
});
if (values.svgs && values.specs) fail('give --svgs or --specs, not both');
if (!existsSync(values.chromium)) fail(`no Chromium at ${values.chromium} (apt-get install -y chromium, or --chromium PATH)`);
const scale = Number(values.scale);
if (!(scale > 0 && scale <= 4)) fail('--scale takes a number above 0, at most 4');

function fail(message) {
  process.stderr.write(`plot-gallery: ${message}\n`);
  process.exit(2);
}

// Bundle the renderer, the page and the examples into one temporary module.
const work = mkdtempSync(join(tmpdir(), 'railcheck-gallery-'));
const entry = [
  `export { renderSvg } from ${JSON.stringify(join(root, 'packages/cli/src/plot/svg.ts'))};`,
  `export { renderPage } from ${JSON.stringify(join(root, 'packages/cli/src/plot/page.ts'))};`,
  `export { EXAMPLES, EXAMPLE_PAGE } from ${JSON.stringify(join(root, 'test/cli/plot/examples.ts'))};`,
].join('\n');
const bundle = join(work, 'gallery.mjs');
await build({
  stdin: { contents: entry, resolveDir: root, loader: 'ts' },
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  outfile: bundle,
  logLevel: 'warning',
  alias: { '@railcheck/core': join(root, 'packages/core/src/index.ts'), '@railcheck/devices': join(root, 'packages/devices/src/index.ts') },
  nodePaths: [join(root, 'packages/cli/node_modules')],
});
const lib = await import(pathToFileURL(bundle).href);

/** The plots to shoot: { name, svg } each, and the page sections when specs are known. */
let plots;
let page;
if (values.svgs) {
  const dir = resolve(values.svgs);
  plots = readdirSync(dir).filter((f) => f.endsWith('.svg')).sort().map((f) => ({ name: basename(f, '.svg'), svg: readFileSync(join(dir, f), 'utf8') }));
} else {
  const specs = values.specs
    ? readdirSync(resolve(values.specs)).filter((f) => f.endsWith('.json')).sort().map((f) => JSON.parse(readFileSync(join(resolve(values.specs), f), 'utf8')))
    : lib.EXAMPLES;
  plots = specs.map((spec) => ({ name: spec.id, svg: lib.renderSvg(spec) }));
  const sections = values.specs
    ? [{ heading: 'Plots', plots: specs.map((spec, k) => ({ spec, svg: plots[k].svg, file: `${spec.id}.svg` })) }]
    : lib.EXAMPLE_PAGE.sections.map((s) => ({ heading: s.heading, plots: s.specs.map((spec) => ({ spec, svg: lib.renderSvg(spec), file: `${spec.id}.svg` })), ...(s.facts ? { facts: s.facts } : {}) }));
  page = lib.renderPage({ title: values.specs ? 'Plots' : lib.EXAMPLE_PAGE.title, ...(values.specs ? {} : { caution: lib.EXAMPLE_PAGE.caution }), sections });
}
if (plots.length === 0) fail('no plot to shoot');

const puppeteer = (await import('puppeteer-core')).default;
const browser = await puppeteer.launch({ executablePath: values.chromium, headless: true, args: ['--no-sandbox', '--disable-gpu'] });
try {
  const tab = await browser.newPage();
  const out = resolve(values.out);
  mkdirSync(out, { recursive: true });
  for (const p of plots) {
    const w = Number(/width="([\d.]+)"/.exec(p.svg)?.[1] ?? 720);
    const h = Number(/height="([\d.]+)"/.exec(p.svg)?.[1] ?? 420);
    await tab.setViewport({ width: Math.ceil(w), height: Math.ceil(h), deviceScaleFactor: scale });
    await tab.setContent(`<!DOCTYPE html><html><body style="margin:0;background:#fff">${p.svg}</body></html>`);
    const file = join(out, `${p.name}.png`);
    await (await tab.$('svg')).screenshot({ path: file });
    process.stdout.write(`${file}\n`);
  }
  if (values.page) {
    if (!page) fail('--page needs the examples or --specs (an SVG folder has its own index.html)');
    await tab.setViewport({ width: 1200, height: 900, deviceScaleFactor: 1 });
    const html = join(work, 'index.html');
    writeFileSync(html, page);
    await tab.goto(pathToFileURL(html).href);
    await tab.screenshot({ path: resolve(values.page), fullPage: true });
    process.stdout.write(`${resolve(values.page)}\n`);
  }
} finally {
  await browser.close();
  rmSync(work, { recursive: true, force: true });
}
