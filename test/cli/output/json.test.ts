/**
 * `railcheck run FILE --json`: the core members of docs/output.md ("The
 * JSON object": `title`, `op`, `figures`, `limits`, `warnings`) and the
 * waveform and small-signal members `transients` and `ac`.
 * Values are checked against hand calculations, not against earlier output.
 */
import { describe, expect, test } from 'vitest';
import { cli, scratchDir, writeNetlist } from './support.js';

/** RC low-pass, 1 kΩ and 100 nF: corner fc = 1/(2πRC) = 1591.55 Hz. */
const FC = 1 / (2 * Math.PI * 1e3 * 100e-9);
const RC = [
  'sensor rail: supply filter',
  'V1 in 0 dc 5 ac 1 pwl(0 5 0.2m 4 1m 4)',
  'R1 in out 1k',
  'C1 out 0 100n',
  '.ac lin 3 100 10k',
];

interface TransientJson {
  temperature: number;
  method: string;
  from_ic: boolean;
  points: string;
  times: number[];
  nodes: Record<string, number[]>;
  branches: Record<string, number[]>;
  stats: { accepted: number; rejectedLte: number; rejectedNewton: number; newtonIterations: number; minStep: number; maxStep: number };
}
interface AcJson {
  temperature: number;
  frequencies: number[];
  nodes: Record<string, { db: (number | null)[]; phase_deg: number[]; re: number[]; im: number[] }>;
}
interface ReportJson {
  title: string;
  file: string;
  temperature: number;
  op: { nodes: Record<string, number>; currents: Record<string, number>; power: Record<string, number> };
  figures: Record<string, number>;
  limits: unknown[];
  warnings: string[];
  operating_points: { temperature: number }[];
  sweeps: unknown[];
  transients: TransientJson[];
  ac: AcJson[];
}

async function json(lines: readonly string[], extra: readonly string[] = []): Promise<ReportJson> {
  const file = writeNetlist(scratchDir(), [...lines, '.end', ''].join('\n'));
  const r = await cli(['run', file, '--json', ...extra]);
  expect(r.status, r.err).toBe(0);
  return JSON.parse(r.out) as ReportJson;
}

describe('core members (docs/output.md)', () => {
  test('title, op, figures, limits and warnings are present with their shapes', async () => {
    const j = await json([...RC, '.op']);
    expect(j.title).toBe('sensor rail: supply filter');
    // DC: the capacitor is open, so V(out) = V(in) = 5 V and no current flows (Ohm's law).
    expect(j.op.nodes).toEqual({ in: 5, out: 5 });
    expect(j.op.currents['R1']).toBe(0);
    expect(j.op.power['R1']).toBe(0);
    expect(j.figures).toEqual({});
    expect(j.limits).toEqual([]);
    expect(j.warnings).toEqual([]);
    expect(j.temperature).toBe(27);
    expect(j.operating_points.map((p) => p.temperature)).toEqual([27]);
    expect(j.transients).toEqual([]);
  });
});

describe('transients', () => {
  test('grid points, every node and branch current, method, from_ic and counters', async () => {
    const j = await json([...RC, '.tran 0.1m 1m']);
    const t = j.transients[0]!;
    expect(t.points).toBe('grid');
    expect(t.method).toBe('trap');
    expect(t.from_ic).toBe(false);
    expect(t.temperature).toBe(27);
    expect(t.times.length).toBe(11);
    // Observed 0; bound 2·eps·t.
    t.times.forEach((time, k) => expect(Math.abs(time - (k * 1e-4))).toBeLessThanOrEqual(2 * Number.EPSILON * k * 1e-4));
    expect(Object.keys(t.nodes)).toEqual(['in', 'out']);
    for (const v of Object.values(t.nodes)) expect(v.length).toBe(t.times.length);
    // The pwl input is linear between its corners (landed on), so the grid shows it exactly.
    // Observed 0 (the pwl corners are landed on); bounds 2·eps·|value|.
    expect(Math.abs(t.nodes['in']![1]! - 4.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 4.5);
    expect(Math.abs(t.nodes['in']![10]! - 4)).toBeLessThanOrEqual(2 * Number.EPSILON * 4);
    // One branch current, the voltage source's; its length follows the grid.
    const branches = Object.values(t.branches);
    expect(branches.length).toBe(1);
    expect(branches[0]!.length).toBe(t.times.length);
    // At the end the source current is −C·dV(out)/dt, tiny, since out has settled to 4 V
    // (τ = 0.1 ms, 8τ after the last corner): observed 1.4e-7 A; bound 3.5e-7 A.
    expect(Math.abs(branches[0]![10]!)).toBeLessThan(3.5e-7);
    const s = t.stats;
    expect(s.accepted).toBeGreaterThan(0);
    expect(s.minStep).toBeGreaterThan(0);
    expect(s.maxStep).toBeGreaterThanOrEqual(s.minStep);
    expect(s.rejectedLte + s.rejectedNewton).toBeGreaterThanOrEqual(0);
    expect(s.newtonIterations).toBeGreaterThanOrEqual(s.accepted);
  });

  test('--steps gives the accepted points; be and fromic show in method and from_ic', async () => {
    const j = await json([...RC, '.tran 0.1m 1m be fromic'], ['--steps']);
    const t = j.transients[0]!;
    expect(t.points).toBe('accepted');
    expect(t.method).toBe('be');
    expect(t.from_ic).toBe(true);
    // The accepted points include t = 0, which the accepted-step counter does not.
    expect(t.times.length).toBe(t.stats.accepted + 1);
    expect(t.times[0]).toBe(0);
    // From ic= values (none given: 0 V) the capacitor starts discharged.
    // Observed 5e-15 V; bound 1.2e-14 V.
    expect(Math.abs(t.nodes['out']![0]!)).toBeLessThan(1.2e-14);
    for (const v of [...Object.values(t.nodes), ...Object.values(t.branches)]) expect(v.length).toBe(t.times.length);
  });

  test('one entry per .tran and per .temp temperature, in that order', async () => {
    const j = await json([...RC, '.temp 0 50', '.tran 0.1m 1m', '.tran 0.5m 1m']);
    expect(j.transients.map((t) => [t.temperature, t.times.length])).toEqual([[0, 11], [0, 3], [50, 11], [50, 3]]);
    expect(j.ac.map((a) => a.temperature)).toEqual([0, 50]);
  });
});

describe('ac', () => {
  test('frequencies, and per node db, phase_deg, re, im as 1/(1 + jωRC)', async () => {
    const j = await json([...RC, `.ac lin 1 ${FC} ${FC}`]);
    const sweep = j.ac[1]!;
    expect(sweep.frequencies.length).toBe(1);
    // Observed 0, 4.4e-16 dB, 7.1e-15°, 1.1e-16 and 0; bounds 2·eps·|value| or 2–3× the observed.
    expect(Math.abs(sweep.frequencies[0]! - FC)).toBeLessThanOrEqual(2 * Number.EPSILON * FC);
    const out = sweep.nodes['out']!;
    // At the corner of an RC low-pass |H| = 1/√2 (−3.0103 dB) and arg H = −45° (textbook, from memory).
    expect(Math.abs(out.db[0]! - (-10 * Math.log10(2)))).toBeLessThan(1e-15);
    expect(Math.abs(out.phase_deg[0]! + 45)).toBeLessThan(1.8e-14);
    expect(Math.abs(out.re[0]! - 0.5)).toBeLessThan(3e-16);
    expect(Math.abs(out.im[0]! + 0.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.5);
    // The input node carries the source's ac 1 exactly.
    expect(sweep.nodes['in']).toEqual({ db: [0], phase_deg: [0], re: [1], im: [0] });
    // The first sweep: three frequencies, each member as long as the frequency list.
    const first = j.ac[0]!;
    expect(first.frequencies.length).toBe(3);
    // Every member of every node against the closed form: the source node is 1∠0, the output
    // 1/(1 + jωRC) (RC low-pass; textbook, from memory), with db = 20·log10|H| (the level of a root-power
    // quantity, ISO 80000-3) and phase_deg = arg H in degrees (docs/output.md).
    const closedForm = (name: string, f: number): { re: number; im: number } => {
      if (name === 'in') return { re: 1, im: 0 };
      const w = 2 * Math.PI * f * 1e3 * 100e-9;
      return { re: 1 / (1 + w * w), im: -w / (1 + w * w) };
    };
    for (const [name, n] of Object.entries(first.nodes)) {
      for (const arr of [n.db, n.phase_deg, n.re, n.im]) expect(arr.length).toBe(3);
      first.frequencies.forEach((f, k) => {
        const h = closedForm(name, f);
        // Observed 1.4e-17, 1.4e-17, 0 dB and 2.8e-14°; bounds 3.5e-17, 3.5e-17, 4e-15 dB (two ulps at 16 dB), 7e-14°.
        expect(Math.abs(n.re[k]! - h.re)).toBeLessThan(3.5e-17);
        expect(Math.abs(n.im[k]! - h.im)).toBeLessThan(3.5e-17);
        expect(Math.abs(n.db[k]! - 20 * Math.log10(Math.hypot(h.re, h.im)))).toBeLessThan(4e-15);
        expect(Math.abs(n.phase_deg[k]! - (Math.atan2(h.im, h.re) * 180) / Math.PI)).toBeLessThan(7e-14);
      });
    }
  });

  test('a .ac with no source carrying an ac value: a warning, zero phasors, db null', async () => {
    const j = await json(['no drive', 'V1 in 0 dc 5', 'R1 in out 1k', 'C1 out 0 100n', '.ac dec 1 10 100']);
    expect(j.warnings.length).toBe(1);
    expect(j.warnings[0]).toMatch(/no source has an ac value/);
    const out = j.ac[0]!.nodes['out']!;
    expect(out.re).toEqual([0, 0]);
    expect(out.im).toEqual([0, 0]);
    // 20·log10(0) = −∞, which JSON cannot hold: it is written as null.
    expect(out.db).toEqual([null, null]);
  });
});

describe('exit statuses', () => {
  test('2 for a netlist error, with the message on standard error and nothing on standard output', async () => {
    const file = writeNetlist(scratchDir(), 'broken\nR1 a 0\n.end\n');
    const r = await cli(['run', file, '--json']);
    expect(r.status).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toMatch(/stage\.cir:2/);
  });

  test('2 for an analysis failure: the small-signal matrix singular at a series LC resonance', async () => {
    // Series L–C from an ideal source: at f0 = 1/(2π√(LC)) the loop impedance is zero and the
    // MNA equations have no solution (L = 1/(4π²) H, C = 1 F → f0 = 1 Hz).
    const file = writeNetlist(scratchDir(), 'resonance\nV1 in 0 ac 1\nL1 in a {1/(4*3.141592653589793^2)}\nC1 a 0 1\n.ac lin 1 1 1\n.end\n');
    const r = await cli(['run', file, '--json']);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/singular at 1 Hz/);
    expect(r.err).not.toMatch(/\n\s+at /);
  });

  test('1 when a limit fails, 0 when it passes (figures.md)', async () => {
    // A 1k/1k divider: line.slope = 0.5 V/V exactly (Ohm's law).
    const base = ['bench divider', 'V1 in 0 dc 10', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', '.figure line'];
    const dir = scratchDir();
    const pass = await cli(['run', writeNetlist(dir, [...base, '.limit line.slope < 0.6', '.end', ''].join('\n'), 'p.cir'), '--json']);
    const fail = await cli(['run', writeNetlist(dir, [...base, '.limit line.slope < 0.4', '.end', ''].join('\n'), 'f.cir'), '--json']);
    expect(pass.status).toBe(0);
    expect(fail.status).toBe(1);
    const j = JSON.parse(fail.out) as { figures: Record<string, number>; limits: { figure: string; op: string; value: number; actual: number; pass: boolean; status: string }[] };
    // Observed 0; bound 2·eps·0.5.
    expect(Math.abs(j.figures['line.slope']! - 0.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.5);
    expect(j.limits).toEqual([{ figure: 'line.slope', op: '<', value: 0.4, actual: j.figures['line.slope'], pass: false, status: 'fail' }]);
  });
});
