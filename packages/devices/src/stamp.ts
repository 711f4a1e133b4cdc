/**
 * Slot bookkeeping for the two-terminal conductance pattern of modified nodal
 * analysis (Ho, Ruehli and Brennan 1975): +g on the diagonal entries (a,a),
 * (b,b) and −g on (a,b), (b,a).
 */

import type { SlotBinder } from './device.js';

/** Matrix offsets of the four entries a two-terminal branch touches. */
export class PairSlots {
  aa = 0;
  ab = 0;
  ba = 0;
  bb = 0;

  /** Records the offsets for the pair (a, b) of unknown indices. */
  bind(slots: SlotBinder, a: number, b: number): void {
    this.aa = slots.slot(a, a);
    this.ab = slots.slot(a, b);
    this.ba = slots.slot(b, a);
    this.bb = slots.slot(b, b);
  }

  /** Adds conductance `g` (S), or capacitance (F), in the two-terminal pattern. */
  add(m: Float64Array, g: number): void {
    m[this.aa] = (m[this.aa] as number) + g;
    m[this.ab] = (m[this.ab] as number) - g;
    m[this.ba] = (m[this.ba] as number) - g;
    m[this.bb] = (m[this.bb] as number) + g;
  }
}

/**
 * Offsets of the ±1 incidence entries of a voltage-defining branch between p
 * and n (V, L, E, H): the branch current enters KCL at p and n, and the
 * branch row reads V(p) − V(n) = ... (Ho, Ruehli and Brennan 1975).
 */
export class BranchSlots {
  pb = 0;
  nb = 0;
  bp = 0;
  bn = 0;

  bind(slots: SlotBinder, p: number, n: number, br: number): void {
    this.pb = slots.slot(p, br);
    this.nb = slots.slot(n, br);
    this.bp = slots.slot(br, p);
    this.bn = slots.slot(br, n);
  }

  add(m: Float64Array): void {
    addAt(m, this.pb, 1);
    addAt(m, this.nb, -1);
    addAt(m, this.bp, 1);
    addAt(m, this.bn, -1);
  }
}

/** Adds `v` at storage offset `i`; the one place the index-access check is discharged. */
export function addAt(m: Float64Array, i: number, v: number): void {
  m[i] = (m[i] as number) + v;
}

/** Reads unknown `i` of a solution vector (0 where absent). */
export function at(x: Float64Array, i: number): number {
  return x[i] ?? 0;
}

/**
 * Stamps a companion current `ieq` (A) flowing from unknown `a` to unknown
 * `b` inside the device: rhs[a] −= ieq, rhs[b] += ieq (companion form
 * matrix·x = rhs).
 */
export function injectPair(rhs: Float64Array, a: number, b: number, ieq: number): void {
  rhs[a] = (rhs[a] as number) - ieq;
  rhs[b] = (rhs[b] as number) + ieq;
}
