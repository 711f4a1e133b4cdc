/**
 * `railcheck spread FILE`: a tolerance run over the netlist's `.spread`
 * lines, Monte Carlo or corners, with the yield against each limit
 * (docs/output.md, "railcheck spread"). Exit status 0 when every limit
 * passes in every run at every temperature and every run ran, 1 when a run
 * fails a limit, a limit's figure was not measured in a run, or a run did
 * not run at all, 2 for a netlist error or a usage error.
 */
import { jsonText } from '../present/json-text.js';
import { PLOT_FLAG, writePlotFolder } from '../plot/command.js';
import { spreadSections } from '../plot/from-report.js';
import {
  DEFAULT_MAX_CORNER_RUNS, DEFAULT_SPREAD_PERCENTILES, DEFAULT_SPREAD_RUNS, DEFAULT_SPREAD_SEED, elaborate, formatDiagnostic, readNetlistFile, runNetlistFile, runSampleNetlistFile, spreadNetlistFile,
  type Diagnostic, type FlatCircuit, type ModelSampling, type SpreadOptions, type SpreadResult,
} from '@railcheck/core';
import { match } from 'ts-pattern';
import { commandArgs, flagHelp, type FlagSpec } from '../args.js';
import { EXIT_ERROR, EXIT_LIMIT_FAILED, EXIT_OK, type CliIo } from '../main.js';
import { formatWarnings } from '../present/text.js';
import { judgeSample, sampleRunText, spreadText, type HistogramChoice, type SampleLimit } from '../present/spread.js';

const SPREAD_FLAGS: readonly FlagSpec[] = [
  { name: 'runs', short: 'n', takesValue: true, valueName: 'N', help: `Monte Carlo runs (default ${DEFAULT_SPREAD_RUNS})` },
  { name: 'seed', takesValue: true, valueName: 'S', help: `seed of the random draws, a whole number (default ${DEFAULT_SPREAD_SEED}); the same seed gives the same report` },
  { name: 'corners', takesValue: false, help: `every spread at both ends instead of random draws: all 2^k corners, or a two-level fractional factorial design when 2^k exceeds ${DEFAULT_MAX_CORNER_RUNS}` },
  { name: 'temp', takesValue: true, valueName: 'LIST', help: 'temperatures in °C, comma-separated (default: the netlist\'s .temp list, else 27); --temp=-20,27 for a list that starts below 0' },
  { name: 'model-sampling', takesValue: true, valueName: 'each|lot', help: 'a model spread whose line names no mode: each part draws its own value (each, the default) or all parts of the model share one per run (lot)' },
  { name: 'percentiles', takesValue: true, valueName: 'LIST', help: `percentiles to report, comma-separated, each 0 to 100 (default ${DEFAULT_SPREAD_PERCENTILES.join(',')})` },
  { name: 'histograms', takesValue: true, valueName: 'limits|all', help: 'draw a histogram for the figures with a limit (limits, the default) or for every figure (all)' },
  { name: 'json', short: 'j', takesValue: false, help: 'print the result as one JSON object on standard output' },
  { name: 'all-runs', takesValue: false, help: 'with --json: every run\'s sample and figures in the JSON too' },
  { name: 'jobs', takesValue: true, valueName: 'N', help: 'run on N worker threads (default: the number of cores); the output is the same for any N' },
  { name: 'shard', takesValue: true, valueName: 'K/N', help: 'run only the K-th of N shares of the runs (run r with r mod N = K-1); combine the shares\' --json with railcheck merge' },
  { name: 'allow-outside-includes', takesValue: false, help: 'let .include reach files outside the netlist\'s folder tree' },
  PLOT_FLAG,
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Help of `railcheck spread`. */
export const SPREAD_HELP = `usage: railcheck spread FILE [options]

Runs the stage many times with its .spread values drawn at random (or at
their ends, with --corners) and reports, at every temperature: the yield
against each .limit with its Wilson score interval, each figure's minimum,
percentiles, maximum, mean and standard deviation, a histogram of each
figure with a limit, the worst unit for each figure and limit with its
sampled values and the command that repeats it
(railcheck run FILE --sample RUN --seed S), and every run that did not give
every figure, with its sample. A run that does not converge, or whose
figure cannot be measured, counts against the yield.

options:
${flagHelp(SPREAD_FLAGS)}

Progress goes to standard error: a bar on a terminal, else a line every
5 seconds.

exit status: 0 every limit passes in every run and every run ran, 1 a run
fails a limit, a limit's figure was not measured in a run, or a run did not
run, 2 a netlist error or a usage error.`;

/** Seconds between progress lines when standard error is not a terminal. */
export const PROGRESS_LINE_SECONDS = 5;

/** A whole number ≥ `min` from an option's text, or a message naming the option. */
export function wholeNumber(flag: string, text: string, min: number, what: string): { ok: true; value: number } | { ok: false; message: string } {
  if (!/^[0-9]+$/.test(text) || !Number.isSafeInteger(Number(text)) || Number(text) < min) return { ok: false, message: `--${flag} ${text}: expected ${what}` };
  return { ok: true, value: Number(text) };
}

/** `K/N` of `--shard`, or a message. */
export function shardOption(text: string): { ok: true; value: { index: number; count: number } } | { ok: false; message: string } {
  const m = /^([0-9]+)\/([0-9]+)$/.exec(text);
  const index = Number(m?.[1]);
  const count = Number(m?.[2]);
  if (!m || count < 1 || index < 1 || index > count) return { ok: false, message: `--shard ${text}: expected K/N with whole numbers 1 ≤ K ≤ N, e.g. --shard 2/3` };
  return { ok: true, value: { index, count } };
}

/** A comma-separated list of finite numbers (`--temp`, `--percentiles`), or a message. */
export function numberList(flag: string, text: string, check: (x: number) => boolean, what: string): { ok: true; value: number[] } | { ok: false; message: string } {
  const items = text.split(',').map((s) => s.trim());
  const values = items.map((s) => (s === '' ? Number.NaN : Number(s)));
  const bad = items.find((_, i) => !Number.isFinite(values[i]!) || !check(values[i]!));
  if (bad !== undefined) return { ok: false, message: `--${flag} ${text}: '${bad}' is not ${what}` };
  return { ok: true, value: values };
}

/** `each` or `lot` of `--model-sampling`, or a message. */
export function modelSamplingOption(text: string): { ok: true; value: ModelSampling } | { ok: false; message: string } {
  return text === 'each' || text === 'lot' ? { ok: true, value: text } : { ok: false, message: `--model-sampling ${text}: expected each or lot` };
}

/** What the options of `spread` say, read and checked. */
interface SpreadArgs {
  readonly options: Pick<SpreadOptions, 'method' | 'runs' | 'seed' | 'temperatures' | 'modelSampling' | 'percentiles' | 'jobs' | 'shard'>;
  readonly histograms: HistogramChoice;
  readonly json: boolean;
  readonly allRuns: boolean;
}

type Read<T> = { ok: true; value: T } | { ok: false; message: string };

/** An option's value read by `parse`, or undefined when the option is not given. */
function optional<T>(flags: ReadonlyMap<string, string | true>, name: string, parse: (text: string) => Read<T>): Read<T | undefined> {
  const v = flags.get(name);
  return typeof v === 'string' ? parse(v) : { ok: true, value: undefined };
}

/** `--temp LIST`: temperatures in °C above absolute zero. */
const temperaturesOption = (t: string): Read<number[]> => numberList('temp', t, (x) => x > -273.15, 'a temperature in °C above absolute zero');
/** `--seed S`: a whole number ≥ 0. */
const seedOption = (t: string): Read<number> => wholeNumber('seed', t, 0, 'a whole number, 0 or more');

/** Reads every option of `spread`; the first mistake as a message. */
function readSpreadArgs(flags: ReadonlyMap<string, string | true>): Read<SpreadArgs> {
  const runs = optional(flags, 'runs', (t) => wholeNumber('runs', t, 1, 'a whole number of runs, 1 or more'));
  const seed = optional(flags, 'seed', seedOption);
  const jobs = optional(flags, 'jobs', (t) => wholeNumber('jobs', t, 1, 'a whole number of threads, 1 or more'));
  const shard = optional(flags, 'shard', shardOption);
  const temperatures = optional(flags, 'temp', temperaturesOption);
  const modelSampling = optional(flags, 'model-sampling', modelSamplingOption);
  const percentiles = optional(flags, 'percentiles', (t) => numberList('percentiles', t, (x) => x >= 0 && x <= 100, 'a percentile from 0 to 100'));
  const histograms = optional(flags, 'histograms', (t): Read<HistogramChoice> => (t === 'limits' || t === 'all' ? { ok: true, value: t } : { ok: false, message: `--histograms ${t}: expected limits or all` }));
  for (const r of [runs, seed, jobs, shard, temperatures, modelSampling, percentiles, histograms]) if (!r.ok) return r;
  // Every option read well (above): its value, or undefined when not given.
  const val = <T>(r: Read<T | undefined>): T | undefined => (r.ok ? r.value : undefined);
  const corners = flags.has('corners');
  if (corners && val(runs) !== undefined) return { ok: false, message: '--runs cannot be given with --corners: the corner design fixes the number of runs' };
  if (corners && val(seed) !== undefined) return { ok: false, message: '--seed cannot be given with --corners: corners are not drawn at random' };
  if (flags.has('all-runs') && !flags.has('json')) return { ok: false, message: '--all-runs needs --json (every run\'s figures go into the JSON; the text report lists the runs that matter)' };
  const given = { runs: val(runs), seed: val(seed), jobs: val(jobs), shard: val(shard), temperatures: val(temperatures), modelSampling: val(modelSampling), percentiles: val(percentiles) };
  return {
    ok: true,
    value: {
      options: { method: corners ? 'corners' : 'monte-carlo', ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) },
      histograms: val(histograms) ?? 'limits',
      json: flags.has('json'),
      allRuns: flags.has('all-runs'),
    },
  };
}

/** A progress display on standard error: a bar on a terminal, else a plain line every {@link PROGRESS_LINE_SECONDS} s. */
export interface Progress {
  readonly tick: (done: number, total: number) => void;
  readonly stop: () => void;
}

/** `about 16 s left`, `about 3 min left`. */
function timeLeft(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return 'time left not known yet';
  return seconds < 120 ? `about ${Math.ceil(seconds)} s left` : `about ${Math.ceil(seconds / 60)} min left`;
}

/** A rate in runs per second: whole above 10, two digits below. */
const rateText = (rate: number): string => String(rate >= 10 ? Math.round(rate) : Number(rate.toPrecision(2)));

/** The plain progress line: `spread: 400/1000 runs, 38 runs/s, about 16 s left`. */
export function progressLine(done: number, total: number, seconds: number): string {
  const rate = seconds > 0 ? done / seconds : 0;
  return `spread: ${done}/${total} runs, ${rateText(rate)} runs/s, ${rate > 0 ? timeLeft((total - done) / rate) : 'time left not known yet'}`;
}

/** The progress display for this run: a cli-progress bar when standard error is a terminal, plain lines to `err` otherwise. */
async function progress(err: (text: string) => void, now: () => number = Date.now): Promise<Progress> {
  const start = now();
  if (process.stderr.isTTY) {
    const { SingleBar, Presets } = await import('cli-progress');
    let bar: InstanceType<typeof SingleBar> | undefined;
    return {
      tick: (done, total) => {
        if (!bar) {
          bar = new SingleBar({ stream: process.stderr, clearOnComplete: true, hideCursor: true, format: 'spread [{bar}] {value}/{total} runs, {rate} runs/s, {left}' }, Presets.shades_classic);
          bar.start(total, 0, { rate: '0', left: 'time left not known yet' });
        }
        // The rate over the whole run so far, and the time left at that rate (the same words as the plain line).
        const seconds = (now() - start) / 1000;
        const rate = seconds > 0 ? done / seconds : 0;
        bar.update(done, { rate: rateText(rate), left: rate > 0 ? timeLeft((total - done) / rate) : 'time left not known yet' });
      },
      stop: () => bar?.stop(),
    };
  }
  let last = start;
  return {
    tick: (done, total) => {
      const t = now();
      if (t - last < PROGRESS_LINE_SECONDS * 1000 || done === total) return;
      last = t;
      err(progressLine(done, total, (t - start) / 1000));
    },
    stop: () => undefined,
  };
}

/** The errors that stopped a spread before any run, as for `run`. */
function printErrors(io: CliIo, command: string, errors: readonly Diagnostic[], warnings: readonly Diagnostic[]): void {
  for (const e of errors) io.err(e.pos ? formatDiagnostic(e) : `railcheck ${command}: ${e.message}${e.expected ? ` (expected ${e.expected})` : ''}`);
  const notes = formatWarnings(warnings);
  if (notes) io.err(notes);
  io.err(`railcheck ${command}: ${errors.length} error${errors.length === 1 ? '' : 's'}; nothing was run`);
}

/**
 * The JSON of a result as `spread --json` prints it (and `merge` for
 * spread shards): the result with `runsPerSecond` null (a machine's speed
 * is not part of the reproducible result), and `runs` only with
 * `--all-runs` or in a share of several, which the merge needs.
 */
export function spreadJson(r: SpreadResult, allRuns: boolean): string {
  const keep = allRuns || r.shard.count > 1;
  return jsonText({ ...r, runs: keep ? r.runs : null, allRuns: keep, runsPerSecond: null });
}

/** Exit status of a result: 0 when every limit passed in every run at every temperature and every run ran; else 1. */
export function spreadStatus(r: SpreadResult): number {
  const clean = r.at.every((t) => t.failed.length === 0 && t.limits.every((l) => l.fails === 0 && l.notEvaluated === 0));
  return clean ? EXIT_OK : EXIT_LIMIT_FAILED;
}

/** Prints a result (text or JSON) and gives the exit status: shared by `spread` and by `merge` of spread shards. */
export function presentSpread(io: CliIo, r: SpreadResult, json: boolean, allRuns: boolean, histograms: HistogramChoice): number {
  if (json) io.out(spreadJson(r, allRuns));
  else io.out(spreadText(r, { histograms }));
  return spreadStatus(r);
}

/** `railcheck spread FILE [options]`. */
export async function spreadCommand(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = commandArgs('spread', argv, SPREAD_FLAGS, SPREAD_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  if (positionals.length !== 1) {
    io.err(`railcheck spread: expected one netlist FILE${positionals.length ? `, got ${positionals.length}: ${positionals.join(' ')}` : ''}\n\n${SPREAD_HELP}`);
    return EXIT_ERROR;
  }
  const read = readSpreadArgs(flags);
  if (!read.ok) {
    io.err(`railcheck spread: ${read.message}`);
    return EXIT_ERROR;
  }
  const a = read.value;
  const shown = await progress(io.err);
  const outcome = await spreadNetlistFile(positionals[0]!, {
    ...a.options,
    // Every run is kept: the text report draws its histograms and lists the runs not measured from them.
    allRuns: true,
    onProgress: shown.tick,
    parse: { allowOutsideIncludes: flags.has('allow-outside-includes') },
  });
  shown.stop();
  if (!outcome.ok) {
    printErrors(io, 'spread', outcome.errors, outcome.warnings);
    return EXIT_ERROR;
  }
  const r = outcome.result;
  const plot = flags.get('plot');
  if (typeof plot === 'string') {
    const caution = r.caution ?? undefined;
    const folder = { title: `${r.title} — spread over ${r.runsDone} runs`, ...(caution ? { caution } : {}), sections: spreadSections(r, a.histograms === 'all') };
    const written = writePlotFolder(plot, folder, positionals[0]!, 'spread', [], (l) => io.err(l));
    if (written !== EXIT_OK) return written;
  }
  if (r.shard.count > 1 && !a.json) io.err(`railcheck spread: shard ${r.shard.index}/${r.shard.count}: this report covers ${r.runsDone} of ${r.runCount} runs; write each share with --json and combine them with railcheck merge`);
  return presentSpread(io, r, a.json, a.allRuns, a.histograms);
}

/** The options `railcheck run` takes to repeat one run of a spread (main.ts adds them to run's own). */
export const SAMPLE_FLAGS: readonly FlagSpec[] = [
  { name: 'sample', takesValue: true, valueName: 'RUN', help: 'repeat run RUN of a spread (the number its report gives) with that run\'s sampled values' },
  { name: 'seed', takesValue: true, valueName: 'S', help: `with --sample: the spread's seed (default ${DEFAULT_SPREAD_SEED})` },
  { name: 'corners', takesValue: false, help: 'with --sample: RUN is a row of the corner design (spread --corners)' },
  { name: 'model-sampling', takesValue: true, valueName: 'each|lot', help: 'with --sample: the spread\'s --model-sampling' },
  { name: 'temp', takesValue: true, valueName: 'LIST', help: 'with --sample: temperatures in °C, comma-separated (default: the netlist\'s .temp list)' },
];

/** The netlist elaborated (for its limits when its nominal run fails), or undefined when it does not read or elaborate. */
function elaborated(file: string, allowOutsideIncludes: boolean): FlatCircuit | undefined {
  const parsed = readNetlistFile(file, { allowOutsideIncludes });
  const flat = parsed.ok ? elaborate(parsed.netlist) : undefined;
  return flat?.ok ? flat.circuit : undefined;
}

/**
 * `railcheck run FILE --sample RUN [--seed S] [--corners] [--model-sampling M] [--temp LIST]`:
 * one run of a spread repeated, with the same sampled values and so the same
 * figure values as the spread reported for it. Exit status as for run: 0
 * every limit passes, 1 a limit fails, 2 a netlist or usage error, a run
 * that did not run, or a limit not evaluated.
 */
export function sampleCommand(file: string, flags: ReadonlyMap<string, string | true>, io: CliIo): number {
  const text = (name: string): string | undefined => {
    const v = flags.get(name);
    return typeof v === 'string' ? v : undefined;
  };
  const runText = text('sample')!;
  const run = wholeNumber('sample', runText, 0, 'a run number, 0 or more, as the spread report gives it');
  const seedText = text('seed');
  const seed = seedText === undefined ? undefined : seedOption(seedText);
  const tempText = text('temp');
  const temps = tempText === undefined ? undefined : temperaturesOption(tempText);
  const modelText = text('model-sampling');
  const model = modelText === undefined ? undefined : modelSamplingOption(modelText);
  for (const r of [run, seed, temps, model]) {
    if (r && !r.ok) {
      io.err(`railcheck run: ${r.message}`);
      return EXIT_ERROR;
    }
  }
  if (flags.has('corners') && seedText !== undefined) {
    io.err('railcheck run: --seed cannot be given with --corners: corners are not drawn at random');
    return EXIT_ERROR;
  }
  const index = run.ok ? run.value : 0;
  const corners = flags.has('corners');
  const options = {
    run: index,
    method: corners ? ('corners' as const) : ('monte-carlo' as const),
    // A Monte Carlo run's sample depends on the seed and its number only; the count only bounds the number.
    runs: Math.max(DEFAULT_SPREAD_RUNS, index + 1),
    ...(seed?.ok ? { seed: seed.value } : {}),
    ...(temps?.ok ? { temperatures: temps.value } : {}),
    ...(model?.ok ? { modelSampling: model.value } : {}),
    parse: { allowOutsideIncludes: flags.has('allow-outside-includes') },
  };
  const outcome = runSampleNetlistFile(file, options);
  if (!outcome.ok) {
    printErrors(io, 'run', outcome.errors, outcome.warnings);
    return EXIT_ERROR;
  }
  // The nominal run, as spread makes it: its limits, and the mains caution judged on what it reaches (the sample's outcome carries neither).
  const nominal = runNetlistFile(file, { allowOutsideIncludes: flags.has('allow-outside-includes') });
  const circuit = nominal.ok ? nominal.report.circuit : elaborated(file, flags.has('allow-outside-includes'));
  const limits: SampleLimit[] = (circuit?.limits ?? []).map((l) => ({ figure: l.figure, op: l.op, value: l.value }));
  const caution = (nominal.ok ? nominal.report.warnings : nominal.warnings).find((w) => w.code === 'above-elv')?.message ?? null;
  const judged = judgeSample(outcome.run, limits);
  const origin = corners ? `run ${index} of a corner spread (row ${index} of the design)` : `run ${index} of a Monte Carlo spread with seed ${seed?.ok ? seed.value : DEFAULT_SPREAD_SEED}`;
  if (flags.has('json')) {
    io.out(JSON.stringify({ title: outcome.title, file, caution, method: options.method, seed: corners ? null : (seed?.ok ? seed.value : DEFAULT_SPREAD_SEED), run: index, sample: outcome.sample, at: outcome.run.at, limits: judged.map((l) => ({ celsius: l.celsius, figure: l.limit.figure, op: l.limit.op, value: l.limit.value, status: l.status, actual: 'actual' in l ? l.actual : null, ...('reason' in l ? { reason: l.reason } : {}) })), warnings: outcome.warnings.map((w) => formatDiagnostic({ ...w, severity: 'warning' }).split('\n')[0]!) }, null, 2));
  } else {
    io.out(sampleRunText({ title: outcome.title, file, origin, caution, variables: outcome.variables, sample: outcome.sample, run: outcome.run, limits: judged }));
    const notes = formatWarnings(outcome.warnings);
    if (notes) io.out(notes);
  }
  if (outcome.run.at.some((a) => a.failure !== null)) {
    io.err(`railcheck run: run ${index} did not run at every temperature; the reasons are in the report`);
    return EXIT_ERROR;
  }
  return judged.reduce(
    (worst, l) => Math.max(worst, match(l.status).with('pass', () => EXIT_OK).with('fail', () => EXIT_LIMIT_FAILED).with('not-evaluated', () => EXIT_ERROR).exhaustive()),
    EXIT_OK,
  );
}
