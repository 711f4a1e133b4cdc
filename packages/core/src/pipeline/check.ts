/**
 * Regression runs of saved netlists (`railcheck check`): every netlist
 * found under the paths is run with its limits and, given a baseline,
 * every figure and operating-point node voltage is compared with its
 * saved value. The result is plain JSON-serialisable data
 * ({@link CheckResult}); the text report, the JSON and the JUnit XML are
 * all rendered from it, so the merge of shard results
 * ({@link mergeCheckResults}) reproduces an unsharded run exactly.
 * docs/output.md, "railcheck check", has the rules (order, shares,
 * baseline keys, tolerances).
 */
import { readdirSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { errorAt, RailcheckError, type Diagnostic } from '../errors.js';
import { argumentDiagnostic, isRecord } from '../arguments.js';
import { figureUnit, type FigureUnit } from '../figure-registry.js';
import { MAINS_CAUTION } from '../analysis/safety.js';
import { runForCheck, type NetlistRun } from './check-run.js';
import { runOnWorkers, workerPath } from './worker-pool.js';
import {
  BASELINE_FORMAT, BASELINE_VERSION, baselineEntry, baselineText, compareValue, readBaseline, toleranceOf, valueText, writeFileAtomic,
  type Baseline, type BaselineEntry,
} from './check-baseline.js';

/** The `format` member of a check result. */
export const CHECK_FORMAT = 'railcheck-check';
/** The `version` member of a check result this railcheck writes and merges. */
export const CHECK_VERSION = 1;

/** One test of a netlist: the run itself, a limit, or a baseline value. */
export interface CheckTest {
  /** `run`, `limit FIGURE OP VALUE`, `figure NAME` or `node NAME`. */
  readonly name: string;
  readonly kind: 'run' | 'limit' | 'figure' | 'node';
  /** `new`: a value not in the baseline (reported, not a failure). A value gone from the baseline is a `fail`. */
  readonly status: 'pass' | 'fail' | 'new';
  /** What was found: for a baseline value both values, the difference and the band. */
  readonly message: string;
}

/** One netlist's outcome in a check. */
export interface NetlistCheck {
  /** Its place in the run's list of netlists (0-based, over all shards). */
  readonly index: number;
  /** The path as given (a folder's file as the folder's path, `/`, the path inside it). */
  readonly path: string;
  /** Its key in the baseline: the path relative to the baseline file's folder, `/`-separated (the path as shown without a baseline). */
  readonly key: string;
  /** Its title line; null when the netlist could not be read. */
  readonly title: string | null;
  /** `compared` with its baseline entry, `new` (no entry), `none` (no baseline given, or one being written), `not-run` (the run failed). */
  readonly baseline: 'compared' | 'new' | 'none' | 'not-run';
  /** True when no test failed. */
  readonly passed: boolean;
  readonly tests: readonly CheckTest[];
  /** What the run measured, or its errors. */
  readonly run: NetlistRun;
}

/** What a check reports: the same data in the text, the JSON and the JUnit renderings. */
export interface CheckResult {
  readonly format: typeof CHECK_FORMAT;
  readonly version: typeof CHECK_VERSION;
  /** Every netlist of the run, in run order (all shards'). */
  readonly netlists: readonly string[];
  /** This share: the `index`-th (1-based) of `count`; 1 of 1 for an unsharded run or a merge. */
  readonly shard: { readonly index: number; readonly count: number };
  /** The baseline file as given, and whether it was compared with or written; null without one. */
  readonly baseline: { readonly file: string; readonly mode: 'compared' | 'updated' } | null;
  /** This share's netlists, in run order. */
  readonly cases: readonly NetlistCheck[];
  /** Compared: baseline netlists not among the netlists run; updated: entries dropped. Carried by share 1 only. */
  readonly gone: readonly string[];
  readonly summary: { readonly netlists: number; readonly passed: number; readonly failed: number };
  /** The extra-low-voltage caution, once, when any netlist here works above extra-low voltage; null otherwise. */
  readonly caution: string | null;
}

/** Options of {@link checkNetlists}. */
export interface CheckOptions {
  /** Baseline file to compare with (or, with `updateBaseline`, to write). */
  readonly baseline?: string;
  /** Write the baseline from this run instead of comparing; needs `baseline` and no `shard`. */
  readonly updateBaseline?: boolean;
  /** Worker threads (default: `os.availableParallelism()`); 1 runs on the calling thread. */
  readonly jobs?: number;
  /** Run only the `index`-th (1-based) of `count` shares: the netlists whose 0-based place p has p mod count = index − 1. */
  readonly shard?: { readonly index: number; readonly count: number };
  /** Let `.include` reach outside each netlist's folder tree. */
  readonly allowOutsideIncludes?: boolean;
  /** The worker script (default: `check-worker.js` beside this module in the built package); when it does not exist the netlists run on the calling thread. */
  readonly workerScript?: string | URL;
  /** Hears each netlist's outcome in run order, as soon as it and all before it are done. */
  readonly onNetlist?: (c: NetlistCheck, total: number) => void;
  /** Hears the number of netlists this share will run, before the first starts. */
  readonly onStart?: (total: number) => void;
  /** Hears each completion in any order (for a progress display): netlists done and the total. */
  readonly onProgress?: (done: number, total: number) => void;
}

/** What {@link checkNetlists} returns: the result, or the usage errors that stopped it before any run. */
export type CheckOutcome = { readonly ok: true; readonly result: CheckResult } | { readonly ok: false; readonly errors: readonly Diagnostic[] };

const byCodePoint = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
const slashed = (p: string): string => p.split(sep).join('/');

/** The `*.cir` files under a folder, recursively, as `/`-separated paths inside it, in code-point order. */
function cirFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (rel: string): void => {
    for (const d of readdirSync(rel ? resolve(dir, rel) : dir, { withFileTypes: true })) {
      const r = rel ? `${rel}/${d.name}` : d.name;
      if (d.isDirectory()) walk(r);
      else if (d.name.endsWith('.cir') && (d.isFile() || (d.isSymbolicLink() && statSync(resolve(dir, r), { throwIfNoEntry: false })?.isFile()))) out.push(r);
    }
  };
  walk('');
  return out.sort(byCodePoint);
}

/**
 * The netlists of a run: each path in the order given, a folder as its
 * `*.cir` files (recursively, code-point order of the path inside it); a
 * file named twice is run once, at its first place. A path that does not
 * exist is an error.
 */
export function expandCheckPaths(paths: readonly string[]): { ok: true; files: { file: string; shown: string }[] } | { ok: false; errors: Diagnostic[] } {
  const errors: Diagnostic[] = [];
  const files: { file: string; shown: string }[] = [];
  const seen = new Set<string>();
  const add = (file: string, shown: string): void => {
    const key = resolve(file);
    if (seen.has(key)) return;
    seen.add(key);
    files.push({ file, shown });
  };
  for (const p of paths) {
    const st = statSync(p, { throwIfNoEntry: false });
    if (!st) errors.push(errorAt('check-path-missing', `${p}: no such file or folder`, undefined, undefined, 'a netlist file or a folder of *.cir files'));
    else if (st.isDirectory()) {
      const base = p.replace(/[\\/]+$/, '');
      for (const r of cirFiles(p)) add(join(p, r), base === '.' || base === '' ? r : `${slashed(base)}/${r}`);
    } else add(p, slashed(p));
  }
  if (errors.length === 0 && files.length === 0) errors.push(errorAt('check-no-netlists', `no netlist found under ${paths.join(', ') || '(no paths)'}`, undefined, undefined, 'a netlist file or a folder with *.cir files in it'));
  return errors.length > 0 ? { ok: false, errors } : { ok: true, files };
}

function unitGuess(name: string): FigureUnit {
  return figureUnit(name, 'dc') ?? figureUnit(name, 'sine-fed') ?? 'ratio';
}

const limitName = (l: { figure: string; op: string; value: number }): string => `limit ${l.figure} ${l.op} ${l.value}`;

/** The tests of one netlist: the run, its limits, and (with a baseline entry) every figure and node voltage against it. */
function testsOf(run: NetlistRun, entry: BaselineEntry | undefined, comparing: boolean): CheckTest[] {
  if (!run.ok) return [{ name: 'run', kind: 'run', status: 'fail', message: `did not run: ${run.errors.join('\n')}` }];
  const tests: CheckTest[] = [{ name: 'run', kind: 'run', status: 'pass', message: 'ran' }];
  for (const l of run.limits) {
    const bound = `${l.op} ${l.value}`;
    const message =
      l.status === 'not-evaluated'
        ? `not evaluated: the figure was not measured: ${l.reason ?? 'no reason given'}`
        : `${l.status === 'pass' ? 'passes' : 'fails'}: measured ${l.unit ? valueText(l.actual ?? 0, l.unit) : String(l.actual)}, limit ${bound}`;
    tests.push({ name: limitName(l), kind: 'limit', status: l.status === 'pass' ? 'pass' : 'fail', message });
  }
  if (!comparing || !entry) return tests;
  const values = (kind: 'figure' | 'node', now: Readonly<Record<string, number>>, saved: Readonly<Record<string, number>>, unitOf: (n: string) => FigureUnit): void => {
    const names = [...new Set([...Object.keys(now), ...Object.keys(saved)])].sort(byCodePoint);
    for (const n of names) {
      const a = now[n];
      const b = saved[n];
      const name = `${kind} ${n}`;
      const unit = unitOf(n);
      if (a === undefined) tests.push({ name, kind, status: 'fail', message: `gone: in the baseline (${valueText(b!, unit)}) but not measured now` });
      else if (b === undefined) tests.push({ name, kind, status: 'new', message: `new: ${valueText(a, unit)}, not in the baseline` });
      else tests.push({ name, kind, ...compareValue(a, b, unit, toleranceOf(entry, kind === 'node' ? `node:${n}` : n, unit)) });
    }
  };
  const figures = Object.fromEntries(Object.entries(run.figures).map(([n, v]) => [n, v.value]));
  values('figure', figures, entry.figures, (n) => run.figures[n]?.unit ?? unitGuess(n));
  values('node', run.nodes, entry.nodes, () => 'V');
  return tests;
}

/** One netlist's outcome from its run. */
function netlistCheck(index: number, path: string, key: string, run: NetlistRun, baseline: Baseline | undefined): NetlistCheck {
  const entry = baseline?.netlists[key];
  const tests = testsOf(run, entry, baseline !== undefined);
  const state: NetlistCheck['baseline'] = !run.ok ? 'not-run' : baseline === undefined ? 'none' : entry ? 'compared' : 'new';
  return { index, path, key, title: run.ok ? run.title : null, baseline: state, passed: tests.every((t) => t.status !== 'fail'), tests, run };
}

/** The result from its parts; summary and caution are derived from the cases, the same way for a run and a merge. */
function assemble(netlists: readonly string[], shard: CheckResult['shard'], baseline: CheckResult['baseline'], cases: readonly NetlistCheck[], gone: readonly string[]): CheckResult {
  const passed = cases.filter((c) => c.passed).length;
  return {
    format: CHECK_FORMAT, version: CHECK_VERSION, netlists, shard, baseline, cases, gone,
    summary: { netlists: cases.length, passed, failed: cases.length - passed },
    caution: cases.some((c) => c.run.aboveElv) ? MAINS_CAUTION : null,
  };
}

interface Job {
  readonly k: number;
  readonly file: string;
}

/**
 * Runs every netlist under `paths` with its limits and, with
 * `options.baseline`, compares each figure and operating-point node
 * voltage with the saved value (or, with `options.updateBaseline`, writes
 * the baseline from this run, atomically). Netlists run on
 * `options.jobs` worker threads; the result is the same as a serial run's,
 * in run order. A netlist that fails to read or converge is a failed
 * netlist with its errors; the others go on. Usage errors (a path that
 * does not exist, no netlists, a missing or malformed baseline, bad
 * options) come back as `ok: false` before any run.
 *
 * @example
 * ```ts
 * import { checkNetlists } from '@railcheck/core';
 * const outcome = await checkNetlists(['examples'], { baseline: 'examples/baseline.json', jobs: 2 });
 * if (outcome.ok) {
 *   const { netlists, passed, failed } = outcome.result.summary;
 *   console.log(`${netlists} netlists, ${passed} passed, ${failed} failed`);
 *   for (const c of outcome.result.cases) for (const t of c.tests) if (t.status === 'fail') console.log(c.path, t.name, t.message);
 * }
 * ```
 */
export async function checkNetlists(paths: readonly string[], options: CheckOptions = {}): Promise<CheckOutcome> {
  try {
    const wrong = optionsProblem(options);
    if (wrong) return { ok: false, errors: [wrong] };
    return await checkChecked(paths, options);
  } catch (e) {
    if (e instanceof RailcheckError) return { ok: false, errors: e.diagnostics };
    return { ok: false, errors: [errorAt('internal', `internal error: ${e instanceof Error ? e.message : String(e)}`)] };
  }
}

/** The first option of the wrong type, as a `bad-argument` diagnostic. */
function optionsProblem(options: unknown): Diagnostic | undefined {
  if (!isRecord(options)) return argumentDiagnostic('checkNetlists', 'options', 'an options object', options);
  const kinds: Record<string, (v: unknown) => boolean> = {
    baseline: (v) => typeof v === 'string' && v !== '',
    updateBaseline: (v) => typeof v === 'boolean',
    jobs: (v) => typeof v === 'number',
    shard: (v) => isRecord(v) && typeof v['index'] === 'number' && typeof v['count'] === 'number',
    allowOutsideIncludes: (v) => typeof v === 'boolean',
    workerScript: (v) => (typeof v === 'string' && v !== '') || v instanceof URL,
    onNetlist: (v) => typeof v === 'function',
    onStart: (v) => typeof v === 'function',
    onProgress: (v) => typeof v === 'function',
  };
  for (const [k, ok] of Object.entries(kinds)) {
    const v = options[k];
    if (v !== undefined && !ok(v)) return argumentDiagnostic('checkNetlists', `options.${k}`, `a value of the documented type for ${k}`, v);
  }
  return undefined;
}

async function checkChecked(paths: readonly string[], options: CheckOptions): Promise<CheckOutcome> {
  const usage = (code: string, message: string, expected: string): CheckOutcome => ({ ok: false, errors: [errorAt(code, message, undefined, undefined, expected)] });
  if (!Array.isArray(paths) || !paths.every((p) => typeof p === 'string' && p !== '')) return { ok: false, errors: [argumentDiagnostic('checkNetlists', 'paths', 'an array of file and folder paths', paths)] };
  const shard = options.shard ?? { index: 1, count: 1 };
  if (!Number.isInteger(shard.count) || !Number.isInteger(shard.index) || shard.count < 1 || shard.index < 1 || shard.index > shard.count) return usage('check-bad-shard', `shard ${shard.index}/${shard.count} is not one of the shares`, 'K/N with whole numbers 1 ≤ K ≤ N');
  const jobs = options.jobs ?? availableParallelism();
  if (!Number.isInteger(jobs) || jobs < 1) return usage('check-bad-jobs', `jobs ${jobs} is not a whole number of threads`, 'a whole number ≥ 1');
  const updating = options.updateBaseline === true;
  if (updating && options.baseline === undefined) return usage('check-update-without-baseline', 'updating the baseline needs the baseline file', '--baseline FILE with --update-baseline');
  if (updating && shard.count > 1) return usage('check-update-sharded', 'a shard cannot write the baseline: it runs only part of the netlists', 'update the baseline from an unsharded run');
  const expanded = expandCheckPaths(paths);
  if (!expanded.ok) return expanded;
  let baseline: Baseline | undefined;
  if (options.baseline !== undefined) {
    const read = readBaseline(options.baseline);
    if (read.ok) baseline = read.baseline;
    else if (!(updating && read.errors[0]?.code === 'baseline-missing')) return { ok: false, errors: read.errors };
  }
  const baseDir = options.baseline !== undefined ? dirname(resolve(options.baseline)) : undefined;
  const all = expanded.files.map((f) => ({ ...f, key: baseDir !== undefined ? slashed(relative(baseDir, resolve(f.file))) : f.shown }));
  const mine: Job[] = all.flatMap((f, k) => (k % shard.count === shard.index - 1 ? [{ k, file: f.file }] : []));

  const compared = updating ? undefined : baseline;
  const cases: (NetlistCheck | undefined)[] = new Array<NetlistCheck | undefined>(mine.length);
  let emitted = 0;
  let finished = 0;
  const done = (j: number, run: NetlistRun): void => {
    const job = mine[j]!;
    const f = all[job.k]!;
    cases[j] = netlistCheck(job.k, f.shown, f.key, run, compared);
    options.onProgress?.(++finished, mine.length);
    while (emitted < mine.length && cases[emitted] !== undefined) {
      const c = cases[emitted]!;
      emitted += 1;
      options.onNetlist?.(c, mine.length);
    }
  };
  const allow = options.allowOutsideIncludes === true;
  options.onStart?.(mine.length);
  const script = jobs > 1 && mine.length > 1 ? workerPath(options.workerScript, 'check-worker.js', import.meta.url) : undefined;
  if (script !== undefined) {
    const pool = {
      jobs: mine,
      message: (job: Job) => ({ file: job.file, allowOutsideIncludes: allow }),
      reply: (m: unknown) => (m as { run: NetlistRun }).run,
      stopped: (job: Job, why: string): NetlistRun => ({ ok: false, errors: [`${job.file}: error: the worker thread running it stopped: ${why}`], aboveElv: false }),
    };
    await runOnWorkers(pool, Math.min(jobs, mine.length), script, done);
  }
  else {
    for (let j = 0; j < mine.length; j++) {
      // Let a progress display draw between netlists.
      await new Promise((r) => setImmediate(r));
      done(j, runForCheck(mine[j]!.file, allow));
    }
  }
  const finalCases = cases as NetlistCheck[];
  const keys = new Set(all.map((f) => f.key));
  const gone = shard.index === 1 && baseline ? Object.keys(baseline.netlists).filter((k) => !keys.has(k)).sort(byCodePoint) : [];
  if (updating) writeCheckBaseline(options.baseline!, finalCases, baseline);
  return { ok: true, result: assemble(all.map((f) => f.shown), shard, options.baseline !== undefined ? { file: options.baseline, mode: updating ? 'updated' : 'compared' } : null, finalCases, gone) };
}

/**
 * Writes a baseline from a check's netlists (atomically, keys sorted, a
 * trailing newline): each netlist that ran gets its figures and node
 * voltages; one that did not run keeps its old entry (if any); every
 * entry keeps its tolerance overrides; entries of netlists not run are
 * dropped.
 */
export function writeCheckBaseline(file: string, cases: readonly NetlistCheck[], old: Baseline | undefined): void {
  const netlists: Record<string, BaselineEntry> = {};
  for (const c of cases) {
    const before = old?.netlists[c.key];
    if (c.run.ok) netlists[c.key] = baselineEntry(Object.fromEntries(Object.entries(c.run.figures).map(([n, v]) => [n, v.value])), c.run.nodes, before);
    else if (before) netlists[c.key] = before;
  }
  writeFileAtomic(file, baselineText({ format: BASELINE_FORMAT, version: BASELINE_VERSION, netlists }));
}

/** Whether a value has the shape of a netlist's outcome, as far as a merge reads it. */
const isNetlistCheck = (v: unknown): boolean =>
  isRecord(v) && Number.isInteger(v['index']) && typeof v['path'] === 'string' && typeof v['key'] === 'string' && typeof v['passed'] === 'boolean' && Array.isArray(v['tests']) && isRecord(v['run']) && typeof v['run']['aboveElv'] === 'boolean';

/**
 * Combines the JSON results of shards 1..N of one run (each exactly once,
 * any order) into the result of the unsharded run: the same netlists, in
 * run order, the gone netlists of share 1, summary and caution recomputed.
 * Anything else (a missing, repeated or foreign shard, different runs) is
 * an error saying which.
 *
 * @example
 * ```ts
 * import { readFileSync } from 'node:fs';
 * import { mergeCheckResults } from '@railcheck/core';
 * const shards = ['s1.json', 's2.json', 's3.json'].map((f) => JSON.parse(readFileSync(f, 'utf8')) as unknown);
 * const merged = mergeCheckResults(shards);
 * if (merged.ok) console.log(merged.result.summary);
 * ```
 */
export function mergeCheckResults(shards: readonly unknown[]): CheckOutcome {
  const bad = (message: string): CheckOutcome => ({ ok: false, errors: [errorAt('merge-shards', message, undefined, undefined, 'the --json results of railcheck check --shard K/N, for every K from 1 to N once')] });
  if (!Array.isArray(shards) || shards.length === 0) return bad('no shard results to merge');
  const parts: CheckResult[] = [];
  for (const [i, s] of shards.entries()) {
    const shard = isRecord(s) ? s['shard'] : undefined;
    const wellFormed = isRecord(s) && s['format'] === CHECK_FORMAT && s['version'] === CHECK_VERSION && Array.isArray(s['netlists']) && s['netlists'].every((n) => typeof n === 'string')
      && Array.isArray(s['cases']) && s['cases'].every(isNetlistCheck) && Array.isArray(s['gone']) && isRecord(shard) && Number.isInteger(shard['index']) && Number.isInteger(shard['count'])
      && (shard['count'] as number) >= 1 && (shard['index'] as number) >= 1 && (shard['index'] as number) <= (shard['count'] as number) && (shard['count'] as number) <= 1_000_000;
    if (!wellFormed) {
      return bad(`shard result ${i + 1} is not a ${CHECK_FORMAT} version ${CHECK_VERSION} result (railcheck check --json)`);
    }
    parts.push(s as unknown as CheckResult);
  }
  const first = parts[0]!;
  const count = first.shard.count;
  const same = JSON.stringify(first.netlists);
  const seen = new Map<number, number>();
  for (const [i, p] of parts.entries()) {
    if (p.shard.count !== count) return bad(`shard result ${i + 1} is shard ${p.shard.index}/${p.shard.count}, the first is of ${count}: they are not shares of one run`);
    if (JSON.stringify(p.netlists) !== same || JSON.stringify(p.baseline) !== JSON.stringify(first.baseline)) return bad(`shard result ${i + 1} lists other netlists or another baseline than the first: they are not shares of one run`);
    const dup = seen.get(p.shard.index);
    if (dup !== undefined) return bad(`shard ${p.shard.index}/${count} is given twice (results ${dup + 1} and ${i + 1})`);
    seen.set(p.shard.index, i);
  }
  const missing = Array.from({ length: count }, (_, k) => k + 1).filter((k) => !seen.has(k));
  if (missing.length > 0) return bad(`shard${missing.length === 1 ? '' : 's'} ${missing.map((k) => `${k}/${count}`).join(', ')} missing: give every shard of the run once`);
  const cases = parts.flatMap((p) => p.cases).sort((a, b) => a.index - b.index);
  if (cases.length !== first.netlists.length || cases.some((c, k) => c.index !== k || c.path !== first.netlists[k])) return bad('the shard results do not hold each netlist of the run exactly once');
  const one = parts.find((p) => p.shard.index === 1)!;
  return { ok: true, result: assemble(first.netlists, { index: 1, count: 1 }, first.baseline, cases, one.gone) };
}
