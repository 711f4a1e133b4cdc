/**
 * Helpers for the small-signal tests: run a netlist, pick a node's phasor
 * out of a report, and a low-level handle (operating point solved, circuit
 * linearised) that evaluates the engine's response at any frequency.
 */
import { expect } from 'vitest';
import { complex, type Complex } from 'mathjs';
import { parseNetlist, prepare, runNetlist, type AcResult, type CompiledCircuit, type RunReport } from '@railcheck/core';
import { linearise, solveAt, solveOperatingPoint } from '@railcheck/core/internal';

/** Runs netlist text and fails the test with the diagnostics if it does not run. */
export function run(text: string, keepSteps = false): RunReport {
  const r = runNetlist(text, { keepSteps });
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return r.report;
}

/** The k-th phasor of `node` in a sweep, as a mathjs Complex. */
export function phasor(ac: AcResult, node: string, k: number): Complex {
  const p = ac.nodes[node];
  expect(p, `node ${node} in the sweep`).toBeDefined();
  return complex(p!.re[k]!, p!.im[k]!);
}

/** |a − b| / |b|. */
export function relErr(a: Complex, b: Complex): number {
  return Math.hypot(a.re - b.re, a.im - b.im) / Math.hypot(b.re, b.im);
}

/** 20·log10|h|. */
export const db = (h: Complex): number => 20 * Math.log10(Math.hypot(h.re, h.im));
/** arg h in degrees. */
export const deg = (h: Complex): number => (Math.atan2(h.im, h.re) * 180) / Math.PI;

/** A circuit at its operating point, linearised, with a function giving a node's phasor at any frequency. */
export interface Linearised {
  readonly compiled: CompiledCircuit;
  /** Node phasor at `hertz` (V per unit of ac excitation). */
  at(node: string, hertz: number): Complex;
}

/** Prepares, solves the operating point and linearises netlist text (the engine's own layers). */
export function lineariseNetlist(text: string): Linearised {
  const prepared = prepare(parseNetlist(text));
  if (!prepared.ok) throw new Error(prepared.errors.map((e) => e.message).join('\n'));
  const c = prepared.compiled;
  const op = solveOperatingPoint(c);
  expect(op.ok, 'operating point').toBe(true);
  const sys = linearise(c);
  return {
    compiled: c,
    at(node, hertz) {
      const key = c.flat.nodes.find((n) => n.name.toLowerCase() === node.toLowerCase())?.key;
      expect(key, `node ${node}`).toBeDefined();
      const i = c.nodeIndex.get(key!)!;
      expect(solveAt(sys, hertz)).toBe(0);
      return complex(sys.xRe[i]!, sys.xIm[i]!);
    },
  };
}

/** Bisection for a root of f on [lo, hi] (f(lo), f(hi) of opposite sign) to a relative width `tol`. */
export function bisect(f: (x: number) => number, lo: number, hi: number, tol = 1e-12): number {
  let flo = f(lo);
  expect(Math.sign(flo) * Math.sign(f(hi))).toBe(-1);
  while (hi - lo > tol * Math.abs(hi)) {
    const mid = 0.5 * (lo + hi);
    const fm = f(mid);
    if (Math.sign(fm) === Math.sign(flo)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Golden-section search for the maximum of a unimodal f on [lo, hi] (Kiefer 1953). */
export function argmax(f: (x: number) => number, lo: number, hi: number, tol = 1e-10): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let a = lo;
  let b = hi;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = f(c);
  let fd = f(d);
  while (b - a > tol * Math.abs(b)) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = f(d);
    }
  }
  return 0.5 * (a + b);
}
