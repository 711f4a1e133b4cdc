/**
 * Directive lines other than the power-supply ones (netlist.md, Models,
 * Subcircuits, Includes, Analyses): `.model`, `.param`, `.subckt` headers,
 * `.ends`, `.include`, `.op`, `.dc`, `.tran`, `.ac`, `.temp`.
 */
import { MODEL_TYPES, knownParams, modelKindOf, sheetKeys } from '@railcheck/devices';
import type { AnalysisCard, Assignments, ModelCard, ModelType, ParamCard, Value } from './ast.js';
import type { Cursor } from './cursor.js';
import { show } from './cursor.js';
import { isExprFunction } from './expr.js';
import type { Token } from './lexer.js';
import { IDENTIFIER } from './parse-elements.js';
import { leafName } from './parse-supply.js';

/** Flags a `.tran` line may end with. `fromic`: start from the `ic=` values without an operating point; `be` / `trap`: integration method (backward Euler / trapezoidal, the default). */
export const TRAN_FLAGS: readonly string[] = ['fromic', 'be', 'trap'];


/** `.model name D|NPN|PNP [(] [param=value ...] [)]`; parameters checked against the device's table. */
export function parseModel(c: Cursor): ModelCard {
  const form = '.model name D|NPN|PNP (param=value ...)';
  const origin = c.origin();
  c.next();
  const name = c.name('the model name', form);
  const typeTok = c.name('the model type', 'D, NPN or PNP');
  const type: ModelType | undefined = MODEL_TYPES.find((t) => t === typeTok.text.toUpperCase());
  if (!type) c.fail('unknown-model-type', `unknown model type "${typeTok.text}"`, typeTok, 'D, NPN or PNP');
  // Physical parameters (docs/models.md) and the datasheet form's keys (docs/models.md, "Datasheet form").
  const known = [...knownParams(type), ...sheetKeys(modelKindOf(type)).map((k) => k.name)];
  const open = c.peek()?.kind === 'lparen' ? c.next() : undefined;
  const params: Array<Assignments[number]> = [];
  const seen = new Set<string>();
  while (!c.done && c.peek()?.kind !== 'rparen') {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), `param=value pairs; ${type} parameters are ${known.join(' ')}`);
    const { key, value } = c.rawAssignment();
    const p = key.text.toUpperCase();
    if (!known.includes(p)) c.fail('unknown-parameter', `unknown ${type} model parameter "${key.text}"`, key, `one of ${known.join(' ')}`);
    if (seen.has(p)) c.fail('duplicate-key', `model parameter "${key.text}" is given twice`, key, 'each parameter at most once');
    seen.add(p);
    params.push({ name: p, value: c.toValue(value, `a value for ${p}`, `${p}=<number or {expression}>`), pos: key.pos });
  }
  const close = c.peek()?.kind === 'rparen' ? c.next() : undefined;
  if (close && !open) c.fail('syntax', 'a ")" with no "(" before it', close, form);
  if (open && !close) c.fail('syntax', 'the parameter list "(" is never closed', undefined, 'a closing ")"');
  c.expectEnd('the end of the .model line');
  return { ...origin, kind: 'model', name: name.text, type, params };
}

/** Reads `name=value` definitions (`.param`, subcircuit defaults) with identifier names. */
export function parseDefinitions(c: Cursor, form: string, reserved: readonly string[]): Assignments {
  const out: Array<Assignments[number]> = [];
  const seen = new Set<string>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), form);
    const { key, value } = c.rawAssignment();
    const name = key.text.toLowerCase();
    if (!IDENTIFIER.test(key.text)) c.fail('bad-name', `"${key.text}" is not a parameter name`, key, 'a name of letters, digits and _ starting with a letter or _');
    if (reserved.includes(name) || isExprFunction(name)) c.fail('bad-name', `"${key.text}" is reserved and cannot name a parameter`, key, 'another parameter name');
    if (seen.has(name)) c.fail('duplicate-key', `parameter "${key.text}" is defined twice on this line`, key, 'each parameter at most once');
    seen.add(name);
    out.push({ name, value: c.toValue(value, `a value for ${key.text}`, `${key.text}=<number or {expression}>`), pos: key.pos });
  }
  return out;
}

/** `.param name=value [name=value ...]` */
export function parseParam(c: Cursor): ParamCard {
  const origin = c.origin();
  c.next();
  if (c.done) c.fail('missing-item', '.param defines nothing', undefined, '.param name=value [name=value ...]');
  return { ...origin, kind: 'param', assignments: parseDefinitions(c, '.param name=value [name=value ...]', []) };
}

/** The header of `.subckt name port... [name=default ...]`. */
export interface SubcktHeader {
  readonly name: string;
  readonly ports: readonly string[];
  readonly defaults: Assignments;
}

/** Reads a `.subckt` line. `pmax` is reserved: on an X line it is the instance's power rating. */
export function parseSubcktHeader(c: Cursor): SubcktHeader {
  const form = '.subckt name port... [name=default ...]';
  c.next();
  const name = c.name('the subcircuit name', form);
  const ports: string[] = [];
  while (!c.done && !c.atAssignment()) ports.push(c.name('a port node name', form).text);
  const seen = new Set<string>();
  for (const [k, p] of ports.entries()) {
    const low = p.toLowerCase();
    if (seen.has(low)) c.fail('duplicate-port', `port "${p}" is listed twice`, c.tokens[k + 2], 'each port once');
    seen.add(low);
  }
  return { name: name.text, ports, defaults: parseDefinitions(c, form, ['pmax']) };
}

/** Reads `.ends [name]`; returns the name token when one is given. */
export function parseEnds(c: Cursor): Token | undefined {
  c.next();
  const name = c.done ? undefined : c.name('the subcircuit name', '.ends [name]');
  c.expectEnd('the end of the .ends line');
  return name;
}

/** Reads `.include "path"` (a bare path without spaces is accepted too). */
export function parseIncludePath(c: Cursor): { path: string; at: Token } {
  c.next();
  const t = c.peek();
  if (!t) c.fail('missing-item', '.include names no file', undefined, '.include "path"');
  if (t.kind !== 'string' && t.kind !== 'word') c.fail('syntax', `expected a file path but found ${show(t)}`, t, '.include "path"');
  c.next();
  c.expectEnd('the end of the .include line');
  const path = t.kind === 'string' ? t.text.slice(1, -1) : t.text;
  if (path.length === 0) c.fail('missing-item', '.include names an empty path', t, '.include "path"');
  return { path, at: t };
}

/** Reports a plain-number value that fails a check; expressions are checked at elaboration. */
function checkNumber(c: Cursor, v: Value, tok: Token | undefined, ok: (x: number) => boolean, message: string, expected: string): void {
  if (v.kind === 'number' && !ok(v.value)) c.note('bad-value', message, tok, expected);
}

/** Reads a value, remembering its token for later messages. */
function valueAt(c: Cursor, what: string, form: string): { v: Value; t: Token | undefined } {
  const t = c.peek();
  return { v: c.value(what, form), t };
}

/** `.op`, `.dc`, `.tran`, `.ac`, `.temp`; `keyword` is lower-case without the dot. */
export function parseAnalysis(c: Cursor, keyword: string): AnalysisCard {
  const origin = c.origin();
  c.next();
  switch (keyword) {
    case 'op':
      c.expectEnd('nothing after .op');
      return { ...origin, kind: 'op' };
    case 'dc': {
      const form = '.dc source start stop step';
      const src = c.name('the source to sweep', form);
      if (!/^[vi]/i.test(leafName(src.text))) c.fail('bad-source', `"${src.text}" is not an independent source; .dc sweeps a V or I element`, src, 'a V or I element name');
      const start = c.value('the start value', form);
      const stop = c.value('the stop value', form);
      const step = valueAt(c, 'the step', form);
      checkNumber(c, step.v, step.t, (x) => x !== 0, 'the .dc step must be non-zero', 'a non-zero step');
      c.expectEnd('the end of the .dc line');
      return { ...origin, kind: 'dc', source: src.text, start, stop, step: step.v };
    }
    case 'tran':
      return parseTran(c, origin);
    case 'ac': {
      const form = '.ac dec|lin points fstart fstop';
      const vt = c.name('the point spacing', 'dec or lin');
      const variation = vt.text.toLowerCase();
      if (variation !== 'dec' && variation !== 'lin') c.fail('syntax', `unknown point spacing "${vt.text}"`, vt, 'dec (points per decade) or lin (points in all)');
      const points = valueAt(c, 'the number of points', form);
      checkNumber(c, points.v, points.t, (x) => Number.isInteger(x) && x >= 1, 'the number of points must be a whole number of at least 1', 'a whole number ≥ 1');
      const fstart = valueAt(c, 'the start frequency', form);
      if (variation === 'dec') checkNumber(c, fstart.v, fstart.t, (x) => x > 0, 'a dec sweep needs a start frequency above 0 Hz', 'a frequency > 0');
      const fstop = valueAt(c, 'the stop frequency', form);
      if (fstart.v.kind === 'number') checkNumber(c, fstop.v, fstop.t, (x) => x >= (fstart.v as { value: number }).value, 'the stop frequency lies below the start frequency', 'fstop ≥ fstart');
      c.expectEnd('the end of the .ac line');
      return { ...origin, kind: 'ac', variation, points: points.v, fstart: fstart.v, fstop: fstop.v };
    }
    default: {
      const temps: Value[] = [];
      while (!c.done) temps.push(c.value('a temperature in °C', '.temp t1 [t2 ...]'));
      if (temps.length === 0) c.fail('missing-value', '.temp gives no temperature', undefined, '.temp t1 [t2 ...] (°C)');
      return { ...origin, kind: 'temp', temps };
    }
  }
}

function parseTran(c: Cursor, origin: ReturnType<Cursor['origin']>): AnalysisCard {
  const form = '.tran tstep tstop [tstart [tmax]] [fromic]';
  const tstep = valueAt(c, 'the output step tstep', form);
  const tstop = valueAt(c, 'the stop time tstop', form);
  const tstart = c.isValue(c.peek()) ? valueAt(c, 'the start time tstart', form) : undefined;
  const tmax = tstart && c.isValue(c.peek()) ? valueAt(c, 'the largest step tmax', form) : undefined;
  const flags: string[] = [];
  while (!c.done) {
    const t = c.peek() as Token;
    if (t.kind !== 'word' || c.atAssignment()) c.fail('syntax', `unexpected ${show(t)}`, t, form);
    const f = t.text.toLowerCase();
    if (c.isValue(t)) c.fail('syntax', `unexpected ${show(t)}: .tran takes at most four values`, t, form);
    if (!TRAN_FLAGS.includes(f)) c.fail('unknown-flag', `unknown .tran flag "${t.text}"`, t, TRAN_FLAGS.join(', '));
    if (!flags.includes(f)) flags.push(f);
    c.next();
  }
  const positive = (x: number): boolean => x > 0;
  checkNumber(c, tstep.v, tstep.t, positive, 'tstep must be above 0 s', 'a time > 0');
  checkNumber(c, tstop.v, tstop.t, positive, 'tstop must be above 0 s', 'a time > 0');
  if (tstart && tstop.v.kind === 'number') {
    const stop = tstop.v.value;
    checkNumber(c, tstart.v, tstart.t, (x) => x >= 0 && x < stop, 'tstart must lie in [0, tstop)', '0 ≤ tstart < tstop');
  }
  if (tmax) checkNumber(c, tmax.v, tmax.t, positive, 'tmax must be above 0 s', 'a time > 0');
  return {
    ...origin,
    kind: 'tran',
    tstep: tstep.v,
    tstop: tstop.v,
    ...(tstart ? { tstart: tstart.v } : {}),
    ...(tmax ? { tmax: tmax.v } : {}),
    flags,
  };
}
