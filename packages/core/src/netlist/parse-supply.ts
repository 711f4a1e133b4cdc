/**
 * The project's own power-supply directives (netlist.md, Power-supply
 * directives; figures.md): `.supply`, `.figure`, `.limit`, `.spread`.
 */
import { BJT_PARAMS, DIODE_PARAMS } from '@railcheck/devices';
import type { Assignments, LimitOp, SupplyCard } from './ast.js';
import { FIGURE_KIND_INFO, FIGURE_KINDS, figureKindOf } from '../figure-registry.js';
import type { Cursor, ValueRules } from './cursor.js';
import { show } from './cursor.js';
import type { Token } from './lexer.js';

/** The `.figure` kinds and figure names come from the figure registry. */
export { figureKindOf, FIGURE_KINDS };

/** The element's own name in an instance path (`X1.R2` → `R2`): its first letter gives its kind. */
export function leafName(name: string): string {
  return name.slice(name.lastIndexOf('.') + 1);
}

const LIMIT_OPS: readonly LimitOp[] = ['<', '<=', '>', '>='];
const SUPPLY_KEYS = ['in', 'out', 'ref', 'load', 'feed'] as const;
const SUPPLY_FORM = '.supply in=<Vsource> out=<node> [ref=<node>] [load=<element>] [feed=<node>]';

/** `.supply in=V out=node [ref=node] [load=element] [feed=node]` */
export function parseSupply(c: Cursor): SupplyCard {
  const origin = c.origin();
  c.next();
  const got = new Map<string, Token>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), SUPPLY_FORM);
    const { key, value } = c.rawAssignment();
    const k = key.text.toLowerCase();
    if (!(SUPPLY_KEYS as readonly string[]).includes(k)) c.fail('unknown-key', `unknown .supply key "${key.text}"`, key, SUPPLY_KEYS.join(', '));
    if (got.has(k)) c.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each key at most once');
    if (value.kind !== 'word') c.fail('syntax', `expected a name after "${key.text}=" but found ${show(value)}`, value, SUPPLY_FORM);
    got.set(k, value);
  }
  const input = got.get('in');
  const out = got.get('out');
  if (!input) c.fail('missing-item', '.supply does not name its input source (in=)', undefined, SUPPLY_FORM);
  if (!out) c.fail('missing-item', '.supply does not name its output node (out=)', undefined, SUPPLY_FORM);
  if (!/^v/i.test(leafName(input.text))) c.fail('bad-source', `in=${input.text}: the input must be an independent voltage source`, input, 'a V element name');
  const load = got.get('load');
  if (load && !/^[ri]/i.test(leafName(load.text))) c.fail('bad-load', `load=${load.text}: the load must be a current source or a resistor`, load, 'an I or R element name');
  const name = (k: string): Record<string, string> => {
    const t = got.get(k);
    return t ? { [k]: t.text } : {};
  };
  return { ...origin, kind: 'supply', input: input.text, out: out.text, ...name('ref'), ...name('load'), ...name('feed') };
}

/** `.figure <kind> [key=value ...]` with the keys of figures.md. */
export function parseFigure(c: Cursor): SupplyCard {
  const origin = c.origin();
  c.next();
  const kt = c.name('the figure kind', FIGURE_KINDS.join(', '));
  const figure = FIGURE_KINDS.find((k) => k === kt.text.toLowerCase());
  if (!figure) c.fail('unknown-figure', `unknown figure kind "${kt.text}"`, kt, `one of ${FIGURE_KINDS.join(', ')}`);
  const table = FIGURE_KIND_INFO[figure].keys;
  const names = Object.keys(table);
  const known = names.length ? names.join(', ') : `no keys (a ${figure} figure takes none)`;
  let method: 'ac' | 'tran' | 'both' | undefined;
  const keys: Array<Assignments[number]> = [];
  const seen = new Set<string>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), `key=value pairs (${known})`);
    const { key, value } = c.rawAssignment();
    const k = key.text.toLowerCase();
    const entry = Object.prototype.hasOwnProperty.call(table, k) ? table[k] : undefined;
    if (!entry) c.fail('unknown-key', `a ${figure} figure has no key "${key.text}"`, key, known);
    if (seen.has(k)) c.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each key at most once');
    seen.add(k);
    if (entry.value === 'method') {
      const m = value.kind === 'word' ? entry.words.find((w) => w === value.text.toLowerCase()) : undefined;
      if (!m) c.fail('syntax', `${k}=${value.text}: unknown method`, value, entry.words.join(', ').replace(/, (\w+)$/, ' or $1'));
      method = m;
      continue;
    }
    const rules: ValueRules = { percent: entry.percent };
    keys.push({ name: k, value: c.toValue(value, `a value for ${k}`, `${k}=<number or {expression}>`, rules), pos: key.pos });
  }
  return { ...origin, kind: 'figure', figure, keys, ...(method ? { method } : {}) };
}

/** `.limit <figure-name> <op> <value>`; a `%` in the value is an error (figures.md, Limits). */
export function parseLimit(c: Cursor): SupplyCard {
  const form = '.limit <figure-name> <|<=|>|>= <value>';
  const origin = c.origin();
  c.next();
  const ft = c.name('the figure name', form);
  if (!figureKindOf(ft.text)) {
    c.fail('unknown-figure', `no figure is called "${ft.text}"`, ft, `a figure name such as line.delta, load.pct, dropout.v, ripple.rr, pd.Q1, efficiency or sag.fall`);
  }
  const ot = c.peek();
  if (!ot) c.fail('missing-item', 'the limit has no comparison', undefined, LIMIT_OPS.join(' '));
  const op = LIMIT_OPS.find((o) => o === ot.text);
  if (ot.kind !== 'op' || !op) c.fail('syntax', `expected a comparison but found ${show(ot)}`, ot, LIMIT_OPS.join(' '));
  c.next();
  const value = c.value('the limit value', form, {
    percentMessage: 'a % sign is not allowed in a limit value: percent figures are already in percent (write 1 for 1 %)',
  });
  c.expectEnd('the end of the .limit line');
  return { ...origin, kind: 'limit', figure: ft.text, op, value };
}

/** A tolerance ratio lies in (0, 1): 0 is no tolerance, and 100 % would take a value to zero (docs/netlist.md, .spread). */
export const SPREAD_RATIO = { above: 0, below: 1 } as const;
/** What a tolerance must be, in words. */
export const SPREAD_RATIO_EXPECTED = 'a ratio > 0 and < 1 such as 5% or 0.05';

const ALL_MODEL_PARAMS = [...new Set([...DIODE_PARAMS, ...BJT_PARAMS].map((p) => p.name))];

/**
 * `.spread <element>|<model>.<PARAM> <ratio> [uniform|gauss] [each|lot]`; a
 * `<model>.<PARAM>` target keeps the model as written and the parameter
 * upper-cased. The last word (model spreads only; docs/spread.md) says
 * whether each element of the model draws its own factor (`each`) or all
 * share one (`lot`); without it the spread's option decides.
 */
export function parseSpread(c: Cursor): SupplyCard {
  const form = '.spread <element>|<model>.<PARAM> <ratio> [uniform|gauss] [each|lot]';
  const origin = c.origin();
  c.next();
  const tt = c.name('the element or model parameter', form);
  let target = tt.text;
  const dot = tt.text.lastIndexOf('.');
  if (dot >= 0) {
    const param = tt.text.slice(dot + 1).toUpperCase();
    if (dot === 0 || !ALL_MODEL_PARAMS.includes(param)) {
      c.fail('unknown-parameter', `"${tt.text}" does not name a model parameter`, tt, `<model>.<PARAM> with PARAM one of ${ALL_MODEL_PARAMS.join(' ')}`);
    }
    target = `${tt.text.slice(0, dot)}.${param}`;
  } else if (!/^[rclvieghf]/i.test(tt.text)) {
    c.fail('bad-target', `"${tt.text}" cannot take a tolerance: only elements with a value (R C L V I E G F H) or model parameters can`, tt, form);
  }
  const rt = c.peek();
  const ratio = c.value('the tolerance ratio', form, { percent: true });
  if (ratio.kind === 'number' && !(ratio.value > SPREAD_RATIO.above && ratio.value < SPREAD_RATIO.below)) c.note('bad-value', `a tolerance of ${ratio.text} is out of range`, rt, SPREAD_RATIO_EXPECTED);
  let distribution: 'uniform' | 'gauss' = 'uniform';
  let sampling: 'each' | 'lot' | undefined;
  const samplingWord = (t: { text: string } | undefined): boolean => t !== undefined && ['each', 'lot'].includes(t.text.toLowerCase());
  if (!c.done && !samplingWord(c.peek())) {
    const dt = c.name('the distribution', 'uniform or gauss');
    const d = dt.text.toLowerCase();
    if (d !== 'uniform' && d !== 'gauss') c.fail('syntax', `unknown distribution "${dt.text}"`, dt, 'uniform (± ratio) or gauss (ratio = 3σ), then optionally each or lot');
    distribution = d;
  }
  if (!c.done) {
    const st = c.name('the sampling of a model spread', 'each or lot');
    const m = st.text.toLowerCase();
    if (m !== 'each' && m !== 'lot') c.fail('syntax', `unknown sampling "${st.text}"`, st, 'each (every element of the model draws its own factor) or lot (they share one)');
    if (dot < 0) c.fail('syntax', `"${st.text}" applies to model spreads only: ${tt.text} is one element`, st, `${form} with each or lot after a <model>.<PARAM> target`);
    sampling = m;
  }
  c.expectEnd('the end of the .spread line');
  return { ...origin, kind: 'spread', target, ratio, distribution, ...(sampling !== undefined ? { sampling } : {}) };
}
