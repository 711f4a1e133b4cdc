/**
 * Renderings of `railcheck model` (commands/model.ts): the text report and
 * the JSON object of docs/output.md, "railcheck model".
 */
import { formatSI, type ModelCard, type ResolvedModel, type SheetValue } from '@railcheck/core';
import { paramTable } from '@railcheck/devices';
import { heading, table } from './table.js';

/** Where the model came from: datasheet values on the command line, or a netlist. */
export type ModelSource = 'datasheet' | 'netlist';

/** One row of the check: an implied value, and the value given for it if any. */
export interface SheetRow extends SheetValue {
  readonly given: number | undefined;
}

/** Shortest text that reads back as the same double. */
const exact = (x: number): string => String(x);

/** The JSON object of `railcheck model --json` (docs/output.md). */
export function modelJson(source: ModelSource, from: { file: string; card: ModelCard } | undefined, written: string, r: ResolvedModel & { ok: true }, rows: readonly SheetRow[], format: string, version: number): unknown {
  return {
    format,
    version,
    source,
    file: from?.file ?? null,
    place: from ? { file: from.card.pos.file, line: from.card.pos.line } : null,
    name: r.name,
    type: r.type,
    written,
    given: Object.fromEntries(r.given),
    line: r.line,
    params: Object.fromEntries(r.params),
    filled: r.filled,
    implied: rows.map((v) => ({
      key: v.key,
      value: v.value,
      unit: v.unit,
      at: v.at,
      conditions: v.conditions,
      given: v.given ?? null,
      difference: v.given === undefined ? null : v.value - v.given,
      relative: v.given === undefined || v.given === 0 ? null : (v.value - v.given) / Math.abs(v.given),
    })),
  };
}

/** A value for people: 6 significant digits (the check compares to datasheet values of 2 to 3); a per-kelvin coefficient without prefix. */
const shown = (x: number, unit: string): string => (unit === '' || unit.startsWith('1/') ? `${Number(x.toPrecision(6))}${unit ? ` ${unit}` : ''}` : formatSI(x, unit, 6));

/** {@link table} of `rows` with a left-aligned last column of words after each row. */
function tableWithWords(rows: ReadonlyArray<readonly string[]>, words: readonly string[]): string {
  const laid = table(rows).split('\n');
  const width = Math.max(...laid.map((l) => [...l].length));
  return laid.map((l, k) => (words[k] ? `${l}${' '.repeat(width - [...l].length)}  ${words[k]}` : l)).join('\n');
}

/** A relative difference in percent, 2 significant digits (0 when exact). */
const percent = (d: number, of: number): string => (of === 0 ? '' : d === 0 ? '0 %' : `${Number(((100 * d) / Math.abs(of)).toPrecision(2))} %`);

/** The text report of `railcheck model`. */
export function formatModel(source: ModelSource, from: { file: string; card: ModelCard } | undefined, written: string, r: ResolvedModel & { ok: true }, rows: readonly SheetRow[]): string {
  const specs = paramTable(r.type);
  const lines: string[] = [];
  lines.push(source === 'datasheet' ? `railcheck model — ${r.type} from datasheet values` : `railcheck model — ${r.name} (${r.type}) in ${from!.file}, ${from!.card.pos.file}:${from!.card.pos.line}`);
  lines.push('', heading(source === 'datasheet' ? 'Given' : 'As written'), `  ${written}`);
  lines.push('', heading('Resolved .model line'), `  ${r.line}`);
  lines.push('', heading('Physical parameters'));
  const paramRows = [...r.params].map(([k, v]) => {
    const spec = specs.find((p) => p.name === k);
    return [k, shown(v, spec?.unit ?? ''), exact(v)];
  });
  const docs = ['', ...[...r.params.keys()].map((k) => specs.find((p) => p.name === k)?.doc ?? '')];
  lines.push(paramRows.length > 0 ? tableWithWords([['', 'value', 'exact'], ...paramRows], docs) : '  (none given: every parameter at its default of docs/models.md)');
  lines.push('  Parameters not listed keep their defaults (docs/models.md).');
  lines.push('', heading('Defaults the datasheet values left to fill'));
  lines.push(r.filled.length > 0 ? r.filled.map((f) => `  ${f}`).join('\n') : '  none');
  const anyGiven = rows.some((v) => v.given !== undefined);
  lines.push('', heading(anyGiven ? 'Check: the model simulated in the datasheet test circuits' : 'Datasheet values the model implies (simulated in the test circuits)'));
  const head = anyGiven ? ['', 'implied', 'given', 'implied − given', ''] : ['', 'implied'];
  const body = rows.map((v) => {
    if (!anyGiven) return [v.key, shown(v.value, v.unit)];
    if (v.given === undefined) return [v.key, shown(v.value, v.unit), '—', '', ''];
    const d = v.value - v.given;
    return [v.key, shown(v.value, v.unit), shown(v.given, v.unit), formatSI(d, v.unit, 3), percent(d, v.given)];
  });
  lines.push(tableWithWords([head, ...body], ['at', ...rows.map((v) => v.at)]));
  return lines.join('\n');
}
