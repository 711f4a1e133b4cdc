/**
 * The page of `--plot DIR` (docs/plots.md, "The page"): one self-contained
 * HTML5 file (no external resource, no script) with every plot inline and
 * linked to its own SVG file, and beside each section the report's figures
 * and limits. A mains caution, when the report carries one, stands first.
 */
import { escapeXml, PLOT_LOOK } from './svg.js';
import type { PlotSpec } from './spec.js';

/** One plot on the page: its spec, its rendered SVG, and its file name relative to the page. */
export interface PagePlot {
  readonly spec: PlotSpec;
  readonly svg: string;
  /** File name beside index.html, e.g. `line.svg`. */
  readonly file: string;
}

/** One row of a section's figure table: a figure or limit, its value as the report prints it, and its status (`pass`, `FAIL`, …) if it is a limit. */
export interface PageFact {
  readonly name: string;
  readonly value: string;
  readonly status?: string;
}

/** A section of the page: a heading, its plots, and the figures and limits shown beside them. */
export interface PageSection {
  readonly heading: string;
  readonly plots: readonly PagePlot[];
  readonly facts?: readonly PageFact[];
}

/** What the page shows: its title, the mains caution if any, and the sections. */
export interface PageInput {
  readonly title: string;
  /** The caution the report carries for a stage above extra-low voltage; shown first, prominently. */
  readonly caution?: string;
  readonly sections: readonly PageSection[];
}

const STYLE = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0; padding: 24px; background: #F6F6F4; color: ${PLOT_LOOK.text}; font: 15px/1.45 ${PLOT_LOOK.font}; }
main { max-width: 1180px; margin: 0 auto; }
h1 { font-size: 1.55rem; margin: 0 0 16px; }
h2 { font-size: 1.2rem; margin: 28px 0 12px; }
.caution { border: 2px solid #B34700; border-left-width: 8px; background: #FFF3E6; color: #5C2400; padding: 12px 16px; margin: 0 0 20px; font-weight: 600; border-radius: 4px; }
.caution strong { font-size: 1.05rem; }
.section { display: flex; flex-wrap: wrap; gap: 20px; align-items: flex-start; }
.plots { flex: 1 1 640px; min-width: 0; display: grid; gap: 16px; }
figure { margin: 0; background: #FFFFFF; border: 1px solid #D9D9D6; border-radius: 6px; padding: 8px; }
figure svg { display: block; width: 100%; height: auto; max-width: ${PLOT_LOOK.width}px; }
figcaption { font-size: 0.85rem; color: ${PLOT_LOOK.muted}; padding: 4px 4px 0; }
figcaption a { color: #005A8C; }
.facts { flex: 0 1 380px; min-width: 260px; overflow-x: auto; background: #FFFFFF; border: 1px solid #D9D9D6; border-radius: 6px; padding: 8px 12px; }
table { border-collapse: collapse; width: 100%; font-size: 0.9rem; font-variant-numeric: tabular-nums; }
th, td { text-align: left; padding: 5px 6px; border-bottom: 1px solid #E8E8E5; vertical-align: top; }
td:first-child { overflow-wrap: anywhere; }
th { font-weight: 600; color: ${PLOT_LOOK.muted}; }
td.value { white-space: nowrap; }
.status { font-weight: 700; white-space: nowrap; }
.status-pass { color: #006B4F; }
.status-fail { color: #A33B00; }
@media (max-width: 720px) { body { padding: 10px; } .facts { flex-basis: 100%; } }
`;

/** The CSS class of a status word: pass, fail, or other. */
function statusClass(status: string): string {
  const s = status.toLowerCase();
  return s === 'pass' ? 'status-pass' : s === 'fail' ? 'status-fail' : 'status-other';
}

/** The SVG without anything before its root element (an XML declaration, a doctype), for inlining. */
function inlineSvg(svg: string): string {
  const at = svg.indexOf('<svg');
  return (at >= 0 ? svg.slice(at) : svg).trim();
}

/**
 * Builds the page of `input` (docs/plots.md, "The page"): valid HTML5 with
 * `lang` and a UTF-8 charset, the caution first when given, then each
 * section's plots (inline SVG, captioned with a link to its file) and its
 * facts table (name, value, status; a FAIL stands out). The plots scale
 * down to narrow screens.
 */
export function renderPage(input: PageInput): string {
  const e = escapeXml;
  const out: string[] = [];
  out.push('<!DOCTYPE html>');
  out.push('<html lang="en">');
  out.push('<head>');
  out.push('<meta charset="utf-8">');
  out.push('<meta name="viewport" content="width=device-width, initial-scale=1">');
  out.push(`<title>${e(input.title)}</title>`);
  out.push(`<style>${STYLE}</style>`);
  out.push('</head>');
  out.push('<body>');
  out.push('<main>');
  out.push(`<h1>${e(input.title)}</h1>`);
  if (input.caution) out.push(`<div class="caution" role="alert"><strong>Caution:</strong> ${e(input.caution)}</div>`);
  for (const [k, section] of input.sections.entries()) {
    out.push(`<section aria-labelledby="section-${k + 1}">`);
    out.push(`<h2 id="section-${k + 1}">${e(section.heading)}</h2>`);
    out.push('<div class="section">');
    out.push('<div class="plots">');
    for (const p of section.plots) {
      out.push(`<figure id="plot-${e(p.spec.id)}" data-plot="${e(p.spec.id)}">`);
      out.push(inlineSvg(p.svg));
      out.push(`<figcaption>${e(p.spec.title)} · <a href="${e(encodeURI(p.file))}">${e(p.file)}</a></figcaption>`);
      out.push('</figure>');
    }
    out.push('</div>');
    if (section.facts && section.facts.length > 0) {
      out.push('<aside class="facts">');
      out.push('<table>');
      out.push('<thead><tr><th scope="col">figure or limit</th><th scope="col">value</th><th scope="col">status</th></tr></thead>');
      out.push('<tbody>');
      for (const f of section.facts) {
        const status = f.status ? `<span class="status ${statusClass(f.status)}">${e(f.status)}</span>` : '';
        out.push(`<tr><td>${e(f.name)}</td><td class="value">${e(f.value)}</td><td>${status}</td></tr>`);
      }
      out.push('</tbody>');
      out.push('</table>');
      out.push('</aside>');
    }
    out.push('</div>');
    out.push('</section>');
  }
  out.push('</main>');
  out.push('</body>');
  out.push('</html>');
  return `${out.join('\n')}\n`;
}
