/**
 * The stage, its figures and its limits, as a person reads them: each
 * figure with its unit and the conditions it was measured at, each limit
 * with pass or FAIL, and a one-line verdict.
 */
import { FIGURE_KIND_INFO, figureEntry, formatSI, type FigureReport, type FigureUnit, type LimitResult, type RunReport } from '@railcheck/core';
import { match } from 'ts-pattern';
import { heading, table } from './table.js';

/** A figure value with its unit (figure registry): SI prefixes for V, V/V, Ω, W; fixed decimals for dB and percentages; a flag with its words. */
export function formatFigureValue(name: string, value: number, unit: FigureUnit): string {
  return match(unit)
    .with('dB', () => `${value.toFixed(2)} dB`)
    .with('%', '%/V', (u) => `${Number(value.toPrecision(4))} ${u}`)
    .with('flag', () => {
      const words = figureEntry(name)?.flagWords;
      return words ? `${value} (${value === 1 ? words.one : words.zero})` : `${value}`;
    })
    .with('ratio', () => `${Number(value.toPrecision(4))}`)
    .with('V', 'V/V', 'Ω', 'W', (u) => formatSI(value, u))
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

/** Every figure with its conditions and values. */
export function formatFigures(figures: FigureReport, temperature: number): string {
  const lines = [heading(`Figures at ${temperature} °C`)];
  for (const f of figures.figures) {
    lines.push(`  ${FIGURE_KIND_INFO[f.kind].title} — ${f.conditions}`);
    lines.push(table(Object.entries(f.values).map(([n, v]) => [n, formatFigureValue(n, v, f.units[n]!)]), '      '));
  }
  return lines.join('\n');
}

/** The limits table and verdict. */
export function formatLimits(limits: readonly LimitResult[], figures: FigureReport): string {
  if (limits.length === 0) return '';
  // A limit's figure was measured (checkLimits refuses one that was not), so its unit is among the measured ones.
  const unitOf = (name: string): FigureUnit => {
    for (const f of figures.figures) for (const [n, u] of Object.entries(f.units)) if (n.toLowerCase() === name.toLowerCase()) return u;
    throw new Error(`no unit for the limit on ${name}: it was not measured`);
  };
  const rows = [['limit', 'measured', 'result'], ...limits.map((l) => [`${l.figure} ${l.op} ${l.value}`, formatFigureValue(l.figure, l.actual, unitOf(l.figure)), l.pass ? 'pass' : 'FAIL'])];
  const failed = limits.filter((l) => !l.pass).length;
  const verdict = failed === 0 ? `all ${limits.length} limit${limits.length === 1 ? '' : 's'} pass` : `${failed} of ${limits.length} limit${limits.length === 1 ? '' : 's'} FAILED`;
  return [heading('Limits'), table(rows), `  verdict: ${verdict}`].join('\n');
}
