/**
 * Reads the few component values the independent computations need
 * straight from an example netlist, with a reader written for the tests
 * (not railcheck's), so that the hand solutions follow the file as it is
 * and a changed value cannot leave them behind. Handles only what the
 * examples use: element lines, `.model` cards, `.param name=value` and
 * `{name}` references, `;` comments. A model written in its datasheet form
 * (docs/models.md) is turned into its physical parameters by the devices
 * package's resolver: the hand solutions check the engine and the figures
 * given those parameters, and test/devices/datasheet.test.ts checks the
 * resolver itself against simulated test points.
 */
import { readFileSync } from 'node:fs';
import { resolveSheet, sheetKeys } from '@railcheck/devices';
import { fileURLToPath } from 'node:url';

/** Absolute path of an example netlist. */
export function examplePath(file: string): string {
  return fileURLToPath(new URL(`../../../../examples/${file}`, import.meta.url));
}

/** One element line: name, node names, the rest of its tokens. */
export interface ElementLine {
  readonly name: string;
  readonly tokens: readonly string[];
}

/** What a netlist holds, by upper-case name. */
export interface NetlistValues {
  readonly elements: ReadonlyMap<string, ElementLine>;
  /** Model name → parameter (upper-case) → value. */
  readonly models: ReadonlyMap<string, ReadonlyMap<string, number>>;
  /** `.figure` kind → key → raw text. */
  readonly figures: ReadonlyMap<string, ReadonlyMap<string, string>>;
}

/** Scale suffixes of the netlist number notation (the common netlist notation; `meg` before `m`). */
const SUFFIXES: readonly (readonly [string, number])[] = [
  ['meg', 1e6], ['t', 1e12], ['g', 1e9], ['k', 1e3], ['m', 1e-3], ['u', 1e-6], ['n', 1e-9], ['p', 1e-12], ['f', 1e-15],
];

/** A number as written (`1.5k`, `2200u`, `50m`, `10%` → 0.1), `{name}` resolved against `params`. */
export function numberOf(text: string, params: ReadonlyMap<string, number> = new Map()): number {
  const ref = /^\{(\w+)\}$/.exec(text);
  if (ref) {
    const v = params.get(ref[1]!.toLowerCase());
    if (v === undefined) throw new Error(`unknown parameter ${text}`);
    return v;
  }
  const m = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)([a-z%]*)$/i.exec(text);
  if (!m) throw new Error(`not a number: ${text}`);
  const base = Number(m[1]);
  const tail = m[2]!.toLowerCase();
  if (tail === '%') return base / 100;
  const s = SUFFIXES.find(([p]) => tail.startsWith(p));
  return s ? base * s[1] : base;
}

/** Reads an example netlist's element lines, models and figure keys. */
export function readExample(file: string): NetlistValues {
  const lines = readFileSync(examplePath(file), 'utf8').split(/\r?\n/).slice(1);
  const params = new Map<string, number>();
  const elements = new Map<string, ElementLine>();
  const models = new Map<string, Map<string, number>>();
  const figures = new Map<string, Map<string, string>>();
  for (const raw of lines) {
    const line = raw.replace(/;.*$/, '').trim();
    if (line === '' || line.startsWith('*')) continue;
    const tokens = line.replace(/[(),]/g, ' ').trim().split(/\s+/);
    const head = tokens[0]!.toLowerCase();
    if (head === '.param') {
      for (const t of tokens.slice(1)) {
        const [k, v] = t.split('=');
        params.set(k!.toLowerCase(), numberOf(v!, params));
      }
    } else if (head === '.model') {
      const p = new Map<string, number>();
      for (const t of tokens.slice(3)) {
        const [k, v] = t.split('=');
        p.set(k!.toUpperCase(), numberOf(v!, params));
      }
      const kind = tokens[2]!.toUpperCase() === 'D' ? 'diode' : 'bjt';
      const sheet = [...p.keys()].some((k) => sheetKeys(kind).some((s) => s.name === k));
      const r = sheet ? resolveSheet(kind, p) : undefined;
      if (r && !r.ok) throw new Error(`model ${tokens[1]}: ${r.problems.map((x) => x.message).join('; ')}`);
      models.set(tokens[1]!.toUpperCase(), r?.ok ? r.params : p);
    } else if (head === '.figure') {
      figures.set(tokens[1]!.toLowerCase(), new Map(tokens.slice(2).map((t) => t.split('=') as [string, string])));
    } else if (!head.startsWith('.')) {
      const resolved = tokens.map((t) => (/^\{\w+\}$/.test(t) ? String(numberOf(t, params)) : t));
      elements.set(tokens[0]!.toUpperCase(), { name: tokens[0]!, tokens: resolved });
    }
  }
  return { elements, models, figures };
}

/** The element named `name`, or an error naming it. */
export function element(v: NetlistValues, name: string): ElementLine {
  const e = v.elements.get(name.toUpperCase());
  if (!e) throw new Error(`no element ${name} in the example`);
  return e;
}

/** Value of a two-terminal element (`R1 a b 1k`, `I1 a b 50m`, `V1 a 0 dc 12`): the number after the nodes. */
export function valueOf(v: NetlistValues, name: string): number {
  const t = element(v, name).tokens;
  const i = t[3]?.toLowerCase() === 'dc' ? 4 : 3;
  return numberOf(t[i]!);
}

/** Model parameters of a diode or transistor element (its last node token is followed by the model name). */
export function modelOf(v: NetlistValues, name: string, modelToken: number): ReadonlyMap<string, number> {
  const model = element(v, name).tokens[modelToken]!.toUpperCase();
  const m = v.models.get(model);
  if (!m) throw new Error(`no model ${model}`);
  return m;
}

/** Nodes of an element, as written (upper-case keys untouched). */
export function nodesOf(v: NetlistValues, name: string, count: number): readonly string[] {
  return element(v, name).tokens.slice(1, 1 + count);
}
