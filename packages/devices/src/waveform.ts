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

/** The four corner offsets of a pulse within its period (Infinity where absent), and the period (Infinity for one pulse). */
function pulseShape(w: Pulse, defaultEdge: number): { c1: number; c2: number; c3: number; per: number } {
  const tr = w.tr ?? defaultEdge;
  const tf = w.tf ?? defaultEdge;
  const pw = w.pw;
  return {
    c1: tr,
    c2: pw === undefined ? Infinity : tr + pw,
    c3: pw === undefined ? Infinity : tr + pw + tf,
    per: periodic(w) ? w.per : Infinity,
  };
}

/** First period index whose corners can lie in (from, ...]. */
function firstPeriod(w: Pulse, from: number, per: number): number {
  return per === Infinity ? 0 : Math.max(0, Math.floor((from - w.td) / per));
}

function pulseBreakpoints(w: Pulse, from: number, to: number, defaultEdge: number, out: number[], max: number): void {
  const { c1, c2, c3, per } = pulseShape(w, defaultEdge);
  let last = -Infinity;
  for (let k = firstPeriod(w, from, per); out.length < max; k++) {
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
 * An upper bound on the number of corners {@link waveformBreakpoints} would
 * push for (from, to], counted without generating them (a pulse: periods in
 * the window × corners per period), so a caller can refuse a waveform with
 * too many corners before allocating anything. Infinity when the count is
 * not a finite number.
 */
export function waveformCornerCount(w: WaveformSpec, from: number, to: number, defaultEdge: number): number {
  const n = ((): number => {
    switch (w.kind) {
      case 'sin':
        return w.td > 0 ? 1 : 0;
      case 'pulse': {
        const { c1, c2, c3, per } = pulseShape(w, defaultEdge);
        const perPeriod = 1 + [c1, c2, c3].filter((c) => c < per).length;
        if (per === Infinity) return perPeriod;
        const periods = Math.floor((to - w.td) / per) - firstPeriod(w, from, per) + 1;
        return Math.max(0, periods) * perPeriod;
      }
      case 'pwl':
      case 'modulated':
        return w.times.length;
      case 'sum': {
        let total = 0;
        for (const part of w.parts) total += waveformCornerCount(part, from, to, defaultEdge);
        return total;
      }
    }
  })();
  return Number.isFinite(n) ? n : Infinity;
}

/**
 * Pushes every corner of the waveform in (from, to] onto `out` in ascending
 * order, in seconds: each pulse corner of each period, each pwl point, and
 * the start td of a delayed sine (where its slope jumps). A pulse train
 * stops once `out` holds `max` entries (default unbounded), so a caller's
 * budget holds even when it did not count first ({@link waveformCornerCount}).
 */
export function waveformBreakpoints(w: WaveformSpec, from: number, to: number, defaultEdge: number, out: number[], max = Infinity): void {
  switch (w.kind) {
    case 'sin':
      if (w.td > 0) pushCorner(out, w.td, from, to, -Infinity);
      return;
    case 'pulse':
      pulseBreakpoints(w, from, to, defaultEdge, out, max);
      return;
    case 'pwl':
    case 'modulated': {
      let last = -Infinity;
      for (const t of w.times) last = pushCorner(out, t, from, to, last);
      return;
    }
    case 'sum': {
      for (const part of w.parts) waveformBreakpoints(part, from, to, defaultEdge, out, max);
      out.sort((a, b) => a - b);
      return;
    }
  }
}
