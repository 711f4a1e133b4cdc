/**
 * Resolves analysis and power-supply directives against the flat circuit:
 * numbers evaluated, element and node names checked.
 */
import { match } from 'ts-pattern';
import type { AnalysisCard, SupplyCard, Value } from '../netlist/ast.js';
import type { FlatAnalysis, FlatCircuit, FlatElement, FlatFigure, FlatLimit, FlatNode, FlatSpread, FlatSupply } from './flat.js';
import { GROUND_KEY } from './flat.js';
import type { Evaluator } from './evaluate.js';
import type { Scope } from './scope.js';
import { checkFigureKeys, checkSpread } from './directive-ranges.js';
import { MAX_AC_POINTS, MAX_ANALYSES, MAX_DC_POINTS, MAX_TEMPERATURES, MAX_TRAN_GRID_POINTS } from '../budgets.js';

/** The directive part of a flat circuit. */
export type ResolvedDirectives = Pick<FlatCircuit, 'analyses' | 'temperatures' | 'supply' | 'figures' | 'limits' | 'spreads'>;

/** Lowest temperature accepted, °C (absolute zero is not a place to simulate a junction). */
const MIN_CELSIUS = -273;

/**
 * The rail is measured between two different nodes, and the feed is
 * neither of them (docs/netlist.md, ".supply"): `out` on `ref` would be a
 * rail of 0 V whose every ratio is 0/0.
 */
function checkSupplyNodes(ev: Evaluator, c: SupplyCard, s: FlatSupply): void {
  if (s.out === s.ref) ev.fail(c, 'bad-supply-nodes', `.supply out=${c.kind === 'supply' ? c.out : ''} is the reference node itself${s.ref === GROUND_KEY ? ' (ground)' : ''}, so the rail is always 0 V`, 'out= a node other than ref= (default ground)');
  else if (s.feed !== undefined && (s.feed === s.out || s.feed === s.ref)) ev.fail(c, 'bad-supply-nodes', `.supply feed= is the ${s.feed === s.out ? 'output' : 'reference'} node`, "feed= the regulator's own input, a node other than out= and ref=");
}

/** Resolves directives; problems are recorded on `ev`. Values are evaluated in the top-level scope `top`. */
export function resolveDirectives(
  ev: Evaluator,
  analyses: readonly AnalysisCard[],
  directives: readonly SupplyCard[],
  names: ReadonlyMap<string, FlatElement>,
  nodes: ReadonlyMap<string, FlatNode>,
  top: Scope,
): ResolvedDirectives {
  const num = (v: Value): number => ev.num(v, top);
  const flat: FlatAnalysis[] = [];
  const temperatures: number[] = [];
  let analysisCards = 0;
  for (const a of analyses) {
    ev.at(a);
    // Every analysis runs at every temperature: both counts are bounded, so their product is.
    if (a.kind !== 'temp' && ++analysisCards > MAX_ANALYSES) {
      ev.fail(a, 'budget-analyses', `more than MAX_ANALYSES = ${MAX_ANALYSES} analysis cards (.op, .dc, .tran, .ac); each runs at every .temp temperature`, 'fewer analysis cards');
      continue;
    }
    match(a)
      .with({ kind: 'op' }, (c) => flat.push({ kind: 'op', origin: c }))
      .with({ kind: 'dc' }, (c) => {
        const src = names.get(c.source.toLowerCase());
        if (!src || (src.kind !== 'vsource' && src.kind !== 'isource')) {
          ev.fail(c, 'unknown-sweep-source', `.dc sweeps '${c.source}', which is not an independent source`, 'the name of a V or I element');
          return;
        }
        const step = num(c.step);
        const start = num(c.start);
        const stop = num(c.stop);
        if (!(step !== 0) || !Number.isFinite(step) || (stop - start) / step < 0) {
          ev.fail(c, 'bad-sweep', `.dc step ${step} does not lead from ${start} to ${stop}`, 'a non-zero step with the sign of (stop − start)');
          return;
        }
        const dcPoints = Math.abs((stop - start) / step) + 1;
        if (dcPoints > MAX_DC_POINTS) {
          ev.fail(c, 'budget-dc-points', `.dc sweep has ${dcPoints.toPrecision(3)} points, over the budget MAX_DC_POINTS = ${MAX_DC_POINTS}`, 'a larger step');
          return;
        }
        flat.push({ kind: 'dc', origin: c, source: src.key, start, stop, step });
      })
      .with({ kind: 'tran' }, (c) => {
        const tstep = num(c.tstep);
        const tstop = num(c.tstop);
        if (!(tstep > 0) || !(tstop > 0)) ev.fail(c, 'bad-tran', `.tran needs a positive step and stop time (got ${tstep} and ${tstop})`, 'tstep > 0 and tstop > 0');
        else {
          const grid = (tstop - (c.tstart ? num(c.tstart) : 0)) / tstep + 1;
          if (!(grid <= MAX_TRAN_GRID_POINTS)) ev.fail(c, 'budget-tran-points', `.tran has ${grid.toPrecision(3)} output points (tstop/tstep), over the budget MAX_TRAN_GRID_POINTS = ${MAX_TRAN_GRID_POINTS}`, 'a larger tstep');
        }
        flat.push({ kind: 'tran', origin: c, tstep, tstop, tstart: c.tstart ? num(c.tstart) : 0, tmax: c.tmax ? num(c.tmax) : undefined, flags: c.flags.map((f) => f.toLowerCase()) });
      })
      .with({ kind: 'ac' }, (c) => {
        const points = num(c.points);
        const fstart = num(c.fstart);
        const fstop = num(c.fstop);
        const startOk = c.variation === 'lin' ? fstart >= 0 : fstart > 0;
        if (!(points >= 1) || !startOk || !(fstop >= fstart)) ev.fail(c, 'bad-ac', `.ac needs points ≥ 1 and ${c.variation === 'lin' ? '0 ≤' : '0 <'} fstart ≤ fstop`, 'e.g. .ac dec 20 1 100k or .ac lin 101 0 10k');
        else {
          const total = c.variation === 'lin' ? points : points * Math.log10(fstop / fstart) + 2;
          if (!(total <= MAX_AC_POINTS)) ev.fail(c, 'budget-ac-points', `.ac asks for ${total.toPrecision(3)} frequency points, over the budget MAX_AC_POINTS = ${MAX_AC_POINTS}`, 'fewer points');
        }
        flat.push({ kind: 'ac', origin: c, variation: c.variation, points: Math.round(points), fstart, fstop });
      })
      .with({ kind: 'temp' }, (c) => {
        if (temperatures.length + c.temps.length > MAX_TEMPERATURES) {
          ev.fail(c, 'budget-temperatures', `.temp brings the temperatures to ${temperatures.length + c.temps.length}, over the budget MAX_TEMPERATURES = ${MAX_TEMPERATURES}; every analysis runs at each`, 'fewer temperatures');
          return;
        }
        for (const t of c.temps) {
          const celsius = num(t);
          if (!(celsius > MIN_CELSIUS)) ev.fail(c, 'bad-temperature', `temperature ${celsius} °C is below absolute zero`, `a temperature above ${MIN_CELSIUS} °C`);
          temperatures.push(celsius);
        }
      })
      .exhaustive();
  }

  let supply: FlatSupply | undefined;
  const figures: FlatFigure[] = [];
  const limits: FlatLimit[] = [];
  const spreads: FlatSpread[] = [];
  const figureCards: Array<Extract<SupplyCard, { kind: 'figure' }>> = [];
  const spreadTargets = new Set<string>();
  const nodeKey = (card: SupplyCard, written: string, role: string): string => {
    const key = written.toLowerCase();
    if (key === '0' || key === 'gnd') return GROUND_KEY;
    if (!nodes.has(key)) ev.fail(card, 'unknown-node', `.supply ${role}=${written} names no node of the circuit`, 'a node name used by some element');
    return key;
  };
  for (const d of directives) {
    ev.at(d);
    match(d)
      .with({ kind: 'supply' }, (c) => {
        if (supply) ev.fail(c, 'duplicate-supply', 'a second .supply line', 'one .supply line per netlist');
        const input = names.get(c.input.toLowerCase());
        if (!input || input.kind !== 'vsource') ev.fail(c, 'bad-supply-input', `.supply in=${c.input} is not an independent voltage source`, 'the name of the V element that feeds the stage');
        const load = c.load === undefined ? undefined : names.get(c.load.toLowerCase());
        if (c.load !== undefined && (!load || (load.kind !== 'isource' && load.kind !== 'resistor'))) {
          ev.fail(c, 'bad-supply-load', `.supply load=${c.load} is not a current source or resistor`, 'the name of the I or R element that is the load');
        }
        supply = {
          origin: c,
          input: c.input.toLowerCase(),
          out: nodeKey(c, c.out, 'out'),
          ref: c.ref === undefined ? GROUND_KEY : nodeKey(c, c.ref, 'ref'),
          load: c.load?.toLowerCase(),
          feed: c.feed === undefined ? undefined : nodeKey(c, c.feed, 'feed'),
        };
        checkSupplyNodes(ev, c, supply);
      })
      .with({ kind: 'figure' }, (c) => {
        const keys = new Map<string, number>();
        const percentKeys = new Set<string>();
        for (const k of c.keys) {
          keys.set(k.name.toLowerCase(), num(k.value));
          if (k.value.kind === 'number' && k.value.percent) percentKeys.add(k.name.toLowerCase());
        }
        figures.push({ origin: c, figure: c.figure, keys, percentKeys, method: c.method });
        figureCards.push(c);
      })
      .with({ kind: 'limit' }, (c) => limits.push({ origin: c, figure: c.figure, op: c.op, value: num(c.value) }))
      .with({ kind: 'spread' }, (c) => {
        const spread: FlatSpread = { origin: c, target: c.target.toLowerCase(), ratio: num(c.ratio), distribution: c.distribution, sampling: c.sampling };
        checkSpread(ev, c, spread, names, top, spreadTargets);
        spreads.push(spread);
      })
      .exhaustive();
  }
  checkFigureKeys(ev, figureCards, figures, supply, names);
  if ((figures.length > 0 || limits.length > 0) && !supply) {
    const first = figures[0]?.origin ?? limits[0]!.origin;
    ev.at(first);
    ev.fail(first, 'no-supply', 'figures and limits need a .supply line naming the stage', '.supply in=<V source> out=<node> [ref=<node>] [load=<element>]');
  }
  return { analyses: flat, temperatures: temperatures.length ? temperatures : [27], supply, figures, limits, spreads };
}
