/**
 * Element lines (netlist.md, Elements): the first letter of the name gives
 * the kind; nodes, values and `key=value` options follow.
 */
import { DEVICES, DEVICE_KINDS, describeRange, inRange, kindOfLetter, type CardFamily, type DeviceKind, type ValueField } from '@railcheck/devices';
import type {
  Assignments,
  CardOrigin,
  DeviceCard,
  ElementCard,
  InstanceCard,
  SourceCard,
  Value,
  Waveform,
} from './ast.js';
import { partDataKeysOf, type PartDataKey } from '../part-data.js';
import type { Cursor } from './cursor.js';
import { show } from './cursor.js';
import type { Token } from './lexer.js';

/** Element letters the reader knows: every registry letter, then X (subcircuit instances). */
export const ELEMENT_LETTERS: string = DEVICE_KINDS.map((k) => DEVICES[k].letter).join('') + 'X';

/** The written form of each element line, quoted in messages (from the registry, plus X). */
const FORMS: Readonly<Record<string, string>> = {
  ...Object.fromEntries(DEVICE_KINDS.map((k) => [DEVICES[k].letter, DEVICES[k].form])),
  X: 'Xname node... subckt [name=value ...]',
};

/** Identifier form of parameter names (`.param`, subcircuit parameters). */
export const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** Number of fields after the name before the first `key=value`. */
function positionalCount(c: Cursor): number {
  let n = 0;
  while (c.peek(n) && !(c.peek(n)?.kind === 'word' && c.peek(n + 1)?.kind === 'eq')) n++;
  return n;
}

/** Checks the field count of a fixed-form element against [min, max]. */
function checkFields(c: Cursor, name: Token, min: number, max: number, needs: string): void {
  const n = positionalCount(c);
  const form = FORMS[name.text[0]?.toUpperCase() ?? ''] ?? '';
  if (n < min) {
    c.fail('wrong-node-count', `${name.text} needs ${needs}${min > 2 ? ` (${min} fields after the name)` : ''}, but ${n === 0 ? 'none follow' : `only ${n} follow${n === 1 ? 's' : ''}`}`, undefined, form);
  }
  if (n > max) c.fail('too-many-fields', `${name.text} has ${n} fields after the name; at most ${max} are accepted (${needs})`, c.peek(max), form);
}

function nodes(c: Cursor, count: number, form: string): string[] {
  const out: string[] = [];
  for (let k = 0; k < count; k++) out.push(c.name('a node name', form).text);
  return out;
}

/** Reads trailing `key=value` options, each key at most once, from the allowed list. */
function options(c: Cursor, name: Token, allowed: readonly string[]): Map<string, Value> {
  const form = FORMS[name.text[0]?.toUpperCase() ?? ''] ?? '';
  const out = new Map<string, Value>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), form);
    const { key, value } = c.rawAssignment();
    const k = key.text.toLowerCase();
    if (!allowed.includes(k)) {
      c.fail('unknown-key', `"${key.text}=" is not accepted on ${name.text}`, key, allowed.map((a) => `${a}=`).join(', ') || 'no options');
    }
    if (out.has(k)) c.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each option at most once');
    out.set(k, c.toValue(value, `a value for ${key.text}`, `${key.text}=<number or {expression}>`));
  }
  return out;
}

/** Spreads optional fields so that absent ones stay absent (exactOptionalPropertyTypes). */
function opt<K extends string, V>(key: K, v: V | undefined): { [P in K]?: V } {
  return (v === undefined ? {} : { [key]: v }) as { [P in K]?: V };
}

/** The part-data options (part-data.ts) among the options read, as the card's `part` field (absent when none is given). */
function partOf(letter: string, o: ReadonlyMap<string, Value>): { part?: Readonly<Partial<Record<PartDataKey, Value>>> } {
  const part: Partial<Record<PartDataKey, Value>> = {};
  for (const k of partDataKeysOf(letter)) {
    const v = o.get(k);
    if (v !== undefined) part[k] = v;
  }
  return Object.keys(part).length > 0 ? { part } : {};
}

/** Reports a plain-number value outside its field's valid range (expressions are checked at elaboration). */
function checkValue(c: Cursor, name: Token, field: ValueField, value: Value, at: Token | undefined): void {
  if (value.kind !== 'number' || inRange(field.range, value.value)) return;
  if (field.zero && value.value === 0) {
    c.note(field.zero.code, `${name.text}: the ${field.what} must not be zero`, at, field.zero.hint);
    return;
  }
  c.note('bad-value', `${name.text}: the ${field.what} ${value.text} is out of range`, at, `${field.what} ${describeRange(field.range)}`);
}

/** The card's main value read with its field's checks. */
function mainValue(c: Cursor, name: Token, kind: DeviceKind, form: string): Value {
  const field = DEVICES[kind].value as ValueField;
  const at = c.peek();
  const value = c.value(`the ${field.what}`, form);
  checkValue(c, name, field, value, at);
  return value;
}

/** "2 nodes (anode cathode)" and the like, from the registry's terminal names. */
function nodesPhrase(kind: DeviceKind): string {
  const t: readonly string[] = DEVICES[kind].terminals;
  return t.length === 2 && t[0] === 'n+' ? '2 nodes' : `${t.length} nodes (${t.join(' ')})`;
}

type FamilyParser = (c: Cursor, name: Token, kind: DeviceKind, origin: CardOrigin) => DeviceCard;

/** One reader per card family of the registry: a family not handled here fails to compile. */
const FAMILY_PARSERS: Readonly<Record<CardFamily, FamilyParser>> = {
  passive: (c, name, kind, origin) => {
    const letter = DEVICES[kind].letter as 'R' | 'C' | 'L';
    const form = FORMS[letter] ?? '';
    const what = (DEVICES[kind].value as ValueField).what;
    checkFields(c, name, 3, 3, `2 nodes and a ${what}`);
    const ns = nodes(c, 2, form);
    const value = mainValue(c, name, kind, form);
    const o = options(c, name, [...(letter === 'R' ? ['pmax'] : ['ic', 'pmax']), ...partDataKeysOf(letter)]);
    return { ...origin, kind: letter, name: name.text, nodes: [ns[0] ?? '', ns[1] ?? ''], value, ...opt('ic', o.get('ic')), ...opt('pmax', o.get('pmax')), ...partOf(letter, o) };
  },
  source: (c, name, kind, origin) => parseSource(c, name, DEVICES[kind].letter as 'V' | 'I', origin),
  semiconductor: (c, name, kind, origin) => {
    const letter = DEVICES[kind].letter as 'D' | 'Q';
    const form = FORMS[letter] ?? '';
    const n = DEVICES[kind].terminals.length;
    checkFields(c, name, n + 1, n + 2, `${nodesPhrase(kind)} and a model name`);
    const ns = nodes(c, n, form);
    const model = c.name('a model name', form).text;
    const area = c.isValue(c.peek()) && !c.atAssignment() ? c.value('the area', form) : undefined;
    const o = options(c, name, [...(area === undefined ? ['area', 'pmax'] : ['pmax']), ...partDataKeysOf(letter)]);
    const common = { ...origin, name: name.text, model, ...opt('area', area ?? o.get('area')), ...opt('pmax', o.get('pmax')), ...partOf(letter, o) };
    if (letter === 'D') return { ...common, kind: letter, nodes: [ns[0] ?? '', ns[1] ?? ''] };
    return { ...common, kind: letter, nodes: [ns[0] ?? '', ns[1] ?? '', ns[2] ?? ''] };
  },
  'voltage-controlled': (c, name, kind, origin) => {
    const letter = DEVICES[kind].letter as 'E' | 'G';
    const form = FORMS[letter] ?? '';
    checkFields(c, name, 5, 5, `${nodesPhrase(kind)} and a ${(DEVICES[kind].value as ValueField).what}`);
    const ns = nodes(c, 4, form);
    const gain = mainValue(c, name, kind, form);
    const o = options(c, name, ['pmax']);
    return { ...origin, kind: letter, name: name.text, nodes: [ns[0] ?? '', ns[1] ?? '', ns[2] ?? '', ns[3] ?? ''], gain, ...opt('pmax', o.get('pmax')) };
  },
  'current-controlled': (c, name, kind, origin) => {
    const letter = DEVICES[kind].letter as 'F' | 'H';
    const form = FORMS[letter] ?? '';
    checkFields(c, name, 4, 4, `2 nodes, the controlling voltage source and a ${(DEVICES[kind].value as ValueField).what}`);
    const ns = nodes(c, 2, form);
    const control = c.name('the name of the controlling voltage source', form);
    if (!/^v/i.test(control.text)) c.fail('bad-control', `"${control.text}" is not a voltage source name; the controlling current is the one through a V element`, control, 'a V element name such as Vsense');
    const gain = mainValue(c, name, kind, form);
    const o = options(c, name, ['pmax']);
    return { ...origin, kind: letter, name: name.text, nodes: [ns[0] ?? '', ns[1] ?? ''], control: control.text, gain, ...opt('pmax', o.get('pmax')) };
  },
  coupling: (c, name, kind, origin) => {
    const form = FORMS.K ?? '';
    checkFields(c, name, 3, 3, 'the names of two inductors and the coupling coefficient');
    const inductor = (which: string): Token => {
      const t = c.name(`the ${which} inductor's name`, form);
      if (!/^l/i.test(t.text)) c.fail('bad-coupling', `"${t.text}" is not an inductor name; K couples two L elements`, t, 'an L element name such as Lpri');
      return t;
    };
    const first = inductor('first');
    const second = inductor('second');
    if (first.text.toLowerCase() === second.text.toLowerCase()) c.fail('bad-coupling', `${name.text} couples ${first.text} with itself`, second, 'two different inductors');
    const coupling = mainValue(c, name, kind, form);
    const o = options(c, name, ['pmax']);
    return { ...origin, kind: 'K', name: name.text, inductors: [first.text, second.text], coupling, ...opt('pmax', o.get('pmax')) };
  },
};

/** Parses an element line; the cursor stands at its name. */
export function parseElement(c: Cursor): ElementCard {
  const origin = c.origin();
  const name = c.next() as Token;
  const letter = (name.text[0] ?? '').toUpperCase();
  const kind = kindOfLetter(letter);
  if ((kind !== undefined || letter === 'X') && name.text.includes('.')) {
    c.fail('bad-name', `"${name.text}": element names may not contain "." (it joins instance paths such as X1.Q2)`, name, 'a name of letters, digits and _');
  }
  if (kind !== undefined) return FAMILY_PARSERS[DEVICES[kind].family](c, name, kind, origin);
  if (letter === 'X') return parseInstance(c, name, origin);
  return c.fail('unknown-element', `"${name.text}" does not name an element: no element kind starts with "${name.text[0] ?? ''}"`, name, `an element line (${ELEMENT_LETTERS.split('').join(' ')}) or a directive (.model, .param, ...)`);
}

const WAVE_ARGS: Readonly<Record<string, readonly string[]>> = {
  sin: ['vo', 'va', 'freq', 'td', 'theta', 'phase'],
  pulse: ['v1', 'v2', 'td', 'tr', 'tf', 'pw', 'per'],
};
const WAVE_FORMS: Readonly<Record<string, string>> = {
  sin: 'sin(vo va freq [td [theta [phase]]])',
  pulse: 'pulse(v1 v2 [td [tr [tf [pw [per]]]]])',
  pwl: 'pwl(t1 v1 [t2 v2 ...])',
};

function parseSource(c: Cursor, name: Token, kind: 'V' | 'I', origin: ReturnType<Cursor['origin']>): SourceCard {
  const form = FORMS[kind] ?? '';
  checkFields(c, name, 2, Infinity, '2 nodes');
  const ns = nodes(c, 2, form);
  let dc: Value | undefined;
  let ac: SourceCard['ac'];
  let waveform: Waveform | undefined;
  let pmax: Value | undefined;
  const once = (t: Token, taken: boolean, what: string): void => {
    if (taken) c.fail('duplicate-key', `${name.text} has ${what} twice`, t, form);
  };
  while (!c.done) {
    const t = c.peek() as Token;
    const word = t.kind === 'word' ? t.text.toLowerCase() : '';
    if (c.atAssignment()) {
      const { key, value } = c.rawAssignment();
      if (key.text.toLowerCase() !== 'pmax') c.fail('unknown-key', `"${key.text}=" is not accepted on ${name.text}`, key, 'pmax=W');
      once(key, pmax !== undefined, 'pmax=');
      pmax = c.toValue(value, 'the power rating', 'pmax=W');
    } else if (word === 'dc') {
      once(t, dc !== undefined, 'a dc value');
      c.next();
      dc = c.value('the dc value', form);
    } else if (word === 'ac') {
      once(t, ac !== undefined, 'an ac value');
      c.next();
      const mag = c.value('the ac magnitude', 'ac mag [phase]');
      ac = c.isValue(c.peek()) ? { mag, phase: c.value('the ac phase', 'ac mag [phase]') } : { mag };
    } else if (word === 'sin' || word === 'pulse' || word === 'pwl') {
      once(t, waveform !== undefined, 'a waveform');
      c.next();
      waveform = parseWaveform(c, t, word);
    } else if (c.isValue(t) && dc === undefined && ac === undefined && waveform === undefined) {
      dc = c.value('the dc value', form);
    } else {
      c.fail('syntax', `unexpected ${show(t)}`, t, form);
    }
  }
  return { ...origin, kind, name: name.text, nodes: [ns[0] ?? '', ns[1] ?? ''], ...opt('dc', dc), ...opt('ac', ac), ...opt('waveform', waveform), ...opt('pmax', pmax) };
}

/** Reads a waveform's arguments; parentheses and commas are optional. */
function parseWaveform(c: Cursor, kw: Token, kind: 'sin' | 'pulse' | 'pwl'): Waveform {
  const form = WAVE_FORMS[kind] ?? '';
  const names = WAVE_ARGS[kind];
  const args: Value[] = [];
  const argTokens: Token[] = [];
  const label = (k: number): string => (names ? `the ${kind} argument ${names[k] ?? `#${k + 1}`}` : `the pwl ${k % 2 === 0 ? 'time' : 'value'} #${Math.floor(k / 2) + 1}`);
  if (c.peek()?.kind === 'lparen') {
    c.next();
    while (c.peek() && c.peek()?.kind !== 'rparen') {
      argTokens.push(c.peek() as Token);
      args.push(c.value(label(args.length), form));
    }
    if (!c.peek()) c.fail('syntax', `the ${kind}( argument list is never closed`, undefined, `a closing ")" (${form})`);
    c.next();
  } else {
    while (c.isValue(c.peek())) {
      argTokens.push(c.peek() as Token);
      args.push(c.value(label(args.length), form));
    }
  }
  const a = (k: number): Value | undefined => args[k];
  if (kind === 'pwl') {
    if (args.length < 2 || args.length % 2 !== 0) {
      c.fail('waveform-args', `pwl needs time-value pairs, but ${args.length} value${args.length === 1 ? '' : 's'} ${args.length === 1 ? 'was' : 'were'} given`, kw, form);
    }
    const points: Array<{ t: Value; v: Value }> = [];
    for (let k = 0; k + 1 < args.length; k += 2) points.push({ t: args[k] as Value, v: args[k + 1] as Value });
    checkPwlTimes(c, points, argTokens);
    return { kind, points };
  }
  const [lo, hi] = kind === 'sin' ? [3, 6] : [2, 7];
  if (args.length < lo) c.fail('waveform-args', `${kind} needs at least ${lo} arguments, but ${args.length} ${args.length === 1 ? 'was' : 'were'} given`, kw, form);
  if (args.length > hi) c.fail('waveform-args', `${kind} takes at most ${hi} arguments, but ${args.length} were given`, argTokens[hi], form);
  if (kind === 'sin') {
    return { kind, vo: a(0) as Value, va: a(1) as Value, freq: a(2) as Value, ...opt('td', a(3)), ...opt('theta', a(4)), ...opt('phase', a(5)) };
  }
  return { kind, v1: a(0) as Value, v2: a(1) as Value, ...opt('td', a(2)), ...opt('tr', a(3)), ...opt('tf', a(4)), ...opt('pw', a(5)), ...opt('per', a(6)) };
}

/** pwl times written as plain numbers must increase strictly (a transient cannot step back in time). */
function checkPwlTimes(c: Cursor, points: ReadonlyArray<{ t: Value }>, toks: readonly Token[]): void {
  let last = -Infinity;
  points.forEach((p, k) => {
    if (p.t.kind !== 'number') return;
    if (p.t.value <= last) c.note('pwl-order', `pwl time ${p.t.text} does not come after the time before it`, toks[2 * k], 'pwl times in increasing order');
    last = p.t.value;
  });
}

function parseInstance(c: Cursor, name: Token, origin: ReturnType<Cursor['origin']>): InstanceCard {
  const form = FORMS.X ?? '';
  const words: Token[] = [];
  while (!c.done && !c.atAssignment()) words.push(c.name('a node or the subcircuit name', form));
  const subckt = words.pop();
  if (!subckt) c.fail('wrong-node-count', `${name.text} needs its nodes and the subcircuit name`, undefined, form);
  const params: Array<Assignments[number]> = [];
  let pmax: Value | undefined;
  const seen = new Set<string>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), form);
    const { key, value } = c.rawAssignment();
    const k = key.text.toLowerCase();
    if (!IDENTIFIER.test(key.text)) c.fail('bad-name', `"${key.text}" is not a parameter name`, key, 'a name of letters, digits and _ starting with a letter or _');
    if (seen.has(k)) c.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each parameter at most once');
    seen.add(k);
    const v = c.toValue(value, `a value for ${key.text}`, `${key.text}=<number or {expression}>`);
    if (k === 'pmax') pmax = v;
    else params.push({ name: k, value: v, pos: key.pos });
  }
  return { ...origin, kind: 'X', name: name.text, nodes: words.map((w) => w.text), subckt: subckt.text, params, ...opt('pmax', pmax) };
}
