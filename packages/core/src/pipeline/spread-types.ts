/**
 * The data of a tolerance run (`railcheck spread`, docs/spread.md): the
 * options, the result and its parts. Everything in a result is plain
 * JSON-serialisable data (numbers, strings, booleans, null, arrays and
 * plain objects), so that a worker thread can hand back its runs, a shard
 * can be written as JSON and `mergeSpreadResults` can rebuild the whole run
 * from the shards' JSON. Quantities are in SI units (figure values in the
 * unit the figure registry gives them, temperatures in °C).
 */
import type { Diagnostic } from '../errors.js';
import type { BenchKind, Better, FigureUnit } from '../figure-registry.js';
import type { LimitOp } from '../netlist/ast.js';
import type { ParseOptions } from '../netlist/index.js';
import type { Summary } from '../stats.js';

/** The `format` member of a spread result. */
export const SPREAD_FORMAT = 'railcheck-spread';
/** The `version` member of a spread result this railcheck writes and merges. */
export const SPREAD_VERSION = 1;
/** Monte Carlo runs when `runs` is not given. */
export const DEFAULT_SPREAD_RUNS = 1000;
/** The seed when `seed` is not given. */
export const DEFAULT_SPREAD_SEED = 1;
/** Percentiles reported when `percentiles` is not given, in percent. */
export const DEFAULT_SPREAD_PERCENTILES: readonly number[] = [1, 5, 50, 95, 99];
/** Confidence of the yield intervals when `confidence` is not given (Wilson score interval). */
export const DEFAULT_SPREAD_CONFIDENCE = 0.95;
/** Corner runs above which the corners method uses a fractional design instead of all 2^k corners (corner-design.ts). */
export const DEFAULT_MAX_CORNER_RUNS = 256;

/** How runs are drawn: random samples (`monte-carlo`) or every spread at its extremes (`corners`). */
export type SpreadMethod = 'monte-carlo' | 'corners';

/**
 * How a `<model>.<PARAM>` spread is sampled when several elements use the
 * model: `each` element draws its own factor (parts from different
 * batches), or the elements of the model share one factor per run (`lot`:
 * parts from one batch track each other). An element spread has one
 * element, so the two are the same for it.
 */
export type ModelSampling = 'each' | 'lot';

/** The distribution of a spread's factor: uniform over 1 ± ratio, or gaussian with ratio = 3σ. */
export type SpreadDistribution = 'uniform' | 'gauss';

/** Options of a tolerance run (`spreadNetlist`). */
export interface SpreadOptions {
  /** `monte-carlo` (default) or `corners`. */
  readonly method?: SpreadMethod;
  /** Monte Carlo runs (default {@link DEFAULT_SPREAD_RUNS}); ignored by `corners`, whose design fixes the count. */
  readonly runs?: number;
  /** Seed of the random streams (a whole number ≥ 0; default {@link DEFAULT_SPREAD_SEED}): run r's sample depends only on (seed, r). */
  readonly seed?: number;
  /** Temperatures, °C (default: the netlist's `.temp` list, 27 °C without one). */
  readonly temperatures?: readonly number[];
  /** Percentiles to report, in percent, each in [0, 100] (default {@link DEFAULT_SPREAD_PERCENTILES}). */
  readonly percentiles?: readonly number[];
  /** Confidence of the yield intervals, in (0, 1) (default {@link DEFAULT_SPREAD_CONFIDENCE}). */
  readonly confidence?: number;
  /** Sampling of model spreads whose `.spread` line names no mode (default `each`); a mode on the line wins. */
  readonly modelSampling?: ModelSampling;
  /** Most corner runs before `corners` falls back to a fractional design (default {@link DEFAULT_MAX_CORNER_RUNS}). */
  readonly maxCornerRuns?: number;
  /** Worker threads (default: `os.availableParallelism()`); 1 runs on the calling thread. The result does not depend on it. */
  readonly jobs?: number;
  /** Run only the `index`-th (1-based) of `count` shares: the runs r (0-based) with r mod count = index − 1. */
  readonly shard?: { readonly index: number; readonly count: number };
  /** Keep every run's figures in the result (`runs`); a shard of more than one share keeps them always, since a merge needs them. */
  readonly allRuns?: boolean;
  /** The worker script (default: `spread-worker.js` beside this module in the built package); when it does not exist the runs go on the calling thread. */
  readonly workerScript?: string | URL;
  /** Hears each completed run (any order): runs done and the total of this share. */
  readonly onProgress?: (done: number, total: number) => void;
  /** Reading options of the netlist (include handling; `file` for `spreadNetlist` on text). */
  readonly parse?: ParseOptions;
}

/**
 * One random variable of the run: a spread's factor, for an element
 * spread or a `lot` model spread one per `.spread` line, for an `each`
 * model spread one per element using the model (flat element order).
 * Drawn in the order of this list (docs/spread.md, "Sampling").
 */
export interface SpreadVariable {
  /** `R1`, `ZREF.BV` (lot), or `ZREF.BV@DZ1` (each: the element's key after `@`). */
  readonly name: string;
  /** The `.spread` target as elaborated: an element key or `model.PARAM`. */
  readonly target: string;
  /** The element this variable scales, for an `each` model spread; null for an element spread (the target is the element) and for `lot`. */
  readonly element: string | null;
  readonly ratio: number;
  readonly distribution: SpreadDistribution;
  /** `each` or `lot` for a model spread; null for an element spread. */
  readonly sampling: ModelSampling | null;
  /** The nominal value the factor multiplies (the element's value or the model parameter), in its SI unit. */
  readonly nominal: number;
  /** Where the `.spread` line is: `file:line`. */
  readonly line: string;
}

/** One variable's value in a run: its factor and the value it gives. */
export interface SampledValue {
  /** {@link SpreadVariable.name}. */
  readonly name: string;
  /** The factor (1 = nominal). */
  readonly factor: number;
  /** nominal × factor, in the variable's SI unit. */
  readonly value: number;
}

/** A run's outcome at one temperature: its figure values, or why none or some could not be measured. */
export interface SpreadRunAt {
  readonly celsius: number;
  /** Measured figure values by dotted name (finite numbers only), in code-point order of the names. */
  readonly values: Readonly<Record<string, number>>;
  /** Figures or values not measured in this run, each with the reason (one line); empty when all were measured. */
  readonly notMeasured: readonly { readonly name: string; readonly reason: string }[];
  /** Set when the run failed as a whole at this temperature (values out of range, no operating point): the reason; null otherwise. */
  readonly failure: string | null;
}

/** One run: its index, its factors (in {@link SpreadResult.variables} order) and its outcome at every temperature. */
export interface SpreadRun {
  /** 0-based index over the whole run (all shards). */
  readonly run: number;
  /** One factor per variable, in variable order. */
  readonly factors: readonly number[];
  /** One entry per temperature, in {@link SpreadResult.temperatures} order. */
  readonly at: readonly SpreadRunAt[];
}

/** A run named as worst (or as failed), with the values needed to reproduce it (`railcheck run FILE --sample RUN --seed S`). */
export interface SpreadRunRef {
  readonly run: number;
  /** The figure's value in that run, or null when it was not measured. */
  readonly value: number | null;
  /** The sampled values of the run, in variable order. */
  readonly sample: readonly SampledValue[];
}

/** The statistics of a figure's values over the runs, in the figure's unit: stats.ts `summarise`'s result (percentiles keyed as written, `"5"`, `"99.5"`). */
export type SpreadSummary = Summary;

/** One figure value at one temperature over all runs. */
export interface SpreadFigure {
  /** Dotted figure name (figures.md). */
  readonly name: string;
  readonly unit: FigureUnit;
  /** Which way the value is better (figure registry). */
  readonly better: Better;
  /** Runs in which it was measured, and in which it was not (failed runs among them). */
  readonly measured: number;
  readonly notMeasured: number;
  /** Statistics over the runs that measured it; null when none did. */
  readonly summary: SpreadSummary | null;
  /**
   * The worst run: for `lower` the highest value, for `higher` the lowest;
   * for `none` both extremes, lowest first. Ties go to the lowest run
   * index. Empty when no run measured it.
   */
  readonly worst: readonly SpreadRunRef[];
}

/** One `.limit` at one temperature over all runs: its yield with the confidence interval, and its worst run. */
export interface SpreadLimit {
  /** The figure's dotted name as the `.limit` line writes it. */
  readonly figure: string;
  readonly op: LimitOp;
  /** The bound, in the figure's unit. */
  readonly value: number;
  /** Runs that pass, fail, and where the figure was not measured (counted against the yield). */
  readonly passes: number;
  readonly fails: number;
  readonly notEvaluated: number;
  /** passes / runs. */
  readonly yield: number;
  /** Wilson score interval of the yield at the result's confidence (stats.ts `wilsonInterval`). */
  readonly interval: { readonly low: number; readonly high: number };
  /**
   * The run with the least margin (the largest violation when any fails;
   * margin = how far the value is inside the bound, in the figure's unit);
   * a run where the figure was not measured counts as the worst of all (its
   * `value` null). Null when there are no runs.
   */
  readonly worst: (SpreadRunRef & { readonly margin: number | null }) | null;
}

/** Everything at one temperature. */
export interface SpreadTemperature {
  readonly celsius: number;
  /** Every figure value measured in any run, in code-point order of the names. */
  readonly figures: readonly SpreadFigure[];
  /** The `.limit`s in netlist order. */
  readonly limits: readonly SpreadLimit[];
  /** Runs that failed as a whole at this temperature (no figure measured), with the reason. */
  readonly failed: readonly (SpreadRunRef & { readonly reason: string })[];
  /** Runs that ran but missed a figure or value at this temperature, each with what it missed and why (the sample's `value` is null); in run order. */
  readonly incomplete: readonly (SpreadRunRef & { readonly missing: readonly { readonly name: string; readonly reason: string }[] })[];
}

/**
 * The stage as the nominal run saw it (`.supply`): the input element and
 * how it is fed, the output and reference nodes with the nominal output,
 * and the load. Names as written in the netlist.
 */
export interface SpreadStage {
  /** The input source's name. */
  readonly input: string;
  /** How the input is fed: its d.c. value (V), or a sine's peak (V) and frequency (Hz). */
  readonly feed: { readonly kind: 'dc'; readonly volts: number } | { readonly kind: 'sine'; readonly peakVolts: number; readonly hertz: number } | { readonly kind: 'other' };
  readonly output: string;
  readonly reference: string;
  /** The nominal output, V (signed; the cycle mean on a sine-fed stage), or null when it could not be solved. */
  readonly voutNominal: number | null;
  /** The load element: a resistor (Ω), a current source (A), or another kind; null without `load=`. */
  readonly load: { readonly name: string; readonly kind: 'resistor'; readonly ohms: number } | { readonly name: string; readonly kind: 'isource'; readonly amps: number } | { readonly name: string; readonly kind: 'other' } | null;
}

/** The corner design used by `corners` (corner-design.ts). */
export interface SpreadDesign {
  /** `full`: all 2^k corners; `fractional`: fewer rows (named by `name`). */
  readonly kind: 'full' | 'fractional';
  readonly name: string;
  /** Rows of −1 (value·(1 − ratio)) and +1 (value·(1 + ratio)), one sign per variable. */
  readonly rows: readonly (readonly (-1 | 1)[])[];
}

/** What a tolerance run reports: the same data behind the text and the JSON. */
export interface SpreadResult {
  readonly format: typeof SPREAD_FORMAT;
  readonly version: typeof SPREAD_VERSION;
  readonly title: string;
  readonly file: string;
  readonly method: SpreadMethod;
  readonly seed: number;
  /** The `modelSampling` option the runs were drawn with (a mode on a `.spread` line wins over it; each variable records its own mode). */
  readonly modelSampling: ModelSampling;
  /** The stage the figures are of; null without a `.supply` line. */
  readonly stage: SpreadStage | null;
  /** Runs of the whole run (all shards). */
  readonly runCount: number;
  readonly confidence: number;
  readonly percentiles: readonly number[];
  readonly temperatures: readonly number[];
  readonly variables: readonly SpreadVariable[];
  /** The corner design (null for `monte-carlo`). */
  readonly design: SpreadDesign | null;
  /** This share: the `index`-th (1-based) of `count`; 1 of 1 for an unsharded run or a merge. */
  readonly shard: { readonly index: number; readonly count: number };
  /** Runs done in this result (this share's, or all for a merge). */
  readonly runsDone: number;
  /** One entry per temperature, in order. */
  readonly at: readonly SpreadTemperature[];
  /** Every run done (this share's), in run order, when `allRuns` was asked for or the result is a shard of several; null otherwise. */
  readonly runs: readonly SpreadRun[] | null;
  /** Whether `allRuns` was asked for (a merge keeps `runs` only then). */
  readonly allRuns: boolean;
  /** Warnings of the nominal run and of the spread (once each). */
  readonly warnings: readonly Diagnostic[];
  /** The extra-low-voltage caution when the stage works above extra-low voltage; null otherwise. */
  readonly caution: string | null;
  /** Runs per second of this result's runs on this machine (not part of the reproducible data: a merge sums nothing and sets null). */
  readonly runsPerSecond: number | null;
  /** The kind of bench the figures were measured on (units follow it); null when the nominal stage has no figures. */
  readonly bench: BenchKind | null;
}

/** What a spread returns: the result, or the errors that stopped it before any run (a netlist error, bad options). */
export type SpreadOutcome =
  | { readonly ok: true; readonly result: SpreadResult }
  | { readonly ok: false; readonly errors: readonly Diagnostic[]; readonly warnings: readonly Diagnostic[] };

/** Options of `runSampleNetlist`: which run to repeat, with the options of the spread that made it. */
export interface SampleOptions {
  /** The run index (0-based, as the spread reports it). */
  readonly run: number;
  readonly seed?: number;
  readonly method?: SpreadMethod;
  /** Needed for `monte-carlo` only as far as it bounds `run` (default {@link DEFAULT_SPREAD_RUNS}). */
  readonly runs?: number;
  readonly temperatures?: readonly number[];
  readonly modelSampling?: ModelSampling;
  readonly maxCornerRuns?: number;
  readonly parse?: ParseOptions;
}

/** One run repeated: its sample and outcome, equal to the spread's record of that run. */
export type SampleOutcome =
  | { readonly ok: true; readonly title: string; readonly variables: readonly SpreadVariable[]; readonly sample: readonly SampledValue[]; readonly run: SpreadRun; readonly warnings: readonly Diagnostic[] }
  | { readonly ok: false; readonly errors: readonly Diagnostic[]; readonly warnings: readonly Diagnostic[] };

/** Signature of `spreadNetlist(text, options)`: a tolerance run of netlist text. */
export type SpreadNetlist = (text: string, options?: SpreadOptions) => Promise<SpreadOutcome>;
/** Signature of `spreadNetlistFile(path, options)`: a tolerance run of a netlist file. */
export type SpreadNetlistFile = (path: string, options?: SpreadOptions) => Promise<SpreadOutcome>;
/** Signature of `mergeSpreadResults(shards)`: the JSON of shards 1..N of one spread → the unsharded result. */
export type SpreadMerge = (shards: readonly unknown[]) => SpreadOutcome;
/** Signature of `runSampleNetlist(text, options)` / `runSampleNetlistFile(path, options)`: one run of a spread repeated. */
export type SampleRun = (textOrPath: string, options: SampleOptions) => SampleOutcome;
