/**
 * Source waveforms of netlist.md: damped sine, trapezoidal pulse train and
 * piecewise-linear. Corners are left-continuous: at the exact instant of a
 * corner the waveform still has the value it approached from before.
 */

import type { WaveformSpec } from './sources.js';

type Sin = Extract<WaveformSpec, { kind: 'sin' }>;
type Pulse = Extract<WaveformSpec, { kind: 'pulse' }>;
type Pwl = Extract<WaveformSpec, { kind: 'pwl' }>;

const DEG = Math.PI / 180;

/**
 * vo + va·sin(2π·freq·(t−td) + phase°)·exp(−theta·(t−td)) for t ≥ td, and
 * vo + va·sin(phase°) before td (netlist.md). Volts or amps; t in seconds.
 */
export function sinValue(w: Sin, t: number): number {
  const phase = w.phaseDeg * DEG;
  if (t < w.td) return w.vo + w.va * Math.sin(phase);
  const dt = t - w.td;
  return w.vo + w.va * Math.sin(2 * Math.PI * w.freq * dt + phase) * Math.exp(-w.theta * dt);
}

/** True when the pulse repeats: a period is given and positive. */
function periodic(w: Pulse): w is Pulse & { per: number } {
  return w.per !== undefined && w.per > 0 && w.pw !== undefined;
}

/**
 * Trapezoidal pulse: v1 until td, a linear rise over tr to v2, v2 for pw, a
 * linear fall over tf to v1, then v1 until the period per ends and the shape
 * repeats. pw undefined holds v2 for ever; per undefined gives one pulse.
 * Volts or amps; t and `defaultEdge` (used for undefined tr/tf) in seconds.
 */
export function pulseValue(w: Pulse, t: number, defaultEdge: number): number {
  if (t <= w.td) return w.v1;
  const tr = w.tr ?? defaultEdge;
  const tf = w.tf ?? defaultEdge;
  let u = t - w.td;
  if (periodic(w)) {
    u -= Math.floor(u / w.per) * w.per;
    if (u === 0) return w.v1;
  }
  if (u <= tr) return tr > 0 ? w.v1 + ((w.v2 - w.v1) * u) / tr : w.v1;
  if (w.pw === undefined) return w.v2;
  const top = tr + w.pw;
  if (u <= top) return w.v2;
  if (u <= top + tf) return tf > 0 ? w.v2 + ((w.v1 - w.v2) * (u - top)) / tf : w.v2;
  return w.v1;
}

/** Piecewise linear through (times[i], values[i]), held at the end values outside the points. */
export function pwlValue(w: Pwl, t: number): number {
  return piecewiseLinear(w.times, w.values, t);
}

function piecewiseLinear(ts: readonly number[], vs: readonly number[], t: number): number {
  const n = ts.length;
  if (n === 0) return 0;
  if (t <= (ts[0] as number)) return vs[0] as number;
  if (t >= (ts[n - 1] as number)) return vs[n - 1] as number;
  // Binary search for ts[lo] < t ≤ ts[hi]: no allocation in the transient loop.
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((ts[mid] as number) < t) lo = mid;
    else hi = mid;
  }
  const t0 = ts[lo] as number;
  const t1 = ts[hi] as number;
  const v0 = vs[lo] as number;
  const v1 = vs[hi] as number;
  return v0 + ((v1 - v0) * (t - t0)) / (t1 - t0);
}

/** Value of any waveform at time t (seconds); `defaultEdge` is the pulse's fallback edge time. */
export function waveformValue(w: WaveformSpec, t: number, defaultEdge: number): number {
  switch (w.kind) {
    case 'sin':
      return sinValue(w, t);
    case 'pulse':
      return pulseValue(w, t, defaultEdge);
    case 'pwl':
      return pwlValue(w, t);
    case 'sum': {
      let v = 0;
      for (let k = 0; k < w.parts.length; k++) v += waveformValue(w.parts[k]!, t, defaultEdge);
      return v;
    }
    case 'modulated': {
      const env = piecewiseLinear(w.times, w.amplitudes, t);
      return w.vo + env * Math.sin(2 * Math.PI * w.freq * t + w.phaseDeg * DEG);
    }
  }
}

/** Pushes t when it lies in (from, to] and beyond `last` (this call's previous corner); returns the new last. */
function pushCorner(out: number[], t: number, from: number, to: number, last: number): number {
  if (t > from && t <= to && t > last) {
    out.push(t);
    return t;
  }
  return last;
}

function pulseBreakpoints(w: Pulse, from: number, to: number, defaultEdge: number, out: number[]): void {
  const tr = w.tr ?? defaultEdge;
  const tf = w.tf ?? defaultEdge;
  const pw = w.pw;
  const c1 = tr;
  const c2 = pw === undefined ? Infinity : tr + pw;
  const c3 = pw === undefined ? Infinity : tr + pw + tf;
  const per = periodic(w) ? w.per : Infinity;
  const kStart = per === Infinity ? 0 : Math.max(0, Math.floor((from - w.td) / per));
  let last = -Infinity;
  for (let k = kStart; ; k++) {
    const base = w.td + (per === Infinity ? 0 : k * per);
    if (base > to) break;
    last = pushCorner(out, base, from, to, last);
    if (c1 < per) last = pushCorner(out, base + c1, from, to, last);
    if (c2 < per) last = pushCorner(out, base + c2, from, to, last);
    if (c3 < per) last = pushCorner(out, base + c3, from, to, last);
    if (per === Infinity) break;
  }
}

/**
 * Pushes every corner of the waveform in (from, to] onto `out` in ascending
 * order, in seconds: each pulse corner of each period, each pwl point, and
 * the start td of a delayed sine (where its slope jumps).
 */
export function waveformBreakpoints(w: WaveformSpec, from: number, to: number, defaultEdge: number, out: number[]): void {
  switch (w.kind) {
    case 'sin':
      if (w.td > 0) pushCorner(out, w.td, from, to, -Infinity);
      return;
    case 'pulse':
      pulseBreakpoints(w, from, to, defaultEdge, out);
      return;
    case 'pwl':
    case 'modulated': {
      let last = -Infinity;
      for (const t of w.times) last = pushCorner(out, t, from, to, last);
      return;
    }
    case 'sum': {
      for (const part of w.parts) waveformBreakpoints(part, from, to, defaultEdge, out);
      out.sort((a, b) => a - b);
      return;
    }
  }
}
