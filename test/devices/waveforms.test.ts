/**
 * Source waveforms against the netlist.md definitions, written out again
 * here in a different form (the pulse as a piecewise-linear list of corners),
 * and their breakpoints.
 */

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type SourceSpec, type WaveformSpec, createCurrentSource, createVoltageSource } from '@railcheck/devices';
import { DeviceHarness, fcSeed } from '../helpers/device-harness.js';

const seed = fcSeed('devices/waveforms');
const runs = { seed, numRuns: 400 };

type Sin = Extract<WaveformSpec, { kind: 'sin' }>;
type Pulse = Extract<WaveformSpec, { kind: 'pulse' }>;
type Pwl = Extract<WaveformSpec, { kind: 'pwl' }>;

const spec = (waveform: WaveformSpec | undefined, dc = 0): SourceSpec => ({ dc, acMag: 0, acPhaseDeg: 0, waveform });
const source = (w: WaveformSpec | undefined, dc = 0) => createVoltageSource('V1', 1, 0, spec(w, dc));

/** netlist.md: vo + va·sin(2π·f·(t−td) + φ)·exp(−θ·(t−td)), and vo + va·sin(φ) before td. */
function refSin(w: Sin, t: number): number {
  const phi = (w.phaseDeg / 180) * Math.PI;
  if (t < w.td) return w.vo + w.va * Math.sin(phi);
  return w.vo + w.va * Math.exp(-w.theta * (t - w.td)) * Math.sin(2 * Math.PI * w.freq * (t - w.td) + phi);
}

/** Linear interpolation through corner points (t ascending), held outside. */
function interp(pts: ReadonlyArray<readonly [number, number]>, t: number): number {
  const first = pts[0];
  const last = pts[pts.length - 1];
  if (first === undefined || last === undefined) return NaN;
  if (t <= first[0]) return first[1];
  for (let k = 1; k < pts.length; k++) {
    const [t1, v1] = pts[k] ?? [NaN, NaN];
    const [t0, v0] = pts[k - 1] ?? [NaN, NaN];
    if (t <= t1) return v0 + ((v1 - v0) * (t - t0)) / (t1 - t0);
  }
  return last[1];
}

/** The trapezoid as corner points over one period, evaluated at the time within the period. */
function refPulse(w: Pulse & { tr: number; tf: number; pw: number; per: number }, t: number): number {
  if (t <= w.td) return w.v1;
  const u = (t - w.td) % w.per;
  const pts: Array<[number, number]> = [
    [0, w.v1],
    [w.tr, w.v2],
    [w.tr + w.pw, w.v2],
    [w.tr + w.pw + w.tf, w.v1],
  ];
  return interp(pts, u);
}

const pos = (lo: number, hi: number) => fc.double({ min: lo, max: hi, noNaN: true });

const sinArb = fc.record({
  kind: fc.constant('sin' as const),
  vo: pos(-10, 10),
  va: pos(-5, 5),
  freq: pos(1, 1e5),
  td: pos(0, 1e-3),
  theta: pos(0, 1e3),
  phaseDeg: pos(-360, 360),
});

const pulseArb = fc
  .record({ v1: pos(-5, 5), v2: pos(-5, 5), td: pos(0, 1e-3), tr: pos(1e-9, 1e-4), tf: pos(1e-9, 1e-4), pw: pos(1e-6, 1e-3), slack: pos(1e-6, 1e-3) })
  .map(({ slack, ...p }) => ({ kind: 'pulse' as const, ...p, per: p.tr + p.pw + p.tf + slack }));

const pwlArb = fc
  .array(fc.tuple(pos(1e-7, 1e-3), pos(-10, 10)), { minLength: 1, maxLength: 12 })
  .map((steps): Pwl => {
    let t = 0;
    const times: number[] = [];
    const values: number[] = [];
    for (const [dt, v] of steps) {
      t += dt;
      times.push(t);
      values.push(v);
    }
    return { kind: 'pwl', times, values };
  });

describe('sin', () => {
  it('matches the netlist.md formula at random times, before and after td', () => {
    fc.assert(
      fc.property(sinArb, pos(0, 5e-3), (w, t) => {
        const got = source(w).valueAt(t);
        // Worst observed 7.4e-16 of the scale over FC_SEED 20261201, 1–13 and 424242; bound 2e-15.
        return Math.abs(got - refSin(w, t)) <= 2e-15 * (Math.abs(w.vo) + Math.abs(w.va) + 1);
      }),
      runs,
    );
  });
});

describe('pulse', () => {
  it('matches the corner-list trapezoid at random times over several periods', () => {
    fc.assert(
      fc.property(pulseArb, pos(0, 1e-2), (w, t) => {
        const got = source(w).valueAt(t);
        // Worst observed 1.2e-13 of the scale over FC_SEED 20261201, 1–13 and 424242 (the ramps evaluated in another order);
        // plus the folding of t into one period, which rounds the time by about eps·t and so the value by eps·t times the
        // steepest ramp's slope: seed 875152052 (3300 periods of 3 µs, a 0.11 µs edge) showed 4.7e-12 of the scale, 5.8 of
        // that term. Bound 3e-13 of the scale plus 16·eps·t·slope.
        const slope = Math.abs(w.v2 - w.v1) / Math.max(Math.min(w.tr ?? Infinity, w.tf ?? Infinity), 1e-300);
        const folding = Number.isFinite(slope) ? 16 * Number.EPSILON * t * slope : 0;
        return Math.abs(got - refPulse(w, t)) <= 3e-13 * (Math.abs(w.v1) + Math.abs(w.v2) + 1) + folding;
      }),
      runs,
    );
  });

  it('holds v2 for ever when pw is missing, and uses defaultEdge for a missing tr/tf', () => {
    const w: Pulse = { kind: 'pulse', v1: 0, v2: 5, td: 1e-3, tr: undefined, tf: undefined, pw: undefined, per: undefined };
    const s = source(w);
    s.defaultEdge = 1e-4;
    expect(s.valueAt(1e-3)).toBe(0);
    // Observed 4.4e-15 V; bound 1.1e-14 V.
    expect(Math.abs(s.valueAt(1.05e-3) - 2.5)).toBeLessThan(1.1e-14);
    expect(s.valueAt(1)).toBe(5);
    const out: number[] = [];
    s.breakpoints(0, 1, out);
    expect(out).toEqual([1e-3, 1e-3 + 1e-4]);
  });

  it('lists every corner of every period in (from, to], computed by hand', () => {
    const w: Pulse = { kind: 'pulse', v1: 0, v2: 1, td: 1e-3, tr: 1e-6, tf: 2e-6, pw: 5e-4, per: 1e-3 };
    const out: number[] = [];
    source(w).breakpoints(1.2e-3, 3e-3, out);
    const hand = [1.501e-3, 1.503e-3, 2e-3, 2.001e-3, 2.501e-3, 2.503e-3, 3e-3];
    expect(out.length).toBe(hand.length);
    // Observed 2.2e-19 s; bound 5.5e-19 s.
    hand.forEach((t, k) => expect(Math.abs(out[k]! - t)).toBeLessThan(5.5e-19));
  });

  it('is linear between consecutive breakpoints (the defining property of a corner list)', () => {
    fc.assert(
      fc.property(pulseArb, pos(0, 3e-3), (w, from) => {
        const s = source(w);
        const out: number[] = [];
        s.breakpoints(from, from + 4 * w.per, out);
        const ascending = out.every((t, k) => t > from && t <= from + 4 * w.per && (k === 0 || t > (out[k - 1] ?? Infinity)));
        let linear = true;
        for (let k = 1; k < out.length; k++) {
          const t0 = out[k - 1] ?? 0;
          const t1 = out[k] ?? 0;
          const mid = s.valueAt((t0 + t1) / 2);
          const avg = (s.valueAt(t0 + 1e-3 * (t1 - t0)) + s.valueAt(t1 - 1e-3 * (t1 - t0))) / 2;
          linear &&= Math.abs(mid - avg) <= 1e-6 * (Math.abs(w.v1) + Math.abs(w.v2) + 1);
        }
        return ascending && linear;
      }),
      runs,
    );
  });
});

describe('pwl', () => {
  it('interpolates linearly, holds the first value before and the last after (netlist.md)', () => {
    fc.assert(
      fc.property(pwlArb, pos(0, 2e-2), (w, t) => {
        const pts = w.times.map((ti, k) => [ti, w.values[k] ?? NaN] as const);
        // Observed 0 over FC_SEED 20261201, 1–13 and 424242 (the same interpolation); bound 2·eps·10 (values within ±10).
        return Math.abs(source(w).valueAt(t) - interp(pts, t)) <= 2 * Number.EPSILON * 10;
      }),
      runs,
    );
  });

  it('has a breakpoint at every point in (from, to], and keeps other sources’ entries', () => {
    const w: Pwl = { kind: 'pwl', times: [0, 1e-3, 2e-3, 5e-3], values: [0, 1, 1, 0] };
    const out = [7];
    source(w).breakpoints(0, 2e-3, out);
    expect(out).toEqual([7, 1e-3, 2e-3]);
  });
});

describe('sources in load', () => {
  it('use dc·sourceScale at DC and waveform(time)·sourceScale in transient', () => {
    const w: Pwl = { kind: 'pwl', times: [0, 1], values: [0, 10] };
    const v = createVoltageSource('V1', 1, 0, spec(w, 3));
    const i = createCurrentSource('I1', 1, 0, spec(w, 3));
    const hz = new DeviceHarness(2, [v, i]);
    hz.ctx.sourceScale = 0.5;
    hz.load();
    const br = v.branchIndex;
    expect(hz.rhs[br]).toBe(1.5);
    expect(hz.rhs[1]).toBe(-1.5);
    hz.ctx.mode = 'tran';
    hz.ctx.time = 0.25;
    hz.load();
    // Observed 0; bounds 2·eps·|value|.
    expect(Math.abs(hz.rhs[br]! - 1.25)).toBeLessThanOrEqual(2 * Number.EPSILON * 1.25);
    expect(Math.abs(hz.rhs[1]! + 1.25)).toBeLessThanOrEqual(2 * Number.EPSILON * 1.25);
    expect(Math.abs(i.report(hz.x, hz.state).currents[0]?.[1]! - 1.25)).toBeLessThanOrEqual(2 * Number.EPSILON * 1.25);
  });

  it('without a waveform, valueAt is the DC value, and a sweep can change it', () => {
    const v = source(undefined, 4);
    expect(v.valueAt(1)).toBe(4);
    v.dc = 6;
    expect(v.valueAt(1)).toBe(6);
    const out: number[] = [];
    v.breakpoints(0, 1, out);
    expect(out).toEqual([]);
  });
});
