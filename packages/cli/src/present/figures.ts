/**
 * The stage, its figures and its limits, as a person reads them: each
 * figure with its unit and the conditions it was measured at, each limit
 * with pass or FAIL, and a one-line verdict.
 */
import { figureUnit, formatSI, type FigureReport, type LimitResult, type RunReport } from '@railcheck/core';
import { heading, table } from './table.js';

const FIGURE_TITLES: Readonly<Record<string, string>> = {
  line: 'line regulation',
  load: 'load regulation',
  dropout: 'dropout',
  ripple: 'ripple rejection',
  dissipation: 'dissipation',
  sag: 'input-dip ride-through',
};

/** A figure value with its unit: SI prefixes for V, A, W, Ω; fixed decimals for dB and percentages. */
export function formatFigureValue(name: string, value: number, unit = figureUnit(name)): string {
  if (unit === 'dB') return `${value.toFixed(2)} dB`;
  if (unit === '%' || unit === '%/V') return `${Number(value.toPrecision(4))} ${unit}`;
  if (name === 'sag.pass') return value === 1 ? '1 (holds)' : '0 (falls too far)';
  if (unit === '') return `${Number(value.toPrecision(4))}`;
  return formatSI(value, unit);
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
    lines.push(`  ${FIGURE_TITLES[f.kind] ?? f.kind} — ${f.conditions}`);
    lines.push(table(Object.entries(f.values).map(([n, v]) => [n, formatFigureValue(n, v, f.units[n])]), '      '));
  }
  return lines.join('\n');
}

/** The limits table and verdict. */
export function formatLimits(limits: readonly LimitResult[], figures: FigureReport): string {
  if (limits.length === 0) return '';
  const unitOf = (name: string): string | undefined => {
    for (const f of figures.figures) for (const [n, u] of Object.entries(f.units)) if (n.toLowerCase() === name.toLowerCase()) return u;
    return undefined;
  };
  const rows = [['limit', 'measured', 'result'], ...limits.map((l) => [`${l.figure} ${l.op} ${l.value}`, formatFigureValue(l.figure, l.actual, unitOf(l.figure)), l.pass ? 'pass' : 'FAIL'])];
  const failed = limits.filter((l) => !l.pass).length;
  const verdict = failed === 0 ? `all ${limits.length} limit${limits.length === 1 ? '' : 's'} pass` : `${failed} of ${limits.length} limit${limits.length === 1 ? '' : 's'} FAILED`;
  return [heading('Limits'), table(rows), `  verdict: ${verdict}`].join('\n');
}
