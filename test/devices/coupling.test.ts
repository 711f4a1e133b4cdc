/**
 * The K element's stamps on their own (harness: backward Euler, fixed step),
 * against the coupled-inductor equations v1 = L1·di1/dt + M·di2/dt,
 * v2 = M·di1/dt + L2·di2/dt, M = k·√(L1·L2) (Alexander and Sadiku,
 * Fundamentals of Electric Circuits, ch. 13, from memory), discretised by
 * backward Euler as in any numerical-methods text: di/dt ≈ Δi/h.
 */
import { describe, expect, test } from 'vitest';
import { createCoupling, createInductor } from '@railcheck/devices';
import { DeviceHarness } from '../helpers/device-harness.js';

const [L1, L2, k, h] = [1e-3, 4e-3, 0.5, 1e-6];
const M = k * Math.sqrt(L1 * L2);

function pair(): { hz: DeviceHarness; b1: number; b2: number } {
  const l1 = createInductor('L1', 1, 0, L1, undefined);
  const l2 = createInductor('L2', 2, 0, L2, undefined);
  const hz = new DeviceHarness(3, [l1, l2, createCoupling('K1', ['l1', 'l2'], k)], { step: h });
  return { hz, b1: l1.branchIndex, b2: l2.branchIndex };
}

describe('K stamps', () => {
  test('transient: each branch row is v − (L·Δi + M·Δi_other)/h, scaled as its inductor scales it', () => {
    const { hz, b1, b2 } = pair();
    hz.ctx.mode = 'tran';
    hz.setX({ [b1]: 0.1, [b2]: -0.05 });
    hz.load();
    hz.statePrev.set(hz.state);
    const [v1, v2, i1, i2] = [2.0, -1.0, 0.1003, -0.0498];
    hz.setX({ 1: v1, 2: v2, [b1]: i1, [b2]: i2 });
    hz.load();
    const r = hz.residual();
    const [d1, d2] = [i1 - 0.1, i2 + 0.05];
    // The rows are divided through by max(1, L/h) (docs/engine.md), a factor that changes no solution.
    const s1 = 1 / Math.max(1, L1 / h);
    const s2 = 1 / Math.max(1, L2 / h);
    const want1 = v1 - (L1 * d1 + M * d2) / h;
    const want2 = v2 - (M * d1 + L2 * d2) / h;
    expect(r[b1]! / s1).toBeCloseTo(want1, 9);
    expect(r[b2]! / s2).toBeCloseTo(want2, 9);
    // The mutual entries: −(M/h)·scale in (b1, b2) and (b2, b1); M12 = M21 before scaling.
    expect(hz.entry(b1, b2) / s1).toBeCloseTo(-M / h, 6);
    expect(hz.entry(b2, b1) / s2).toBeCloseTo(-M / h, 6);
  });

  test('DC: no stamp at all (the inductors are shorts)', () => {
    const { hz, b1, b2 } = pair();
    hz.setX({ [b1]: 0.3, [b2]: 0.2 });
    hz.load();
    expect(hz.entry(b1, b2)).toBe(0);
    expect(hz.entry(b2, b1)).toBe(0);
  });

  test('small signal: −M at both off-diagonal branch positions (V1 − jωL1·I1 − jωM·I2 = 0)', () => {
    const { hz, b1, b2 } = pair();
    hz.loadReactive();
    expect(hz.cap(b1, b2)).toBeCloseTo(-M, 15);
    expect(hz.cap(b2, b1)).toBeCloseTo(-M, 15);
    expect(hz.cap(b1, b1)).toBeCloseTo(-L1, 15);
  });
});
