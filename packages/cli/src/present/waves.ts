/**
 * Transient and small-signal results for people (summary tables) and for
 * tools (CSV per figures.md: `time,<node>,...`, one row per output point).
 */
import { acceptedTimes, formatSI, phasorDb, phasorDeg, sampleTrace, type AcResult, type CompiledCircuit, type TransientResult } from '@railcheck/core';
import { heading, table } from './table.js';

/** Largest number of node columns in text tables (everything is in --json and --csv). */
const COLUMNS = 6;

/** Per-node minimum, maximum, peak-to-peak and final value over a transient. */
export function formatTransient(r: TransientResult): string {
  const rows = [['node', 'min', 'max', 'peak-peak', 'at end']];
  for (const [name, v] of Object.entries(r.nodes)) {
    // A loop, not Math.min(...v): spreading a long grid overflows the call stack.
    let lo = Infinity;
    let hi = -Infinity;
    for (const x of v) {
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
    rows.push([name, formatSI(lo, 'V'), formatSI(hi, 'V'), formatSI(hi - lo, 'V'), formatSI(v[v.length - 1] ?? 0, 'V')]);
  }
  const s = r.stats;
  const end = r.times[r.times.length - 1] ?? 0;
  return [
    heading(`Transient to ${formatSI(end, 's')} at ${r.temperature} °C`),
    `  ${r.method === 'trap' ? 'trapezoidal rule' : 'backward Euler'}, from ${r.fromIc ? 'the ic= values' : 'the operating point'}; ` +
      `${s.accepted} steps (${formatSI(s.minStep, 's')} to ${formatSI(s.maxStep, 's')}), ${s.rejectedLte + s.rejectedNewton} rejected, ${s.newtonIterations} Newton iterations`,
    table(rows),
  ].join('\n');
}

/** Magnitude and phase per node at up to about a dozen of the sweep's frequencies. */
export function formatAc(r: AcResult): string {
  const names = Object.keys(r.nodes).slice(0, COLUMNS);
  const stride = Math.max(1, Math.ceil(r.frequencies.length / 12));
  const rows = [['frequency', ...names.map((n) => `${n} dB / °`)]];
  for (let k = 0; k < r.frequencies.length; k += stride) {
    rows.push([
      formatSI(r.frequencies[k]!, 'Hz'),
      ...names.map((n) => {
        const p = r.nodes[n]!;
        const db = phasorDb(p.re[k]!, p.im[k]!);
        return Number.isFinite(db) ? `${db.toFixed(2)} / ${phasorDeg(p.re[k]!, p.im[k]!).toFixed(1)}` : 'zero';
      }),
    ]);
  }
  const more = Object.keys(r.nodes).length - names.length;
  return [heading(`Small-signal sweep at ${r.temperature} °C`), table(rows), ...(more > 0 ? [`  (${more} more node(s) in --json output)`] : [])].join('\n');
}

/**
 * The waveforms of a transient as columns: the output grid, or with
 * `steps` every accepted point from tstart on (the run must have kept them:
 * runNetlist's `keepSteps`), nodes and branch currents.
 */
export function transientColumns(r: TransientResult, c: CompiledCircuit, steps: boolean): { times: readonly number[]; nodes: Readonly<Record<string, ArrayLike<number>>>; branches: Readonly<Record<string, ArrayLike<number>>> } {
  if (!steps) return { times: r.times, nodes: r.nodes, branches: r.branches };
  const trace = r.trace;
  if (!trace) throw new Error('--steps needs a run that kept its accepted points (keepSteps)');
  const times = acceptedTimes(r);
  return { times, ...sampleTrace(c, trace, times) };
}

/** JSON form of a transient: the output grid, or with `steps` every accepted point. */
export function transientJson(r: TransientResult, c: CompiledCircuit, steps: boolean): Record<string, unknown> {
  const base = { temperature: r.temperature, method: r.method, from_ic: r.fromIc, stats: r.stats };
  return { ...base, points: steps ? 'accepted' : 'grid', ...transientColumns(r, c, steps) };
}

/** JSON form of a small-signal sweep: magnitude (dB) and phase (degrees) per node. */
export function acJson(r: AcResult): Record<string, unknown> {
  const nodes: Record<string, { db: number[]; phase_deg: number[]; re: readonly number[]; im: readonly number[] }> = {};
  for (const [name, p] of Object.entries(r.nodes)) {
    nodes[name] = { db: p.re.map((re, k) => phasorDb(re, p.im[k]!)), phase_deg: p.re.map((re, k) => phasorDeg(re, p.im[k]!)), re: p.re, im: p.im };
  }
  return { temperature: r.temperature, frequencies: r.frequencies, nodes };
}

/** Rows of CSV per piece that {@link transientCsvPieces} hands out. */
const CSV_ROWS = 256;

/** CSV text per figures.md: header `time,<node>,...`, then one row per point, SI units. */
export function transientCsv(times: ArrayLike<number>, nodes: Readonly<Record<string, ArrayLike<number>>>): string {
  return [...transientCsvPieces(times, nodes)].join('');
}

/**
 * The text of {@link transientCsv} in pieces, in order (the header line,
 * then blocks of CSV_ROWS rows, each piece ending with a newline), so that
 * a long run is written without ever being one string.
 */
export function* transientCsvPieces(times: ArrayLike<number>, nodes: Readonly<Record<string, ArrayLike<number>>>): Generator<string> {
  const names = Object.keys(nodes);
  const columns = names.map((n) => nodes[n]!);
  const quote = (s: string): string => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  yield `${['time', ...names].map(quote).join(',')}\n`;
  const row: unknown[] = new Array<unknown>(columns.length + 1);
  for (let k = 0; k < times.length; k += CSV_ROWS) {
    const rows: string[] = [];
    for (let j = k; j < Math.min(times.length, k + CSV_ROWS); j++) {
      row[0] = times[j];
      let finite = Number.isFinite(row[0]);
      for (let c = 0; c < columns.length; c++) {
        const v = columns[c]![j];
        row[c + 1] = v;
        finite &&= Number.isFinite(v);
      }
      // JSON.stringify writes a finite number as String does (ECMA-262, SerializeJSONProperty: ToString),
      // but without String's cache of converted numbers, whose strings live until a full collection
      // and made the process grow with the file. Any other value is written by String ("NaN").
      rows.push(finite ? JSON.stringify(row).slice(1, -1) : row.map((v) => String(v)).join(','));
    }
    yield `${rows.join('\n')}\n`;
  }
}
