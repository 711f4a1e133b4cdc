/**
 * The plots of a run, a compare and a spread (docs/plots.md), as
 * {@link PlotSpec} data: the curves and waveforms behind the figures
 * (measureCurves), every `.tran`, `.dc` and `.ac` analysis of the netlist,
 * and beside them the figures and limits as the text report words them.
 */
import { figureEntry, figureUnit, formatSI, histogram, phasorDb, type FigureCurves, type RunReport, type SpreadResult } from '@railcheck/core';
import { formatFigureValue } from '../present/figures.js';
import { valuesOf } from '../present/spread.js';
import type { PageFact } from './page.js';
import type { PlotAxis, PlotSeries, PlotSpec } from './spec.js';
import type { PlotSection } from './write.js';

/** Most node series drawn in one analysis plot (the supply's nodes first); the CSV and JSON have them all. */
const MAX_NODE_SERIES = 6;

const volts: PlotAxis = { label: 'output', unit: 'V' };

/** The nodes to draw of an analysis: the stage's input, feed and output nodes first, then the others in netlist order. */
function nodeOrder(report: RunReport, names: readonly string[]): string[] {
  const s = report.circuit.supply;
  const key = (n: string): string => n.toLowerCase();
  const first = s ? [s.out, s.feed].filter((k): k is string => k !== undefined) : [];
  const input = s ? report.circuit.elements.find((e) => e.key === s.input) : undefined;
  const inputNodes = input ? input.nodes.filter((k) => k !== '0') : [];
  const wanted = [...inputNodes, ...first];
  const ranked = [...names].sort((a, b) => rank(a) - rank(b));
  function rank(n: string): number {
    const k = wanted.indexOf(key(n));
    return k < 0 ? wanted.length + names.indexOf(n) : k;
  }
  return ranked.slice(0, MAX_NODE_SERIES);
}

/** The input axis of the line curve: volts on a DC input, the amplitude ratio on a sine-fed stage. */
const inputAxis = (unit: 'V' | 'ratio'): PlotAxis => (unit === 'V' ? { label: 'input', unit: 'V' } : { label: 'input amplitude, ratio of nominal', unit: '' });

/** The plots of the curves behind the figures (see measure/curves.ts in core). */
export function curvePlots(curves: FigureCurves, stem = ''): PlotSpec[] {
  const out: PlotSpec[] = [];
  const id = (s: string): string => (stem ? `${stem}-${s}` : s);
  const c = curves;
  if (c.line && c.line.x.length > 0) {
    const l = c.line;
    const unit = l.unit === 'V' ? 'V' : '';
    out.push({
      id: id('line'),
      title: 'Output against input',
      subtitle: l.dropout ? `dropout at ${l.unit === 'V' ? formatSI(l.dropout.x, 'V') : `${l.dropout.x.toPrecision(4)}× the amplitude`}` : 'no dropout point',
      x: inputAxis(l.unit),
      y: volts,
      series: [{ name: 'output (mean)', x: l.x, y: l.y, style: 'line' }],
      markers: [
        { x: l.nominal.x, y: l.nominal.y, label: `nominal ${formatSI(l.nominal.y, 'V')}` },
        ...(l.dropout ? [{ x: l.dropout.x, y: l.dropout.y, label: `dropout ${unit ? formatSI(l.dropout.x, unit) : l.dropout.x.toPrecision(3)}` }] : []),
      ],
    });
  }
  if (c.load && c.load.x.length > 0) {
    const l = c.load;
    out.push({
      id: id('load'),
      title: 'Output against load current',
      x: { label: 'load current', unit: 'A' },
      y: volts,
      series: [{ name: 'output (mean)', x: l.x, y: l.y, style: 'line' }],
      markers: l.nominal ? [{ x: l.nominal.x, y: l.nominal.y, label: `nominal ${formatSI(l.nominal.x, 'A')}` }] : [],
    });
  }
  if (c.rejection && c.rejection.x.length > 0) {
    const r = c.rejection;
    out.push({
      id: id('rejection'),
      title: 'Ripple rejection against frequency',
      subtitle: 'small-signal, the stage linearised at its nominal point',
      x: { label: 'frequency', unit: 'Hz', log: true },
      y: { label: 'rejection', unit: 'dB' },
      series: [{ name: 'rejection', x: r.x, y: r.y, style: 'line' }],
      xRules: [{ at: r.marked, label: `ripple figure ${formatSI(r.marked, 'Hz')}` }],
    });
  }
  if (c.ripple && c.ripple.time.length > 0) {
    const w = c.ripple;
    out.push(waveformPlot(id('ripple-waveform'), 'Ripple at periodic steady state', c.bench === 'dc' ? `${formatSI(w.amp, 'V')} peak at ${formatSI(w.hertz, 'Hz')} on the input` : 'the nominal source cycles', w, []));
  }
  if (c.sag && c.sag.time.length > 0) {
    const w = c.sag;
    out.push(waveformPlot(id('sag-waveform'), 'Input dip and the output', `a dip of ${(w.depth * 100).toFixed(1)} %, time from the start of the dip`, w, [
      { at: w.corners[0]!, label: 'dip starts' },
      { at: w.corners[2]!, label: 'recovery starts' },
    ]));
  }
  return out;
}

/** Input (and feed) on the left axis, output on the right one, against time. */
function waveformPlot(id: string, title: string, subtitle: string, w: { time: readonly number[]; input: readonly number[]; feed: readonly number[] | undefined; output: readonly number[] }, rules: PlotSpec['xRules']): PlotSpec {
  const series: PlotSeries[] = [{ name: 'input', x: w.time, y: w.input, style: 'line' }];
  if (w.feed) series.push({ name: 'feed', x: w.time, y: w.feed, style: 'line' });
  series.push({ name: 'output', x: w.time, y: w.output, style: 'line', axis: 'right' });
  return { id, title, subtitle, x: { label: 'time', unit: 's' }, y: { label: w.feed ? 'input and feed' : 'input', unit: 'V' }, y2: { label: 'output', unit: 'V' }, series, ...(rules && rules.length > 0 ? { xRules: rules } : {}) };
}

/** The plots of the netlist's own analyses: every `.tran` (node voltages against time), `.dc` (against the swept value) and `.ac` (magnitude against frequency). */
export function analysisPlots(report: RunReport): PlotSpec[] {
  const out: PlotSpec[] = [];
  report.transients.forEach((t, k) => {
    const names = nodeOrder(report, Object.keys(t.nodes));
    out.push({
      id: `tran-${k + 1}`,
      title: `Transient at ${t.temperature} °C`,
      ...(names.length < Object.keys(t.nodes).length ? { subtitle: `${names.length} of ${Object.keys(t.nodes).length} nodes (all in --csv)` } : {}),
      x: { label: 'time', unit: 's' },
      y: { label: 'node voltage', unit: 'V' },
      series: names.map((n) => ({ name: `V(${n})`, x: t.times, y: Array.from(t.nodes[n]!), style: 'line' as const })),
    });
  });
  report.sweeps.forEach((s, k) => {
    const names = nodeOrder(report, Object.keys(s.nodes));
    out.push({
      id: `dc-${k + 1}`,
      title: `DC sweep of ${s.source} at ${s.temperature} °C`,
      x: { label: s.source, unit: report.circuit.elements.find((e) => e.name.toLowerCase() === s.source.toLowerCase())?.kind === 'isource' ? 'A' : 'V' },
      y: { label: 'node voltage', unit: 'V' },
      series: names.map((n) => ({ name: `V(${n})`, x: s.values, y: s.nodes[n]!, style: 'line' as const })),
    });
  });
  report.ac.forEach((a, k) => {
    const names = nodeOrder(report, Object.keys(a.nodes));
    out.push({
      id: `ac-${k + 1}`,
      title: `Small-signal response at ${a.temperature} °C`,
      subtitle: 'magnitude per unit of ac drive',
      x: { label: 'frequency', unit: 'Hz', log: true },
      y: { label: 'magnitude', unit: 'dB' },
      series: names.map((n) => {
        const p = a.nodes[n]!;
        const db = p.re.map((re, i) => phasorDb(re, p.im[i]!));
        // A zero phasor has no magnitude in dB: left out of its series.
        const keep = db.map((v) => Number.isFinite(v));
        return { name: `V(${n})`, x: a.frequencies.filter((_, i) => keep[i]), y: db.filter((_, i) => keep[i]), style: 'line' as const };
      }),
    });
  });
  return out;
}

/** The registry entries of the stress tables' per-part ratios (figure registry). */
const STRESS_ROWS: ReadonlySet<string> = new Set(['stress.<element>.<quantity>', 'short.<element>.<quantity>']);

/** The figures and limits of a report, worded as the text report words them. */
export function reportFacts(report: RunReport): PageFact[] {
  const f = report.figures;
  if (!f) return [];
  const facts: PageFact[] = [];
  for (const g of f.figures) {
    if (!g.ok) continue;
    for (const [n, v] of Object.entries(g.values)) {
      // A stress table's ratios are many: the page shows the worst, the report has the table.
      if (STRESS_ROWS.has(figureEntry(n)?.name ?? '')) continue;
      facts.push({ name: n, value: formatFigureValue(n, v, g.units[n]!) });
    }
  }
  for (const l of f.limits) {
    const unit = figureUnit(l.figure, f.bench ?? 'dc');
    const value = l.actual === undefined || unit === undefined ? '—' : formatFigureValue(l.figure, l.actual, unit);
    facts.push({ name: `${l.figure} ${l.op} ${l.value}`, value, status: l.status === 'pass' ? 'pass' : l.status === 'fail' ? 'FAIL' : 'not evaluated' });
  }
  return facts;
}

/** The mains caution of a report (the `above-elv` note), when its stage exceeds extra-low voltage. */
export function reportCaution(report: RunReport): string | undefined {
  return report.warnings.find((w) => w.code === 'above-elv')?.message;
}

/** The sections of a run's page: the figures' curves, then the analyses. */
export function runSections(report: RunReport, curves: FigureCurves | undefined): PlotSection[] {
  const sections: PlotSection[] = [];
  const figurePlots = curves ? curvePlots(curves) : [];
  if (figurePlots.length > 0 || report.figures) sections.push({ heading: 'Figures', specs: figurePlots, facts: reportFacts(report) });
  const analyses = analysisPlots(report);
  if (analyses.length > 0) sections.push({ heading: 'Analyses', specs: analyses, facts: [] });
  return sections;
}

/** The sections of a compare: each curve of the two stages on the same axes, original and modified. */
export function compareSections(original: FigureCurves | undefined, modified: FigureCurves | undefined, facts: readonly PageFact[]): PlotSection[] {
  const a = original ? curvePlots(original) : [];
  const b = modified ? curvePlots(modified) : [];
  const specs: PlotSpec[] = [];
  for (const pa of a) {
    const pb = b.find((p) => p.id === pa.id);
    const tag = (s: PlotSeries, who: string): PlotSeries => ({ ...s, name: `${s.name}, ${who}` });
    specs.push({
      ...pa,
      id: `compare-${pa.id}`,
      subtitle: pb ? 'original and modified' : 'original only: the modified stage has no such curve',
      series: [...pa.series.map((s) => tag(s, 'original')), ...(pb ? pb.series.map((s) => tag(s, 'modified')) : [])],
      // The nominal points of the two sit close together: only the other markers (dropout) are drawn, each named.
      markers: [...(pa.markers ?? []).filter((m) => !m.label.startsWith('nominal')).map((m) => ({ ...m, label: `${m.label} (original)` })), ...(pb?.markers ?? []).filter((m) => !m.label.startsWith('nominal')).map((m) => ({ ...m, label: `${m.label} (modified)` }))],
      ...(pa.y2 ? { y2: pa.y2 } : {}),
    });
  }
  for (const pb of b) if (!a.some((p) => p.id === pb.id)) specs.push({ ...pb, id: `compare-${pb.id}`, subtitle: 'modified only', series: pb.series.map((s) => ({ ...s, name: `${s.name}, modified` })) });
  return [{ heading: 'Original and modified', specs, facts }];
}

/** The sections of a spread: per temperature, a histogram of each figure with a limit over the runs (every figure with `all`), the limits drawn; the runs' values must be in the result (`allRuns`, as the CLI asks for them). */
export function spreadSections(r: SpreadResult, all = false): PlotSection[] {
  return r.at.map((at, k) => {
    const specs: PlotSpec[] = [];
    const limited = new Set(at.limits.map((l) => l.figure.toLowerCase()));
    for (const fig of at.figures) {
      if (!all && !limited.has(fig.name.toLowerCase())) continue;
      const values = valuesOf(r, k, fig.name);
      if (!values || values.length === 0) continue;
      const h = histogram(values);
      const limits = at.limits.filter((l) => l.figure.toLowerCase() === fig.name.toLowerCase());
      specs.push({
        id: `spread-${k + 1}-${fig.name.replace(/[^A-Za-z0-9]+/g, '-')}`,
        title: `${fig.name} over ${values.length} runs at ${at.celsius} °C`,
        x: { label: fig.name, unit: axisUnit(fig.unit) },
        y: { label: 'runs', unit: '' },
        series: [],
        histogram: { name: 'runs', edges: h.edges, counts: h.counts },
        xRules: limits.map((l) => ({ at: l.value, label: `limit ${l.op} ${l.value}` })),
      });
    }
    const facts = at.limits.map((l) => {
      const runs = l.passes + l.fails + l.notEvaluated;
      return { name: `${l.figure} ${l.op} ${l.value}`, value: `${l.passes}/${runs} (${(100 * l.yield).toPrecision(3)} %)`, status: l.passes === runs ? 'pass' : 'FAIL' };
    });
    return { heading: `At ${at.celsius} °C`, specs, facts };
  });
}

/** A figure unit as an axis unit: SI symbols keep theirs, a ratio or a flag is a plain number. */
function axisUnit(u: string): string {
  return u === 'ratio' || u === 'flag' ? '' : u;
}
