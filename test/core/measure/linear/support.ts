/**
 * Shared helpers for the figure tests on linear stages: the fast-check
 * seed (printed once per file so a failure replays with FC_SEED=...),
 * running netlist text to its figure report, and the closed forms the
 * figures are checked against. Every closed form here is derived from
 * circuit theory, not from the engine.
 */
import { expect } from 'vitest';
import fc from 'fast-check';
import { lambertW0Log } from 'lambert-w-function';
import { formatDiagnostic, runNetlist, type Diagnostic, type FigureReport } from '@railcheck/core';

/** The seed for every property in a file; logged once per file. */
export function seedFor(file: string): number {
  const seed = Number(process.env['FC_SEED'] ?? Date.now() % 2 ** 31);
  console.log(`[fast-check] ${file}: seed ${seed} (replay with FC_SEED=${seed})`);
  return seed;
}

/** A number as netlist text that reads back to the same double (shortest round-trip form). */
export const num = (x: number): string => String(x);

/** Log-uniform double in [lo, hi] (component values spread over decades). */
export const logUniform = (lo: number, hi: number): fc.Arbitrary<number> =>
  fc.double({ min: Math.log(lo), max: Math.log(hi), noNaN: true }).map(Math.exp);

/** Runs netlist lines that must succeed; returns the figure report and all warnings. */
export function figuresOf(lines: readonly string[]): { figures: FigureReport; warnings: readonly Diagnostic[] } {
  const r = runNetlist([...lines, '.end', ''].join('\n'));
  if (!r.ok) throw new Error(`expected the netlist to run:\n${r.errors.map(formatDiagnostic).join('\n')}`);
  const figures = r.report.figures;
  if (!figures) throw new Error('the netlist produced no figure report');
  return { figures, warnings: r.report.warnings };
}

/** Runs netlist lines that must fail; returns the errors. */
export function errorsOf(lines: readonly string[]): readonly Diagnostic[] {
  const r = runNetlist([...lines, '.end', ''].join('\n'));
  expect(r.ok, 'expected the run to fail').toBe(false);
  return r.ok ? [] : r.errors;
}

/** A figure value that must be present. */
export function value(f: FigureReport, name: string): number {
  const v = f.values[name];
  if (v === undefined) throw new Error(`no figure value ${name}; have ${Object.keys(f.values).join(', ')}`);
  return v;
}

/** Relative error |a − b| / |b|. */
export const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

/** Parallel resistance a∥b = ab/(a + b) (Ω); Infinity is an open circuit. */
export const par = (a: number, b: number): number => (a === Infinity ? b : b === Infinity ? a : (a * b) / (a + b));

/**
 * Thévenin equivalent of the divider Vin–R1–out–R2–ground seen from `out`
 * (Thévenin's theorem and the voltage divider, any circuit-theory text):
 * Vth = Vin·R2/(R1 + R2), Rth = R1∥R2.
 */
export function dividerThevenin(vin: number, r1: number, r2: number): { vth: number; rth: number } {
  return { vth: (vin * r2) / (r1 + r2), rth: par(r1, r2) };
}

/** Output of the divider with a current `i` (A) drawn from `out`: Vth − i·Rth (V). */
export function dividerWithCurrent(vin: number, r1: number, r2: number, i: number): number {
  const { vth, rth } = dividerThevenin(vin, r1, r2);
  return vth - i * rth;
}

/** Output of the divider with a resistor `rl` (Ω, Infinity = open) from `out` to ground: Vth·RL/(Rth + RL) (V). */
export function dividerWithResistor(vin: number, r1: number, r2: number, rl: number): number {
  const { vth, rth } = dividerThevenin(vin, r1, r2);
  return rl === Infinity ? vth : (vth * rl) / (rth + rl);
}

/**
 * Exact response of the first-order system τ·ẋ = G·u(t) − x to a
 * piecewise-linear input u (corners `times`, `values`, held after the last),
 * from x(times[0]) = x0. On a segment where u = u0 + q·s (s = t − ts) the
 * solution is the particular ramp G·(u0 + q·s) − G·q·τ plus the decaying
 * homogeneous term (any text on linear ODEs; the ramp response of a
 * first-order lag). Returns x at `t` and the minimum of x over [a, b],
 * the minimum found at segment ends and at the stationary point ẋ = 0.
 */
export function firstOrderPwl(times: readonly number[], values: readonly number[], gain: number, tau: number, x0: number) {
  interface Seg { ts: number; te: number; u0: number; q: number; xs: number }
  const segs: Seg[] = [];
  let x = x0;
  const at = (s: Seg, t: number): number => {
    const dt = t - s.ts;
    const xp = gain * (s.u0 + s.q * dt) - gain * s.q * tau;
    return xp + (s.xs - (gain * s.u0 - gain * s.q * tau)) * Math.exp(-dt / tau);
  };
  for (let k = 0; k < times.length; k++) {
    const ts = times[k]!;
    const te = k + 1 < times.length ? times[k + 1]! : Infinity;
    const u0 = values[k]!;
    const q = te === Infinity ? 0 : (values[k + 1]! - u0) / (te - ts);
    const seg = { ts, te, u0, q, xs: x };
    segs.push(seg);
    if (te !== Infinity) x = at(seg, te);
  }
  const segOf = (t: number): Seg => segs.find((s) => t >= s.ts && t <= s.te) ?? segs[0]!;
  const xAt = (t: number): number => at(segOf(t), t);
  const minOver = (a: number, b: number): number => {
    let m = Math.min(xAt(a), xAt(b));
    for (const s of segs) {
      const lo = Math.max(a, s.ts);
      const hi = Math.min(b, s.te);
      if (lo > hi) continue;
      m = Math.min(m, at(s, lo), at(s, hi));
      // ẋ = G·q − (xs − G·u0 + G·q·τ)·e^(−s/τ)/τ = 0
      const c = s.xs - gain * s.u0 + gain * s.q * tau;
      const ratio = c === 0 ? 0 : (gain * s.q * tau) / c;
      if (ratio > 0 && ratio <= 1) {
        const t = s.ts - tau * Math.log(ratio);
        if (t >= lo && t <= hi) m = Math.min(m, at(s, t));
      }
    }
    return m;
  };
  return { xAt, minOver };
}

/** Thermal voltage k·T/q at 27 °C (300.15 K), V; CODATA 2018 exact k and q (models.md states the same constants). */
export const VT_27 = (1.380649e-23 * 300.15) / 1.602176634e-19;

/**
 * DC current (A) of a Shockley diode (IS, n·Vt) fed from `vth` through
 * `rth`: the explicit Lambert-W solution of Banwell and Jayakumar,
 * Electronics Letters 36(4), 2000, I = (nVt/R)·W((IS·R/nVt)·e^((V + IS·R)/nVt)) − IS,
 * with W from the lambert-w-function package (logarithmic form, no overflow).
 */
export function seriesDiodeCurrent(vth: number, rth: number, is: number, nVt: number): number {
  return (nVt / rth) * lambertW0Log(Math.log((is * rth) / nVt) + (vth + is * rth) / nVt) - is;
}
