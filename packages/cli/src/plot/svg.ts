/**
 * The SVG renderer of `--plot DIR` (docs/plots.md, "The renderer"): draws
 * any {@link PlotSpec} as one standalone SVG document, with no dependency
 * and no randomness, so the same spec always gives the same bytes.
 *
 * Axis ticks are "nice" numbers, 1, 2 or 5 times a power of ten (the
 * labelling of Heckbert, "Nice numbers for graph labels", Graphics Gems,
 * 1990); log axes are labelled at decades, with 2 and 5 where they fit.
 * Tick labels carry SI prefixes as reports do (formatSI; SI Brochure, 9th
 * ed., §3). Every number written is finite and rounded to 1/100 px; a
 * value that cannot be drawn (not finite, beyond ±1e100, or below 1e-100 on
 * a log axis, so any value ≤ 0) is skipped, and a range with no width is widened about its value.
 */
import { formatSI } from '@railcheck/core';
import { match } from 'ts-pattern';
import type { PlotAxis, PlotRule, PlotSeries, PlotSpec } from './spec.js';

/**
 * The Okabe–Ito palette of eight colours told apart under the common colour
 * vision deficiencies (Okabe and Ito, "Color Universal Design", 2008).
 */
export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/**
 * Series colours in the order they are handed out: the Okabe–Ito colours
 * with at least 3:1 contrast on white first (WCAG 2.1, 1.4.11, non-text
 * contrast), then the paler ones; yellow (1.3:1 on white) is left out.
 */
export const SERIES_COLOURS: readonly string[] = [OKABE_ITO.blue, OKABE_ITO.vermillion, OKABE_ITO.bluishGreen, OKABE_ITO.reddishPurple, OKABE_ITO.black, OKABE_ITO.orange, OKABE_ITO.skyBlue];

/** The look shared by every plot and the page: sizes in px, colours as CSS hex. */
export const PLOT_LOOK = {
  /** Default drawing size; the SVG scales (viewBox) to any width. */
  width: 720,
  height: 420,
  /** A generic font stack: the reader's own interface font, no download. */
  font: 'system-ui, sans-serif',
  /** Text (15.9:1 on white). */
  text: '#1A1A1A',
  /** Secondary text: subtitles, tick labels (7.5:1 on white). */
  muted: '#4D4D4D',
  /** Grid lines. */
  grid: '#E4E4E4',
  /** Plot frame and tick marks. */
  frame: '#595959',
  /** Reference lines (rules) and markers. */
  rule: '#333333',
  /** Histogram bars: fill and outline. */
  barFill: OKABE_ITO.skyBlue,
  barLine: OKABE_ITO.blue,
  titleSize: 17,
  subtitleSize: 12.5,
  labelSize: 12.5,
  tickSize: 11.5,
  lineWidth: 2,
  pointRadius: 3.2,
} as const;

/** Drawing size of one SVG in px (default {@link PLOT_LOOK}'s 720 × 420). */
export interface SvgSize {
  readonly width?: number;
  readonly height?: number;
}

/** Largest magnitude drawn; beyond it a value is skipped as not drawable. */
const LIMIT = 1e100;

/** A number for SVG: rounded to 1/100, never -0, never non-finite (clamped). */
function n(v: number): string {
  const c = Number.isFinite(v) ? Math.max(-1e6, Math.min(1e6, v)) : 0;
  const r = Math.round(c * 100) / 100;
  return String(r === 0 ? 0 : r);
}

/** A data value for attributes: 12 significant digits. */
function dataNumber(v: number): string {
  const r = Number(v.toPrecision(12));
  return String(r === 0 ? 0 : r);
}

/** Text escaped for XML content and attribute values. */
export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}

/** Estimated width of `s` at `size` px in a sans-serif face (average advance about 0.56 em). */
function textWidth(s: string, size: number): number {
  return s.length * size * 0.56;
}

/** Units written without prefixes (a "k" before dB or % reads wrongly). */
const PLAIN_UNITS = new Set(['dB', '%', '%/V', '°C', '']);

/** A tick label: `value` with `digits` significant digits, prefixed as formatSI does, or plain for dB, %, °C and bare numbers. */
function tickLabel(value: number, unit: string, digits: number): string {
  if (!PLAIN_UNITS.has(unit)) return formatSI(value, unit, digits);
  const a = Math.abs(value);
  if (a === 0 || a < 1e-15) return unit ? `0 ${unit}` : '0';
  const text = a >= 1e6 || a < 1e-3 ? Number(value.toPrecision(digits)).toExponential() : String(Number(value.toPrecision(digits)));
  return unit === '%' || unit === '' ? `${text}${unit === '%' ? ' %' : ''}` : `${text} ${unit}`;
}

const PREFIX: Readonly<Record<number, string>> = { 12: 'T', 9: 'G', 6: 'M', 3: 'k', 0: '', [-3]: 'm', [-6]: 'µ', [-9]: 'n', [-12]: 'p', [-15]: 'f' };

/**
 * Labels of linear ticks `values` spaced `step`: one SI prefix for all
 * (the one formatSI would give the largest magnitude) and as many decimals
 * as the step needs, so `4.9995 V, 5.0000 V, 5.0005 V` line up; dB, % and
 * bare numbers take no prefix. Outside the prefixes' range each label is
 * formatSI's own.
 */
function linearLabels(values: readonly number[], step: number, unit: string): string[] {
  const mag = Math.max(...values.map(Math.abs), step);
  const plain = PLAIN_UNITS.has(unit);
  const e3 = plain ? 0 : 3 * Math.floor(Math.log10(mag) / 3 + 1e-9);
  const prefix = PREFIX[e3];
  const scaledStep = step / 10 ** e3;
  const decimals = Math.max(0, -Math.floor(Math.log10(scaledStep) + 1e-9));
  if (prefix === undefined || (plain && (mag >= 1e9 || decimals > 9))) return values.map((v) => (plain ? tickLabel(v, unit, digitsFor(mag, step)) : formatSI(v, unit, digitsFor(mag, step))));
  const sep = unit === '' && prefix === '' ? '' : ' ';
  return values.map((v) => {
    const m = v / 10 ** e3;
    const text = Math.abs(m) < 0.5 * 10 ** -decimals ? (0).toFixed(decimals) : m.toFixed(decimals);
    return `${text}${sep}${prefix}${unit}`;
  });
}

/** One axis as drawn: its shown range, scale, ticks (labelled and minor). */
interface Scale {
  readonly min: number;
  readonly max: number;
  readonly log: boolean;
  readonly ticks: readonly { readonly at: number; readonly label: string }[];
  readonly minor: readonly number[];
}

/** Whether `v` can be drawn on an axis: finite and at most 1e100 in size; on a log axis also at least 1e-100 (so above zero). */
function drawable(v: number, log: boolean): boolean {
  return Number.isFinite(v) && Math.abs(v) <= LIMIT && (!log || v >= 1 / LIMIT);
}

/** The range to show for values `vs`: padded by `pad` of the span, widened when it has no width; `floor` keeps a bound (counts start at 0). */
function rangeOf(vs: readonly number[], log: boolean, pad: number, floor?: number): [number, number] {
  const ok = vs.filter((v) => drawable(v, log));
  if (ok.length === 0) return log ? [1, 10] : [0, 1];
  let lo = Math.min(...ok);
  let hi = Math.max(...ok);
  if (log) {
    let a = Math.log10(lo);
    let b = Math.log10(hi);
    if (b - a < 1e-9) {
      a -= 0.5;
      b += 0.5;
    } else {
      const p = (b - a) * pad;
      a -= p;
      b += p;
    }
    return [10 ** a, 10 ** b];
  }
  const mag = Math.max(Math.abs(lo), Math.abs(hi));
  // No width (or one too small to divide into ticks): widen about the value by 5 %, at least 1e-100 (1 for zero).
  if (hi - lo <= mag * 1e-9 || hi - lo < 1e-100) {
    const w = mag === 0 ? 1 : Math.max(mag * 0.05, 1e-100);
    lo -= w;
    hi += w;
  } else {
    const p = (hi - lo) * pad;
    lo -= p;
    hi += p;
  }
  if (floor !== undefined && lo < floor && Math.min(...ok) >= floor) lo = floor;
  return [lo, hi];
}

/** 1, 2 or 5 times a power of ten, the one nearest `raw` (Heckbert's rounding: below 1.5 → 1, 3 → 2, 7 → 5). */
function niceStep(raw: number): number {
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m < 1.5 ? 1 : m < 3 ? 2 : m < 7 ? 5 : 10) * p;
}

/** The next larger nice step after `step` (1 → 2 → 5 → 10). */
function nextStep(step: number): number {
  const p = 10 ** Math.floor(Math.log10(step) + 1e-9);
  const m = Math.round(step / p);
  return (m < 2 ? 2 : m < 5 ? 5 : 10) * p;
}

/** Significant digits that tell ticks `step` apart up to magnitude `mag`. */
function digitsFor(mag: number, step: number): number {
  const d = Math.floor(Math.log10(mag)) - Math.floor(Math.log10(step) + 1e-9) + 1;
  return Math.max(1, Math.min(12, Number.isFinite(d) ? d : 1));
}

/**
 * Linear ticks over [min, max], about `target` of them, spaced so no two
 * labels (each `room(label)` px wide or tall) touch across `length` px.
 */
function linearTicks(min: number, max: number, unit: string, target: number, length: number, room: (s: string) => number, integer: boolean): Scale {
  let step = niceStep((max - min) / Math.max(1, target));
  if (integer) step = Math.max(1, step);
  for (let tries = 0; tries < 12; tries++) {
    const first = Math.ceil(min / step - 1e-9);
    const last = Math.floor(max / step + 1e-9);
    const at: number[] = [];
    for (let i = first; i <= last && at.length < 60; i++) at.push(i === 0 ? 0 : i * step);
    const names = at.length ? linearLabels(at, step, unit) : [];
    const ticks = at.map((v, k) => ({ at: v, label: names[k]! }));
    const spacing = (step / (max - min)) * length;
    const widest = Math.max(0, ...ticks.map((t) => room(t.label)));
    if (spacing >= widest + 10 || tries === 11) return { min, max, log: false, ticks, minor: [] };
    step = nextStep(step);
  }
  /* c8 ignore next */
  return { min, max, log: false, ticks: [], minor: [] };
}

/** Log ticks over [min, max]: decades labelled (every k-th when crowded), minor ticks at 2…9, and 2 and 5 labelled when there is room. */
function logTicks(min: number, max: number, unit: string, length: number, room: (s: string) => number): Scale {
  const a = Math.log10(min);
  const b = Math.log10(max);
  const decades = b - a;
  const pxPerDecade = length / decades;
  const inRange = (v: number): boolean => v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9);
  const lo = Math.floor(a);
  const hi = Math.ceil(b);
  const widest = (vs: readonly number[]): number => Math.max(0, ...vs.map((v) => room(tickLabel(v, unit, 2))));
  const decadeValues: number[] = [];
  for (let k = lo; k <= hi; k++) if (inRange(10 ** k)) decadeValues.push(10 ** k);
  let every = 1;
  while (pxPerDecade * every < widest(decadeValues) + 10 && every < 1000) every *= 2;
  const labelled = new Set<number>();
  for (let k = lo; k <= hi; k++) if (k % every === 0 && inRange(10 ** k)) labelled.add(10 ** k);
  const minor: number[] = [];
  if (decades <= 12) for (let k = lo; k <= hi; k++) for (let m = 2; m <= 9; m++) if (inRange(m * 10 ** k)) minor.push(m * 10 ** k);
  // 2 and 5 take a label when each decade has room for three labels, or when decades alone give fewer than two.
  const spaceOf = (v: number, w: number): boolean => {
    const x = (Math.log10(v) - a) * pxPerDecade;
    return [...labelled].every((u) => Math.abs((Math.log10(u) - a) * pxPerDecade - x) >= (w + room(tickLabel(u, unit, 2))) / 2 + 8);
  };
  const candidates = (ms: readonly number[]): number[] => minor.filter((v) => ms.some((m) => Math.abs(v / 10 ** Math.floor(Math.log10(v) + 1e-9) - m) < 1e-6));
  if (decades <= 12 && (pxPerDecade >= 3 * (widest(decadeValues) + 10) || labelled.size < 2)) {
    for (const v of candidates([2, 5])) if (spaceOf(v, room(tickLabel(v, unit, 2)))) labelled.add(v);
  }
  if (labelled.size < 2) for (const v of candidates([3, 4, 6, 7, 8, 9])) if (spaceOf(v, room(tickLabel(v, unit, 2)))) labelled.add(v);
  const ticks = [...labelled].sort((x, y) => x - y).map((v) => ({ at: v, label: tickLabel(v, unit, 2) }));
  return { min, max, log: true, ticks, minor: minor.filter((v) => !labelled.has(v)) };
}

/** Position of `v` on a scale drawn from `p0` (at min) to `p1` (at max). */
function place(s: Scale, v: number, p0: number, p1: number): number {
  const t = s.log ? (Math.log10(v) - Math.log10(s.min)) / (Math.log10(s.max) - Math.log10(s.min)) : (v - s.min) / (s.max - s.min);
  return p0 + t * (p1 - p0);
}

/** Axis title: `label (unit)`, or the label alone for a plain number. */
function axisTitle(a: PlotAxis): string {
  return a.unit ? `${a.label} (${a.unit})` : a.label;
}

/** Lines of at most `width` px at `size`, at most `most` of them (the last cut with an ellipsis). */
function wrap(text: string, width: number, size: number, most: number): string[] {
  const words = text.split(/\s+/).filter((w) => w.length > 0);
  const lines: string[] = [];
  let line = '';
  for (const w of words) {
    const next = line ? `${line} ${w}` : w;
    if (line && textWidth(next, size) > width) {
      lines.push(line);
      line = w;
    } else line = next;
  }
  if (line) lines.push(line);
  if (lines.length > most) {
    const kept = lines.slice(0, most);
    kept[most - 1] = `${kept[most - 1]!}…`;
    return kept;
  }
  return lines;
}

/** A box in px, for keeping labels apart. */
interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

const overlaps = (p: Box, q: Box): boolean => p.x0 < q.x1 && q.x0 < p.x1 && p.y0 < q.y1 && q.y0 < p.y1;

/** The finite, drawable points of a series against its scales. */
function pointsOf(s: PlotSeries, xs: Scale, ys: Scale): [number, number][] {
  const out: [number, number][] = [];
  const count = Math.min(s.x.length, s.y.length);
  for (let i = 0; i < count; i++) {
    const x = s.x[i]!;
    const y = s.y[i]!;
    if (drawable(x, xs.log) && drawable(y, ys.log)) out.push([x, y]);
  }
  return out;
}

/** Legend entries: name, colour, and how the swatch is drawn. */
interface LegendEntry {
  readonly name: string;
  readonly colour: string;
  readonly kind: 'line' | 'points' | 'step' | 'bar';
}

/**
 * Draws `spec` as a standalone SVG document (docs/plots.md): frame, grid,
 * ticks and axis titles, the title and subtitle, a legend when there is
 * more than one series or a histogram, the series, histogram bars, dashed
 * rules and labelled markers, and a right axis for series on `axis:
 * 'right'`. Each series' path carries `data-series` (its name) and
 * `data-points` (points drawn); each axis group `data-min`/`data-max` (its
 * shown range, in the axis unit). `size` sets the drawing size in px.
 */
export function renderSvg(spec: PlotSpec, size: SvgSize = {}): string {
  const L = PLOT_LOOK;
  const W = size.width !== undefined && Number.isFinite(size.width) && size.width >= 200 ? size.width : L.width;
  const H = size.height !== undefined && Number.isFinite(size.height) && size.height >= 150 ? size.height : L.height;
  const xLog = spec.x.log === true;
  const yLog = spec.y.log === true;
  const rightSeries = spec.series.filter((s) => s.axis === 'right');
  const leftSeries = spec.series.filter((s) => s.axis !== 'right');
  const hasRight = rightSeries.length > 0;
  const y2Axis: PlotAxis = spec.y2 ?? spec.y;
  const y2Log = hasRight && y2Axis.log === true;
  const colourOf = new Map<PlotSeries, string>(spec.series.map((s, k) => [s, SERIES_COLOURS[k % SERIES_COLOURS.length]!]));
  const hist = spec.histogram;

  // Ranges: everything drawn against an axis lies inside it.
  const xValues: number[] = [...spec.series.flatMap((s) => s.x.slice(0, Math.min(s.x.length, s.y.length))), ...(spec.markers ?? []).map((m) => m.x), ...(spec.xRules ?? []).map((r) => r.at), ...(spec.x.include ?? [])];
  const leftValues: number[] = [...leftSeries.flatMap((s) => s.y.slice(0, Math.min(s.x.length, s.y.length))), ...(spec.markers ?? []).map((m) => m.y), ...(spec.yRules ?? []).map((r) => r.at), ...(spec.y.include ?? [])];
  const bins: { lo: number; hi: number; count: number }[] = [];
  if (hist) {
    for (let i = 0; i + 1 < hist.edges.length && i < hist.counts.length; i++) {
      const lo = hist.edges[i]!;
      const hi = hist.edges[i + 1]!;
      const count = hist.counts[i]!;
      if (drawable(lo, xLog) && drawable(hi, xLog) && hi > lo && drawable(count, false) && count >= 0) bins.push({ lo, hi, count });
    }
    for (const b of bins) xValues.push(b.lo, b.hi);
    if (bins.length > 0) leftValues.push(0, ...bins.map((b) => b.count));
  }
  const countsOnly = hist !== undefined && leftSeries.length === 0;
  const [x0v, x1v] = rangeOf(xValues, xLog, bins.length > 0 && spec.series.length === 0 ? 0.02 : 0.03);
  // Markers get more room, so their labels fit above or below them inside the frame.
  let [y0v, y1v] = rangeOf(leftValues, yLog, (spec.markers ?? []).length > 0 ? 0.1 : 0.06, bins.length > 0 ? 0 : undefined);
  const rightValues = [...rightSeries.flatMap((s) => s.y.slice(0, Math.min(s.x.length, s.y.length))), ...(spec.y2?.include ?? [])];
  let [r0v, r1v] = rangeOf(rightValues, y2Log, 0.06);
  // With series on both sides, the left ones take the upper part of the plot and the right ones the lower, so neither hides the other.
  if (hasRight && leftSeries.length > 0 && !yLog && !y2Log && bins.length === 0) {
    y0v -= (y1v - y0v) * 0.7;
    r1v += (r1v - r0v) * 0.7;
  }

  // Legend entries.
  const legend: LegendEntry[] = [];
  const showLegend = spec.series.length > 1 || hist !== undefined;
  if (showLegend) {
    for (const s of spec.series) legend.push({ name: hasRight && leftSeries.length > 0 && s.axis === 'right' ? `${s.name} (right axis)` : s.name, colour: colourOf.get(s)!, kind: s.style ?? 'line' });
    if (hist) legend.push({ name: hist.name, colour: L.barFill, kind: 'bar' });
  }

  // Vertical layout: title, subtitle, legend rows, plot, x tick labels, x title.
  const pad = 16;
  const titleLines = wrap(spec.title, W - 2 * pad, L.titleSize, 2);
  const subLines = spec.subtitle ? wrap(spec.subtitle, W - 2 * pad, L.subtitleSize, 2) : [];
  let y = pad;
  const titleY: number[] = titleLines.map(() => (y += L.titleSize * 1.25));
  if (subLines.length) y += 2;
  const subY: number[] = subLines.map(() => (y += L.subtitleSize * 1.35));
  const legendRows: { entry: LegendEntry; x: number }[][] = [];
  if (legend.length) {
    let row: { entry: LegendEntry; x: number }[] = [];
    let x = pad;
    for (const e of legend) {
      const w = 30 + textWidth(e.name, L.labelSize) + 18;
      if (row.length && x + w > W - pad) {
        legendRows.push(row);
        row = [];
        x = pad;
      }
      row.push({ entry: e, x });
      x += w;
    }
    legendRows.push(row);
  }
  const legendTop = y + 8;
  y = legendTop + legendRows.length * 20;
  const top = y + 12;
  const bottom = H - (L.tickSize + 8 + L.labelSize + 16);
  const plotH = Math.max(40, bottom - top);

  const tall = (): number => L.tickSize * 1.6;
  const yScale = yLog ? logTicks(y0v, y1v, spec.y.unit, plotH, tall) : linearTicks(y0v, y1v, spec.y.unit, Math.max(2, Math.round(plotH / 55)), plotH, tall, countsOnly);
  const rScale = y2Log ? logTicks(r0v, r1v, y2Axis.unit, plotH, tall) : linearTicks(r0v, r1v, y2Axis.unit, Math.max(2, Math.round(plotH / 55)), plotH, tall, false);
  const widestY = Math.max(0, ...yScale.ticks.map((t) => textWidth(t.label, L.tickSize)));
  const widestR = hasRight ? Math.max(0, ...rScale.ticks.map((t) => textWidth(t.label, L.tickSize))) : 0;
  const left = pad + L.labelSize + 10 + widestY + 8;
  const right = W - (hasRight ? pad + L.labelSize + 10 + widestR + 8 : pad + 8);
  const wide = (s: string): number => textWidth(s, L.tickSize);
  const xTicks = (w: number): Scale => (xLog ? logTicks(x0v, x1v, spec.x.unit, w, wide) : linearTicks(x0v, x1v, spec.x.unit, Math.max(2, Math.round(w / 90)), w, wide, false));
  let plotW = Math.max(60, right - left);
  let xScale = xTicks(plotW);
  // The last tick label must not run past the edge of the drawing: narrow the plot once if it does.
  const last = xScale.ticks[xScale.ticks.length - 1];
  if (last) {
    const over = left + place(xScale, last.at, 0, plotW) + wide(last.label) / 2 - (W - 4);
    if (over > 0) {
      plotW = Math.max(60, plotW - over);
      xScale = xTicks(plotW);
    }
  }

  const X = (v: number): number => place(xScale, v, left, left + plotW);
  const Y = (v: number): number => place(yScale, v, top + plotH, top);
  const R = (v: number): number => place(rScale, v, top + plotH, top);
  const clipId = `rc-clip-${spec.id.replace(/[^A-Za-z0-9-]/g, '-')}`;

  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${n(W)}" height="${n(H)}" viewBox="0 0 ${n(W)} ${n(H)}" role="img" aria-labelledby="${clipId}-title" font-family="${L.font}" font-size="${L.tickSize}" fill="${L.text}" style="font-variant-numeric: tabular-nums">`);
  out.push(`<title id="${clipId}-title">${escapeXml(spec.subtitle ? `${spec.title}: ${spec.subtitle}` : spec.title)}</title>`);
  out.push(`<rect width="${n(W)}" height="${n(H)}" fill="#FFFFFF"/>`);
  out.push(`<defs><clipPath id="${clipId}"><rect x="${n(left)}" y="${n(top)}" width="${n(plotW)}" height="${n(plotH)}"/></clipPath></defs>`);

  // Title and subtitle.
  titleLines.forEach((t, k) => out.push(`<text class="title" x="${n(pad)}" y="${n(titleY[k]!)}" font-size="${L.titleSize}" font-weight="600">${escapeXml(t)}</text>`));
  subLines.forEach((t, k) => out.push(`<text class="subtitle" x="${n(pad)}" y="${n(subY[k]!)}" font-size="${L.subtitleSize}" fill="${L.muted}">${escapeXml(t)}</text>`));

  // Grid (under everything drawn in the plot).
  out.push(`<g class="grid" stroke="${L.grid}" stroke-width="1">`);
  for (const v of xScale.minor) out.push(`<line x1="${n(X(v))}" y1="${n(top)}" x2="${n(X(v))}" y2="${n(top + plotH)}" stroke-opacity="0.6"/>`);
  for (const v of yScale.minor) out.push(`<line x1="${n(left)}" y1="${n(Y(v))}" x2="${n(left + plotW)}" y2="${n(Y(v))}" stroke-opacity="0.6"/>`);
  for (const t of xScale.ticks) out.push(`<line x1="${n(X(t.at))}" y1="${n(top)}" x2="${n(X(t.at))}" y2="${n(top + plotH)}"/>`);
  for (const t of yScale.ticks) out.push(`<line x1="${n(left)}" y1="${n(Y(t.at))}" x2="${n(left + plotW)}" y2="${n(Y(t.at))}"/>`);
  out.push('</g>');

  // Axes: ticks, labels, titles.
  const axisGroup = (name: string, s: Scale): string => `<g class="axis axis-${name}" data-axis="${name}" data-min="${dataNumber(s.min)}" data-max="${dataNumber(s.max)}"${s.log ? ' data-log="true"' : ''}>`;
  out.push(axisGroup('x', xScale));
  for (const t of xScale.ticks) {
    out.push(`<line x1="${n(X(t.at))}" y1="${n(top + plotH)}" x2="${n(X(t.at))}" y2="${n(top + plotH + 5)}" stroke="${L.frame}"/>`);
    out.push(`<text x="${n(X(t.at))}" y="${n(top + plotH + 8 + L.tickSize)}" text-anchor="middle" fill="${L.muted}">${escapeXml(t.label)}</text>`);
  }
  out.push(`<text class="axis-title" x="${n(left + plotW / 2)}" y="${n(H - 12)}" text-anchor="middle" font-size="${L.labelSize}">${escapeXml(axisTitle(spec.x))}</text>`);
  out.push('</g>');
  out.push(axisGroup('y', yScale));
  for (const t of yScale.ticks) {
    out.push(`<line x1="${n(left - 5)}" y1="${n(Y(t.at))}" x2="${n(left)}" y2="${n(Y(t.at))}" stroke="${L.frame}"/>`);
    out.push(`<text x="${n(left - 8)}" y="${n(Y(t.at))}" dy="0.35em" text-anchor="end" fill="${L.muted}">${escapeXml(t.label)}</text>`);
  }
  const yTitle = countsOnly && spec.y.label === '' ? 'runs' : axisTitle(spec.y);
  out.push(`<text class="axis-title" transform="translate(${n(pad + L.labelSize * 0.8)} ${n(top + plotH / 2)}) rotate(-90)" text-anchor="middle" font-size="${L.labelSize}">${escapeXml(yTitle)}</text>`);
  out.push('</g>');
  if (hasRight) {
    out.push(axisGroup('y2', rScale));
    for (const t of rScale.ticks) {
      out.push(`<line x1="${n(left + plotW)}" y1="${n(R(t.at))}" x2="${n(left + plotW + 5)}" y2="${n(R(t.at))}" stroke="${L.frame}"/>`);
      out.push(`<text x="${n(left + plotW + 8)}" y="${n(R(t.at))}" dy="0.35em" text-anchor="start" fill="${L.muted}">${escapeXml(t.label)}</text>`);
    }
    out.push(`<text class="axis-title" transform="translate(${n(W - pad - L.labelSize * 0.3)} ${n(top + plotH / 2)}) rotate(90)" text-anchor="middle" font-size="${L.labelSize}">${escapeXml(axisTitle(y2Axis))}</text>`);
    out.push('</g>');
  }

  // Histogram bars.
  if (hist) {
    out.push(`<g class="histogram" data-series="${escapeXml(hist.name)}" data-points="${bins.length}" clip-path="url(#${clipId})" fill="${L.barFill}" fill-opacity="0.75" stroke="${L.barLine}" stroke-width="1">`);
    for (const b of bins) {
      const xa = X(b.lo);
      const xb = X(b.hi);
      const yt = Y(b.count);
      const yb = Y(yLog ? yScale.min : Math.max(yScale.min, 0));
      out.push(`<rect x="${n(xa)}" y="${n(Math.min(yt, yb))}" width="${n(Math.max(0, xb - xa))}" height="${n(Math.abs(yb - yt))}"/>`);
    }
    out.push('</g>');
  }

  // The series in px, and the obstacles labels keep clear of: points along every series (every 5 px at most), bars, markers.
  const drawn = spec.series.map((s) => {
    const onRight = s.axis === 'right';
    const ys = onRight ? rScale : yScale;
    return { s, onRight, pts: pointsOf(s, xScale, ys).map(([a, b]): [number, number] => [X(a), onRight ? R(b) : Y(b)]) };
  });
  const obstacles: [number, number][] = [];
  for (const { s, pts } of drawn) {
    const style = s.style ?? 'line';
    const stride = Math.max(1, Math.ceil(pts.length / 4000));
    for (let k = 0; k < pts.length; k += stride) {
      const [a, b] = pts[k]!;
      obstacles.push([a, b]);
      const next = pts[Math.min(pts.length - 1, k + stride)]!;
      if (style === 'points' || k + stride >= pts.length) continue;
      const corner: [number, number] = style === 'step' ? [next[0], b] : next;
      const steps = Math.min(200, Math.ceil(Math.hypot(corner[0] - a, corner[1] - b) / 5));
      for (let j = 1; j < steps; j++) obstacles.push([a + ((corner[0] - a) * j) / steps, b + ((corner[1] - b) * j) / steps]);
      if (style === 'step') for (let j = 1; j < 20; j++) obstacles.push([next[0], b + ((next[1] - b) * j) / 20]);
    }
  }
  const blocked: Box[] = bins.map((b) => ({ x0: X(b.lo), x1: X(b.hi), y0: Y(b.count), y1: top + plotH }));
  const markers = (spec.markers ?? []).filter((m) => drawable(m.x, xLog) && drawable(m.y, yLog)).map((m) => ({ m, x: X(m.x), y: Y(m.y) }));
  for (const m of markers) blocked.push({ x0: m.x - 6, x1: m.x + 6, y0: m.y - 6, y1: m.y + 6 });

  // Labels go where they cover the least: clear of other labels first, then of markers and bars, then of the series.
  const placed: Box[] = [];
  const labels: string[] = [];
  const label = (text: string, tries: readonly [number, number, 'start' | 'end'][], colour: string): void => {
    const w = textWidth(text, L.tickSize) + 4;
    const h = L.tickSize + 2;
    const inside = (b: Box): boolean => b.x0 >= left + 2 && b.x1 <= left + plotW - 2 && b.y0 >= top + 2 && b.y1 <= top + plotH - 2;
    const score = (b: Box): number =>
      (inside(b) ? 0 : 1e9) +
      placed.filter((p) => overlaps(p, b)).length * 1e6 +
      blocked.filter((p) => overlaps(p, b)).length * 1e3 +
      obstacles.filter(([a, c]) => a >= b.x0 - 2 && a <= b.x1 + 2 && c >= b.y0 - 2 && c <= b.y1 + 2).length;
    let best: { x: number; yb: number; anchor: 'start' | 'end'; box: Box } | undefined;
    let bestScore = Infinity;
    for (const [x, yb, anchor] of tries) {
      const box = { x0: anchor === 'start' ? x - 2 : x - w + 2, x1: anchor === 'start' ? x + w - 2 : x + 2, y0: yb - h + 2, y1: yb + 3 };
      const sc = score(box);
      if (sc < bestScore) {
        best = { x, yb, anchor, box };
        bestScore = sc;
      }
    }
    if (!best) return;
    placed.push(best.box);
    labels.push(`<text x="${n(best.x)}" y="${n(best.yb)}" text-anchor="${best.anchor}" fill="${colour}" stroke="#FFFFFF" stroke-width="3" stroke-linejoin="round" paint-order="stroke">${escapeXml(text)}</text>`);
  };

  // Rules (dashed), under the series.
  const ruleLabels: (() => void)[] = [];
  const drawRules = (rules: readonly PlotRule[], vertical: boolean): void => {
    for (const r of rules) {
      if (!drawable(r.at, vertical ? xLog : yLog)) continue;
      if (vertical) {
        const x = X(r.at);
        out.push(`<line class="rule rule-x" x1="${n(x)}" y1="${n(top)}" x2="${n(x)}" y2="${n(top + plotH)}" stroke="${L.rule}" stroke-width="1.3" stroke-dasharray="6 4"/>`);
        const rows = [top + L.tickSize + 6, top + 2 * L.tickSize + 12, top + plotH / 2, top + plotH - 8];
        ruleLabels.push(() => label(r.label, rows.flatMap((yb): [number, number, 'start' | 'end'][] => [[x + 5, yb, 'start'], [x - 5, yb, 'end']]), L.rule));
      } else {
        const yv = Y(r.at);
        out.push(`<line class="rule rule-y" x1="${n(left)}" y1="${n(yv)}" x2="${n(left + plotW)}" y2="${n(yv)}" stroke="${L.rule}" stroke-width="1.3" stroke-dasharray="6 4"/>`);
        const cols: [number, 'start' | 'end'][] = [[left + plotW - 6, 'end'], [left + 6, 'start'], [left + plotW / 2, 'start']];
        ruleLabels.push(() => label(r.label, cols.flatMap(([x, anchor]): [number, number, 'start' | 'end'][] => [[x, yv - 5, anchor], [x, yv + L.tickSize + 4, anchor]]), L.rule));
      }
    }
  };
  drawRules(spec.xRules ?? [], true);
  drawRules(spec.yRules ?? [], false);

  // Series.
  for (const { s, onRight, pts } of drawn) {
    const colour = colourOf.get(s)!;
    const style = s.style ?? 'line';
    const common = `class="series series-${style}" data-series="${escapeXml(s.name)}" data-points="${pts.length}"${onRight ? ' data-axis="y2"' : ''} clip-path="url(#${clipId})"`;
    const d = match(style)
      .with('line', () => pts.map(([a, b], k) => `${k === 0 ? 'M' : 'L'}${n(a)} ${n(b)}`).join(''))
      .with('step', () => pts.map(([a, b], k) => (k === 0 ? `M${n(a)} ${n(b)}` : `H${n(a)}V${n(b)}`)).join(''))
      .with('points', () => pts.map(([a, b]) => `M${n(a - L.pointRadius)} ${n(b)}a${n(L.pointRadius)} ${n(L.pointRadius)} 0 1 0 ${n(2 * L.pointRadius)} 0a${n(L.pointRadius)} ${n(L.pointRadius)} 0 1 0 ${n(-2 * L.pointRadius)} 0z`).join(''))
      .exhaustive();
    const paint = style === 'points' ? `fill="${colour}" fill-opacity="0.85" stroke="#FFFFFF" stroke-width="0.8"` : `fill="none" stroke="${colour}" stroke-width="${L.lineWidth}" stroke-linejoin="round" stroke-linecap="round"`;
    out.push(`<path ${common} ${paint} d="${d || 'M0 0'}"${d ? '' : ' visibility="hidden"'}/>`);
  }

  // Markers over the series; their labels first (they belong to one point), then the rules'.
  for (const { x, y: yv } of markers) out.push(`<circle class="marker" cx="${n(x)}" cy="${n(yv)}" r="5" fill="${L.rule}" stroke="#FFFFFF" stroke-width="1.5"/>`);
  for (const { m, x, y: yv } of markers) {
    const near = L.tickSize + 6;
    label(m.label, [[x + 9, yv - 8, 'start'], [x - 9, yv - 8, 'end'], [x + 9, yv + near, 'start'], [x - 9, yv + near, 'end'], [x + 9, yv - 8 - near, 'start'], [x - 9, yv - 8 - near, 'end'], [x + 9, yv + 2 * near, 'start'], [x - 9, yv + 2 * near, 'end']], L.text);
  }
  for (const f of ruleLabels) f();
  out.push(`<g class="labels" font-size="${L.tickSize}">${labels.join('')}</g>`);

  // Frame over the grid and data edges.
  out.push(`<rect class="frame" x="${n(left)}" y="${n(top)}" width="${n(plotW)}" height="${n(plotH)}" fill="none" stroke="${L.frame}" stroke-width="1"/>`);

  // Legend.
  if (legendRows.length) {
    out.push(`<g class="legend" font-size="${L.labelSize}">`);
    legendRows.forEach((row, k) => {
      const cy = legendTop + k * 20 + 10;
      for (const { entry, x } of row) {
        const swatch = match(entry.kind)
          .with('bar', () => `<rect x="${n(x)}" y="${n(cy - 6)}" width="22" height="12" fill="${L.barFill}" fill-opacity="0.75" stroke="${L.barLine}"/>`)
          .with('points', () => `<circle cx="${n(x + 11)}" cy="${n(cy)}" r="${n(L.pointRadius + 0.5)}" fill="${entry.colour}"/>`)
          .with('line', 'step', () => `<line x1="${n(x)}" y1="${n(cy)}" x2="${n(x + 22)}" y2="${n(cy)}" stroke="${entry.colour}" stroke-width="${L.lineWidth + 1}" stroke-linecap="round"/>`)
          .exhaustive();
        out.push(`${swatch}<text x="${n(x + 30)}" y="${n(cy)}" dy="0.35em">${escapeXml(entry.name)}</text>`);
      }
    });
    out.push('</g>');
  }
  out.push('</svg>');
  return `${out.join('\n')}\n`;
}
