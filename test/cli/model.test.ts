/**
 * `railcheck model` on the built bundle (packages/cli/dist/railcheck.mjs, in
 * child processes): datasheet values → a `.model` line → that line put in a
 * netlist test circuit and run → the datasheet value again, for a Zener
 * and a transistor; a netlist's models resolved with the datasheet values
 * they imply, checked against hand formulas; usage errors exit 2 with the
 * project's diagnostics and no stack trace; --json parses.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runNetlist, type RunResult } from '@railcheck/core';
import { describe, expect, test } from 'vitest';
import { freshDir, STACK_LINE, writeFiles } from './support.js';
import { thermalVoltage } from '../helpers/diode-closed-form.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const bundle = join(root, 'packages/cli/dist/railcheck.mjs');

/** `railcheck model ARGS...` on the built bundle. */
function model(args: readonly string[], cwd = root): { status: number; out: string; err: string } {
  const r = spawnSync(process.execPath, [bundle, 'model', ...args], { cwd, encoding: 'utf8', timeout: 60_000 });
  return { status: r.status ?? -1, out: r.stdout, err: r.stderr };
}

interface ModelJson {
  format: string;
  source: string;
  name: string;
  type: string;
  line: string;
  written: string;
  params: Record<string, number>;
  filled: string[];
  implied: { key: string; value: number; unit: string; at: string; conditions: Record<string, number>; given: number | null; difference: number | null }[];
}

function modelJson(args: readonly string[], cwd = root): ModelJson {
  const r = model([...args, '--json'], cwd);
  expect(r.err).toBe('');
  expect(r.status).toBe(0);
  return JSON.parse(r.out) as ModelJson;
}

/** The first operating point of a netlist run. */
function op(lines: readonly string[]): { nodes: Record<string, number>; currents: Record<string, number> } {
  const r: RunResult = runNetlist([...lines, '.op', '.end', ''].join('\n'));
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report.operatingPoints[0]!;
}

/** Checks an observed error against its tolerance (MODEL_TEST_ERRORS=1 prints each, to set tolerances from what is observed). */
function within(error: number, tolerance: number): void {
  if (process.env['MODEL_TEST_ERRORS']) console.log(`observed ${error.toExponential(2)} < ${tolerance}`);
  expect(error).toBeLessThan(tolerance);
}

const implied = (j: ModelJson, key: string): number => j.implied.find((v) => v.key === key)!.value;

/** Vt at Tnom 27 °C from the exact SI 2019 k and q (BIPM SI brochure, 9th ed.), for the Shockley checks. */
const VT = thermalVoltage(300.15);

describe('datasheet values → model line → netlist → datasheet values (round trip)', () => {
  const zener = ['D', 'VZ=5.6', 'IZT=5m', 'ZZT=40', 'TCVZ=2.5m', 'VF=0.8', 'IF=10m'];

  test('Zener: the printed line, run in a netlist, gives VZ at IZT, ZZT, VF at IF and TCVZ again', () => {
    const text = model(zener);
    expect(text.status).toBe(0);
    expect(text.err).toBe('');
    const line = /^ {2}(\.model from_sheet D \(.*\))$/m.exec(text.out.split('Resolved .model line')[1]!)![1]!;
    expect(text.out).toContain('N = 1 (default');
    // VZ at IZT: the Zener driven in reverse by 5 mA (the datasheet's test circuit). Observed error 2.1e-10 V
    // (the operating point's Newton tolerance); 6e-10 V, 3× that.
    const vz = (i: number, temp?: number): number => op(['zener', `I1 0 k ${i}`, 'D1 0 k from_sheet', line, ...(temp === undefined ? [] : [`.temp ${temp}`])]).nodes['k']!;
    within(Math.abs(vz(5e-3) - 5.6), 6e-10);
    // ZZT as the central difference ±1 % about IZT: the breakdown exponential's curvature gives a
    // second-order error (observed 3.3e-5 relative); 1e-4 relative, 3×.
    const zzt = (vz(5.05e-3) - vz(4.95e-3)) / 1e-4;
    within(Math.abs(zzt - 40) / 40, 1e-4);
    // TCVZ over 26 °C to 28 °C (observed 6.1e-9 relative); 2e-8 relative, 3×.
    within(Math.abs((vz(5e-3, 28) - vz(5e-3, 26)) / 2 - 2.5e-3) / 2.5e-3, 2e-8);
    // VF at IF forward through the diode (observed 2.1e-12 V, the Newton tolerance); 6e-12 V, 3×.
    within(Math.abs(op(['forward', 'I1 0 a 10m', 'D1 a 0 from_sheet', line]).nodes['a']! - 0.8), 6e-12);
    // Shockley's equation by hand (Sze, Physics of Semiconductor Devices, the ideal diode equation) with the printed IS, N = 1:
    // V = N·Vt·ln(IF/IS + 1). Observed 0 (the same Vt to the last bit); 1e-12 V allows the rounding of a Vt computed another way.
    const is = Number(/IS=([^ )]+)/.exec(line)![1]);
    within(Math.abs(VT * Math.log1p(10e-3 / is) - 0.8), 1e-12);
  });

  test('Zener: the printed numbers read back exactly, and the check column matches the values given', () => {
    const j = modelJson(zener);
    expect(j.format).toBe('railcheck-model');
    for (const [k, v] of Object.entries(j.params)) expect(Number(new RegExp(`${k}=([^ )]+)`).exec(j.line)![1])).toBe(v);
    // Given values are those typed on the command line, not the code's.
    expect(j.implied.find((v) => v.key === 'VZ')!.given).toBe(5.6);
    expect(j.implied.find((v) => v.key === 'TCVZ')!.given).toBe(2.5e-3);
    // The test circuits give back the datasheet values within the tolerances of the test above.
    within(Math.abs(implied(j, 'VZ') - 5.6), 6e-10);
    within(Math.abs(implied(j, 'ZZT') - 40) / 40, 1e-4);
    within(Math.abs(implied(j, 'VF') - 0.8), 6e-12);
  });

  test('NPN: the printed line gives HFE at ICHFE and VBE at ICVBE again in netlist test circuits', () => {
    const j = modelJson(['NPN', 'HFE=150', 'ICHFE=50m', 'VBE=0.65', 'ICVBE=10m', 'VA=100']);
    expect(j.params['VAF']).toBe(100);
    expect(j.filled.join()).toMatch(/VCE = 5 V/);
    const line = j.line.replace('from_sheet', 'qx');
    // h_FE = IC/IB at VCE = 5 V: a base current of ICHFE/HFE gives IC = ICHFE. Observed 1.1e-8 relative
    // (the junctions' gmin, which the resolver's equations leave out); 3e-8 relative, 3×.
    const gain = op(['gain point', 'VC c 0 5', `IB 0 b ${50e-3 / 150}`, 'Q1 c b 0 qx', line]);
    within(Math.abs(Math.abs(gain.currents['Q1.c']!) - 50e-3) / 50e-3, 3e-8);
    // V_BE at IC = 10 mA: the base held at 0.65 V gives IC = 10 mA (observed 1.7e-16 relative, rounding); 5e-16.
    const vbe = op(['vbe point', 'VC c 0 5', 'VB b 0 0.65', 'Q1 c b 0 qx', line]);
    within(Math.abs(Math.abs(vbe.currents['Q1.c']!) - 10e-3) / 10e-3, 5e-16);
    // The command's own test circuits: observed 1.1e-8 relative (gmin, as above) and 5.4e-15 V (the base-current search); 3×.
    within(Math.abs(implied(j, 'HFE') - 150) / 150, 3e-8);
    within(Math.abs(implied(j, 'VBE') - 0.65), 1.5e-14);
  });

  test('PNP with HOE: magnitudes, and h_oe comes back', () => {
    const j = modelJson(['PNP', 'HFE=80', 'VBE=0.7', 'HOE=20u', '--name', 'qp']);
    expect(j.line).toMatch(/^\.model qp PNP \(/);
    // Observed 4e-6 relative (h_oe by central difference over ±0.5 V, and VBE moving with VCE); 1.2e-5, 3×.
    within(Math.abs(implied(j, 'HOE') - 20e-6) / 20e-6, 1.2e-5);
    // Observed 2.9e-8 relative (gmin); 8e-8.
    within(Math.abs(implied(j, 'HFE') - 80) / 80, 8e-8);
  });
});

describe('a netlist model resolved, with the datasheet values it implies', () => {
  const dir = freshDir('model');
  writeFiles(dir, {
    'refs.inc': '* greenhouse valve controller reference (invented demo values)\n.param vz=6.2\n.model zref D (VZ={vz} IZT=2m ZZT=15 IZK=0.25m ZZK=100)\n',
    'valve.cir': 'Greenhouse valve controller rail\n.include "refs.inc"\n.model qpass NPN (IS=2e-14 BF=120 VAF=80)\nV1 in 0 12\nR1 in k 2.2k\nD1 0 k zref\n.op\n.end\n',
  });

  test('the Zener in an include, with a .param: as written, resolved, and its values at the conditions written', () => {
    const r = model(['valve.cir', 'zref'], dir);
    expect(r.status).toBe(0);
    expect(r.out).toContain('.model zref D (VZ={vz} IZT=2m ZZT=15 IZK=0.25m ZZK=100)');
    expect(r.out).toMatch(/refs\.inc:3/);
    expect(r.out).toMatch(/VZ .*IZT = 2 mA/);
    const j = modelJson(['valve.cir', 'ZREF'], dir);
    expect(j.source).toBe('netlist');
    // Observed 7.5e-11 V (Newton tolerance); 2e-10 V.
    within(Math.abs(implied(j, 'VZ') - 6.2), 2e-10);
    // ZZK at the knee: the ±1 % difference at 250 µA, observed 3.2e-5 relative; 1e-4, 3×.
    within(Math.abs(implied(j, 'ZZK') - 100) / 100, 1e-4);
    expect(j.implied.find((v) => v.key === 'ZZK')!.conditions['IZK']).toBe(0.25e-3);
  });

  test('a transistor of physical parameters: h_FE and h_oe against the Ebers-Moll transport model with Early effect by hand', () => {
    const j = modelJson(['valve.cir', 'qpass', '--ichfe', '1m', '--vce', '2'], dir);
    const vbe = implied(j, 'VBE');
    expect(j.implied.find((v) => v.key === 'HFE')!.conditions).toEqual({ IC: 1e-3, VCE: 2 });
    // Forward active, base-collector reverse-biased (its current ≈ IS, negligible): IC = BF·IB·(1 + VCB/VAF),
    // so h_FE = BF·(1 + (VCE − VBE)/VAF) (Ebers-Moll transport form with the Early factor, as in Sedra & Smith,
    // Microelectronic Circuits, from memory). Observed 9.1e-8 relative: the gmin conductance (1e-12 S) across the
    // reverse-biased base-collector junction, left out of the hand formula, is about that fraction of IB; 2.5e-7.
    const hfe = 120 * (1 + (2 - vbe) / 80);
    within(Math.abs(implied(j, 'HFE') - hfe) / hfe, 2.5e-7);
    // h_oe with IB held: ∂IC/∂VCE = BF·IB/VAF = (IC/h_FE)·BF/VAF. Observed 9.9e-6 relative (IB·BF held while VBE
    // moves a little, and the central difference); 3e-5, 3×.
    const hoe = (1e-3 / hfe) * (120 / 80);
    within(Math.abs(implied(j, 'HOE') - hoe) / hoe, 3e-5);
    // VBE by hand from IC = IS·exp(VBE/Vt)·(1 + VCB/VAF), solved by fixed point. Observed 5.2e-13 V; 1.5e-12 V.
    let v = 0.6;
    for (let k = 0; k < 50; k++) v = VT * Math.log(1e-3 / (2e-14 * (1 + (2 - v) / 80)));
    within(Math.abs(vbe - v), 1.5e-12);
  });
});

describe('usage errors exit 2 with diagnostics and no stack trace', () => {
  const dir = freshDir('model-usage');
  writeFiles(dir, { 'one.cir': 'Sensor rail\n.model zref D (VZ=5.1)\nV1 a 0 1\nR1 a 0 1k\n.op\n' });
  test.each([
    ['no arguments', [], /expected a model TYPE/],
    ['a type without values', ['D'], /needs datasheet values/],
    ['not a type', ['Z', 'VZ=5'], /'Z' is not a model type/],
    ['a file and no model name', ['one.cir'], /expected a netlist FILE and one MODELNAME/],
    ['an unknown key, with its place', ['D', 'VX=5'], /\(command line\):1:\d+: error: unknown D model parameter/],
    ['a value that is no number', ['D', 'VZ=five'], /\(command line\):1:\d+: error: expected a value for VZ/],
    ['datasheet values that do not resolve', ['D', 'VZ=5.6', 'ZZK=3'], /ZZK is given without IZK/],
    ['an unknown model', ['one.cir', 'zmissing'], /has no top-level \.model zmissing[\s\S]*one of its models: zref/],
    ['a missing file', ['none.cir', 'zref'], /none\.cir/],
    ['--name with a file', ['one.cir', 'zref', '--name', 'x'], /--name is for datasheet values/],
    ['a bad condition', ['D', 'VZ=5.6', '--izt', 'lots'], /--izt lots: expected a positive number/],
    ['too many forward currents', ['D', 'VF=0.7', '--if', '1m,2m,3m,4m'], /at most 3 forward currents/],
    ['an unknown option', ['D', 'VZ=5.6', '--temperature', '3'], /unknown option '--temperature'/],
  ])('%s', (_what, args, message) => {
    const r = model(args, dir);
    expect(r.status).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toMatch(message);
    expect(r.err).not.toMatch(STACK_LINE);
  });

  test('help exits 0 and documents the condition options', () => {
    const r = model(['--help']);
    expect(r.status).toBe(0);
    for (const o of ['--izt', '--if', '--izk', '--ichfe', '--icvbe', '--vce', '--json', '--name']) expect(r.out).toContain(o);
  });
});
