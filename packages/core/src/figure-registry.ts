/**
 * The one table of power-supply figures (figures.md): every dotted figure
 * name, the `.figure` kind that produces it, its unit on each kind of
 * bench, which way it is better, a title and a one-line definition; and
 * every `.figure` kind with its title and keys. The netlist reader, the
 * measuring code, the presenters and docs/figures.md (checked by a test)
 * all read this table. It imports only the shared argument checks, so every layer of core may.
 */

import { argumentError, checkString } from './arguments.js';

/** A `.figure` kind (figures.md). */
export type FigureKind = 'line' | 'load' | 'dropout' | 'ripple' | 'dissipation' | 'sag' | 'stress' | 'short' | 'startup' | 'step'
  // thermal figure (docs/thermal.md)
  | 'thermal';

/**
 * How a stage is measured: `dc`, by DC solutions (a DC input); `sine-fed`,
 * at periodic steady state (a `sin` input: a stage fed from a transformer
 * secondary, figures.md).
 */
export type BenchKind = 'dc' | 'sine-fed';

/** Both bench kinds, in the order figures.md describes them. */
export const BENCH_KINDS: readonly BenchKind[] = ['dc', 'sine-fed'];

/**
 * Unit of a figure value: SI units (V, A, s, Ω, W), V/V, percent (`%`, `%/V`:
 * values are in percent, 1 = 1 %), dB; `ratio` is a plain number (0.5 =
 * half); `flag` is 1 or 0; `°C` a temperature in degrees Celsius, `K` a
 * temperature difference in kelvin, `K/W` a thermal resistance.
 */
export type FigureUnit = 'V' | 'A' | 's' | 'V/V' | '%/V' | '%' | 'Ω' | 'dB' | 'W' | 'ratio' | 'flag'
  // thermal figure (docs/thermal.md)
  | '°C' | 'K' | 'K/W';

/** Which way a value is better: `lower`, `higher`, or `none` (a condition of the measurement, not a merit). */
export type Better = 'lower' | 'higher' | 'none';

/** One figure value's entry. */
export interface FigureEntry {
  /** Dotted name as figures.md writes it, lower case; a pattern entry writes its variable part in angle brackets (`pd.<element>`). */
  readonly name: string;
  /** For a pattern entry, the lower-case names it stands for. */
  readonly pattern?: RegExp;
  /** The `.figure` kind that produces it. */
  readonly kind: FigureKind;
  /** Unit on each bench kind that produces the value; a bench kind that is absent does not produce it. */
  readonly units: Readonly<Partial<Record<BenchKind, FigureUnit>>>;
  /** Which way the value is better. */
  readonly better: Better;
  /** A short title. */
  readonly title: string;
  /** One line of definition (figures.md has the full one). */
  readonly doc: string;
  /** For a `flag`: the words reports print beside 1 and 0. */
  readonly flagWords?: { readonly one: string; readonly zero: string };
}

const both = (unit: FigureUnit): Readonly<Partial<Record<BenchKind, FigureUnit>>> => ({ dc: unit, 'sine-fed': unit });

/** Every figure value, in the order figures.md lists them. */
export const FIGURES: readonly FigureEntry[] = [
  { name: 'line.delta', kind: 'line', units: both('V'), better: 'lower', title: 'output change over the line range', doc: 'Vout(to) − Vout(from) at nominal load (the mean output on a sine-fed stage)' },
  { name: 'line.slope', kind: 'line', units: { dc: 'V/V' }, better: 'lower', title: 'line slope', doc: 'line.delta / (to − from)' },
  { name: 'line.pct_per_v', kind: 'line', units: { dc: '%/V' }, better: 'lower', title: 'line regulation per volt', doc: '100 · line.slope / Vout_nom' },
  { name: 'line.pct', kind: 'line', units: { 'sine-fed': '%' }, better: 'lower', title: 'line regulation over the amplitude range', doc: '100 · line.delta / Vout_nom' },
  { name: 'load.delta', kind: 'load', units: both('V'), better: 'lower', title: 'output droop over the load range', doc: 'Vout(from) − Vout(to) at nominal input; positive when the output droops' },
  { name: 'load.pct', kind: 'load', units: both('%'), better: 'lower', title: 'load regulation', doc: '100 · load.delta / Vout(from)' },
  { name: 'load.rout', kind: 'load', units: both('Ω'), better: 'lower', title: 'output resistance', doc: 'load.delta / (to − from)' },
  { name: 'dropout.vin', kind: 'dropout', units: { dc: 'V' }, better: 'lower', title: 'dropout input', doc: 'the input Vin* at which Vout = Vout_nom − fall' },
  { name: 'dropout.v', kind: 'dropout', units: { dc: 'V' }, better: 'lower', title: 'dropout voltage', doc: 'Vin* − Vout(Vin*), the input-output differential' },
  { name: 'dropout.headroom', kind: 'dropout', units: { dc: 'V', 'sine-fed': 'ratio' }, better: 'higher', title: 'headroom above dropout', doc: 'nominal input − Vin* (V); on a sine-fed stage 1 − dropout.ratio (ratio)' },
  { name: 'dropout.ratio', kind: 'dropout', units: { 'sine-fed': 'ratio' }, better: 'lower', title: 'dropout amplitude ratio', doc: 'the lowest amplitude ratio at which the stage still holds its output' },
  { name: 'headroom.min', kind: 'dropout', units: { 'sine-fed': 'V' }, better: 'higher', title: 'least headroom over the cycle', doc: 'the least V(feed) − Vout over the nominal cycle' },
  { name: 'ripple.rr', kind: 'ripple', units: both('dB'), better: 'higher', title: 'ripple rejection', doc: '−20·log10|Vout/Vin| small-signal (DC input); 20·log10(feed p-p / output p-p) on a sine-fed stage' },
  { name: 'ripple.rr_tran', kind: 'ripple', units: { dc: 'dB' }, better: 'higher', title: 'ripple rejection, transient', doc: '20·log10(input p-p / output p-p) with a sine on the input, at periodic steady state' },
  { name: 'ripple.out_pp', kind: 'ripple', units: both('V'), better: 'lower', title: 'output ripple', doc: 'output peak-to-peak at periodic steady state' },
  { name: 'ripple.feed_pp', kind: 'ripple', units: { 'sine-fed': 'V' }, better: 'none', title: 'feed ripple', doc: 'peak-to-peak of V(feed) at nominal, the ripple the regulator works against' },
  { name: 'pd.<element>', pattern: /^pd\.[^.]+(\.[^.]+)*$/, kind: 'dissipation', units: both('W'), better: 'lower', title: 'dissipation', doc: 'the largest power the element absorbs at nominal and at the worst line and load corners' },
  { name: 'efficiency', kind: 'dissipation', units: both('ratio'), better: 'higher', title: 'efficiency', doc: 'power into the load / power out of the input source, at nominal' },
  { name: 'sag.fall', kind: 'sag', units: both('V'), better: 'lower', title: 'output fall in the dip', doc: 'Vout_nom − the lowest Vout from the start of the dip until 5·edge after recovery' },
  { name: 'sag.pass', kind: 'sag', units: both('flag'), better: 'higher', title: 'rides through', doc: '1 when sag.fall ≤ fall, else 0', flagWords: { one: 'holds', zero: 'falls too far' } },
  { name: 'sag.max_depth', kind: 'sag', units: both('ratio'), better: 'higher', title: 'deepest dip ridden through', doc: 'the deepest dip of the same shape with sag.fall ≤ fall' },
  { name: 'sag.out_pp', kind: 'sag', units: both('V'), better: 'lower', title: 'output ripple in the dip', doc: 'output peak-to-peak over the last whole ripple cycle of the dip, the drift across the cycle taken out' },
  { name: 'sag.out_pp_max', kind: 'sag', units: both('V'), better: 'lower', title: 'largest output ripple in the dip', doc: 'the largest such drift-free peak-to-peak over the whole ripple cycles at the bottom of the dip' },
  { name: 'sag.out_pp_before', kind: 'sag', units: both('V'), better: 'lower', title: 'output ripple before the dip', doc: 'output peak-to-peak over the last whole ripple cycle before the dip, the drift across the cycle taken out' },
  { name: 'stress.worst', kind: 'stress', units: both('ratio'), better: 'lower', title: 'highest stress ratio', doc: 'the largest worst value / rating over every rated quantity of every part, over the conditions of the figures measured' },
  { name: 'stress.<element>.<quantity>', pattern: /^stress\.[^.]+(\.[^.]+)*\.(v|vr|vce|vcb|iavg|ipk|irms|ic|p)$/, kind: 'stress', units: both('ratio'), better: 'lower', title: 'stress ratio', doc: 'the worst value of one rated quantity of one part / its rating (docs/stress.md, "Quantities")' },
  { name: 'short.current', kind: 'short', units: both('A'), better: 'lower', title: 'short-circuit current', doc: 'the current into a short of r ohms from out to ref at nominal input (its cycle average on a sine-fed stage)' },
  { name: 'short.vout', kind: 'short', units: both('V'), better: 'none', title: 'output across the short', doc: '|Vout| with the output shorted (the cycle mean on a sine-fed stage)' },
  { name: 'short.pin', kind: 'short', units: both('W'), better: 'lower', title: 'input power into the short', doc: 'the power out of the input source with the output shorted (a cycle average on a sine-fed stage)' },
  { name: 'short.pd.<element>', pattern: /^short\.pd\.[^.]+(\.[^.]+)*$/, kind: 'short', units: both('W'), better: 'lower', title: 'dissipation in the short', doc: 'the power a resistor, diode or transistor absorbs with the output shorted' },
  { name: 'short.<element>.tj', pattern: /^short\.[^.]+(\.[^.]+)*\.tj$/, kind: 'short', units: both('°C'), better: 'lower', title: 'junction temperature in the short', doc: 'Ta + P·(rth + rthsink) of a diode or transistor with rth= at its dissipation with the output shorted, Ta the key tamb' },
  { name: 'short.worst', kind: 'short', units: both('ratio'), better: 'lower', title: 'highest stress ratio in the short', doc: 'the largest worst value / rating over every rated quantity of every part with the output shorted: the part that fails first' },
  { name: 'short.<element>.<quantity>', pattern: /^short\.[^.]+(\.[^.]+)*\.(v|vr|vce|vcb|iavg|ipk|irms|ic|p)$/, kind: 'short', units: both('ratio'), better: 'lower', title: 'stress ratio in the short', doc: 'the worst value of one rated quantity of one part with the output shorted / its rating (docs/stress.md, "Quantities")' },
  { name: 'startup.inrush', kind: 'startup', units: both('A'), better: 'lower', title: 'inrush current', doc: 'the largest magnitude of the input source current from switch-on, everything discharged' },
  { name: 'startup.ipk_rect', kind: 'startup', units: both('A'), better: 'lower', title: 'peak rectifier current', doc: 'the largest forward current of any diode of the stage from switch-on' },
  { name: 'startup.settle', kind: 'startup', units: both('s'), better: 'lower', title: 'start-up settling time', doc: 'time from switch-on until the output comes within fall of its steady value (band) and stays there' },
  { name: 'startup.overshoot', kind: 'startup', units: both('V'), better: 'lower', title: 'start-up overshoot', doc: 'the largest output above its steady value (the settled cycle maximum on a sine-fed stage), 0 if none' },
  { name: 'step.dip', kind: 'step', units: both('V'), better: 'lower', title: 'output excursion in a load step', doc: 'the largest excursion of the output from its value before the step, the way the step pushes it (down for a rising load)' },
  { name: 'step.peak', kind: 'step', units: both('V'), better: 'lower', title: 'overshoot on recovery', doc: 'after the dip, the largest excursion beyond the new steady value the other way, 0 if none' },
  { name: 'step.recovery', kind: 'step', units: both('s'), better: 'lower', title: 'load-step recovery time', doc: 'time from the start of the step until the output comes within band of its new steady value and stays there' },
  // thermal figure (docs/thermal.md)
  { name: 'thermal.<element>.tj', pattern: /^thermal\.[^.]+(\.[^.]+)*\.tj$/, kind: 'thermal', units: both('°C'), better: 'lower', title: 'junction temperature', doc: 'Ta + P·(rth + rthsink) at the largest dissipation over nominal and the worst line and load corners' },
  { name: 'thermal.<element>.margin', pattern: /^thermal\.[^.]+(\.[^.]+)*\.margin$/, kind: 'thermal', units: both('K'), better: 'higher', title: 'junction temperature margin', doc: 'tjmax − thermal.<element>.tj' },
  { name: 'thermal.<element>.rthsink_max', pattern: /^thermal\.[^.]+(\.[^.]+)*\.rthsink_max$/, kind: 'thermal', units: both('K/W'), better: 'higher', title: 'largest heatsink thermal resistance', doc: '(tjmax − Ta)/P − rth with rthsink= given; without it, the largest total junction-to-ambient resistance (tjmax − Ta)/P' },
  { name: 'thermal.worst_margin', kind: 'thermal', units: both('K'), better: 'higher', title: 'least junction temperature margin', doc: 'the least thermal.<element>.margin over the parts with rth=' },
  { name: 'thermal.vout_drift', kind: 'thermal', units: { dc: 'V' }, better: 'none', title: 'output drift from self-heating', doc: 'with selfheat=1: Vout with every part with rth= at its own junction temperature − Vout with every part at ambient, at nominal (on magnitudes)' },
];

/**
 * Bounds of a valid `.figure` key value, each open or closed (docs/figures.md,
 * "Key ranges"); the elaborator checks them. Missing bounds are not checked.
 */
export interface KeyBounds {
  /** The value must be greater than this. */
  readonly above?: number;
  /** The value must be at least this. */
  readonly atLeast?: number;
  /** The value must be less than this. */
  readonly below?: number;
  /** The value must be at most this. */
  readonly atMost?: number;
}

/**
 * The valid values of a numeric key on one bench kind: `bounds`, plain
 * bounds; `input-level`, an input level in volts with the nominal input's
 * sign (non-zero; docs/figures.md, "Negative rails").
 */
export type KeyRange =
  | { readonly kind: 'bounds'; readonly bounds: KeyBounds; /** The unit on this bench when it is not the key's (an amplitude ratio). */ readonly unit?: string }
  | { readonly kind: 'input-level' };

/** A numeric `.figure` key: `percent` when it may be written as `5%` (a ratio). */
export interface FigureNumberKey {
  readonly value: 'number';
  readonly percent: boolean;
  /** The bench kinds whose measurement reads the key. */
  readonly benches: readonly BenchKind[];
  readonly doc: string;
  /** Unit of the value as written without `%` (`V`, `A`, `Hz`, `s`, `ratio`), for messages. */
  readonly unit: string;
  /** Valid values on each bench kind that reads the key. */
  readonly range: Readonly<Partial<Record<BenchKind, KeyRange>>>;
  /**
   * Valid values when the key is written as a percentage (`fall=2%`, a ratio
   * of Vout_nom), if that differs from `range`.
   */
  readonly percentRange?: KeyBounds;
}

/** The word key `method=ac|tran|both` of the ripple figure. */
export interface FigureMethodKey {
  readonly value: 'method';
  readonly words: readonly ['ac', 'tran', 'both'];
  readonly benches: readonly BenchKind[];
  readonly doc: string;
}

/** A `.figure` key. */
export type FigureKey = FigureNumberKey | FigureMethodKey;

/** One `.figure` kind: its title in reports and its keys. */
export interface FigureKindInfo {
  readonly title: string;
  readonly keys: Readonly<Record<string, FigureKey>>;
  /** Two keys that, when both are given, must differ (the two ends of a range). */
  readonly distinct?: readonly [string, string];
}

const DC_ONLY: readonly BenchKind[] = ['dc'];

/** Longest dip or edge a sag figure simulates, s: far beyond any hold-up a supply is asked for (common practice, no source). */
export const MAX_SAG_DURATION = 100;

/** Longest run (`tmax=`) and rise a start-up or load-step figure simulates, s: far beyond any start-up a supply is asked for (common practice, no source). */
export const MAX_SETTLE_TIME = 100;

const bounds = (b: KeyBounds): KeyRange => ({ kind: 'bounds', bounds: b });
const onBenches = (benches: readonly BenchKind[], r: KeyRange): Partial<Record<BenchKind, KeyRange>> => Object.fromEntries(benches.map((b) => [b, r]));
const num = (percent: boolean, unit: string, doc: string, range: KeyRange | Partial<Record<BenchKind, KeyRange>>, benches: readonly BenchKind[] = BENCH_KINDS, percentRange?: KeyBounds): FigureNumberKey => ({
  value: 'number', percent, benches, doc, unit,
  range: 'kind' in range ? onBenches(benches, range as KeyRange) : range,
  ...(percentRange ? { percentRange } : {}),
});

const POSITIVE_KEY = bounds({ above: 0 });
/** An input level: volts of the nominal input's sign on a DC input, an amplitude ratio > 0 on a sine-fed stage. */
const LEVEL: Partial<Record<BenchKind, KeyRange>> = { dc: { kind: 'input-level' }, 'sine-fed': { kind: 'bounds', bounds: { above: 0 }, unit: 'ratio' } };
/** A load current drawn from the rail, A (docs/figures.md, "Negative rails"). */
const LOAD_CURRENT = bounds({ atLeast: 0 });
/** An output fall: > 0 V, or as a percentage a ratio of Vout_nom in (0, 1). */
const FALL_PERCENT: KeyBounds = { above: 0, below: 1 };
/** A simulated time of a start-up or load-step figure, s. */
const SETTLE_TIME = bounds({ above: 0, atMost: MAX_SETTLE_TIME });

/** Largest resistance of the output short, Ω: above it the "short" is a heavy load, which the load figures cover. */
export const MAX_SHORT_OHMS = 100;

/** Lowest ambient of the thermal figure, °C: the lowest `.temp` accepted (docs/thermal.md). */
export const MIN_AMBIENT_CELSIUS = -273;

/** A derating ratio: > 0 and ≤ 1 (1: marked only past the rating). */
const DERATE = bounds({ above: 0, atMost: 1 });

/** Every `.figure` kind with its keys (figures.md), in the order figures.md lists them. */
export const FIGURE_KIND_INFO: Readonly<Record<FigureKind, FigureKindInfo>> = {
  line: {
    title: 'line regulation',
    keys: { from: num(false, 'V', 'low end: input V, or amplitude ratio on a sine-fed stage', LEVEL), to: num(false, 'V', 'high end, likewise', LEVEL) },
    distinct: ['from', 'to'],
  },
  load: {
    title: 'load regulation',
    keys: { from: num(false, 'A', 'first load current, A', LOAD_CURRENT), to: num(false, 'A', 'second load current, A', LOAD_CURRENT) },
    distinct: ['from', 'to'],
  },
  dropout: { title: 'dropout', keys: { fall: num(true, 'V', 'output fall that defines dropout: V, or a % of Vout_nom', POSITIVE_KEY, BENCH_KINDS, FALL_PERCENT) } },
  ripple: {
    title: 'ripple rejection',
    keys: {
      freq: num(false, 'Hz', 'ripple frequency, Hz', POSITIVE_KEY, DC_ONLY),
      amp: num(false, 'V', 'ripple amplitude, V peak', POSITIVE_KEY, DC_ONLY),
      method: { value: 'method', words: ['ac', 'tran', 'both'], benches: DC_ONLY, doc: 'small-signal, transient or both' },
    },
  },
  dissipation: { title: 'dissipation', keys: {} },
  sag: {
    title: 'input-dip ride-through',
    keys: {
      depth: num(true, 'ratio', 'dip depth, ratio of the nominal input (or amplitude)', bounds({ above: 0, atMost: 1 })),
      dur: num(false, 's', 'time at the bottom of the dip, s (whole cycles on a sine-fed stage)', bounds({ above: 0, atMost: MAX_SAG_DURATION })),
      edge: num(false, 's', 'fall and recovery time, s', bounds({ atLeast: 0, atMost: MAX_SAG_DURATION })),
      fall: num(true, 'V', 'largest acceptable output fall: V, or a % of Vout_nom', POSITIVE_KEY, BENCH_KINDS, FALL_PERCENT),
      ripple: num(false, 'V', 'ripple riding on the input, V peak', bounds({ atLeast: 0 }), DC_ONLY),
      freq: num(false, 'Hz', 'frequency of that ripple, Hz', POSITIVE_KEY, DC_ONLY),
    },
  },
  stress: {
    title: 'part stress',
    keys: {
      vderate: num(true, 'ratio', 'derating of voltage ratings: a voltage above this ratio of its rating is marked', DERATE),
      iderate: num(true, 'ratio', 'derating of current ratings, likewise', DERATE),
      pderate: num(true, 'ratio', 'derating of power ratings, likewise', DERATE),
    },
  },
  short: {
    title: 'output short',
    keys: {
      r: num(false, 'Ω', 'resistance of the short from out to ref, Ω', bounds({ above: 0, atMost: MAX_SHORT_OHMS })),
      tamb: num(false, '°C', 'ambient of the junction temperatures, °C (default: the figure temperature)', bounds({ atLeast: MIN_AMBIENT_CELSIUS })),
      vderate: num(true, 'ratio', 'derating of voltage ratings in the short, as for stress', DERATE),
      iderate: num(true, 'ratio', 'derating of current ratings in the short, likewise', DERATE),
      pderate: num(true, 'ratio', 'derating of power ratings in the short, likewise', DERATE),
    },
  },
  startup: {
    title: 'switch-on',
    keys: {
      fall: num(true, 'V', 'settling band about the steady output: V, or a % of Vout_nom', POSITIVE_KEY, BENCH_KINDS, FALL_PERCENT),
      tmax: num(false, 's', 'longest time simulated, s', SETTLE_TIME),
    },
  },
  step: {
    title: 'load step',
    keys: {
      from: num(false, 'A', 'load current before the step, A', LOAD_CURRENT),
      to: num(false, 'A', 'load current after the step, A', LOAD_CURRENT),
      rise: num(false, 's', 'rise (or fall) time of the step, s', SETTLE_TIME),
      band: num(true, 'V', 'recovery band about the new steady output (the settled cycle on a sine-fed stage): V, or a % of Vout_nom', POSITIVE_KEY, BENCH_KINDS, FALL_PERCENT),
      tmax: num(false, 's', 'longest time simulated after the step, s', SETTLE_TIME),
    },
    distinct: ['from', 'to'],
  },
  // thermal figure (docs/thermal.md)
  thermal: {
    title: 'junction temperatures',
    keys: {
      tamb: num(false, '°C', 'ambient temperature, °C (default: the figure temperature, the first .temp)', bounds({ atLeast: MIN_AMBIENT_CELSIUS })),
      selfheat: num(false, '', '1: also solve the electro-thermal operating point at nominal (thermal.vout_drift); 0 (default): not', bounds({ atLeast: 0, atMost: 1 }), DC_ONLY),
    },
  },
};

/** True when `x` is finite and within `b`. */
export function withinKeyBounds(b: KeyBounds, x: number): boolean {
  if (!Number.isFinite(x)) return false;
  if (b.above !== undefined && !(x > b.above)) return false;
  if (b.atLeast !== undefined && !(x >= b.atLeast)) return false;
  if (b.below !== undefined && !(x < b.below)) return false;
  return !(b.atMost !== undefined && !(x <= b.atMost));
}

/** A key's range on a bench as docs/figures.md ("Key ranges") writes it; `not used` for a bench that does not read the key. */
export function describeKeyRange(key: FigureNumberKey, bench: BenchKind): string {
  const r = key.range[bench];
  if (r === undefined) return 'not used';
  const base = r.kind === 'input-level' ? "V of the nominal input's sign, ≠ 0" : describeKeyBounds(r.bounds, r.unit ?? key.unit);
  return key.percentRange ? `${base}; as a %: ${describeKeyBounds(key.percentRange, 'ratio')}` : base;
}

/** Bounds as docs/figures.md writes them, e.g. `> 0 Hz`, `> 0 and ≤ 100 s`. */
export function describeKeyBounds(b: KeyBounds, unit: string): string {
  const u = unit === 'ratio' || unit === '' ? '' : ` ${unit}`;
  const parts: string[] = [];
  if (b.above !== undefined) parts.push(`> ${b.above}`);
  if (b.atLeast !== undefined) parts.push(`≥ ${b.atLeast}`);
  if (b.below !== undefined) parts.push(`< ${b.below}`);
  if (b.atMost !== undefined) parts.push(`≤ ${b.atMost}`);
  return parts.length === 0 ? 'any finite value' : `${parts.join(' and ')}${u}`;
}

/** Figure kinds in the order figures.md lists them. */
export const FIGURE_KINDS: readonly FigureKind[] = Object.keys(FIGURE_KIND_INFO) as FigureKind[];

const BY_NAME = new Map(FIGURES.filter((e) => !e.pattern).map((e) => [e.name, e] as const));
const PATTERNS = FIGURES.filter((e) => e.pattern);

/** The entry of a figure name (any case; `pd.Q1` finds `pd.<element>`), or undefined for a name no figure has. */
export function figureEntry(name: string): FigureEntry | undefined {
  checkString('figureEntry', 'name', name);
  const low = name.toLowerCase();
  return BY_NAME.get(low) ?? PATTERNS.find((e) => e.pattern!.test(low));
}

/** The `.figure` kind that produces a figure name (any case), or undefined for a name no figure has. */
export function figureKindOf(name: string): FigureKind | undefined {
  checkString('figureKindOf', 'name', name);
  return figureEntry(name)?.kind;
}

/** Unit of a figure value on a bench kind; undefined when no figure has that name or that bench kind does not produce it. */
export function figureUnit(name: string, bench: BenchKind): FigureUnit | undefined {
  checkString('figureUnit', 'name', name);
  if (!BENCH_KINDS.includes(bench)) throw argumentError('figureUnit', 'bench', `one of ${BENCH_KINDS.join(', ')}`, bench);
  return figureEntry(name)?.units[bench];
}
