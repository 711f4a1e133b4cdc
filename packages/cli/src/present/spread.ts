/**
 * The text report of a tolerance run (`railcheck spread`, docs/output.md,
 * "railcheck spread") and of one of its runs repeated (`railcheck run FILE
 * --sample RUN`). Everything printed comes from the one SpreadResult, so
 * that a merge of shards prints what the unsharded run prints, and nothing
 * in it depends on the machine (no times, no rates, no thread count).
 */
import {
  figureEntry, formatSI, histogram,
  type FigureUnit, type SampledValue, type SpreadFigure, type SpreadLimit, type SpreadResult, type SpreadRun, type SpreadRunRef, type SpreadTemperature, type SpreadVariable,
} from '@railcheck/core';
import { BJT_PARAMS, DEVICES, DIODE_PARAMS, kindOfLetter } from '@railcheck/devices';
import { match } from 'ts-pattern';
import { formatFigureValue } from './figures.js';
import { heading, table } from './table.js';
import { formatWarnings } from './text.js';

/** Which figures get a histogram: those with a `.limit` (default), or all. */
export type HistogramChoice = 'limits' | 'all';

/** Width of a full histogram bar, in character cells. */
export const BAR_CELLS = 32;
/** The partial blocks U+258F..U+2589 for 1..7 eighths of a cell; a full cell is U+2588. */
const EIGHTHS = ['', '▏', '▎', '▍', '▌', '▋', '▊', '▉'];

const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;

/**
 * A bar for `count` scaled so that `largest` fills {@link BAR_CELLS} cells,
 * in eighths of a cell; a count above zero shows at least one eighth, so an
 * occupied bin is never blank.
 */
export function bar(count: number, largest: number): string {
  if (count <= 0 || largest <= 0) return '';
  const eighths = Math.max(1, Math.round((count / largest) * BAR_CELLS * 8));
  return '█'.repeat(Math.floor(eighths / 8)) + EIGHTHS[eighths % 8]!;
}

/**
 * A proportion (0..1) as a percentage with one decimal, and more decimals
 * when one would round a proportion short of 1 up to `100 %` or one above 0
 * down to `0 %` (999 999 of a million passes is not 100 %).
 */
export function percentText(p: number): string {
  if (p === 0 || p === 1) return `${p * 100} %`;
  for (let d = 1; d < 12; d++) {
    const t = (p * 100).toFixed(d);
    if (Number(t) !== 0 && Number(t) !== 100) return `${t} %`;
  }
  return `${p * 100} %`;
}

/** Bin edges with their unit: as figure values, with more digits when neighbouring edges would otherwise print alike. */
export function edgeTexts(name: string, edges: readonly number[], unit: FigureUnit): string[] {
  const distinct = (texts: readonly string[]): boolean => texts.every((t, i) => i === 0 || t !== texts[i - 1]);
  const plain = edges.map((e) => formatFigureValue(name, e, unit));
  if (distinct(plain)) return plain;
  for (let digits = 5; digits <= 9; digits++) {
    const texts = edges.map((e) =>
      match(unit)
        .with('V', 'A', 's', 'V/V', 'Ω', 'W', (u) => formatSI(e, u, digits))
        .with('dB', () => `${e.toFixed(digits - 2)} dB`)
        .with('%', '%/V', (u) => `${Number(e.toPrecision(digits))} ${u}`)
        .with('ratio', 'flag', () => `${Number(e.toPrecision(digits))}`)
        // thermal figure (docs/thermal.md)
        .with('°C', 'K', (u) => `${e.toFixed(digits - 2)} ${u}`)
        .with('K/W', (u) => `${Number(e.toPrecision(digits))} ${u}`)
        .exhaustive(),
    );
    if (distinct(texts)) return texts;
  }
  return plain;
}

/** The unit symbol of a spread variable's value: the element's value unit (registry), or the model parameter's; '' when unknown or dimensionless. */
export function variableUnit(v: SpreadVariable): string {
  if (v.sampling === null) {
    const kind = kindOfLetter(v.name.charAt(0).toUpperCase());
    if (!kind) return '';
    const entry = DEVICES[kind];
    return 'value' in entry && entry.value ? entry.value.unit : kind === 'vsource' ? 'V' : kind === 'isource' ? 'A' : '';
  }
  const param = v.target.slice(v.target.lastIndexOf('.') + 1).toUpperCase();
  return [...DIODE_PARAMS, ...BJT_PARAMS].find((p) => p.name === param)?.unit ?? '';
}

/** A value of a spread variable with its unit. */
function variableValue(v: SpreadVariable | undefined, value: number): string {
  const unit = v ? variableUnit(v) : '';
  return unit ? formatSI(value, unit) : `${Number(value.toPrecision(4))}`;
}

/** A factor as a signed percentage away from nominal: `+5.12 %`, `−0.8 %`, `±0 %`. */
function deviation(factor: number): string {
  const pct = (factor - 1) * 100;
  const t = Number(pct.toPrecision(3));
  if (t === 0) return '±0 %';
  return `${t > 0 ? '+' : '−'}${Math.abs(t)} %`;
}

/** A sample in one line: each variable's value and how far from nominal. */
export function sampleText(sample: readonly SampledValue[], variables: readonly SpreadVariable[]): string {
  return sample.map((s) => `${s.name} ${variableValue(variables.find((v) => v.name === s.name), s.value)} (${deviation(s.factor)})`).join(', ');
}

/** A run's sample from its factors (value = nominal × factor), in variable order. */
export function sampleOf(run: SpreadRun, variables: readonly SpreadVariable[]): SampledValue[] {
  return variables.map((v, i) => ({ name: v.name, factor: run.factors[i]!, value: v.nominal * run.factors[i]! }));
}

/** A word for a shell: as it is when it holds only safe characters, else in single quotes. */
function shellWord(w: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(w) ? w : `'${w.replace(/'/g, `'\\''`)}'`;
}

/**
 * The command that repeats run `run` of the result at `celsius`:
 * `railcheck run FILE --sample RUN --seed S --temp C` (`--temp=C` below
 * 0 °C), with `--corners` for a corner design (whose rows need no seed)
 * and `--model-sampling lot` when the spread had that option and has a
 * model spread (a mode written on a `.spread` line is read from the line).
 */
export function repeatCommand(r: SpreadResult, run: number, celsius: number): string {
  const words = ['railcheck', 'run', r.file, '--sample', String(run)];
  if (r.method === 'corners') words.push('--corners');
  else words.push('--seed', String(r.seed));
  // The option as the spread had it (a line's own mode needs nothing: the run reads the line too); only a model spread reads it.
  if (r.modelSampling === 'lot' && r.variables.some((v) => v.sampling !== null)) words.push('--model-sampling', 'lot');
  // A negative temperature is joined to its option, or the command line would read it as an option of its own.
  words.push(...(celsius < 0 ? [`--temp=${celsius}`] : ['--temp', String(celsius)]));
  return words.map(shellWord).join(' ');
}

/** The stage section: input and how it is fed, output with its nominal value, load; '' without a `.supply` line. */
export function stageText(r: SpreadResult): string {
  const st = r.stage;
  if (!st) return '';
  const feed = match(st.feed)
    .with({ kind: 'dc' }, (f) => `${st.input}, ${formatSI(f.volts, 'V')} d.c.`)
    .with({ kind: 'sine' }, (f) => `${st.input}, ${formatSI(f.peakVolts, 'V')} peak sine at ${formatSI(f.hertz, 'Hz')} (figures at periodic steady state)`)
    .with({ kind: 'other' }, () => st.input)
    .exhaustive();
  const nominal = st.voutNominal === null ? '' : `: ${formatSI(st.voutNominal, 'V')} ${st.feed.kind === 'sine' ? 'mean over the nominal cycle' : 'at nominal'} values`;
  const load = st.load === null
    ? 'none named (load= on .supply)'
    : match(st.load)
      .with({ kind: 'resistor' }, (l) => `${l.name}, ${formatSI(l.ohms, 'Ω')} resistor (nominal)`)
      .with({ kind: 'isource' }, (l) => `${l.name}, ${formatSI(l.amps, 'A')} current source (nominal)`)
      .with({ kind: 'other' }, (l) => l.name)
      .exhaustive();
  return [heading('Stage'), table([['input', feed], ['output', `${st.output} against ${st.reference}${nominal}`], ['load', load]], '  ', true)].join('\n');
}

/** The design in words: Monte Carlo with its runs and seed, or the corner design's name and runs. */
export function designText(r: SpreadResult): string {
  if (r.method === 'monte-carlo' || !r.design) return `Monte Carlo, ${plural(r.runCount, 'run')} drawn from seed ${r.seed}`;
  const k = r.variables.length;
  return r.design.kind === 'full'
    ? `corners: all 2^${k} = ${r.runCount} combinations of every spread at its two ends (${r.design.name})`
    : `corners: ${r.design.name}, ${plural(r.runCount, 'run')} instead of all 2^${k} corners`;
}

/** What was spread: one row per variable with its nominal value, tolerance, distribution, model sampling and line. */
function variablesText(r: SpreadResult): string {
  const rows = [['spread', 'nominal', 'tolerance', 'distribution', 'model sampling', 'line']];
  for (const v of r.variables) {
    rows.push([
      v.name,
      variableValue(v, v.nominal),
      `±${Number((v.ratio * 100).toPrecision(4))} %`,
      match(v.distribution).with('uniform', () => 'uniform').with('gauss', () => 'gaussian, ±3σ').exhaustive(),
      v.sampling === null ? '—' : match(v.sampling).with('each', () => 'each part its own').with('lot', () => 'one per model (lot)').exhaustive(),
      v.line,
    ]);
  }
  return table(rows, '  ', true);
}

/** `dropout.v <= 2`: a limit as its line writes it. */
const limitName = (l: SpreadLimit): string => `${l.figure} ${l.op} ${l.value}`;

/** The yield table: per limit the passes over the runs, the yield and its Wilson interval, the fails and the runs not measured. */
function yieldText(t: SpreadTemperature, r: SpreadResult): string {
  if (t.limits.length === 0) return '  no .limit lines: no yield to report';
  const conf = `${Number((r.confidence * 100).toPrecision(4))} %`;
  const rows = [['limit', 'pass', 'yield', `${conf} Wilson interval`, 'fail', 'not measured']];
  for (const l of t.limits) {
    const interval = r.method === 'corners' ? '—' : `${percentText(l.interval.low)} – ${percentText(l.interval.high)}`;
    rows.push([limitName(l), `${l.passes}/${l.passes + l.fails + l.notEvaluated}`, percentText(l.yield), interval, String(l.fails), String(l.notEvaluated)]);
  }
  const note = r.method === 'corners' ? ['  (corner runs are not a random sample of parts: the yield counts corners, and no confidence interval applies)'] : [];
  return [table(rows), ...note].join('\n');
}

/** The unit a limit's figure is measured in, from the figures of its temperature (a figure never measured: the registry's DC unit). */
function unitOf(name: string, t: SpreadTemperature): FigureUnit {
  const f = t.figures.find((g) => g.name.toLowerCase() === name.toLowerCase());
  return f?.unit ?? figureEntry(name)?.units.dc ?? 'ratio';
}

/** Relative width below which a figure counts as the same in every run (rounding of the solves; common practice, no source). */
export const SAME_IN_EVERY_RUN = 1e-9;

/** True when a figure's values differ by no more than rounding over the runs: it has no worst unit to name. */
export function sameInEveryRun(f: SpreadFigure): boolean {
  const s = f.summary;
  return s !== null && s.max - s.min <= SAME_IN_EVERY_RUN * Math.max(Math.abs(s.max), Math.abs(s.min));
}

/** One figure: a line with its runs, mean, standard deviation and direction, then min, percentiles and max in a compact table. */
function figureStats(f: SpreadFigure, r: SpreadResult): string {
  const better = match(f.better).with('lower', () => 'lower is better').with('higher', () => 'higher is better').with('none', () => 'a condition, not a merit').exhaustive();
  const counts = f.notMeasured > 0 ? `measured in ${f.measured} of ${f.measured + f.notMeasured} runs` : `${plural(f.measured, 'run')}`;
  const s = f.summary;
  if (!s) return `  ${f.name} — not measured in any run; ${better}`;
  const v = (x: number): string => formatFigureValue(f.name, x, f.unit);
  if (sameInEveryRun(f)) return `  ${f.name} — ${counts}, ${v(s.mean)} in every run (to ${Math.round(-Math.log10(SAME_IN_EVERY_RUN))} digits); ${better}`;
  const head = `  ${f.name} — ${counts}, mean ${v(s.mean)}, standard deviation ${v(s.std)}; ${better}`;
  const ps = r.percentiles.map((p) => String(p));
  const header = ['min', ...ps.map((p) => `p${p}`), 'max'];
  const values = [v(s.min), ...ps.map((p) => v(s.percentiles[p]!)), v(s.max)];
  return [head, table([header, values].map((row) => ['', ...row]), '    ')].join('\n');
}

/** Which side of `value` a limit's passing values lie on: below for `<`, `<=`; above for `>`, `>=`. */
const passesBelow = (l: SpreadLimit): boolean => match(l.op).with('<', '<=', () => true).with('>', '>=', () => false).exhaustive();

/**
 * A histogram of a figure over the runs: one row per bin (stats.ts
 * `histogram`: equal bins by Sturges' rule, J. Am. Stat. Assoc. 21, 1926) with its range, a bar scaled to the fullest bin and the count;
 * each limit on the figure marked on the bin it falls in, or named below
 * when it lies outside every run's value.
 */
export function histogramText(values: readonly number[], f: SpreadFigure, limits: readonly SpreadLimit[]): string {
  const h = histogram(values);
  const edges = edgeTexts(f.name, h.edges, f.unit);
  const largest = Math.max(...h.counts);
  const mine = limits.filter((l) => l.figure.toLowerCase() === f.name.toLowerCase());
  const lo = h.edges[0]!;
  const hi = h.edges[h.edges.length - 1]!;
  const marks = h.counts.map(() => [] as string[]);
  const outside: string[] = [];
  for (const l of mine) {
    const at = h.counts.findIndex((_, i) => l.value >= h.edges[i]! && (l.value < h.edges[i + 1]! || (i === h.counts.length - 1 && l.value <= hi)));
    if (at >= 0) marks[at]!.push(`◀ limit ${l.op} ${formatFigureValue(f.name, l.value, f.unit)}`);
    else outside.push(`  limit ${limitName(l)} lies ${l.value < lo ? 'below' : 'above'} every run's value: ${passesBelow(l) === l.value > hi ? 'every run passes it' : 'every run fails it'}`);
  }
  const rows = h.counts.map((c, i) => {
    const range = h.edges[i] === h.edges[i + 1] ? `${edges[i]} (every run)` : `${edges[i]} – ${edges[i + 1]}`;
    return [range, bar(c, largest).padEnd(BAR_CELLS), String(c), marks[i]!.join('  ')];
  });
  const laidOut = table(rows.map(([range, b, c, m]) => [range!, `${b}  ${c!.padStart(String(largest).length)}${m ? `  ${m}` : ''}`]), '      ', true);
  return [laidOut, ...outside.map((o) => `    ${o}`)].join('\n');
}

/** One entry of the worst units: the run and what it is worst for, in words. */
interface WorstEntry {
  readonly ref: SpreadRunRef;
  readonly what: string;
}

/** The worst runs of a temperature: per limit the least margin, per figure its worst end (figure registry's `better`). */
function worstEntries(t: SpreadTemperature): WorstEntry[] {
  const out: WorstEntry[] = [];
  const named = new Set<string>();
  for (const l of t.limits) {
    const w = l.worst;
    if (!w) continue;
    const unit = unitOf(l.figure, t);
    const what =
      w.value === null || w.margin === null
        ? `${limitName(l)}: not measured`
        : `${limitName(l)}: ${formatFigureValue(l.figure, w.value, unit)}, ${w.margin < 0 ? `${formatFigureValue(l.figure, -w.margin, unit)} beyond the limit (FAIL)` : `${formatFigureValue(l.figure, w.margin, unit)} inside the limit`}`;
    if (w.value !== null) named.add(`${w.run}:${l.figure.toLowerCase()}:${w.value}`);
    out.push({ ref: w, what });
  }
  for (const f of t.figures.filter((g) => !sameInEveryRun(g))) {
    const sides = match(f.better)
      .with('lower', () => ['highest'])
      .with('higher', () => ['lowest'])
      .with('none', () => ['lowest', 'highest'])
      .exhaustive();
    f.worst.forEach((w, i) => {
      // The run a limit on this figure already names with this value: the limit's line says it.
      if (w.value !== null && named.has(`${w.run}:${f.name.toLowerCase()}:${w.value}`)) return;
      out.push({ ref: w, what: `${sides[i] ?? 'worst'} ${f.name}: ${w.value === null ? 'not measured' : formatFigureValue(f.name, w.value, f.unit)}` });
    });
  }
  return out;
}

/** The worst units, one block per run (in the order first named): what it is worst for, one line each, its sample and the command that repeats it. */
function worstText(t: SpreadTemperature, r: SpreadResult): string {
  const entries = worstEntries(t);
  if (entries.length === 0) return '  no run measured anything';
  const byRun = new Map<number, WorstEntry[]>();
  for (const e of entries) byRun.set(e.ref.run, [...(byRun.get(e.ref.run) ?? []), e]);
  const blocks: string[] = [];
  for (const [run, list] of byRun) {
    blocks.push(
      [`  run ${run}, the worst for`, ...list.map((e) => `      ${e.what}`), `    sample  ${sampleText(list[0]!.ref.sample, r.variables)}`, `    repeat  ${repeatCommand(r, run, t.celsius)}`].join('\n'),
    );
  }
  return blocks.join('\n');
}

/**
 * Runs that did not give every figure at this temperature: those that
 * failed as a whole (with the reason), then those where a figure or
 * value was not measured (with what and why); each with its
 * sample and the command that repeats it. Never dropped: each counts
 * against the yield of the limits on what it lacks.
 */
function failedText(t: SpreadTemperature, r: SpreadResult): string | undefined {
  const blocks: string[] = [];
  for (const f of t.failed) {
    blocks.push([`  run ${f.run}: did not run: ${f.reason}`, `    sample  ${sampleText(f.sample, r.variables)}`, `    repeat  ${repeatCommand(r, f.run, t.celsius)}`].join('\n'));
  }
  for (const run of t.incomplete) {
    blocks.push(
      [
        `  run ${run.run}: not measured: ${run.missing.map((m) => `${m.name} (${m.reason})`).join('; ')}`,
        `    sample  ${sampleText(run.sample, r.variables)}`,
        `    repeat  ${repeatCommand(r, run.run, t.celsius)}`,
      ].join('\n'),
    );
  }
  return blocks.length > 0 ? blocks.join('\n') : undefined;
}

/** The values of figure `name` at temperature index `k` over every run that measured it, in run order (from `runs`). */
export function valuesOf(r: SpreadResult, k: number, name: string): number[] | undefined {
  if (!r.runs) return undefined;
  const out: number[] = [];
  for (const run of r.runs) {
    const v = run.at[k]?.values[name];
    if (v !== undefined) out.push(v);
  }
  return out;
}

/** The section of one temperature: yields, figures with their histograms, worst units, failed runs. */
function temperatureText(t: SpreadTemperature, k: number, r: SpreadResult, histograms: HistogramChoice): string {
  const parts = [heading(`At ${t.celsius} °C`), '', '  Yield against the limits', yieldText(t, r), '', '  Figures over the runs'];
  const limited = new Set(t.limits.map((l) => l.figure.toLowerCase()));
  for (const f of t.figures) {
    parts.push(figureStats(f, r));
    // A figure the same in every run has nothing to draw: its line says the value.
    if ((histograms === 'all' || limited.has(f.name.toLowerCase())) && !sameInEveryRun(f)) {
      const values = valuesOf(r, k, f.name);
      if (values && values.length > 0) parts.push(histogramText(values, f, t.limits));
    }
  }
  parts.push('', '  Worst units', worstText(t, r));
  const failed = failedText(t, r);
  if (failed) parts.push('', '  Runs that did not give every figure', failed);
  return parts.join('\n');
}

/** The verdict lines: per temperature and limit, how many runs failed it; the runs that did not run. */
export function verdictText(r: SpreadResult): string {
  const lines: string[] = [];
  for (const t of r.at) {
    const short = t.limits.filter((l) => l.passes < l.passes + l.fails + l.notEvaluated);
    for (const l of short) lines.push(`${limitName(l)} at ${t.celsius} °C: ${l.fails + l.notEvaluated} of ${plural(l.passes + l.fails + l.notEvaluated, 'run')} fail${l.notEvaluated > 0 ? ` (${l.notEvaluated} not measured)` : ''}`);
    if (t.failed.length > 0) lines.push(`at ${t.celsius} °C ${plural(t.failed.length, 'run')} did not run`);
  }
  const limits = r.at[0]?.limits.length ?? 0;
  if (lines.length === 0) return limits > 0 ? `verdict: every limit passes in all ${plural(r.runsDone, 'run')}${r.at.length > 1 ? ` at each of ${r.at.length} temperatures` : ''}` : `verdict: all ${plural(r.runsDone, 'run')} ran; there are no limits to judge them by`;
  return ['verdict:', ...lines.map((l) => `  ${l}`)].join('\n');
}

/** Options of {@link spreadText}. */
export interface SpreadTextOptions {
  /** Which figures get a histogram (default: those with a limit). */
  readonly histograms?: HistogramChoice;
}

/**
 * The whole text report of a tolerance run: header and caution, what was
 * spread and the design, then per temperature the yields with their
 * Wilson intervals, each figure's statistics (and histogram), the worst
 * units with their samples and the command that repeats each, the runs
 * that did not give every figure; the verdict and the notes last.
 */
export function spreadText(r: SpreadResult, options: SpreadTextOptions = {}): string {
  const histograms = options.histograms ?? 'limits';
  const parts = [`railcheck spread — ${r.title || '(untitled)'}`, `  netlist ${r.file}`, ''];
  const elv = r.warnings.find((w) => w.code === 'above-elv');
  if (r.caution) parts.push(`caution: ${elv?.message ?? r.caution}`, '');
  const stage = stageText(r);
  if (stage) parts.push(stage, '');
  parts.push(heading('What is spread'), variablesText(r), '');
  const ps = r.percentiles.map((p) => `p${p}`).join(' ');
  parts.push(
    table(
      [
        ['design', designText(r)],
        ['statistics', `min, percentiles ${ps} (Hyndman & Fan definition 7), max; mean and sample standard deviation`],
        ['yield', `${r.method === 'corners' ? 'corners passed over corners run' : `passes over runs, with the ${Number((r.confidence * 100).toPrecision(4))} % Wilson score interval`}; a run whose figure was not measured counts as a fail`],
      ],
      '  ',
      true,
    ),
    '',
  );
  r.at.forEach((t, k) => parts.push(temperatureText(t, k, r, histograms), ''));
  parts.push(verdictText(r), '');
  const notes = formatWarnings(r.warnings.filter((w) => w.code !== 'above-elv'));
  if (notes) parts.push(notes, '');
  return parts.join('\n');
}

/** A `.limit` as `run --sample` judges it on one run: the line's figure, comparison and bound. */
export interface SampleLimit {
  readonly figure: string;
  readonly op: SpreadLimit['op'];
  readonly value: number;
}

/** The outcome of one limit on one run at one temperature: pass or fail with the value, or not measured. */
export type SampleLimitResult =
  | { readonly status: 'pass' | 'fail'; readonly limit: SampleLimit; readonly celsius: number; readonly actual: number }
  | { readonly status: 'not-evaluated'; readonly limit: SampleLimit; readonly celsius: number; readonly reason: string };

/** True when `actual` meets `op bound`. */
const meets = (op: SampleLimit['op'], actual: number, bound: number): boolean =>
  match(op)
    .with('<', () => actual < bound)
    .with('<=', () => actual <= bound)
    .with('>', () => actual > bound)
    .with('>=', () => actual >= bound)
    .exhaustive();

/** Each limit judged on a run at each of its temperatures (a figure not measured, or a run that failed, is not evaluated). */
export function judgeSample(run: SpreadRun, limits: readonly SampleLimit[]): SampleLimitResult[] {
  return run.at.flatMap((at) =>
    limits.map((limit): SampleLimitResult => {
      const key = Object.keys(at.values).find((n) => n.toLowerCase() === limit.figure.toLowerCase());
      const actual = key === undefined ? undefined : at.values[key];
      if (actual === undefined) {
        const why = at.failure ?? at.notMeasured.find((m) => m.name.toLowerCase() === limit.figure.toLowerCase() || limit.figure.toLowerCase().startsWith(`${m.name.toLowerCase()}.`))?.reason ?? 'the figure was not measured';
        return { status: 'not-evaluated', limit, celsius: at.celsius, reason: why };
      }
      return { status: meets(limit.op, actual, limit.value) ? 'pass' : 'fail', limit, celsius: at.celsius, actual };
    }),
  );
}

/** The unit of a figure value by name, from the registry (its DC bench's, else its sine-fed bench's). */
function registryUnit(name: string): FigureUnit | undefined {
  const units = figureEntry(name)?.units;
  return units?.dc ?? units?.['sine-fed'];
}

/** A figure value with its unit when the registry knows the name, else as a plain number. */
function sampleValueText(name: string, v: number): string {
  const unit = registryUnit(name);
  return unit ? formatFigureValue(name, v, unit) : `${Number(v.toPrecision(4))}`;
}

/** What `run --sample` needs to print: the sample outcome's parts and where the run came from. */
export interface SampleReport {
  readonly title: string;
  readonly file: string;
  /** How the run was made, in words: `run 417 of a Monte Carlo spread with seed 42`. */
  readonly origin: string;
  /** The mains caution of the stage (with where it is reached), or null below extra-low voltage. */
  readonly caution: string | null;
  readonly variables: readonly SpreadVariable[];
  readonly sample: readonly SampledValue[];
  readonly run: SpreadRun;
  readonly limits: readonly SampleLimitResult[];
}

/**
 * The text of one run of a spread repeated: the mains caution when the
 * stage is above extra-low voltage, the sampled values, the figure
 * values at each temperature (with the same units and digits as the spread
 * report, so a worst unit's value reads the same), what was not measured
 * and why, and the limits with pass or FAIL.
 */
export function sampleRunText(s: SampleReport): string {
  const parts = [`railcheck — ${s.title || '(untitled)'}`, `  netlist ${s.file}`, `  ${s.origin}`, ''];
  if (s.caution) parts.push(`caution: ${s.caution}`, '');
  const rows = [['spread', 'value', 'from nominal', 'nominal']];
  for (const v of s.sample) {
    const variable = s.variables.find((x) => x.name === v.name);
    rows.push([v.name, variableValue(variable, v.value), deviation(v.factor), variable ? variableValue(variable, variable.nominal) : '']);
  }
  parts.push(heading('Sample'), table(rows), '');
  for (const at of s.run.at) {
    parts.push(heading(`Figures at ${at.celsius} °C`));
    if (at.failure) parts.push(`  did not run: ${at.failure}`);
    const values = Object.entries(at.values);
    if (values.length > 0) parts.push(table(values.map(([n, v]) => [n, sampleValueText(n, v)])));
    for (const m of at.notMeasured) parts.push(`  not measured: ${m.name}: ${m.reason}`);
    const limits = s.limits.filter((l) => l.celsius === at.celsius);
    if (limits.length > 0) {
      const cells = (l: SampleLimitResult): [string, string] =>
        match(l)
          .with({ status: 'pass' }, (r) => [sampleValueText(r.limit.figure, r.actual), 'pass'] as [string, string])
          .with({ status: 'fail' }, (r) => [sampleValueText(r.limit.figure, r.actual), 'FAIL'] as [string, string])
          .with({ status: 'not-evaluated' }, () => ['not measured', 'not evaluated'] as [string, string])
          .exhaustive();
      parts.push('', table([['limit', 'measured', 'result'], ...limits.map((l) => [`${l.limit.figure} ${l.limit.op} ${l.limit.value}`, ...cells(l)])]));
    }
    parts.push('');
  }
  return parts.join('\n');
}
