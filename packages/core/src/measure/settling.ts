/**
 * Watching a transient settle (figures.md, startup and step): whether the
 * circuit's whole state has come close to a known steady state (so that the
 * output stays where it is), and when the output last came into a band and
 * stayed there. Both allocate only when they are made, never per point.
 */
import type { CompiledCircuit } from '../engine/compile.js';

/** Share of its largest magnitude in the run within which a branch current must lie of its steady value (common practice, no source). */
export const CURRENT_SETTLE_RATIO = 0.01;
/** Least current tolerance, A: below it a branch current counts as settled. */
export const CURRENT_SETTLE_FLOOR = 1e-6;
/** Share of the band within which every node voltage must lie of its steady value before a run ends as settled. */
export const VOLTAGE_SETTLE_SHARE = 0.1;

/** Where a run that did not settle stood: the unknown furthest from its steady value, by how much, in its unit. */
export interface SettleDistance {
  readonly name: string;
  readonly distance: number;
  readonly unit: 'V' | 'A';
}

/**
 * Closeness of the circuit's state to a steady state `target` (values by
 * unknown index): every node voltage (and device-internal node) within
 * `voltTol` V of its steady value, every branch current (inductors,
 * voltage sources) within {@link CURRENT_SETTLE_RATIO} of the largest
 * magnitude it has had in the run, and at least {@link CURRENT_SETTLE_FLOOR}.
 */
export class SteadyCheck {
  private readonly peak: Float64Array;
  private readonly branch: Uint8Array;
  private worst = -1;
  private worstDistance = 0;

  constructor(private readonly c: CompiledCircuit, private readonly target: Float64Array, private readonly voltTol: number) {
    this.peak = new Float64Array(target.length);
    this.branch = Uint8Array.from(c.unknowns, (u) => (u.kind === 'branch' ? 1 : 0));
  }

  /** Takes a point's branch currents into their largest magnitudes. */
  observe(x: Float64Array): void {
    for (let k = 1; k < this.peak.length; k++) if (this.branch[k] === 1) this.peak[k] = Math.max(this.peak[k]!, Math.abs(x[k]!));
  }

  /** True when `x` is within tolerance of the steady state; otherwise remembers the unknown furthest from it (against its tolerance). */
  near(x: Float64Array): boolean {
    let worstRatio = 0;
    for (let k = 1; k < this.target.length; k++) {
      const d = Math.abs(x[k]! - this.target[k]!);
      const tol = this.branch[k] === 1 ? Math.max(CURRENT_SETTLE_RATIO * this.peak[k]!, CURRENT_SETTLE_FLOOR) : this.voltTol;
      if (d / tol > worstRatio) {
        worstRatio = d / tol;
        this.worst = k;
        this.worstDistance = d;
      }
    }
    return worstRatio <= 1;
  }

  /** The unknown furthest from the steady state at the last check that failed. */
  furthest(): SettleDistance {
    const u = this.c.unknowns[this.worst];
    return { name: u?.name ?? 'the state', distance: this.worstDistance, unit: u?.kind === 'branch' ? 'A' : 'V' };
  }
}

/**
 * When a signal last came into the band [low, high] and stayed: fed points
 * in time order, it keeps the time of the last entry (the start time when
 * the signal starts inside). The crossing between the last point outside
 * and the first inside is found on the parabola through those two points
 * and the one before them (Lagrange interpolation; a straight line when
 * there is no earlier point), by bisection to 1e-12 of the step: a straight
 * chord across a step of a fifth of a time constant would misplace an
 * exponential's crossing by about h²/(8τ), a parabola by O(h³/τ²).
 */
export class BandWatch {
  private t0 = Number.NaN;
  private v0 = Number.NaN;
  private t1 = Number.NaN;
  private v1 = Number.NaN;
  private lastInside = false;
  /** Time the signal last came into the band, s (undefined while it is outside). */
  entered: number | undefined;

  constructor(readonly low: number, readonly high: number) {}

  /** Takes the value v at time t (s). */
  add(t: number, v: number): void {
    const inside = v >= this.low && v <= this.high;
    if (inside && !this.lastInside) this.entered = Number.isNaN(this.t1) ? t : this.crossing(t, v);
    else if (!inside) this.entered = undefined;
    this.lastInside = inside;
    this.t0 = this.t1;
    this.v0 = this.v1;
    this.t1 = t;
    this.v1 = v;
  }

  /** Time in [t1, t] at which the interpolant reaches the band edge the signal crossed. */
  private crossing(t: number, v: number): number {
    const edge = this.v1 < this.low ? this.low : this.high;
    const { t0, v0, t1, v1 } = this;
    const at = (x: number): number => {
      const lin = v1 + ((v - v1) * (x - t1)) / (t - t1);
      if (Number.isNaN(t0) || !(t0 < t1)) return lin;
      // Lagrange form through (t0, v0), (t1, v1), (t, v).
      return v0 * ((x - t1) * (x - t)) / ((t0 - t1) * (t0 - t)) + v1 * ((x - t0) * (x - t)) / ((t1 - t0) * (t1 - t)) + v * ((x - t0) * (x - t1)) / ((t - t0) * (t - t1));
    };
    // The interpolant is outside at t1 and inside at t: bisect on its distance past the edge.
    const side = Math.sign(edge - v1);
    let a = t1;
    let b = t;
    for (let k = 0; k < 60 && b - a > 1e-12 * (t - t1); k++) {
      const m = 0.5 * (a + b);
      if (side * (at(m) - edge) >= 0) b = m;
      else a = m;
    }
    return 0.5 * (a + b);
  }
}
