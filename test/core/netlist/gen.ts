/**
 * fast-check generators of valid netlist ASTs (every card kind of
 * docs/netlist.md, within the rules the reader enforces: unique
 * names per scope, positive resistors, increasing pwl times, one .supply,
 * limits only on figures asked for, run directives only at top level).
 */
import fc from 'fast-check';
import { knownParams } from '../../../packages/devices/src/index.js';
import type { Card, Expr, Netlist, Value } from '../../../packages/core/src/netlist/ast.js';
import { parseScaledNumber } from '../../../packages/core/src/netlist/index.js';

const P = { file: 'gen', line: 1, column: 1 };
const FUNCS = ['sqrt', 'exp', 'ln', 'log10', 'abs', 'min', 'max', 'pow'];

const ident = fc.stringMatching(/^[a-z_][a-z0-9_]{0,5}$/).filter((s) => !FUNCS.includes(s) && s !== 'pmax');
const node = fc.stringMatching(/^[a-zA-Z0-9_]{1,4}$/);

/** A finite double as the printer would write it. */
function plain(v: number): Value {
  return { kind: 'number', value: v, pos: P, text: Object.is(v, -0) ? '-0' : String(v) };
}

const suffixed = fc.tuple(fc.integer({ min: 1, max: 999 }), fc.constantFrom('f', 'p', 'n', 'u', 'µ', 'm', 'k', 'meg', 'g', 't', ''), fc.constantFrom('', 'V', 'ohm', 'Hz')).map(([n, s, u]): Value => {
  const text = `${n}${s}${s === '' && u !== '' ? '' : u}`;
  return { kind: 'number', value: parseScaledNumber(text) as number, pos: P, text };
});

const finite = (min: number) => fc.double({ min, max: 1e300, noNaN: true, noDefaultInfinity: true });

/** Expression trees as the reader builds them: numbers are non-negative (a minus is a unary node). */
const exprTree: fc.Arbitrary<Expr> = fc.letrec<{ e: Expr }>((tie) => ({
  e: fc.oneof(
    { depthSize: 'small', maxDepth: 4 },
    finite(0).map((value): Expr => ({ kind: 'num', value })),
    ident.map((name): Expr => ({ kind: 'param', name, pos: P })),
    fc.tuple(fc.constantFrom('-', '+'), tie('e')).map(([op, arg]): Expr => ({ kind: 'unary', op: op as '-' | '+', arg })),
    fc.tuple(fc.constantFrom('+', '-', '*', '/', '^'), tie('e'), tie('e')).map(([op, left, right]): Expr => ({ kind: 'binary', op: op as '+', left, right })),
    fc.tuple(fc.constantFrom('sqrt', 'exp', 'ln', 'log10', 'abs'), tie('e')).map(([fn, a]): Expr => ({ kind: 'call', fn: fn as 'sqrt', args: [a], pos: P })),
    fc.tuple(tie('e'), tie('e')).map(([a, b]): Expr => ({ kind: 'call', fn: 'pow', args: [a, b], pos: P })),
    fc.tuple(fc.constantFrom('min', 'max'), fc.array(tie('e'), { minLength: 1, maxLength: 3 })).map(([fn, args]): Expr => ({ kind: 'call', fn: fn as 'min', args, pos: P })),
  ),
})).e;

const exprValue = exprTree.map((expr): Value => ({ kind: 'expr', expr, pos: P, text: '{...}' }));

/** Any value; `min` bounds plain numbers from below (expressions are checked at elaboration). */
export function value(min = -1e300): fc.Arbitrary<Value> {
  return fc.oneof(finite(min).map(plain), suffixed.filter((v) => v.kind === 'number' && v.value >= min), exprValue);
}
/** A value whose plain numbers lie in [lo, hi]: the reader refuses main element values outside their range (docs/models.md, "Valid ranges"). */
function within(lo: number, hi: number): fc.Arbitrary<Value> {
  return fc.oneof(fc.double({ min: lo, max: hi, noNaN: true }).map(plain), suffixed.filter((v) => v.kind === 'number' && v.value >= lo && v.value <= hi), exprValue);
}
const nonZero = fc.oneof(finite(-1e300).filter((v) => v !== 0).map(plain), suffixed, exprValue);
const positive = fc.oneof(finite(Number.MIN_VALUE).map(plain), suffixed, exprValue);
/** A tolerance ratio: the reader refuses plain numbers outside (0, 1) (docs/netlist.md, .spread). */
const tolerance = fc.double({ min: 1e-6, max: 0.999, noNaN: true });
const ratio = fc.oneof(tolerance.map(plain), exprValue, tolerance.map((v): Value => ({ kind: 'number', value: v, pos: P, text: '?', percent: true })));

const opt = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: undefined });

/** Drops undefined fields, as the reader never writes them. */
function clean<T extends object>(o: T): T {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T;
}

const origin = { pos: P, lineText: '' };

function prefix(vals: ReadonlyArray<Value | undefined>, keys: readonly string[]): Record<string, Value> {
  const out: Record<string, Value> = {};
  vals.forEach((v, k) => {
    if (v !== undefined) out[keys[k] as string] = v;
  });
  return out;
}

const waveform = fc.oneof(
  fc.tuple(value(), value(), value(), fc.array(value(), { maxLength: 3 })).map(([vo, va, freq, rest]) => ({ kind: 'sin', vo, va, freq, ...prefix(rest, ['td', 'theta', 'phase']) })),
  fc.tuple(value(), value(), fc.array(value(), { maxLength: 5 })).map(([v1, v2, rest]) => ({ kind: 'pulse', v1, v2, ...prefix(rest, ['td', 'tr', 'tf', 'pw', 'per']) })),
  fc.tuple(fc.uniqueArray(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 4 }), fc.array(value(), { minLength: 4, maxLength: 4 })).map(([ts, vs]) => ({
    kind: 'pwl',
    points: [...ts].sort((a, b) => a - b).map((t, k) => ({ t: plain(t), v: vs[k] as Value })),
  })),
);

/** An element of a given letter with name `name`. */
function element(name: string): fc.Arbitrary<Card> {
  const kind = name[0]?.toUpperCase() ?? 'R';
  const pmax = opt(value());
  const n2 = fc.tuple(node, node);
  const mk = (a: fc.Arbitrary<object>) => a.map((o) => clean({ ...origin, kind, name, ...o }) as unknown as Card);
  switch (kind) {
    case 'R': return mk(fc.record({ nodes: n2, value: within(1e-9, 1e15), pmax }));
    // Values within the ranges the reader checks on plain numbers (docs/models.md): C ≥ 0, L > 0, 0 < k ≤ 1.
    case 'C': return mk(fc.record({ nodes: n2, value: within(0, 1e4), ic: opt(value()), pmax }));
    case 'L': return mk(fc.record({ nodes: n2, value: within(Number.MIN_VALUE, 1e4), ic: opt(value()), pmax }));
    case 'K':
      return mk(fc.record({
        inductors: fc.tuple(fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 9 })).map(([a, b]) => [`L${a}`, `Lp${b}`]),
        coupling: fc.oneof(fc.double({ min: Number.MIN_VALUE, max: 1, noNaN: true }).map(plain), exprValue),
        pmax,
      }));
    case 'V': case 'I':
      return mk(fc.record({ nodes: n2, dc: opt(value()), ac: opt(fc.tuple(value(), opt(value())).map(([mag, phase]) => clean({ mag, phase }))), waveform: opt(waveform), pmax }));
    case 'D': return mk(fc.record({ nodes: n2, model: ident, area: opt(value()), pmax }));
    case 'Q': return mk(fc.record({ nodes: fc.tuple(node, node, node), model: ident, area: opt(value()), pmax }));
    case 'E': case 'G': return mk(fc.record({ nodes: fc.tuple(node, node, node, node), gain: within(-1e12, 1e12), pmax }));
    case 'F': case 'H': return mk(fc.record({ nodes: n2, control: fc.integer({ min: 1, max: 9 }).map((k) => `V${k}`), gain: within(-1e12, 1e12), pmax }));
    default:
      return mk(fc.record({
        nodes: fc.array(node, { maxLength: 3 }),
        subckt: ident,
        params: fc.uniqueArray(fc.tuple(ident, value()), { maxLength: 3, selector: ([k]) => k }).map((ps) => ps.map(([n, v]) => ({ name: n, value: v, pos: P }))),
        pmax,
      }));
  }
}

const assignments = (min: number) => fc.uniqueArray(fc.tuple(ident, value()), { minLength: min, maxLength: 3, selector: ([k]) => k }).map((ps) => ps.map(([name, v]) => ({ name, value: v, pos: P })));

const model = (name: string) => fc.constantFrom('D', 'NPN', 'PNP').chain((type) =>
  fc.subarray([...knownParams(type as 'D')]).chain((names) => fc.array(value(), { minLength: names.length, maxLength: names.length }).map((vals) => ({
    ...origin, kind: 'model', name, type, params: names.map((p, k) => ({ name: p, value: vals[k] as Value, pos: P })),
  }) as unknown as Card)));

/** Cards allowed in a scope: elements, models, params and (to `depth`) nested definitions; names unique per kind. */
function scope(depth: number): fc.Arbitrary<Card[]> {
  const letters = depth > 0 ? 'RCLVIDQEGFHKX' : 'RCLVIDQEGFHK';
  return fc.array(fc.integer({ min: 0, max: 14 }), { maxLength: 6 }).chain((picks) => fc.tuple(...picks.map((p, i): fc.Arbitrary<Card> => {
    if (p < letters.length) return element(`${letters[p]}${i}`);
    if (p === 13) return model(`m${i}`);
    if (p === 14 && depth > 0) return subckt(`s${i}`, depth - 1);
    return assignments(1).map((a) => ({ ...origin, kind: 'param', assignments: a }) as unknown as Card);
  })).map((cards) => cards));
}

function subckt(name: string, depth: number): fc.Arbitrary<Card> {
  return fc.record({
    ports: fc.uniqueArray(fc.stringMatching(/^[a-z][a-z0-9]{0,3}$/), { maxLength: 3 }),
    defaults: assignments(0),
    body: scope(depth),
  }).map((r) => ({ ...origin, kind: 'subckt', name, ...r }) as unknown as Card);
}

const analyses = fc.array(fc.oneof(
  fc.constant({ ...origin, kind: 'op' }),
  fc.record({ source: fc.constantFrom('V1', 'Iload'), start: value(), stop: value(), step: nonZero }).map((r) => ({ ...origin, kind: 'dc', ...r })),
  fc.record({ tstep: positive, tstop: fc.double({ min: 1, max: 10, noNaN: true }).map(plain), tstart: opt(fc.double({ min: 0, max: 0.99, noNaN: true }).map(plain)), tmax: positive, flags: fc.subarray(['fromic']) })
    .map((r) => clean({ ...origin, kind: 'tran', ...r, tmax: r.tstart ? r.tmax : undefined })),
  fc.record({ variation: fc.constantFrom('dec', 'lin'), points: fc.integer({ min: 1, max: 100 }).map(plain), fstart: fc.double({ min: 1, max: 10, noNaN: true }).map(plain), fstop: fc.double({ min: 10, max: 1e6, noNaN: true }).map(plain) })
    .map((r) => ({ ...origin, kind: 'ac', ...r })),
  fc.array(value(), { minLength: 1, maxLength: 3 }).map((temps) => ({ ...origin, kind: 'temp', temps })),
), { maxLength: 4 });

const FIG_KEYS: Record<string, ReadonlyArray<[string, boolean]>> = {
  line: [['from', false], ['to', false]], load: [['from', false], ['to', false]], dropout: [['fall', true]],
  ripple: [['freq', false], ['amp', false]], dissipation: [], sag: [['depth', true], ['dur', false], ['edge', false], ['fall', true], ['ripple', false], ['freq', false]],
};
const FIG_NAMES: Record<string, readonly string[]> = {
  line: ['line.delta', 'line.slope'], load: ['load.pct', 'load.rout'], dropout: ['dropout.v', 'headroom.min'],
  ripple: ['ripple.rr', 'ripple.out_pp'], dissipation: ['pd.Q1', 'efficiency'], sag: ['sag.fall', 'sag.max_depth'],
};

const figure = (kind: string) => fc.tuple(fc.subarray([...(FIG_KEYS[kind] ?? [])]), fc.constantFrom(undefined, 'ac', 'tran', 'both'))
  .chain(([keys, method]) => fc.tuple(...keys.map(([, pct]) => (pct ? ratio : value()))).map((vals) => clean({
    ...origin, kind: 'figure', figure: kind, keys: keys.map(([k], i) => ({ name: k, value: vals[i] as Value, pos: P })), method: kind === 'ripple' ? method : undefined,
  })));

const supplyCards = fc.option(fc.record({
  supply: fc.record({ input: fc.constant('V1'), out: node, ref: opt(node), load: opt(fc.constantFrom('R1', 'Iload')), feed: opt(node) }).map((r) => clean({ ...origin, kind: 'supply', ...r })),
  kinds: fc.subarray(Object.keys(FIG_KEYS)),
}).chain(({ supply, kinds }) => fc.tuple(
  fc.tuple(...kinds.map(figure)),
  fc.array(fc.tuple(fc.constantFrom(...kinds.flatMap((k) => FIG_NAMES[k] ?? []), 'line.delta'), fc.constantFrom('<', '<=', '>', '>='), value()), { maxLength: 3 }),
  fc.array(fc.tuple(fc.constantFrom('R1', 'Cx', 'm1.BV', 'q.VAF'), ratio, fc.constantFrom('uniform', 'gauss'), fc.constantFrom(undefined, 'each', 'lot')), { maxLength: 2 }),
).map(([figs, limits, spreads]) => [
  supply,
  ...figs,
  ...limits.filter(([f]) => kinds.some((k) => FIG_NAMES[k]?.includes(f))).map(([f, op, v]) => ({ ...origin, kind: 'limit', figure: f, op, value: v })),
  // each/lot (docs/spread.md) only after a model target.
  ...spreads.map(([target, r, distribution, sampling]) => clean({ ...origin, kind: 'spread', target, ratio: r, distribution, sampling: target.includes('.') ? sampling : undefined })),
])), { nil: undefined });

/** A whole valid netlist. */
export const netlistArb: fc.Arbitrary<Netlist> = fc.record({
  title: fc.stringMatching(/^[A-Za-z0-9 ,:()-]{0,30}$/),
  body: scope(2),
  runs: analyses,
  supply: supplyCards,
}).map((r) => ({ title: r.title, file: 'gen.cir', cards: [...r.body, ...(r.runs as unknown as Card[]), ...((r.supply ?? []) as unknown as Card[])] }));
