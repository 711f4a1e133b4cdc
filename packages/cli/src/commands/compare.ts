/**
 * `railcheck compare ORIGINAL MODIFIED` (docs/compare.md): both versions of
 * a stage run under the same conditions and set side by side. The text
 * report puts first what a user must see first (the mains caution, then
 * parts over their rating in the modified stage), then the conditions
 * used, what changed in the circuit, the figures with their change and
 * verdict, the limits of both, the operating point and the dissipation
 * against ratings. Exit status: 0 when the modified stage passes every
 * limit it applies, 1 when it fails one, 2 on an error in either file (the
 * message names which) or a limit of the modified stage not evaluated.
 */
import { jsonText } from '../present/json-text.js';
import { PLOT_FLAG, curvesOf, writePlotFolder } from '../plot/command.js';
import { compareSections, reportCaution, reportFacts } from '../plot/from-report.js';
import {
  formatDiagnostic, formatSI, MAINS_CAUTION, compareNetlistFiles,
  type CompareReport, type ConditionsUsed, type ConditionSource, type DissipationSide, type ElementChange, type FigureComparison,
  type FigureSide, type FigureUnit, type LimitSide, type QuantityChange, type QuantityValue, type Diagnostic,
} from '@railcheck/core';
import { match } from 'ts-pattern';
import { commandArgs, flagHelp, type FlagSpec } from '../args.js';
import { formatFigureValue, notEvaluatedErrors, reasonText } from '../present/figures.js';
import { heading, table } from '../present/table.js';
import { formatWarnings } from '../present/text.js';
import type { CliIo } from '../main.js';

/** Exit statuses, as main.ts and docs/output.md define them. */
const EXIT_OK = 0;
const EXIT_LIMIT_FAILED = 1;
const EXIT_ERROR = 2;

const COMPARE_FLAGS: readonly FlagSpec[] = [
  { name: 'json', short: 'j', takesValue: false, help: 'print the comparison as one JSON object on standard output' },
  { name: 'allow-outside-includes', takesValue: false, help: "let .include reach files outside each netlist's folder tree" },
  PLOT_FLAG,
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** The help of `railcheck compare`. */
export const COMPARE_HELP = `usage: railcheck compare ORIGINAL MODIFIED [options]

Runs both netlists under the same conditions and sets them side by side:
parts over their rating in the modified stage first, then what changed in
the circuit (elements, models, .param values), every figure with its change
and whether that is better or worse, the limits of both, the operating point
of the nodes both have and each part's dissipation against its rating.
The modified netlist takes the original's .supply, .figure, .limit and .temp
lines of each kind it has none of its own; the report says which it used.

exit status: 0 the modified stage passes every limit, 1 it fails one (the report
says whether the original passed it), 2 an error in either file (the message
names which) or a limit of the modified stage not evaluated.

options:
${flagHelp(COMPARE_FLAGS)}`;

/** A value change as text: `680 Ω → 390 Ω`. */
function quantityText(v: QuantityValue, unit: string): string {
  if (v === undefined) return '(not given)';
  if (typeof v === 'string') return v;
  return unit === '' ? `${Number(v.toPrecision(6))}` : formatSI(v, unit);
}

const changeText = (c: QuantityChange): string => `${c.what} ${quantityText(c.original, c.unit)} → ${quantityText(c.modified, c.unit)}`;

const CONDITION_WORDS: Readonly<Record<ConditionSource, string>> = { own: 'its own', inherited: "the original's", none: 'neither has one' };

/** The conditions line(s): which cards the modified stage was run with. */
function conditionsText(c: ConditionsUsed): string[] {
  const rows = [
    ['.supply', CONDITION_WORDS[c.supply]],
    ['.figure lines', CONDITION_WORDS[c.figures]],
    ['.limit lines', CONDITION_WORDS[c.limits]],
    ['.temp', c.temperatures === 'none' ? 'neither has one (27 °C)' : CONDITION_WORDS[c.temperatures]],
  ];
  const lines = [heading('Conditions of the modified stage'), table(rows, '  ', true)];
  if (c.inheritedCards > 0) lines.push(`  (${c.inheritedCards} card${c.inheritedCards === 1 ? '' : 's'} inherited from the original; a message about one points at the original's line)`);
  if (c.differing.length > 0) lines.push(`  note: its own ${c.differing.join(', ')} differ from the original's, so those figures were measured under other conditions`);
  return lines;
}

const kindWord = (k: ElementChange['kind']): string => k;

function changesText(r: CompareReport): string[] {
  const { elements, models, params } = r.changes;
  const lines = [heading('What changed in the circuit')];
  if (elements.length + models.length + params.length === 0) {
    lines.push('  nothing: the two netlists elaborate to the same circuit');
    return lines;
  }
  const rows: string[][] = [];
  for (const e of elements) {
    match(e)
      .with({ change: 'added' }, (x) => rows.push([x.element, 'added', `${kindWord(x.kind)} between ${x.nodes.join(', ')}`]))
      .with({ change: 'removed' }, (x) => rows.push([x.element, 'removed', `${kindWord(x.kind)} was between ${x.nodes.join(', ')}`]))
      .with({ change: 'modified' }, (x) => {
        if (x.moved) rows.push([x.element, 'moved', `${x.moved.from.join(' ')} → ${x.moved.to.join(' ')}`]);
        for (const v of x.values) rows.push([x.moved ? '' : x.element, 'value', changeText(v)]);
      })
      .exhaustive();
  }
  if (rows.length > 0) lines.push(table(rows, '  ', true));
  for (const m of models) {
    match(m)
      .with({ change: 'added' }, (x) => lines.push(`  model ${x.model} (${x.type}): added`))
      .with({ change: 'removed' }, (x) => lines.push(`  model ${x.model} (${x.type}): no longer used`))
      .with({ change: 'modified' }, (x) => lines.push(`  model ${x.model} (${x.type}): ${x.params.map(changeText).join('; ')}`))
      .exhaustive();
  }
  for (const p of params) lines.push(`  .param ${p.name}: ${quantityText(p.original, '')} → ${quantityText(p.modified, '')}`);
  return lines;
}

const sideText = (name: string, s: FigureSide, unit: FigureUnit): string =>
  match(s)
    .with({ status: 'measured' }, (x) => formatFigureValue(name, x.value, unit))
    .with({ status: 'not-measured' }, () => 'not measured')
    .with({ status: 'absent' }, () => '—')
    .exhaustive();

/** A signed difference in the figure's unit. */
function deltaText(f: FigureComparison): string {
  if (f.absolute === undefined) return '';
  const d = f.absolute;
  const sign = d > 0 ? '+' : '';
  const body = match(f.unit)
    .with('flag', 'ratio', () => `${Number(d.toPrecision(4))}`)
    // A difference of two Celsius temperatures is in kelvin (thermal figure, docs/thermal.md).
    .with('°C', () => `${d.toFixed(2)} K`)
    .otherwise((u) => formatFigureValue(f.name, d, u));
  return `${sign}${body}`;
}

const relativeText = (f: FigureComparison): string => (f.relative === undefined ? '' : `${f.relative > 0 ? '+' : ''}${Number((100 * f.relative).toPrecision(3))} %`);

const VERDICT_WORDS: Readonly<Record<FigureComparison['verdict'], string>> = { better: 'better', worse: 'WORSE', same: 'same', 'no-verdict': '(condition)', 'not-compared': '' };

function figuresText(r: CompareReport): string[] {
  if (r.figures.length === 0) return [];
  const t = r.original.circuit.temperatures[0] ?? 27;
  const rows = [['figure', 'original', 'modified', 'change', 'relative', 'verdict'], ...r.figures.map((f) => [f.name, sideText(f.name, f.original, f.unit), sideText(f.name, f.modified, f.unit), deltaText(f), relativeText(f), VERDICT_WORDS[f.verdict]])];
  const lines = [heading(`Figures at ${t} °C`), table(rows)];
  const count = (v: FigureComparison['verdict']): number => r.figures.filter((f) => f.verdict === v).length;
  lines.push(`  ${count('better')} better, ${count('worse')} worse, ${count('same')} the same`);
  for (const f of r.figures) {
    for (const [side, s] of [['original', f.original], ['modified', f.modified]] as const) {
      if (s.status === 'not-measured') lines.push(`  ${f.name} not measured in the ${side}: ${reasonText(s.reason)}`);
    }
  }
  return lines;
}

const limitSideText = (s: LimitSide, name: string, unit: FigureUnit | undefined): string =>
  match(s)
    .with({ status: 'not-evaluated' }, () => 'not evaluated')
    .with({ status: 'pass' }, { status: 'fail' }, (x) => `${x.status === 'pass' ? 'pass' : 'FAIL'} (${unit ? formatFigureValue(name, x.actual, unit) : x.actual})${x.applied ? '' : ' *'}`)
    .exhaustive();

function limitsText(r: CompareReport): string[] {
  if (r.limits.length === 0) return [];
  const unitOf = (name: string): FigureUnit | undefined => r.figures.find((f) => f.name.toLowerCase() === name.toLowerCase())?.unit;
  const rows = [['limit', 'original', 'modified'], ...r.limits.map((l) => [`${l.figure} ${l.op} ${l.value}`, limitSideText(l.original, l.figure, unitOf(l.figure)), limitSideText(l.modified, l.figure, unitOf(l.figure))])];
  const lines = [heading('Limits'), table(rows)];
  if (r.limits.some((l) => !l.original.applied || !l.modified.applied)) lines.push('  (* the version does not apply this limit; shown judged on its values)');
  const applied = r.limits.filter((l) => l.modified.applied);
  const failed = applied.filter((l) => l.modified.status === 'fail');
  const unevaluated = applied.filter((l) => l.modified.status === 'not-evaluated');
  if (failed.length === 0 && unevaluated.length === 0) lines.push(`  verdict: the modified stage passes all ${applied.length} of its limits`);
  for (const l of failed) lines.push(`  verdict: the modified stage FAILS ${l.figure} ${l.op} ${l.value}; the original ${l.original.status === 'pass' ? 'passed it' : l.original.status === 'fail' ? 'failed it too' : 'did not evaluate it'}`);
  for (const l of unevaluated) lines.push(`  verdict: ${l.figure} ${l.op} ${l.value} was not evaluated on the modified stage (its figure was not measured)`);
  return lines;
}

function nodesText(r: CompareReport): string[] {
  const cycle = r.original.figures?.cycleOperatingPoint !== undefined || r.modified.figures?.cycleOperatingPoint !== undefined;
  const t = r.original.circuit.temperatures[0] ?? 27;
  const lines = [heading(`Operating point at ${t} °C${cycle ? ' (cycle averages of the sine-fed stage)' : ''}`)];
  const rows = [['node', 'original', 'modified', 'change'], ...r.nodes.map((n) => [n.node, formatSI(n.original, 'V'), formatSI(n.modified, 'V'), `${n.modified - n.original > 0 ? '+' : ''}${formatSI(n.modified - n.original, 'V')}`])];
  lines.push(table(rows));
  if (r.nodesOnlyIn.original.length > 0) lines.push(`  only in the original: ${r.nodesOnlyIn.original.join(', ')}`);
  if (r.nodesOnlyIn.modified.length > 0) lines.push(`  only in the modified: ${r.nodesOnlyIn.modified.join(', ')}`);
  return lines;
}

/** A part's dissipation in one version: the operating point, the figure's worst when measured, and OVER. */
function dissipationCells(s: DissipationSide | undefined): [string, string] {
  if (!s) return ['—', ''];
  const p = formatSI(s.power, 'W') + (s.figure !== undefined ? ` (worst ${formatSI(s.figure, 'W')})` : '');
  return [p, s.pmax === undefined ? '' : `${formatSI(s.pmax, 'W')}${s.over ? '  OVER' : ''}`];
}

function dissipationText(r: CompareReport): string[] {
  if (r.dissipation.length === 0) return [];
  const rows = [['part', 'original', 'rating', 'modified', 'rating'], ...r.dissipation.map((d) => [d.element, ...dissipationCells(d.original), ...dissipationCells(d.modified)])];
  return [heading('Dissipation against rating'), table(rows), '  (at the operating point; "worst" is the dissipation figure over nominal and the line and load corners)'];
}

function overRatingText(r: CompareReport): string[] {
  if (r.overRating.length === 0) return [];
  const lines = [heading('OVER RATING in the modified stage')];
  for (const d of r.overRating) {
    const m = d.modified!;
    const worst = Math.max(m.power, m.figure ?? -Infinity);
    const was = d.original ? (d.original.over ? 'over its rating in the original too' : `within its rating in the original (${formatSI(Math.max(d.original.power, d.original.figure ?? -Infinity), 'W')})`) : 'not in the original';
    lines.push(`  ${d.element} dissipates ${formatSI(worst, 'W')}, over its ${formatSI(m.pmax!, 'W')} rating; ${was}`);
  }
  return lines;
}

function warningsText(r: CompareReport): string[] {
  const out: string[] = [];
  // The mains caution is said once, at the top.
  for (const [side, rep] of [['original', r.original], ['modified', r.modified]] as const) {
    const notes = formatWarnings(rep.warnings.filter((w) => w.code !== 'above-elv'));
    if (notes) out.push(notes.replace(/^Notes\n─+/, heading(`Notes on the ${side}`)));
  }
  return out;
}

/** The whole text report of a comparison. */
export function formatComparison(r: CompareReport): string {
  const parts: string[] = [`railcheck compare — ${r.original.title || '(untitled)'}`, `  original ${r.original.file}`, `  modified ${r.modified.file}`, ''];
  if (r.mainsFed.original || r.mainsFed.modified) {
    const which = r.mainsFed.original && r.mainsFed.modified ? 'both stages' : `the ${r.mainsFed.original ? 'original' : 'modified'} stage`;
    parts.push(`CAUTION (${which}): ${MAINS_CAUTION}`);
    // Where each stage goes above extra-low voltage, as its run says it (analysis/safety.ts).
    for (const [side, rep] of [['original', r.original], ['modified', r.modified]] as const) {
      for (const w of rep.warnings) if (w.code === 'above-elv') parts.push(`  ${side}: ${w.message.startsWith(MAINS_CAUTION) ? w.message.slice(MAINS_CAUTION.length).trim() : w.message}`);
    }
    parts.push('');
  }
  for (const section of [overRatingText(r), conditionsText(r.conditions), changesText(r), figuresText(r), limitsText(r), nodesText(r), dissipationText(r), ...warningsText(r).map((w) => [w])]) {
    if (section.length > 0) parts.push(section.join('\n'), '');
  }
  return parts.join('\n');
}

const orNull = <T>(v: T | undefined): T | null => (v === undefined ? null : v);

const figureSideJson = (s: FigureSide): Record<string, unknown> =>
  match(s)
    .with({ status: 'measured' }, (x) => ({ status: 'measured', value: x.value }))
    .with({ status: 'not-measured' }, (x) => ({ status: 'not-measured', value: null, reason: x.reason.message }))
    .with({ status: 'absent' }, () => ({ status: 'absent', value: null }))
    .exhaustive();

const quantityJson = (c: QuantityChange): Record<string, unknown> => ({ what: c.what, unit: c.unit, original: orNull(c.original), modified: orNull(c.modified) });
const dissipationJson = (s: DissipationSide | undefined): Record<string, unknown> | null => (s ? { power: s.power, figure: orNull(s.figure), pmax: orNull(s.pmax), over: s.over } : null);
const limitSideJson = (s: LimitSide): Record<string, unknown> =>
  match(s)
    .with({ status: 'not-evaluated' }, (x) => ({ status: x.status, actual: null, applied: x.applied, reason: x.reason }))
    .with({ status: 'pass' }, { status: 'fail' }, (x) => ({ status: x.status, actual: x.actual, applied: x.applied }))
    .exhaustive();
const warningLines = (ws: readonly Diagnostic[]): string[] => ws.map((w) => formatDiagnostic({ ...w, severity: 'warning' }).split('\n')[0]!);

/** The JSON object of a comparison (docs/compare.md, "JSON"). */
export function comparisonJson(r: CompareReport, status: number): Record<string, unknown> {
  return {
    original: { file: r.original.file, title: r.original.title },
    modified: { file: r.modified.file, title: r.modified.title },
    status,
    mains_fed: r.mainsFed,
    conditions: { supply: r.conditions.supply, figures: r.conditions.figures, limits: r.conditions.limits, temperatures: r.conditions.temperatures, inherited_cards: r.conditions.inheritedCards, differing: r.conditions.differing },
    over_rating: r.overRating.map((d) => ({ element: d.element, ...dissipationJson(d.modified), original: dissipationJson(d.original) })),
    changes: {
      elements: r.changes.elements.map((e) =>
        match(e)
          .with({ change: 'added' }, { change: 'removed' }, (x) => ({ change: x.change, element: x.element, kind: x.kind, nodes: x.nodes }))
          .with({ change: 'modified' }, (x) => ({ change: x.change, element: x.element, kind: x.kind, moved: x.moved ?? null, values: x.values.map(quantityJson) }))
          .exhaustive(),
      ),
      models: r.changes.models.map((m) =>
        match(m)
          .with({ change: 'added' }, { change: 'removed' }, (x) => ({ change: x.change, model: x.model, type: x.type }))
          .with({ change: 'modified' }, (x) => ({ change: x.change, model: x.model, type: x.type, params: x.params.map(quantityJson) }))
          .exhaustive(),
      ),
      params: r.changes.params.map((p) => ({ change: p.change, name: p.name, original: orNull(p.original), modified: orNull(p.modified) })),
    },
    figures: r.figures.map((f) => ({ name: f.name, unit: f.unit, better: f.better, original: figureSideJson(f.original), modified: figureSideJson(f.modified), absolute: orNull(f.absolute), relative: orNull(f.relative), verdict: f.verdict })),
    limits: r.limits.map((l) => ({ figure: l.figure, op: l.op, value: l.value, original: limitSideJson(l.original), modified: limitSideJson(l.modified) })),
    nodes: r.nodes.map((n) => ({ node: n.node, original: n.original, modified: n.modified, change: n.modified - n.original })),
    nodes_only_in: r.nodesOnlyIn,
    dissipation: r.dissipation.map((d) => ({ element: d.element, original: dissipationJson(d.original), modified: dissipationJson(d.modified) })),
    warnings: { original: warningLines(r.original.warnings), modified: warningLines(r.modified.warnings) },
  };
}

/** Exit status of a comparison: the worst over the limits the modified stage applies (pass 0, fail 1, not evaluated 2). */
export function compareStatus(r: CompareReport): number {
  return r.limits
    .filter((l) => l.modified.applied)
    .reduce((worst, l) => Math.max(worst, match(l.modified.status).with('pass', () => EXIT_OK).with('fail', () => EXIT_LIMIT_FAILED).with('not-evaluated', () => EXIT_ERROR).exhaustive()), EXIT_OK);
}

const INHERITED_WORDS = (c: ConditionsUsed): string =>
  [c.supply === 'inherited' ? '.supply' : '', c.figures === 'inherited' ? '.figure' : '', c.limits === 'inherited' ? '.limit' : '', c.temperatures === 'inherited' ? '.temp' : ''].filter(Boolean).join(', ');

/** `railcheck compare ORIGINAL MODIFIED [--json]`; resolves to the exit status. */
export function compareCommand(argv: readonly string[], io: CliIo): number {
  const parsed = commandArgs('compare', argv, COMPARE_FLAGS, COMPARE_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  if (positionals.length !== 2) {
    io.err(`railcheck compare: expected two netlist files, ORIGINAL and MODIFIED${positionals.length ? `, got ${positionals.length}: ${positionals.join(' ')}` : ''}\n\n${COMPARE_HELP}`);
    return EXIT_ERROR;
  }
  const [originalPath, modifiedPath] = positionals as [string, string];
  const result = compareNetlistFiles(originalPath, modifiedPath, { allowOutsideIncludes: flags.has('allow-outside-includes') });
  if (!result.ok) {
    for (const e of result.errors) io.err(formatDiagnostic(e));
    const notes = formatWarnings(result.warnings);
    if (notes) io.err(notes);
    const inherited = result.conditions && result.conditions.inheritedCards > 0 ? ` (run with the original's ${INHERITED_WORDS(result.conditions)} lines, which it has none of; a message on one of those points at the original's line)` : '';
    const n = result.errors.length;
    io.err(`railcheck compare: the ${result.file} netlist ${result.path} has ${n} error${n === 1 ? '' : 's'}${inherited}; nothing was compared`);
    return EXIT_ERROR;
  }
  const report = result.report;
  const status = compareStatus(report);
  const plot = flags.get('plot');
  if (typeof plot === 'string') {
    // Both stages' curves on the same axes; the modified stage's figures and limits beside them.
    const notes: string[] = [];
    const a = curvesOf(report.original, notes);
    const b = curvesOf(report.modified, notes);
    const caution = reportCaution(report.modified) ?? reportCaution(report.original);
    const folder = { title: `${report.original.title} — original and modified`, ...(caution ? { caution } : {}), sections: compareSections(a, b, reportFacts(report.modified)) };
    const written = writePlotFolder(plot, folder, modifiedPath, 'compare', notes, (l) => io.err(l));
    if (written !== EXIT_OK) return written;
  }
  if (flags.has('json')) io.out(jsonText(comparisonJson(report, status)));
  else io.out(formatComparison(report));
  const unevaluated = notEvaluatedErrors(report.modified.figures?.limits ?? []);
  if (unevaluated.length > 0) {
    for (const e of unevaluated) io.err(formatDiagnostic(e));
    io.err(`railcheck compare: ${unevaluated.length} ${unevaluated.length === 1 ? 'limit was' : 'limits were'} not evaluated on the modified netlist ${report.modified.file}; the report is on standard output`);
  }
  return status;
}
