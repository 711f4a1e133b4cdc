/**
 * The baseline of a regression check: format `railcheck-baseline`,
 * version 1, a JSON file of our own (docs/output.md, "Baseline file").
 * Per netlist (keyed by its path relative to the baseline file's folder,
 * with forward slashes): every measured figure value and every
 * operating-point node voltage, and optional per-value tolerance
 * overrides. Comparison, reading (with located errors) and the atomic,
 * stable write live here.
 */
import { closeSync, fsyncSync, openSync, readFileSync, renameSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { match } from 'ts-pattern';
import { errorAt, type Diagnostic } from '../errors.js';
import { argumentDiagnostic } from '../arguments.js';
import type { FigureUnit } from '../figure-registry.js';
import { formatSI } from '../units.js';
import { sortedRecord } from './check-run.js';

/** The `format` member of a baseline file. */
export const BASELINE_FORMAT = 'railcheck-baseline';
/** The `version` member this railcheck writes and reads. */
export const BASELINE_VERSION = 1;

/**
 * A tolerance: a value passes when |now − saved| ≤ max(`abs`, `rel` × |saved|).
 * `abs` is in the value's own unit; `rel` is a fraction (0.001 = 0.1 %).
 */
export interface Tolerance {
  readonly rel: number;
  readonly abs: number;
}

/**
 * Default tolerance per unit kind (docs/output.md, "Baseline tolerances").
 * Common practice, no source: a simulation repeats to rounding on one
 * machine, so the bands are set to let through floating-point differences
 * between machines and Node versions (relative 1e-4 of the value) while a
 * part changed by a tolerance step (1 % and more) moves a figure far past
 * them; the absolute floors keep a value near zero (numerical dust) from
 * failing on noise. Flags are compared exactly.
 */
export const DEFAULT_TOLERANCES: Readonly<Record<FigureUnit, Tolerance>> = {
  V: { rel: 1e-4, abs: 1e-6 },
  A: { rel: 1e-4, abs: 1e-9 },
  s: { rel: 1e-4, abs: 1e-9 },
  'V/V': { rel: 1e-4, abs: 1e-7 },
  '%/V': { rel: 1e-4, abs: 1e-5 },
  '%': { rel: 1e-4, abs: 1e-5 },
  'Ω': { rel: 1e-4, abs: 1e-6 },
  dB: { rel: 0, abs: 1e-3 },
  W: { rel: 1e-4, abs: 1e-9 },
  ratio: { rel: 1e-4, abs: 1e-7 },
  flag: { rel: 0, abs: 0 },
  // thermal figure (docs/thermal.md): temperatures to a thousandth of a kelvin
  '°C': { rel: 0, abs: 1e-3 },
  K: { rel: 0, abs: 1e-3 },
  'K/W': { rel: 1e-4, abs: 1e-6 },
};

/** One netlist's entry in a baseline. */
export interface BaselineEntry {
  /** Figure values by dotted name, each in its figure's unit. */
  readonly figures: Readonly<Record<string, number>>;
  /** Operating-point node voltages, V, by node name. */
  readonly nodes: Readonly<Record<string, number>>;
  /** Tolerance overrides: by figure name, or `node:NAME` for a node voltage; written back unchanged by an update. */
  readonly tolerances?: Readonly<Record<string, Tolerance>>;
}

/** A baseline: format, version and the netlists by key. */
export interface Baseline {
  readonly format: typeof BASELINE_FORMAT;
  readonly version: typeof BASELINE_VERSION;
  readonly netlists: Readonly<Record<string, BaselineEntry>>;
}

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isNumberRecord = (v: unknown): v is Record<string, number> => isRecord(v) && Object.values(v).every((x) => typeof x === 'number' && Number.isFinite(x));
const isTolerance = (v: unknown): v is Tolerance =>
  isRecord(v) && Object.keys(v).every((k) => k === 'rel' || k === 'abs') && typeof v['rel'] === 'number' && typeof v['abs'] === 'number' && v['rel'] >= 0 && v['abs'] >= 0 && Number.isFinite(v['rel']) && Number.isFinite(v['abs']);

/** Reads a baseline from its text; an error names the file and what was expected. */
export function parseBaseline(text: string, file: string): BaselineRead {
  const bad = (message: string, expected: string): BaselineRead => ({ ok: false, errors: [errorAt('baseline-format', `${file}: ${message}`, { file, line: 1, column: 1 }, undefined, expected)] });
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    return bad(`not JSON (${e instanceof Error ? e.message : String(e)})`, `a ${BASELINE_FORMAT} file written by railcheck check --update-baseline`);
  }
  if (!isRecord(data) || data['format'] !== BASELINE_FORMAT) return bad(`not a ${BASELINE_FORMAT} file`, `an object with "format": "${BASELINE_FORMAT}"`);
  if (data['version'] !== BASELINE_VERSION) return bad(`version ${JSON.stringify(data['version'])} is not one this railcheck reads`, `"version": ${BASELINE_VERSION}`);
  const netlists = data['netlists'];
  if (!isRecord(netlists)) return bad('"netlists" is missing or not an object', '"netlists": { "PATH.cir": { "figures": {...}, "nodes": {...} } }');
  for (const [key, entry] of Object.entries(netlists)) {
    if (!isRecord(entry) || !isNumberRecord(entry['figures']) || !isNumberRecord(entry['nodes'])) return bad(`netlist "${key}": "figures" and "nodes" must be objects of finite numbers`, '{ "figures": { NAME: number }, "nodes": { NAME: number } }');
    const tol = entry['tolerances'];
    if (tol !== undefined && (!isRecord(tol) || !Object.values(tol).every(isTolerance))) return bad(`netlist "${key}": "tolerances" must map names to { "rel": number ≥ 0, "abs": number ≥ 0 }`, '"tolerances": { "line.delta": { "rel": 0.01, "abs": 0.001 } }');
  }
  return { ok: true, baseline: data as unknown as Baseline };
}

/** A baseline read, or the error (one) that says why not: code `baseline-missing`, `baseline-unreadable`, `baseline-format` or `bad-argument`. */
export type BaselineRead = { readonly ok: true; readonly baseline: Baseline } | { readonly ok: false; readonly errors: readonly Diagnostic[] };

/**
 * Reads a baseline file (format `railcheck-baseline`, version 1); a
 * missing, unreadable or malformed file is an `ok: false` result whose
 * error names it and says what was expected.
 *
 * @example
 * ```ts
 * const read = readBaseline('suite/baseline.json');
 * if (read.ok) console.log(Object.keys(read.baseline.netlists)); // paths relative to suite/
 * ```
 */
export function readBaseline(file: string): BaselineRead {
  if (typeof file !== 'string' || file === '') return { ok: false, errors: [argumentDiagnostic('readBaseline', 'file', 'a file path', file)] };
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return { ok: false, errors: [errorAt(code === 'ENOENT' ? 'baseline-missing' : 'baseline-unreadable', `${file}: ${code === 'ENOENT' ? 'no such baseline file' : `cannot read the baseline (${code ?? String(e)})`}`, undefined, undefined, 'a baseline written by railcheck check --baseline FILE --update-baseline')] };
  }
  return parseBaseline(text, file);
}

/** Copy of a value with every object's keys sorted (code-point order), arrays kept in order. */
function sortedDeep(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortedDeep);
  if (isRecord(v)) return Object.fromEntries(Object.keys(v).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0)).map((k) => [k, sortedDeep(v[k])]));
  return v;
}

/** The text of a baseline: keys sorted at every level, two-space indentation, a trailing newline. */
export function baselineText(b: Baseline): string {
  return `${JSON.stringify(sortedDeep(b), null, 2)}\n`;
}

/**
 * Writes `text` to `file` atomically: into a temporary file in the same
 * folder (`.NAME.PID.tmp`), flushed to disk, then renamed over `file`, so a
 * reader sees the old file or the new one, never half of one. A run killed
 * in between leaves the old file as it was (and the temporary file behind).
 * Test hook: with the environment variable
 * `RAILCHECK_TEST_HOLD_BASELINE_WRITE=1` the writer stops for a minute
 * after the temporary file is written, so a test can kill it at that point.
 */
export function writeFileAtomic(file: string, text: string): void {
  const temp = join(dirname(file), `.${basename(file)}.${process.pid}.tmp`);
  const fd = openSync(temp, 'w');
  try {
    writeSync(fd, text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  if (process.env['RAILCHECK_TEST_HOLD_BASELINE_WRITE'] === '1') Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 60_000);
  renameSync(temp, file);
}

/** A value with its unit, six significant digits: enough to show a move past the default tolerances. */
export function valueText(value: number, unit: FigureUnit): string {
  return match(unit)
    .with('V', 'A', 's', 'V/V', 'Ω', 'W', (u) => formatSI(value, u, 6))
    .with('dB', '%', '%/V', (u) => `${Number(value.toPrecision(6))} ${u}`)
    .with('ratio', 'flag', () => `${Number(value.toPrecision(6))}`)
    // thermal figure (docs/thermal.md)
    .with('°C', 'K', 'K/W', (u) => `${Number(value.toPrecision(6))} ${u}`)
    .exhaustive();
}

const signed = (text: string, d: number): string => (d > 0 ? `+${text}` : text);

/** What a comparison of one value with its saved one found. */
export type ValueComparison =
  | { readonly status: 'pass' | 'fail'; readonly message: string }
  | { readonly status: 'new'; readonly message: string };

/**
 * Compares a value now with its saved one under `tol`: passes when
 * |now − saved| ≤ max(tol.abs, tol.rel × |saved|); the message gives both
 * values, the difference (and relative difference when the saved value is
 * not zero) and the band.
 */
export function compareValue(now: number, saved: number, unit: FigureUnit, tol: Tolerance): { status: 'pass' | 'fail'; message: string } {
  const diff = now - saved;
  const band = Math.max(tol.abs, tol.rel * Math.abs(saved));
  const pass = Math.abs(diff) <= band;
  const relative = saved !== 0 ? ` (${signed(`${Number(((100 * diff) / Math.abs(saved)).toPrecision(3))} %`, diff)})` : '';
  const what = pass ? 'within tolerance' : 'moved';
  return { status: pass ? 'pass' : 'fail', message: `${what}: now ${valueText(now, unit)}, baseline ${valueText(saved, unit)}, difference ${signed(valueText(diff, unit), diff)}${relative}, tolerance ±${valueText(band, unit)}` };
}

/** The tolerance of a value: the entry's override by name, else the default of its unit. */
export function toleranceOf(entry: BaselineEntry | undefined, name: string, unit: FigureUnit): Tolerance {
  return entry?.tolerances?.[name] ?? DEFAULT_TOLERANCES[unit];
}

/** A baseline entry from measured values, keeping the old entry's tolerance overrides. */
export function baselineEntry(figures: Readonly<Record<string, number>>, nodes: Readonly<Record<string, number>>, old: BaselineEntry | undefined): BaselineEntry {
  return { figures: sortedRecord(figures), nodes: sortedRecord(nodes), ...(old?.tolerances ? { tolerances: sortedRecord(old.tolerances) } : {}) };
}
