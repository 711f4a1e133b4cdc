/**
 * When plain Newton from zero fails: gmin stepping and source stepping
 * (Nagel, UCB/ERL M520, 1975; the homotopy survey of Roychowdhury and
 * Melville, IEEE TCAD 25(12), 2006). Two circuits that need them, each with a
 * reverse-biased probe diode whose current reveals the junction conductance
 * left in the final solution: it must be exactly 1e-12 S (engine.md;
 * models.md, "Numerical safeguards").
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist, prepare, type CompiledCircuit, type OperatingPoint } from '@railcheck/core';
import { FINAL_GMIN, newtonSolve, operatingPoint } from '@railcheck/core/internal';
import { kclImbalance } from '../../helpers/laws.js';

const IS = 1e-14;
const RP = 1e6;
/** A diode reverse-biased from `node` through 1 MΩ: its current is IS + gmin·V, 10 pA per 10 V of gmin. */
const probe = (node: string): string => `RP ${node} p ${RP}\nDP 0 p dprobe\n.model dprobe D (IS=${IS})`;

function compile(text: string): CompiledCircuit {
  const prepared = prepare(parseNetlist(text));
  if (!prepared.ok) throw new Error(prepared.errors.map((e) => e.message).join('; '));
  return prepared.compiled;
}

/** Plain Newton from zero, junctions at Vcrit, no stepping: the first thing the engine tries. */
function plainNewtonFromZero(c: CompiledCircuit): boolean {
  const { ctx, x } = c.ws;
  ctx.mode = 'dc';
  ctx.time = 0;
  ctx.sourceScale = 1;
  ctx.gmin = FINAL_GMIN;
  ctx.initJunctions = true;
  x.fill(0);
  return newtonSolve(c).converged;
}

/**
 * The probe's current through RP from a supply `v`: at node p,
 * (v − Vp)/RP = IS·(1 − exp(−Vp/Vt)) + g·Vp with exp(−Vp/Vt) ≈ 0 at volts of
 * reverse bias, so Vp = (v/RP − IS)/(1/RP + g) and I = (v − Vp)/RP.
 */
function probeCurrent(v: number, g: number): number {
  const vp = (v / RP - IS) / (1 / RP + g);
  return (v - vp) / RP;
}

function checkProbe(op: OperatingPoint, supply: number): void {
  const measured = op.currents['RP']!;
  // pA level: the 1e-12 S closed form (observed 0 and 7.1e-21 A; bound 2e-20 A), while without gmin
  // the current would be IS = 0.01 pA.
  expect(Math.abs(measured - probeCurrent(supply, 1e-12))).toBeLessThan(2e-20);
  expect(Math.abs(measured - probeCurrent(supply, 0))).toBeGreaterThan(5e-12);
  const vp = op.nodes['p']!;
  const implied = (measured - IS) / vp;
  // Observed 8.4e-11 and 1.4e-10; bound 3.5e-10.
  expect(Math.abs(implied - 1e-12) / 1e-12).toBeLessThan(3.5e-10);
  const delta = Math.abs(measured - probeCurrent(supply, 1e-12));
  console.log(`stepping, ${op.method}: probe current ${(measured * 1e12).toFixed(4)} pA (Δ ${delta.toExponential(1)} A from the 1e-12 S closed form), implied gmin ${implied.toExponential(4)} S`);
}

test('the final junction conductance is 1e-12 S (engine.md, models.md)', () => {
  expect(FINAL_GMIN).toBe(1e-12);
});

describe('gmin stepping: a model-railway controller Schmitt trigger input', () => {
  const VCC = 12;
  const text = `track detector schmitt\nVCC vcc 0 ${VCC}\nRC1 vcc c1 1k\nRC2 vcc c2 1k\nQ1 c1 in e qs\nQ2 c2 b2 e qs\nRE e 0 100\nR1 c1 b2 10k\nR2 b2 0 10k\nVIN in 0 3\n.model qs NPN (IS=1e-14 BF=100)\n${probe('vcc')}\n.op\n`;

  test('plain Newton from zero does not converge', () => {
    expect(plainNewtonFromZero(compile(text))).toBe(false);
  });

  test('the operating point is found by gmin stepping, satisfies KCL, and keeps 1e-12 S', () => {
    const c = compile(text);
    const op = operatingPoint(c, 27);
    expect(op.method).toBe('gmin-stepping');
    // Terminal currents leave out the junction gmin: 1e-12 S × 12 V = 12 pA per junction (observed
    // 1.2e-11 A, one reverse-biased junction's share; bound 3e-11 A).
    const kcl = kclImbalance(c);
    expect(kcl.worst).toBeLessThan(3e-11);
    // Hand analysis (common practice): with 3 V on Q1's base, Q1 conducts and pulls c1 low; the
    // divider then holds Q2's base below the shared emitter, so Q2 is off and c2 sits at VCC.
    expect(op.nodes['b2']!).toBeLessThan(op.nodes['e']!);
    // Observed 1.1e-8 V (Q2's leakage through RC2); bound 2.7e-8 V.
    expect(VCC - op.nodes['c2']!).toBeLessThan(2.7e-8);
    checkProbe(op, VCC);
  });
});

describe('source stepping: a diode straight across a stiff 40 V source', () => {
  const V = 40;
  const text = `stiff source\nV1 in 0 ${V}\nD1 in 0 dm\n.model dm D (IS=${IS})\n${probe('in')}\n.op\n`;

  test('plain Newton from zero does not converge (limiting lets the junction climb ~0.16 V per step)', () => {
    expect(plainNewtonFromZero(compile(text))).toBe(false);
  });

  test('the operating point is found by source stepping, satisfies KCL at 40 V, and keeps 1e-12 S', () => {
    const c = compile(text);
    const op = operatingPoint(c, 27);
    expect(op.method).toBe('source-stepping');
    expect(op.nodes['in']).toBe(V);
    // The diode's current at 40 V is the device law (far past argument 80, models.md's tangent
    // continuation; test/devices checks it); what the engine must get right is that the source
    // delivers it (Kirchhoff's current law): observed 1.7e-16 of the diode current; bound 4e-16.
    const iD = op.currents['D1']!;
    expect(kclImbalance(c).worst / iD).toBeLessThan(4e-16);
    checkProbe(op, V);
  });
});
