/**
 * Range checks of the power-supply directives (docs/figures.md, "Key
 * ranges"; docs/netlist.md, "Power-supply directives"): every `.figure`
 * key against the figure registry's range for the kind of stage the
 * `.supply` input makes, and every `.spread` against the circuit (its
 * element or model parameter exists and has a value to spread) and its
 * ratio range. Each error is at the key's or the line's own place.
 */
import { DEVICES, describeRange, inRange, modelKindOf, paramTable, sheetKeys, type ValueRange } from '@railcheck/devices';
import { match } from 'ts-pattern';
import { describeKeyBounds, FIGURE_KIND_INFO, withinKeyBounds, type BenchKind, type FigureNumberKey } from '../figure-registry.js';
import type { CardOrigin, SupplyCard } from '../netlist/ast.js';
import { SPREAD_RATIO, SPREAD_RATIO_EXPECTED } from '../netlist/parse-supply.js';
import type { Evaluator } from './evaluate.js';
import type { FlatElement, FlatFigure, FlatSpread, FlatSupply } from './flat.js';
import type { Scope } from './scope.js';

type FigureCard = Extract<SupplyCard, { kind: 'figure' }>;
type SpreadCard = Extract<SupplyCard, { kind: 'spread' }>;

/** The place of something at `pos` on `card`'s line (quoted when it is on that line). */
function placeAt(card: CardOrigin, pos: CardOrigin['pos']): CardOrigin {
  return { pos, lineText: pos.line === card.pos.line && pos.file === card.pos.file ? card.lineText : '' };
}

/** The bench kind the supply's input makes (a `sin` input is sine-fed; measure/create-bench.ts) and its nominal DC input, V. */
function benchOf(supply: FlatSupply, names: ReadonlyMap<string, FlatElement>): { kind: BenchKind; nominal: number } | undefined {
  const input = names.get(supply.input);
  if (!input || input.kind !== 'vsource') return undefined;
  return { kind: input.spec.waveform?.kind === 'sin' ? 'sine-fed' : 'dc', nominal: input.spec.dc };
}

/** One key's value against its range on this bench; the expected range in words, or undefined when it is in range. */
function keyProblem(key: FigureNumberKey, value: number, percent: boolean, bench: { kind: BenchKind; nominal: number }): string | undefined {
  const range = key.range[bench.kind];
  if (range === undefined) return undefined; // not read on this bench (a note says so when measured)
  if (percent && key.percentRange) return withinKeyBounds(key.percentRange, value) ? undefined : `${describeKeyBounds(key.percentRange, 'ratio')} written as a percentage (a ratio of Vout_nom)`;
  return match(range)
    .with({ kind: 'bounds' }, (r) => (withinKeyBounds(r.bounds, value) ? undefined : describeKeyBounds(r.bounds, r.unit ?? key.unit)))
    .with({ kind: 'input-level' }, () => {
      const s = Math.sign(bench.nominal);
      const ok = Number.isFinite(value) && value !== 0 && (s === 0 || Math.sign(value) === s);
      return ok ? undefined : s < 0 ? '< 0 V, an input level of the nominal input\'s sign (volts with their sign)' : '> 0 V, an input level of the nominal input\'s sign';
    })
    .exhaustive();
}

/**
 * Checks the keys of every `.figure` line against the registry's ranges
 * for the stage's bench kind, and that the two ends of a range differ.
 * Nothing is checked without a usable `.supply` (that has its own error).
 */
export function checkFigureKeys(ev: Evaluator, cards: readonly FigureCard[], figures: readonly FlatFigure[], supply: FlatSupply | undefined, names: ReadonlyMap<string, FlatElement>): void {
  const bench = supply && benchOf(supply, names);
  if (!bench) return;
  cards.forEach((card, i) => {
    const flat = figures[i]!;
    const info = FIGURE_KIND_INFO[card.figure];
    ev.at(card);
    for (const k of card.keys) {
      const key = info.keys[k.name];
      const value = flat.keys.get(k.name);
      if (key?.value !== 'number' || value === undefined || Number.isNaN(value)) continue;
      const expected = keyProblem(key, value, flat.percentKeys.has(k.name), bench);
      if (expected !== undefined) ev.fail(placeAt(card, k.pos), 'bad-figure-key', `.figure ${card.figure}: ${k.name}=${value} is out of range`, `${k.name} ${expected}`);
    }
    const pair = info.distinct;
    if (!pair) return;
    const [a, b] = [flat.keys.get(pair[0]), flat.keys.get(pair[1])];
    if (a !== undefined && a === b) {
      const second = card.keys.find((k) => k.name === pair[1])!;
      ev.fail(placeAt(card, second.pos), 'bad-figure-key', `.figure ${card.figure}: ${pair[0]} and ${pair[1]} are both ${a}; the figure is a change between two different ends`, `${pair[1]} ≠ ${pair[0]}`);
    }
  });
}

/** Parameters that are ratings, not values a part varies by: a tolerance on them means nothing. */
const NOT_SPREADABLE: ReadonlySet<string> = new Set(['PMAX', 'VCEMAX', 'VCBMAX', 'ICMAX', 'VRRM', 'IFAV', 'IFRM']);

/**
 * Checks one `.spread` line (docs/netlist.md, ".spread"): its ratio in
 * (0, 1); an element target names an element of the top level that has a
 * value (R C L, E G F H, V I); a `model.PARAM` target names a top-level
 * model of a type that has that parameter, with a value in that model,
 * and the ends value·(1 ± ratio) stay within the parameter's valid range.
 * `seen` holds the targets of the lines before (one line per target).
 */
export function checkSpread(ev: Evaluator, card: SpreadCard, spread: FlatSpread, names: ReadonlyMap<string, FlatElement>, top: Scope, seen: Set<string>): void {
  ev.at(card);
  const r = spread.ratio;
  if (!Number.isNaN(r) && !(r > SPREAD_RATIO.above && r < SPREAD_RATIO.below)) ev.fail(placeAt(card, card.ratio.pos), 'out-of-range', `.spread ${card.target}: a tolerance of ${r} is out of range`, SPREAD_RATIO_EXPECTED);
  if (seen.has(spread.target)) ev.fail(card, 'duplicate-spread', `.spread ${card.target} is given twice`, 'one .spread line per element or model parameter');
  seen.add(spread.target);
  const dot = card.target.lastIndexOf('.');
  if (dot < 0) {
    const el = names.get(spread.target);
    if (!el) {
      ev.fail(card, 'unknown-spread-target', `.spread ${card.target}: no element of that name`, 'the name of an R, C, L, E, G, F, H, V or I element of the top level');
      return;
    }
    const entry = DEVICES[el.kind];
    if (entry.value === undefined && el.kind !== 'vsource' && el.kind !== 'isource') {
      ev.fail(card, 'bad-spread-target', `.spread ${card.target}: a ${entry.title} has no value to spread`, 'an element with a value, or a parameter of its model (<model>.<PARAM>)');
    }
    return;
  }
  const modelName = card.target.slice(0, dot);
  const param = card.target.slice(dot + 1).toUpperCase();
  const model = top.models.get(modelName.toLowerCase());
  if (!model) {
    ev.fail(card, 'unknown-model', `.spread ${card.target}: no model '${modelName}' at the top level`, 'the name of a .model line of the top level');
    return;
  }
  const spec = paramTable(model.type).find((p) => p.name === param);
  if (!spec) {
    ev.fail(card, 'unknown-parameter', `.spread ${card.target}: a model of type ${model.type} has no parameter ${param}`, `one of ${paramTable(model.type).map((p) => p.name).join(' ')}`);
    return;
  }
  if (NOT_SPREADABLE.has(param)) {
    ev.fail(card, 'bad-spread-target', `.spread ${card.target}: ${param} is a rating, not a value a part varies by`, 'a parameter of the device equations');
    return;
  }
  // The value the model gives is the one its elements hold, as elaborated: a datasheet form resolved (docs/models.md,
  // "Datasheet form"), its errors already reported. A datasheet-form model no element uses (or whose line has an
  // error) has nothing to check: such a spread varies nothing, and spread-sample.ts notes it.
  const user = [...names.values()].find((el) => (el.kind === 'diode' || el.kind === 'bjt') && el.modelName.toLowerCase() === model.name.toLowerCase());
  const sheet = model.params.some((a) => sheetKeys(modelKindOf(model.type)).some((k) => k.name === a.name.toUpperCase()));
  if (!user && sheet) return;
  const given = model.params.find((a) => a.name.toUpperCase() === param);
  const value = user && (user.kind === 'diode' || user.kind === 'bjt') ? (user.model as unknown as Record<string, number | undefined>)[param] : given ? ev.num(given.value, top) : spec.default;
  if (value === undefined) {
    ev.fail(card, 'bad-spread-target', `.spread ${card.target}: model ${model.name} gives no ${param} (${spec.doc}: none), so there is no value to spread`, `${param}=<value> on .model ${model.name}`);
    return;
  }
  if (Number.isNaN(value) || Number.isNaN(r)) return;
  const ends = [value * (1 - r), value * (1 + r)];
  if (!ends.every((x) => inRange(spec.range as ValueRange, x))) {
    ev.fail(placeAt(card, card.ratio.pos), 'out-of-range', `.spread ${card.target}: ${param}=${value} ± ${r * 100} % reaches ${ends.map((x) => x.toPrecision(4)).join(' and ')}, outside its valid range`, `a tolerance that keeps ${param} ${describeRange(spec.range)}`);
  }
}
