/**
 * The project's own power-supply directives (netlist.md, Power-supply
 * directives; figures.md): `.supply`, `.figure`, `.limit`, `.spread`.
 */
import { BJT_PARAMS, DIODE_PARAMS } from '@railcheck/devices';
import type { Assignments, FigureKind, LimitOp, SupplyCard } from './ast.js';
import type { Cursor, ValueRules } from './cursor.js';
import { show } from './cursor.js';
import type { Token } from './lexer.js';

/** Kinds of `.figure`, with the keys each accepts (figures.md). `true` marks keys that accept `5%`. */
export const FIGURE_KEYS: Readonly<Record<FigureKind, Readonly<Record<string, boolean>>>> = {
  line: { from: false, to: false },
  load: { from: false, to: false },
  dropout: { fall: true },
  ripple: { freq: false, amp: false },
  dissipation: {},
  sag: { depth: true, dur: false, edge: false, fall: true, ripple: false, freq: false },
};

/** Figure kinds in the order figures.md lists them. */
export const FIGURE_KINDS = Object.keys(FIGURE_KEYS) as FigureKind[];

/** Every fixed figure name (figures.md) and the `.figure` kind that produces it; `pd.<element>` is handled apart. */
const FIGURE_NAMES: Readonly<Record<string, FigureKind>> = {
  'line.delta': 'line', 'line.slope': 'line', 'line.pct_per_v': 'line', 'line.pct': 'line',
  'load.delta': 'load', 'load.pct': 'load', 'load.rout': 'load',
  'dropout.vin': 'dropout', 'dropout.v': 'dropout', 'dropout.headroom': 'dropout', 'dropout.ratio': 'dropout', 'headroom.min': 'dropout',
  'ripple.rr': 'ripple', 'ripple.rr_tran': 'ripple', 'ripple.out_pp': 'ripple', 'ripple.feed_pp': 'ripple',
  efficiency: 'dissipation',
  'sag.fall': 'sag', 'sag.pass': 'sag', 'sag.max_depth': 'sag', 'sag.out_pp': 'sag', 'sag.out_pp_before': 'sag',
};

/** The `.figure` kind that produces a figure name (any case), or undefined for a name no figure has. */
export function figureKindOf(name: string): FigureKind | undefined {
  const low = name.toLowerCase();
  if (/^pd\.[^.]+(\.[^.]+)*$/.test(low)) return 'dissipation';
  return Object.prototype.hasOwnProperty.call(FIGURE_NAMES, low) ? FIGURE_NAMES[low] : undefined;
}

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
  const table = FIGURE_KEYS[figure];
  const names = [...Object.keys(table), ...(figure === 'ripple' ? ['method'] : [])];
  const known = names.length ? names.join(', ') : `no keys (a ${figure} figure takes none)`;
  let method: 'ac' | 'tran' | 'both' | undefined;
  const keys: Array<Assignments[number]> = [];
  const seen = new Set<string>();
  while (!c.done) {
    if (!c.atAssignment()) c.fail('syntax', `unexpected ${show(c.peek())}`, c.peek(), `key=value pairs (${known})`);
    const { key, value } = c.rawAssignment();
    const k = key.text.toLowerCase();
    if (!names.includes(k)) c.fail('unknown-key', `a ${figure} figure has no key "${key.text}"`, key, known);
    if (seen.has(k)) c.fail('duplicate-key', `"${key.text}" is given twice`, key, 'each key at most once');
    seen.add(k);
    if (k === 'method') {
      const m = value.kind === 'word' ? value.text.toLowerCase() : '';
      if (m !== 'ac' && m !== 'tran' && m !== 'both') c.fail('syntax', `method=${value.text}: unknown method`, value, 'ac, tran or both');
      method = m;
      continue;
    }
    const rules: ValueRules = { percent: table[k] === true };
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

const ALL_MODEL_PARAMS = [...new Set([...DIODE_PARAMS, ...BJT_PARAMS].map((p) => p.name))];

/** `.spread <element>|<model>.<PARAM> <ratio> [uniform|gauss]`; a `<model>.<PARAM>` target keeps the model as written and the parameter upper-cased. */
export function parseSpread(c: Cursor): SupplyCard {
  const form = '.spread <element>|<model>.<PARAM> <ratio> [uniform|gauss]';
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
  if (ratio.kind === 'number' && ratio.value < 0) c.note('bad-value', 'a tolerance cannot be negative', rt, 'a ratio ≥ 0 such as 5% or 0.05');
  let distribution: 'uniform' | 'gauss' = 'uniform';
  if (!c.done) {
    const dt = c.name('the distribution', 'uniform or gauss');
    const d = dt.text.toLowerCase();
    if (d !== 'uniform' && d !== 'gauss') c.fail('syntax', `unknown distribution "${dt.text}"`, dt, 'uniform (± ratio) or gauss (ratio = 3σ)');
    distribution = d;
  }
  c.expectEnd('the end of the .spread line');
  return { ...origin, kind: 'spread', target, ratio, distribution };
}
