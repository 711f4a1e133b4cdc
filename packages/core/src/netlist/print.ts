/**
 * Netlist → text that reads back to an equivalent netlist (same cards and
 * values; positions differ). Includes are already expanded, so the output
 * is one self-contained file.
 */
import { DEVICES, kindOfLetter, type CardFamily, type DeviceKind } from '@railcheck/devices';
import type { Assignments, Card, CardOfFamily, DeviceCard, ElementCard, Netlist, SupplyCard, AnalysisCard, Value, Waveform } from './ast.js';
import { printExpr } from './expr.js';
import { PART_DATA_KEYS } from '../part-data.js';
import { formatNumber, formatPercent, readNumberWord } from './numbers.js';
import { argumentError, shielded } from '../arguments.js';
import { NETLISTS, netlistShapeProblem } from './brand.js';

/** A value as text: its own spelling when that still reads as its value, else a canonical form. */
export function printValue(v: Value): string {
  if (v.kind === 'expr') return `{${printExpr(v.expr)}}`;
  const percent = v.percent === true;
  const r = readNumberWord(v.text, percent);
  if (r.ok && Object.is(r.value, v.value) && r.percent === percent) return v.text;
  if (!Number.isFinite(v.value)) return `{${printExpr({ kind: 'num', value: v.value })}}`;
  return percent ? formatPercent(v.value) : formatNumber(v.value);
}

function pairs(a: Assignments): string[] {
  return a.map((p) => `${p.name}=${printValue(p.value)}`);
}

function optional(key: string, v: Value | undefined): string[] {
  return v === undefined ? [] : [`${key}=${printValue(v)}`];
}

function waveform(w: Waveform): string {
  const vals = (list: ReadonlyArray<Value | undefined>): string => {
    const out: string[] = [];
    for (const v of list) {
      if (v === undefined) break; // later optional arguments cannot be given without the earlier ones
      out.push(printValue(v));
    }
    return out.join(' ');
  };
  switch (w.kind) {
    case 'sin': return `sin(${vals([w.vo, w.va, w.freq, w.td, w.theta, w.phase])})`;
    case 'pulse': return `pulse(${vals([w.v1, w.v2, w.td, w.tr, w.tf, w.pw, w.per])})`;
    case 'pwl': return `pwl(${w.points.map((p) => `${printValue(p.t)} ${printValue(p.v)}`).join(' ')})`;
  }
}

/** The fields after the name, per card family of the registry (pmax is added by the caller). */
const FAMILY_PRINTERS: { readonly [F in CardFamily]: (e: CardOfFamily[F]) => string[] } = {
  passive: (e) => [...e.nodes, printValue(e.value), ...optional('ic', e.ic)],
  source: (e) => {
    const parts: string[] = [...e.nodes];
    if (e.dc) parts.push('dc', printValue(e.dc));
    if (e.ac) parts.push('ac', printValue(e.ac.mag), ...(e.ac.phase ? [printValue(e.ac.phase)] : []));
    if (e.waveform) parts.push(waveform(e.waveform));
    return parts;
  },
  semiconductor: (e) => [...e.nodes, e.model, ...optional('area', e.area)],
  'voltage-controlled': (e) => [...e.nodes, printValue(e.gain)],
  'current-controlled': (e) => [...e.nodes, e.control, printValue(e.gain)],
  coupling: (e) => [...e.inductors, printValue(e.coupling)],
};

function element(e: ElementCard): string {
  const pmax = [...optional('pmax', e.pmax), ...(e.kind === 'X' ? [] : PART_DATA_KEYS.flatMap((k) => optional(k, e.part?.[k])))];
  if (e.kind === 'X') return [e.name, ...e.nodes, e.subckt, ...pairs(e.params), ...pmax].join(' ');
  const family = DEVICES[kindOfLetter(e.kind) as DeviceKind].family;
  const fields = (FAMILY_PRINTERS[family] as (card: DeviceCard) => string[])(e);
  return [e.name, ...fields, ...pmax].join(' ');
}

function analysis(a: AnalysisCard): string {
  switch (a.kind) {
    case 'op': return '.op';
    case 'dc': return `.dc ${a.source} ${printValue(a.start)} ${printValue(a.stop)} ${printValue(a.step)}`;
    case 'tran': {
      const times = [a.tstep, a.tstop, ...(a.tstart ? [a.tstart] : []), ...(a.tstart && a.tmax ? [a.tmax] : [])];
      // A tmax without a tstart needs tstart = 0 written before it.
      if (!a.tstart && a.tmax) times.push({ kind: 'number', value: 0, pos: a.pos, text: '0' }, a.tmax);
      return ['.tran', ...times.map(printValue), ...a.flags].join(' ');
    }
    case 'ac': return `.ac ${a.variation} ${printValue(a.points)} ${printValue(a.fstart)} ${printValue(a.fstop)}`;
    case 'temp': return ['.temp', ...a.temps.map(printValue)].join(' ');
  }
}

function supply(s: SupplyCard): string {
  switch (s.kind) {
    case 'supply': {
      const keys: Array<[string, string | undefined]> = [['in', s.input], ['out', s.out], ['ref', s.ref], ['load', s.load], ['feed', s.feed]];
      return ['.supply', ...keys.filter(([, v]) => v !== undefined).map(([k, v]) => `${k}=${v}`)].join(' ');
    }
    case 'figure': return ['.figure', s.figure, ...pairs(s.keys), ...(s.method ? [`method=${s.method}`] : [])].join(' ');
    case 'limit': return `.limit ${s.figure} ${s.op} ${printValue(s.value)}`;
    case 'spread': return `.spread ${s.target} ${printValue(s.ratio)} ${s.distribution}${s.sampling !== undefined ? ` ${s.sampling}` : ''}`;
  }
}

function card(c: Card, out: string[], indent: string): void {
  switch (c.kind) {
    case 'model':
      out.push(`${indent}.model ${c.name} ${c.type} (${pairs(c.params).join(' ')})`);
      return;
    case 'param':
      out.push(`${indent}.param ${pairs(c.assignments).join(' ')}`);
      return;
    case 'subckt':
      out.push(`${indent}${['.subckt', c.name, ...c.ports, ...pairs(c.defaults)].join(' ')}`);
      for (const inner of c.body) card(inner, out, `${indent}  `);
      out.push(`${indent}.ends ${c.name}`);
      return;
    case 'op': case 'dc': case 'tran': case 'ac': case 'temp':
      out.push(indent + analysis(c));
      return;
    case 'supply': case 'figure': case 'limit': case 'spread':
      out.push(indent + supply(c));
      return;
    default:
      out.push(indent + element(c));
  }
}

/**
 * Renders a netlist as text: the title on line 1, one card per line
 * (subcircuit bodies indented), `.end` last. Reading the text back gives
 * the same cards and values. Throws RailcheckError (`bad-argument`) when
 * `netlist` is not a netlist.
 */
export function printNetlist(netlist: Netlist): string {
  const wrong = netlistShapeProblem(netlist);
  if (wrong !== undefined) throw argumentError('printNetlist', 'netlist', 'a netlist as parseNetlist returns it', netlist);
  return shielded('printNetlist', NETLISTS.has(netlist), 'a netlist as parseNetlist returns it', () => printChecked(netlist));
}

function printChecked(netlist: Netlist): string {
  const out: string[] = [netlist.title.replace(/[\r\n]+/g, ' ')];
  for (const c of netlist.cards) card(c, out, '');
  out.push('.end', '');
  return out.join('\n');
}
