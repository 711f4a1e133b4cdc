/**
 * What `railcheck run` reports about the operating point, sweeps and
 * temperatures, in JSON (docs/output.md, "The JSON object") and as text. Every number is
 * worked by hand: Ohm's law and the voltage-divider rule for the resistive
 * stages, Kirchhoff's current law and the Ebers-Moll transport model's
 * forward-active current ratio Ic/Ib = BF (no Early effect) for the
 * transistor, the sign convention of netlist.md for sources. Text prefixes
 * follow the SI Brochure (BIPM, 9th ed., §3).
 */
import { describe, expect, test } from 'vitest';
import { cli, netlistFile } from './support.js';

interface OpJson {
  readonly basis: string;
  readonly nodes: Record<string, number>;
  readonly currents: Record<string, number>;
  readonly power: Record<string, number>;
}
interface ReportJson {
  readonly title: string;
  readonly op: OpJson;
  readonly figures: Record<string, number>;
  readonly limits: ReadonlyArray<{ figure: string; op: string; value: number; actual: number; pass: boolean }>;
  readonly warnings: readonly unknown[];
}

async function runJson(text: string): Promise<{ status: number; json: ReportJson }> {
  const run = await cli(['run', netlistFile(text), '--json']);
  expect(run.err).toBe('');
  // ONE JSON object: the whole of standard output parses as a single value.
  const json = JSON.parse(run.out) as ReportJson;
  expect(typeof json).toBe('object');
  expect(Array.isArray(json)).toBe(false);
  return { status: run.status, json };
}

/** 12 V across 3k + 1k: 3 mA; out = 3 V; a second divider 47k / 1k gives 250 mV at 250 µA. */
const DIVIDER = `Bench reference divider
V1 in 0 12
R1 in out 3k
R2 out 0 1k
R3 in m 47k
R4 m 0 1k
.op
`;

describe('--json', () => {
  test('has title, op (nodes, currents, power), figures, limits and warnings', async () => {
    const { status, json } = await runJson(DIVIDER);
    expect(status).toBe(0);
    expect(json.title).toBe('Bench reference divider');
    // figures.md asks for at least nodes, currents and power; basis says what the values are ('dc' here, 'cycle-average' for a sine-fed stage).
    expect(Object.keys(json.op).sort()).toEqual(['basis', 'currents', 'nodes', 'power']);
    expect(json.op.basis).toBe('dc');
    expect(typeof json.figures).toBe('object');
    expect(Array.isArray(json.limits)).toBe(true);
    expect(Array.isArray(json.warnings)).toBe(true);
    for (const w of json.warnings) expect(typeof w).toBe('string');
  });

  test('values agree with Ohm\'s law for the divider', async () => {
    const { json } = await runJson(DIVIDER);
    const { nodes, currents, power } = json.op;
    // Observed 0 except I(V1) 1.3e-18 A and P(V1) 2.1e-17 W; bounds 2·eps·|value| and 2–3× those.
    expect(Math.abs(nodes['in']! - 12)).toBeLessThanOrEqual(2 * Number.EPSILON * 12);
    expect(Math.abs(nodes['out']! - (12 * 1 / 4))).toBeLessThanOrEqual(2 * Number.EPSILON * 3);
    expect(Math.abs(nodes['m']! - (12 * 1 / 48))).toBeLessThanOrEqual(2 * Number.EPSILON * 0.25);
    expect(Math.abs(currents['R1']! - (12 / 4000))).toBeLessThanOrEqual(2 * Number.EPSILON * 3e-3);
    expect(Math.abs(currents['R4']! - (12 / 48000))).toBeLessThanOrEqual(2 * Number.EPSILON * 2.5e-4);
    // netlist.md: a source delivering power reports a negative current; it supplies both branches.
    expect(Math.abs(currents['V1']! + (12 / 4000 + 12 / 48000))).toBeLessThan(3.5e-18);
    // P = I²R
    expect(Math.abs(power['R1']! - (3000 * (12 / 4000) ** 2))).toBeLessThanOrEqual(2 * Number.EPSILON * 27e-3);
    expect(Math.abs(power['R2']! - (1000 * (12 / 4000) ** 2))).toBeLessThanOrEqual(2 * Number.EPSILON * 9e-3);
    expect(Math.abs(power['V1']! + 12 * (12 / 4000 + 12 / 48000))).toBeLessThan(5e-17);
  });

  test('transistor currents as Q1.c, Q1.b, Q1.e', async () => {
    // 10 µA into the base, collector load 1k from 10 V: forward active, so Ic = BF·Ib = 1 mA.
    const { json } = await runJson('Transistor\nVCC c 0 10\nRC c col 1k\nIB 0 base 10u\nQ1 col base 0 qn\n.model qn NPN (BF=100)\n');
    const i = json.op.currents;
    // KCL at the base: all of IB enters Q1, to within the junction gmin's share, which
    // docs/engine.md bounds by 1e-12 S × the junction voltage (≤ 10 V here): 10 pA.
    expect(Math.abs(i['Q1.b']! - 10e-6)).toBeLessThan(1e-11);
    expect(Math.abs(i['Q1.c']! / i['Q1.b']! - 100)).toBeLessThan(2.5e-9); // Ebers-Moll, forward active (observed 1.0e-9)
    expect(Math.abs(i['Q1.e']! + i['Q1.c']! + i['Q1.b']!)).toBeLessThan(1.7e-19); // KCL over the transistor (observed 7.0e-20 A)
    expect(Math.abs(json.op.nodes['col']! - (10 - 1000 * i['Q1.c']!))).toBeLessThan(1e-11 * 1000); // Ohm's law on RC, same gmin bound
    expect(json.op.currents['Q1']).toBeUndefined();
  });

  test('names inside subcircuits as X1.name', async () => {
    const { json } = await runJson('Halves\n.subckt half top bot\nR1 top mid 1k\nR2 mid bot 1k\n.ends\nV1 in 0 8\nX1 in 0 half\n');
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(json.op.nodes['X1.mid']! - 4)).toBeLessThanOrEqual(2 * Number.EPSILON * 4);
    expect(Math.abs(json.op.currents['X1.R1']! - 4e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 4e-3);
    expect(Math.abs(json.op.power['X1.R2']! - 16e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 16e-3);
  });

  test('.figure and .limit: figures named as figures.md names them, each limit with its outcome', async () => {
    // Divider out = in/4 with R2 as the load (figures.md, line and load):
    // line: input 10.8 V → 13.2 V (0.9 and 1.1 of nominal): delta 0.6 V, slope 0.25, 100·0.25/3 %/V;
    // load: R2 open (0 A) gives out = 12 V, at 3 mA out = 3 V: delta 9 V, 75 %, rout 3 kΩ = R1 (Thevenin).
    const stage = 'Divider stage\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure line\n.figure load\n';
    const pass = await runJson(`${stage}.limit load.rout <= 3.1k\n`);
    expect(pass.status).toBe(0);
    const f = pass.json.figures;
    // Observed 1.1e-16 for line.delta, 0 for the rest; bounds 3e-16 and 2·eps·|value|.
    expect(Math.abs(f['line.delta']! - 0.6)).toBeLessThan(3e-16);
    expect(Math.abs(f['line.slope']! - 0.25)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.25);
    expect(Math.abs(f['line.pct_per_v']! - (100 * 0.25) / 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 8.4);
    expect(Math.abs(f['load.delta']! - 9)).toBeLessThanOrEqual(2 * Number.EPSILON * 9);
    expect(Math.abs(f['load.pct']! - 75)).toBeLessThanOrEqual(2 * Number.EPSILON * 75);
    expect(Math.abs(f['load.rout']! - 3000)).toBeLessThanOrEqual(2 * Number.EPSILON * 3000);
    expect(pass.json.limits).toEqual([{ figure: 'load.rout', op: '<=', value: 3100, actual: expect.closeTo(3000, 12) as unknown as number, pass: true, status: 'pass' }]);
    const fail = await runJson(`${stage}.limit line.slope < 0.2\n`);
    expect(fail.status).toBe(1);
    expect(fail.json.limits[0]).toMatchObject({ figure: 'line.slope', op: '<', value: 0.2, pass: false, status: 'fail' });
  });
});

describe('text report', () => {
  test('node voltages, currents and powers with units and engineering prefixes', async () => {
    const run = await cli(['run', netlistFile(DIVIDER)]);
    expect(run.status).toBe(0);
    const lines = run.out.split('\n');
    const row = (name: string): string => lines.find((l) => l.trim().startsWith(`${name} `)) ?? '';
    expect(row('out')).toMatch(/\b3 V\b/);
    expect(row('m')).toMatch(/\b250 mV\b/);
    expect(row('R1')).toMatch(/\b3 mA\b.*\b27 mW\b/);
    expect(row('R2')).toMatch(/\b9 mW\b/);
    expect(row('R4')).toMatch(/250 µA.*62\.5 µW/); // (250 µA)²·1 kΩ
    expect(row('V1')).toMatch(/-3\.25 mA.*-39 mW/); // 3 mA + 250 µA, times 12 V
  });

  test('a .dc sweep is a table of the swept value against the node voltages', async () => {
    const run = await cli(['run', netlistFile(`${DIVIDER}.dc V1 0 12 6\n`)]);
    expect(run.status).toBe(0);
    const table = run.out.slice(run.out.indexOf('DC sweep of V1'));
    expect(table.split('\n')[2]).toMatch(/V1\s+in\s+out\s+m/);
    // in = V1, out = V1/4, m = V1/48
    expect(table).toMatch(/^\s*0 V\s+0 V\s+0 V\s+0 V\s*$/m);
    expect(table).toMatch(/^\s*6 V\s+6 V\s+1\.5 V\s+125 mV\s*$/m);
    expect(table).toMatch(/^\s*12 V\s+12 V\s+3 V\s+250 mV\s*$/m);
  });

  test('.temp with two temperatures prints two operating points', async () => {
    const run = await cli(['run', netlistFile(`${DIVIDER}.temp 0 50\n`)]);
    expect(run.status).toBe(0);
    expect(run.out.match(/Operating point at/g)).toHaveLength(2);
    expect(run.out).toMatch(/Operating point at 0 °C/);
    expect(run.out).toMatch(/Operating point at 50 °C/);
  });
});

describe('.tran, .ac, .figure and .limit', () => {
  test('the rest runs; each is either reported or warned about as not available', async () => {
    const text = `Rail with everything asked for
V1 in 0 dc 12 ac 1
R1 in out 3k
R2 out 0 1k
C1 out 0 1u
.supply in=V1 out=out load=R2
.figure line
.limit line.delta <= 1
.tran 10u 100u
.ac dec 2 10 1k
.op
`;
    const run = await cli(['run', netlistFile(text), '--json']);
    expect(run.status).toBe(0);
    const json = JSON.parse(run.out) as ReportJson & { transients?: unknown[]; ac?: unknown[] };
    expect(Math.abs(json.op.nodes['out']! - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3); // the operating point is there whatever else happens
    const warned = (re: RegExp): boolean => json.warnings.some((w) => typeof w === 'string' && /not available/.test(w) && re.test(w));
    expect(warned(/\.tran/) || json.transients?.length === 1).toBe(true);
    expect(warned(/\.ac/) || json.ac?.length === 1).toBe(true);
    // figures.md, line: a resistive divider by 4 changes by (13.2 − 10.8)/4 = 0.6 V.
    if (!warned(/line/)) expect(Math.abs(json.figures['line.delta']! - 0.6)).toBeLessThan(3e-16);
    if (!warned(/limit/)) expect(json.limits).toMatchObject([{ figure: 'line.delta', pass: true }]);
  });
});
