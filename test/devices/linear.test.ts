/**
 * Linear elements against the element stamps of modified nodal analysis as
 * tabulated by Ho, Ruehli and Brennan, "The modified nodal approach to
 * network analysis", IEEE Trans. Circuits Syst. CAS-22(6), 1975, and a small
 * circuit solved with mathjs's LU solver against hand analysis.
 */

import { lusolve } from 'mathjs';
import { describe, expect, it } from 'vitest';
import {
  type Device,
  type SourceSpec,
  createCapacitor,
  createCccs,
  createCcvs,
  createCurrentSource,
  createInductor,
  createResistor,
  createVccs,
  createVcvs,
  createVoltageSource,
  isKind,
} from '@railcheck/devices';
import { DeviceHarness } from '../helpers/device-harness.js';

const dc = (value: number, acMag = 0, acPhaseDeg = 0): SourceSpec => ({ dc: value, acMag, acPhaseDeg, waveform: undefined });

/** The harness matrix as a dense array over every unknown, ground included. */
function full(hz: DeviceHarness): number[][] {
  return Array.from({ length: hz.size }, (_, r) => Array.from({ length: hz.size }, (_, c) => hz.entry(r, c)));
}

/** A size×size zero matrix with the given entries. */
function expected(size: number, entries: ReadonlyArray<readonly [number, number, number]>): number[][] {
  const m = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (const [r, c, v] of entries) (m[r] as number[])[c] = ((m[r] as number[])[c] ?? 0) + v;
  return m;
}

describe('element stamps (Ho, Ruehli and Brennan 1975)', () => {
  it('R: +1/R on the diagonal, −1/R off it', () => {
    const hz = new DeviceHarness(3, [createResistor('R1', 1, 2, 250)]);
    hz.load();
    expect(full(hz)).toEqual(expected(3, [[1, 1, 0.004], [2, 2, 0.004], [1, 2, -0.004], [2, 1, -0.004]]));
    expect(Array.from(hz.rhs)).toEqual([0, 0, 0]);
  });

  it('V: ±1 in the branch column and row, the value in the branch rhs', () => {
    const v = createVoltageSource('V1', 1, 2, dc(9));
    const hz = new DeviceHarness(3, [v]);
    hz.load();
    const b = v.branchIndex;
    expect(b).toBe(3);
    expect(full(hz)).toEqual(expected(4, [[1, b, 1], [2, b, -1], [b, 1, 1], [b, 2, -1]]));
    expect(Array.from(hz.rhs)).toEqual([0, 0, 0, 9]);
  });

  it('I: −I into the rhs of n+, +I into n− (current flows from n+ through the source to n−)', () => {
    const hz = new DeviceHarness(3, [createCurrentSource('I1', 1, 2, dc(0.1))]);
    hz.load();
    expect(full(hz)).toEqual(expected(3, []));
    expect(Array.from(hz.rhs)).toEqual([0, -0.1, 0.1]);
  });

  it('E: output branch incidence, branch row V(p) − V(n) − A·(V(cp) − V(cn)) = 0', () => {
    const e = createVcvs('E1', 1, 2, 3, 4, 7);
    const hz = new DeviceHarness(5, [e]);
    hz.load();
    const b = e.branchIndex;
    expect(full(hz)).toEqual(expected(6, [[1, b, 1], [2, b, -1], [b, 1, 1], [b, 2, -1], [b, 3, -7], [b, 4, 7]]));
  });

  it('G: +gm at (p, cp) and (n, cn), −gm at (p, cn) and (n, cp)', () => {
    const hz = new DeviceHarness(5, [createVccs('G1', 1, 2, 3, 4, 0.02)]);
    hz.load();
    expect(full(hz)).toEqual(expected(5, [[1, 3, 0.02], [1, 4, -0.02], [2, 3, -0.02], [2, 4, 0.02]]));
  });

  it('F: ±β in the controlling branch column of rows p and n', () => {
    const v = createVoltageSource('Vsense', 3, 0, dc(0));
    const hz = new DeviceHarness(4, [v, createCccs('F1', 1, 2, 'vsense', 5)]);
    hz.load();
    const b = v.branchIndex;
    expect(full(hz)).toEqual(expected(5, [[3, b, 1], [0, b, -1], [b, 3, 1], [b, 0, -1], [1, b, 5], [2, b, -5]]));
  });

  it('H: output branch incidence, branch row V(p) − V(n) − r·I(control) = 0', () => {
    const v = createVoltageSource('Vsense', 3, 0, dc(0));
    const h = createCcvs('H1', 1, 2, 'vsense', 50);
    const hz = new DeviceHarness(4, [h, v]);
    hz.load();
    const bc = v.branchIndex;
    const bo = h.branchIndex;
    expect(full(hz)).toEqual(
      expected(6, [[3, bc, 1], [0, bc, -1], [bc, 3, 1], [bc, 0, -1], [1, bo, 1], [2, bo, -1], [bo, 1, 1], [bo, 2, -1], [bo, bc, -50]]),
    );
  });
});

describe('capacitor and inductor', () => {
  it('C: open at DC; backward Euler gives C/h with current −q_prev/h; reactive stamps C', () => {
    // Backward-Euler companion of a capacitor: conductance C/h in parallel with a
    // source C·v_prev/h (Chua and Lin, Computer-Aided Analysis of Electronic Circuits, 1975; from memory).
    const c = createCapacitor('C1', 1, 0, 2e-6, undefined);
    const hz = new DeviceHarness(2, [c], { step: 1e-3 });
    hz.setX({ 1: 3 });
    hz.load();
    expect(full(hz)).toEqual(expected(2, []));
    hz.statePrev.set(hz.state);
    hz.ctx.mode = 'tran';
    hz.setX({ 1: 3.5 });
    hz.load();
    // Observed 0, 0 and 2.2e-19 A; bounds 2·eps·|value| and 5.5e-19 A.
    expect(Math.abs(hz.entry(1, 1) - (2e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 2e-3);
    expect(Math.abs(hz.rhs[1]! - ((2e-6 * 3) / 1e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 6e-3);
    expect(Math.abs(c.report(hz.x, hz.state).currents[0]?.[1]! - ((2e-6 * 0.5) / 1e-3))).toBeLessThan(5.5e-19);
    hz.loadReactive();
    expect(hz.cap(1, 1)).toBe(2e-6);
    expect(c.topology().dcPaths).toEqual([]);
  });

  it('L: short at DC; backward Euler gives −L/h on the branch diagonal and −L·i_prev/h in its rhs (the row divided by max(1, L/h)); reactive −L', () => {
    const l = createInductor('L1', 1, 2, 1e-3, undefined);
    const hz = new DeviceHarness(3, [l], { step: 1e-6 });
    const b = l.branchIndex;
    hz.setX({ 1: 1, 2: 1, [b]: 0.2 });
    hz.load();
    expect(full(hz)).toEqual(expected(4, [[1, b, 1], [2, b, -1], [b, 1, 1], [b, 2, -1]]));
    hz.statePrev.set(hz.state);
    hz.ctx.mode = 'tran';
    hz.setX({ 1: 1, 2: 1, [b]: 0.3 });
    hz.load();
    // The branch row V(p) − V(n) − (L/h)·i = −(L/h)·i_prev, divided through by L/h = 1000 (a row
    // scaling, same solution): the incidence entries become h/L and the diagonal −1.
    const scale = 1 / Math.max(1, 1e-3 / 1e-6);
    // Observed 0, 0, 1.1e-16 and 0; bounds 2·eps·|value| and 3e-16.
    expect(Math.abs(hz.entry(b, 1) - scale)).toBeLessThanOrEqual(2 * Number.EPSILON * scale);
    expect(Math.abs(hz.entry(b, 2) + scale)).toBeLessThanOrEqual(2 * Number.EPSILON * scale);
    expect(hz.entry(1, b)).toBe(1);
    expect(Math.abs(hz.entry(b, b) - (-1e3 * scale))).toBeLessThan(3e-16);
    expect(Math.abs(hz.rhs[b]! - ((-(1e-3 * 0.2) / 1e-6) * scale))).toBeLessThanOrEqual(2 * Number.EPSILON * 0.2);
    hz.loadReactive();
    expect(hz.cap(b, b)).toBe(-1e-3);
    expect(l.topology().voltageDefined).toEqual([[1, 2]]);
  });

  it('seeds the state from ic= (charge C·ic, flux L·ic)', () => {
    const c = createCapacitor('C1', 1, 0, 1e-6, 2.5);
    const l = createInductor('L1', 1, 0, 1e-3, 0.1);
    const none = createCapacitor('C2', 1, 0, 1e-6, undefined);
    const hz = new DeviceHarness(2, [c, l, none]);
    const st = new Float64Array(hz.stateSize);
    expect(c.seedInitialCondition(st)).toBe(true);
    expect(l.seedInitialCondition(st)).toBe(true);
    expect(none.seedInitialCondition(st)).toBe(false);
    const seeded = Array.from(st).filter((v) => v !== 0).sort((a, b) => a - b);
    expect(seeded.length).toBe(2);
    // Observed 4.2e-22 C and 0; bounds 1.1e-21 C and 2·eps·|value|.
    expect(Math.abs(seeded[0]! - (2.5e-6))).toBeLessThan(1.1e-21);
    expect(Math.abs(seeded[1]! - (1e-4))).toBeLessThanOrEqual(2 * Number.EPSILON * 1e-4);
    expect(c.initialCondition).toBe(2.5);
  });
});

describe('AC excitation', () => {
  it('V: mag·(cos φ, sin φ) in the branch row; I: on the node rows with the rhs signs', () => {
    const v = createVoltageSource('V1', 1, 0, dc(0, 2, 30));
    const i = createCurrentSource('I1', 1, 2, dc(0, 1, -90));
    const hz = new DeviceHarness(3, [v, i]);
    hz.loadReactive();
    const b = v.branchIndex;
    // Observed 2.2e-16, 1.1e-16, 0, 0 and 6.1e-17; bounds 5.5e-16, 3e-16, 2·eps, 2·eps, 1.5e-16.
    expect(Math.abs(hz.excitationRe[b]! - (Math.sqrt(3)))).toBeLessThan(5.5e-16);
    expect(Math.abs(hz.excitationIm[b]! - 1)).toBeLessThan(3e-16);
    expect(Math.abs(hz.excitationIm[1]! - 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(hz.excitationIm[2]! + 1)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(Math.abs(hz.excitationRe[1]!)).toBeLessThan(1.5e-16);
  });
});

describe('a small circuit solved by LU (mathjs) against hand analysis', () => {
  // V1 12 V feeds a 1k/2k divider (node 2 = 8 V, I(V1) = −4 mA by the passive
  // convention). E1 = 0.5·V(2) → 4 V into 1k; H1 = 1000·I(V1) → −4 V;
  // F1 (0 → 5) = 2·I(V1) = −8 mA, so 8 mA leaves node 5 through 1k → −8 V;
  // G1 (0 → 6) = 1 mS·V(2) = 8 mA into node 6 through 1k → +8 V;
  // I1 (0 → 7) = 2 mA into node 7 through 1k → +2 V.
  const devices: Device[] = [
    createVoltageSource('V1', 1, 0, dc(12)),
    createResistor('R1', 1, 2, 1e3),
    createResistor('R2', 2, 0, 2e3),
    createVcvs('E1', 3, 0, 2, 0, 0.5),
    createResistor('R3', 3, 0, 1e3),
    createCcvs('H1', 4, 0, 'v1', 1000),
    createResistor('R4', 4, 0, 1e3),
    createCccs('F1', 0, 5, 'v1', 2),
    createResistor('R5', 5, 0, 1e3),
    createVccs('G1', 0, 6, 2, 0, 1e-3),
    createResistor('R6', 6, 0, 1e3),
    createCurrentSource('I1', 0, 7, dc(2e-3)),
    createResistor('R7', 7, 0, 1e3),
  ];
  const hz = new DeviceHarness(8, devices);
  hz.load();
  const sol = (lusolve(hz.reducedMatrix(), hz.reducedRhs()) as number[][]).map((r) => r[0] ?? NaN);
  hz.x.set([0, ...sol]);

  it('node voltages', () => {
    const want = [12, 8, 4, -4, -8, 8, 2];
    // Observed 0 for every value (mathjs solves the integer-valued system exactly); bounds 2·eps·|value|.
    want.forEach((v, k) => expect(Math.abs(sol[k]! - v)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(v)));
  });

  it('branch currents and reports follow the passive sign convention', () => {
    const v1 = devices[0];
    const e1 = devices[3];
    if (!v1 || !e1 || !isKind(v1, 'vsource') || !isKind(e1, 'vcvs')) throw new Error('device order');
    // Observed 0 (exact); bounds 2·eps·|value|.
    expect(Math.abs(hz.x[v1.branchIndex]! - (-4e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 4e-3);
    expect(Math.abs(hz.x[e1.branchIndex]! - (-4e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 4e-3);
    const rep = v1.report(hz.x, hz.state);
    expect(Math.abs(rep.currents[0]?.[1]! - (-4e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 4e-3);
    expect(Math.abs(rep.power - (-48e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 48e-3);
    const r1 = devices[1]?.report(hz.x, hz.state);
    expect(Math.abs(r1!.power - (16e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 16e-3);
    const f1 = devices[7]?.report(hz.x, hz.state);
    expect(Math.abs(f1?.currents[0]?.[1]! - (-8e-3))).toBeLessThanOrEqual(2 * Number.EPSILON * 8e-3);
    // Power balance: everything absorbed sums to zero.
    const total = devices.reduce((acc, d) => acc + d.report(hz.x, hz.state).power, 0);
    // Observed 0 W; bound 2·eps·48 mW.
    expect(Math.abs(total)).toBeLessThanOrEqual(2 * Number.EPSILON * 48e-3);
  });
});
