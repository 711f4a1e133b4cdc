/**
 * Writing a `--plot DIR` folder (docs/plots.md): every plot as `<id>.svg`
 * and the page `index.html` beside them, all or none, through the same
 * whole-file writes as `--csv` (present/files.ts). A failure comes back as
 * a message for the command to print, never as a thrown error.
 */
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { writeFailure, writeOutputFiles, type OutputFile } from '../present/files.js';
import { renderPage, type PageFact } from './page.js';
import type { PlotSpec } from './spec.js';
import { renderSvg } from './svg.js';

/** One section of the folder's page: a heading, the plots it shows, and the figures and limits beside them. */
export interface PlotSection {
  readonly heading: string;
  readonly specs: readonly PlotSpec[];
  readonly facts?: readonly PageFact[];
}

/** What goes into one folder: the page title, the report's mains caution if any, and the sections. */
export interface PlotFolder {
  readonly title: string;
  readonly caution?: string;
  readonly sections: readonly PlotSection[];
}

/** The outcome of {@link writePlots}: the paths written (every SVG, then index.html), or why nothing was. */
export type PlotWriteOutcome = { readonly ok: true; readonly paths: readonly string[] } | { readonly ok: false; readonly message: string };

/** A plot id as a file stem: letters, digits and `-` (spec.ts). */
const ID = /^[A-Za-z0-9-]+$/;

/**
 * The files of a plot folder `dir`, ready to write: `<id>.svg` for every
 * spec (in section order) and `index.html` last; or why not (an id that is
 * no file stem, or two plots with one id).
 */
export function plotFiles(dir: string, folder: PlotFolder): { readonly ok: true; readonly files: readonly OutputFile[] } | { readonly ok: false; readonly message: string } {
  const seen = new Set<string>();
  for (const s of folder.sections.flatMap((x) => x.specs)) {
    if (!ID.test(s.id)) return { ok: false, message: `plot id ${JSON.stringify(s.id)} is not a file stem (letters, digits and -)` };
    if (seen.has(s.id.toLowerCase())) return { ok: false, message: `two plots have the id ${s.id}` };
    seen.add(s.id.toLowerCase());
  }
  const sections = folder.sections.map((x) => ({
    heading: x.heading,
    plots: x.specs.map((spec) => ({ spec, svg: renderSvg(spec), file: `${spec.id}.svg` })),
    ...(x.facts ? { facts: x.facts } : {}),
  }));
  const page = renderPage({ title: folder.title, ...(folder.caution ? { caution: folder.caution } : {}), sections });
  const files: OutputFile[] = sections.flatMap((x) => x.plots.map((p) => ({ path: join(dir, p.file), text: p.svg })));
  files.push({ path: join(dir, 'index.html'), text: page });
  return { ok: true, files };
}

/**
 * Makes the folder `dir` and its missing parents, one level at a time,
 * each with a plain mkdir: a parent that cannot hold folders fails at once
 * (mkdirSync's own `recursive` walk never returns under /proc on Linux,
 * node 20: found trying `--plot /proc/x`). Throws the file system's error.
 */
function makeFolder(dir: string): void {
  const missing: string[] = [];
  for (let p = resolve(dir); !existsSync(p); p = dirname(p)) {
    missing.push(p);
    if (dirname(p) === p) break;
  }
  for (const m of missing.reverse()) mkdirSync(m);
}

/**
 * Writes the plot folder `dir` (created with its parents when missing):
 * every plot of `folder` as `<id>.svg` and the page `index.html`, all of
 * them or none, never over the netlist `protect` (writeOutputFiles).
 * Returns the paths written, or the message to print after
 * `railcheck COMMAND: --plot: `.
 */
export function writePlots(dir: string, folder: PlotFolder, protect: string): PlotWriteOutcome {
  const built = plotFiles(dir, folder);
  if (!built.ok) return built;
  try {
    if (!statSync(dir).isDirectory()) return { ok: false, message: `${dir} exists and is not a folder` };
  } catch {
    try {
      makeFolder(dir);
    } catch (e) {
      return { ok: false, message: `cannot make the folder ${dir} (${writeFailure(resolve(dir), e)}); no plot was written` };
    }
  }
  const written = writeOutputFiles(built.files, protect);
  if (!written.ok) return written;
  return { ok: true, paths: built.files.map((f) => f.path) };
}
