/**
 * `railcheck run FILE --csv OUT.csv` against docs/output.md ("CSV waveforms"): a
 * header row `time,<node>,...` with every node (names as written, subcircuit
 * nodes as `X1.name`) and one row per output point in SI units; the output
 * points are the `.tran` grid from tstart to tstop (netlist.md: tstep is the
 * output interval), or with `--steps` every accepted step.
 */
import { describe, expect, test } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, parseCsv, scratchDir, writeNetlist } from './support.js';

/**
 * A resistive network fed by a pwl ramp: every node is a fixed fraction of
 * the input, and the input is linear between breakpoints, so every output
 * point is known exactly. Fractions by hand: mid sees R1 = 1k from In and
 * R2 ∥ (R3 + RL) = 2/3 k to ground, so V(mid) = 0.4·V(In), V(Track) = V(mid)/2.
 */
const RAMP = [
  'model-railway controller: track feed ramp',
  'V1 In 0 pwl(0 0 0.4m 4 1m 4)',
  'X1 In Track divider',
  'RIN IN 0 1meg ; same node as In, written differently',
  'RL Track 0 1k',
  '.subckt divider a b',
  'R1 a mid 1k',
  'R2 mid 0 1k',
  'R3 mid b 1k',
  '.ends',
];
const ramp = (t: number): number => (t < 0.4e-3 ? (4 * t) / 0.4e-3 : 4);
const FRACTION: Record<string, number> = { In: 1, Track: 0.2, 'X1.mid': 0.4 };

async function runCsv(lines: readonly string[], extra: readonly string[] = []): Promise<{ dir: string; csv: string; status: number; out: string; err: string }> {
  const dir = scratchDir();
  const file = writeNetlist(dir, [...lines, '.end', ''].join('\n'));
  const csv = join(dir, 'waves.csv');
  const r = await cli(['run', file, '--csv', csv, ...extra]);
  return { dir, csv, ...r };
}

describe('--csv on the output grid', () => {
  test('header has time and every node as written; one row per grid point from tstart to tstop', async () => {
    const r = await runCsv([...RAMP, '.tran 0.1m 1m 0.2m']);
    expect(r.status).toBe(0);
    const { header, rows } = parseCsv(readFileSync(r.csv, 'utf8'));
    expect(header).toEqual(['time', 'In', 'Track', 'X1.mid']);
    // Grid tstart, tstart + tstep, ..., tstop: 0.2 ms to 1 ms in 0.1 ms steps = 9 points.
    expect(rows.length).toBe(9);
    rows.forEach((row, k) => {
      const t = 0.2e-3 + k * 0.1e-3;
      // Observed 0 for the times and 1.1e-16 V for the values; bounds 2·eps·t and 3e-16 V.
      expect(Math.abs(row[0]! - t)).toBeLessThanOrEqual(2 * Number.EPSILON * t);
      header.slice(1).forEach((name, c) => expect(Math.abs(row[c + 1]! - (FRACTION[name]! * ramp(t)))).toBeLessThan(3e-16));
    });
  });

  test('a tstop that is not a whole number of tsteps still ends the grid at tstop', async () => {
    const r = await runCsv([...RAMP, '.tran 0.3m 1m']);
    const { rows } = parseCsv(readFileSync(r.csv, 'utf8'));
    const times = rows.map((row) => row[0]!);
    // Observed 0; bound 2·eps·t.
    [0, 0.3e-3, 0.6e-3, 0.9e-3, 1e-3].forEach((t, k) => expect(Math.abs(times[k]! - t)).toBeLessThanOrEqual(2 * Number.EPSILON * t));
    expect(times.length).toBe(5);
    // The first row of a run from t = 0 is the operating point: V(In) = pwl(0) = 0.
    expect(rows[0]!.slice(1)).toEqual([0, 0, 0]);
  });

  test('--csv together with --json writes the file and prints the JSON', async () => {
    const r = await runCsv([...RAMP, '.tran 0.1m 1m'], ['--json']);
    expect(r.status).toBe(0);
    const json = JSON.parse(r.out) as { transients: { times: number[] }[] };
    const { rows } = parseCsv(readFileSync(r.csv, 'utf8'));
    expect(rows.map((row) => row[0])).toEqual(json.transients[0]!.times);
  });
});

describe('--csv --steps', () => {
  test('one row per accepted step, the same points as --json --steps, landing on the pwl corner', async () => {
    const r = await runCsv([...RAMP, '.tran 0.1m 1m'], ['--steps']);
    expect(r.status).toBe(0);
    const { rows } = parseCsv(readFileSync(r.csv, 'utf8'));
    const times = rows.map((row) => row[0]!);
    const again = await runCsv([...RAMP, '.tran 0.1m 1m'], ['--steps', '--json']);
    const json = JSON.parse(again.out) as { transients: { times: number[]; points: string; stats: { accepted: number } }[] };
    const tr = json.transients[0]!;
    expect(tr.points).toBe('accepted');
    expect(times).toEqual(tr.times);
    // Accepted points start at t = 0 (the initial point) and end at tstop.
    expect(times[0]).toBe(0);
    // Observed 0; bound 2·eps·t.
    expect(Math.abs(times[times.length - 1]! - 1e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 1e-3);
    for (let k = 1; k < times.length; k++) expect(times[k]!).toBeGreaterThan(times[k - 1]!);
    // netlist.md: every pwl corner is a breakpoint that the stepping lands on.
    expect(times.some((t) => Math.abs(t - 0.4e-3) < 1e-15)).toBe(true);
    // Not merely the grid: this run has 11 grid points and a different count of steps.
    expect(times.length).not.toBe(11);
    // Observed 1.1e-16 V; bound 3e-16 V.
    rows.forEach((row) => expect(Math.abs(row[2]! - (0.2 * ramp(row[0]!)))).toBeLessThan(3e-16));
  });
});

describe('further transients and errors', () => {
  // A diode's forward voltage falls about 2 mV/K (common practice, no source): the two
  // temperatures must give two different files.
  const DIODE = ['bench reference: diode from a pwl ramp', 'V1 in 0 pwl(0 1 1m 5)', 'R1 in a 1k', 'D1 a 0 DREF', '.model DREF D (IS=1e-14)'];

  test('each further transient (another .temp, another .tran) goes to OUT-2.csv, OUT-3.csv, ...', async () => {
    const r = await runCsv([...DIODE, '.temp 27 75', '.tran 0.1m 1m', '.tran 0.25m 0.5m']);
    expect(r.status).toBe(0);
    // Order: temperatures in .temp order, and within each the .tran lines in netlist order.
    const files = ['waves.csv', 'waves-2.csv', 'waves-3.csv', 'waves-4.csv'].map((f) => join(r.dir, f));
    files.forEach((f) => expect(existsSync(f), f).toBe(true));
    expect(existsSync(join(r.dir, 'waves-5.csv'))).toBe(false);
    const [a, b, c, d] = files.map((f) => parseCsv(readFileSync(f, 'utf8')));
    expect([a!.rows.length, b!.rows.length, c!.rows.length, d!.rows.length]).toEqual([11, 3, 11, 3]);
    const last = (x: typeof a) => x!.rows[x!.rows.length - 1]!;
    // V(a) at the end: lower at 75 °C than at 27 °C, by roughly 2 mV/K · 48 K.
    const drop = last(a)[2]! - last(c)[2]!;
    expect(drop).toBeGreaterThan(0.05);
    expect(drop).toBeLessThan(0.15);
  });

  test('an OUT name without .csv gets -2 appended', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, [...DIODE, '.temp 27 75', '.tran 0.1m 1m', '.end', ''].join('\n'));
    const r = await cli(['run', file, '--csv', join(dir, 'waves')]);
    expect(r.status).toBe(0);
    expect(existsSync(join(dir, 'waves'))).toBe(true);
    expect(existsSync(join(dir, 'waves-2'))).toBe(true);
  });

  test('--csv without a .tran: exit 2, a message, no file and no report', async () => {
    const r = await runCsv([...DIODE, '.op']);
    // docs/output.md, Exit status: 2 when the request cannot be carried out, message on standard error.
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/--csv needs a \.tran analysis/);
    expect(existsSync(r.csv)).toBe(false);
    expect(r.out).toBe('');
  });

  test('an unwritable OUT path: exit 2 and a message, not a stack trace', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, [...DIODE, '.tran 0.1m 1m', '.end', ''].join('\n'));
    const r = await cli(['run', file, '--csv', join(dir, 'no-such-folder', 'w.csv')]);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/cannot write/);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
});
