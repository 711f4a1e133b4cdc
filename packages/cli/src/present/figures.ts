/**
 * The stage, its figures and its limits, as a person reads them: each
 * figure with its unit and the conditions it was measured at (or "not
 * measured" with the reason), each limit with pass, FAIL or not evaluated,
 * and a one-line verdict.
 */
import { errorAt, FIGURE_KIND_INFO, figureEntry, formatSI, type Diagnostic, type FigureReport, type FigureUnit, type LimitResult, type RunReport, type StressRow } from '@railcheck/core';
import { match } from 'ts-pattern';
import { heading, table } from './table.js';

/** A figure value with its unit (figure registry): SI prefixes for V, V/V, Ω, W; fixed decimals for dB, °C and K; four digits for percentages and K/W; a flag with its words. */
export function formatFigureValue(name: string, value: number, unit: FigureUnit): string {
  return match(unit)
    .with('dB', () => `${value.toFixed(2)} dB`)
    .with('%', '%/V', (u) => `${Number(value.toPrecision(4))} ${u}`)
    .with('flag', () => {
      const words = figureEntry(name)?.flagWords;
      return words ? `${value} (${value === 1 ? words.one : words.zero})` : `${value}`;
    })
    .with('ratio', () => `${Number(value.toPrecision(4))}`)
    .with('V', 'A', 's', 'V/V', 'Ω', 'W', (u) => formatSI(value, u))
    // thermal figure (docs/thermal.md): temperatures and differences to a hundredth of a kelvin
    .with('°C', 'K', (u) => `${value.toFixed(2)} ${u}`)
    .with('K/W', (u) => `${Number(value.toPrecision(4))} ${u}`)
    .exhaustive();
}

/** The stage section: input, output and load. */
export function formatStage(report: RunReport): string {
  const flat = report.circuit;
  const supply = flat.supply;
  if (!supply) return '';
  const input = flat.elements.find((e) => e.key === supply.input);
  const load = supply.load ? flat.elements.find((e) => e.key === supply.load) : undefined;
  const node = (key: string): string => (key === '0' ? '0' : (flat.nodes.find((n) => n.key === key)?.name ?? key));
  let inputText = input?.name ?? supply.input;
  if (input?.kind === 'vsource') {
    const w = input.spec.waveform;
    inputText += w?.kind === 'sin' ? `, ${formatSI(w.va, 'V')} peak sine at ${formatSI(w.freq, 'Hz')} (figures at periodic steady state)` : `, ${formatSI(input.spec.dc, 'V')} d.c.`;
  }
  const op = report.operatingPoints[0];
  const sineFed = input?.kind === 'vsource' && input.spec.waveform?.kind === 'sin';
  const vout = report.figures?.voutNominal ?? (op && !sineFed ? (op.nodes[node(supply.out)] ?? 0) - (supply.ref === '0' ? 0 : (op.nodes[node(supply.ref)] ?? 0)) : undefined);
  const rows = [
    ['input', inputText],
    ['output', `${node(supply.out)} against ${node(supply.ref)}${vout !== undefined ? `: ${formatSI(vout, 'V')} ${sineFed ? 'mean over the nominal cycle' : 'at nominal'}` : ''}`],
    ['load', load ? `${load.name}, ${load.kind === 'isource' ? `${formatSI(load.spec.dc, 'A')} current source` : load.kind === 'resistor' ? `${formatSI(load.ohms, 'Ω')} resistor` : load.kind}` : 'none named (load= on .supply)'],
  ];
  if (supply.feed) rows.push(['feed', node(supply.feed)]);
  return [heading('Stage'), table(rows, '  ', true)].join('\n');
}

/** `file:line:column` of a diagnostic, or '' when it names no place. */
function place(d: Diagnostic): string {
  return d.pos ? `${d.pos.file}:${d.pos.line}:${d.pos.column}` : '';
}

/** The reason something was not measured, in one line: the message and its place. */
export function reasonText(d: Diagnostic): string {
  const at = place(d);
  return at ? `${d.message} (${at})` : d.message;
}

/** Names of what was not measured: figure kinds, and values left out of measured figures. */
export function notMeasuredNames(figures: FigureReport): string[] {
  return figures.figures.flatMap((f) =>
    match(f)
      .with({ ok: false }, (g) => [g.kind as string])
      .with({ ok: true }, (g) => g.notMeasured.map((v) => v.name))
      .exhaustive(),
  );
}

/** The words of a stress row's status. */
const STATUS_WORDS: Readonly<Record<StressRow['status'], string>> = { over: 'OVER', margin: 'past derating', ok: '' };

/** The stress table (docs/stress.md): per part and rated quantity the worst value, the rating, the ratio, a mark, and where the worst was reached; `prefix` is the figure's (`stress`, or `short` for the shorted output). */
export function formatStressTable(rows: readonly StressRow[], prefix: 'stress' | 'short' = 'stress'): string {
  // The first column is the value's own name, as a .limit writes it.
  const head = ['value', 'worst', 'rating', 'ratio', 'mark', 'where'];
  const body = rows.map((r) => [`${prefix}.${r.element}.${r.quantity}`, formatSI(r.value, r.unit), `${formatSI(r.rating, r.unit)} ${r.ratedBy}`, r.ratio.toFixed(3), STATUS_WORDS[r.status], r.where]);
  return table([head, ...body], '      ', true);
}

/** Every figure with its conditions and values; a figure or value not measured says so under its title, with the reason. */
export function formatFigures(figures: FigureReport, temperature: number): string {
  const lines = [heading(`Figures at ${temperature} °C`)];
  if (figures.nominalFailure) {
    // The same reason for every figure: said once.
    lines.push(`  not measured: ${figures.figures.map((f) => FIGURE_KIND_INFO[f.kind].title).join(', ')}`);
    lines.push(`      ${reasonText(figures.nominalFailure)}`);
    return lines.join('\n');
  }
  const missing = notMeasuredNames(figures);
  if (missing.length > 0) lines.push(`  not measured: ${missing.join(', ')} (the reasons are below; a limit on them is not evaluated)`);
  for (const f of figures.figures) {
    match(f)
      .with({ ok: true }, (g) => {
        lines.push(`  ${FIGURE_KIND_INFO[g.kind].title} — ${g.conditions}`);
        // A stress table's ratios are values too: the table says them with the values behind them.
        const prefix = g.kind === 'short' ? 'short' : 'stress';
        const inTable = new Set((g.stress ?? []).map((r) => `${prefix}.${r.element}.${r.quantity}`));
        const shown = Object.entries(g.values).filter(([n]) => !inTable.has(n));
        const rows = shown.map(([n, v]) => [n, formatFigureValue(n, v, g.units[n]!)]);
        if (rows.length > 0) lines.push(table(rows, '      '));
        if (g.stress && g.stress.length > 0) lines.push(formatStressTable(g.stress, prefix));
        // The reason names the value.
        for (const v of g.notMeasured) lines.push(`      not measured: ${reasonText(v.reason)}`);
      })
      .with({ ok: false }, (g) => {
        lines.push(`  ${FIGURE_KIND_INFO[g.kind].title}`);
        lines.push(`      not measured: ${reasonText(g.reason)}`);
      })
      .exhaustive();
  }
  return lines.join('\n');
}

const limitWord = (n: number): string => `limit${n === 1 ? '' : 's'}`;

/** The limits table (measured value and pass, FAIL or not evaluated) and a verdict. */
export function formatLimits(limits: readonly LimitResult[], figures: FigureReport): string {
  if (limits.length === 0) return '';
  // A pass or fail was measured, so its unit is among the measured figures' units.
  const unitOf = (name: string): FigureUnit => {
    for (const f of figures.figures) if (f.ok) for (const [n, u] of Object.entries(f.units)) if (n.toLowerCase() === name.toLowerCase()) return u;
    throw new Error(`no unit for the limit on ${name}: it was not measured`);
  };
  const cells = (l: LimitResult): [string, string] =>
    match(l)
      .with({ status: 'pass' }, (r) => [formatFigureValue(r.figure, r.actual, unitOf(r.figure)), 'pass'] as [string, string])
      .with({ status: 'fail' }, (r) => [formatFigureValue(r.figure, r.actual, unitOf(r.figure)), 'FAIL'] as [string, string])
      .with({ status: 'not-evaluated' }, () => ['not measured', 'not evaluated'] as [string, string])
      .exhaustive();
  const rows = [['limit', 'measured', 'result'], ...limits.map((l) => [`${l.figure} ${l.op} ${l.value}`, ...cells(l)])];
  const count = (status: LimitResult['status']): number => limits.filter((l) => l.status === status).length;
  const failed = count('fail');
  const unevaluated = count('not-evaluated');
  const n = limits.length;
  const verdict =
    unevaluated > 0
      ? [`${unevaluated} of ${n} ${limitWord(n)} not evaluated (a figure was not measured)`, ...(failed > 0 ? [`${failed} FAILED`] : []), ...(count('pass') > 0 ? [`${count('pass')} pass`] : [])].join(', ')
      : failed === 0
        ? `all ${n} ${limitWord(n)} pass`
        : `${failed} of ${n} ${limitWord(n)} FAILED`;
  return [heading('Limits'), table(rows), `  verdict: ${verdict}`].join('\n');
}

/** One error per limit not evaluated, at its `.limit` line, for standard error (exit status 2). */
export function notEvaluatedErrors(limits: readonly LimitResult[]): Diagnostic[] {
  return limits.flatMap((l) =>
    l.status === 'not-evaluated'
      ? [errorAt('limit-not-evaluated', `.limit ${l.figure} was not evaluated: nothing was measured to compare it with: ${reasonText(l.reason)}`, l.origin.pos, l.origin.lineText)]
      : [],
  );
}
