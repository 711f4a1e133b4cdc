/**
 * Continuation (homotopy) in one parameter for DC solutions: a family of
 * problems P(λ), λ from 0 (whose solution is in the workspace) to 1, is
 * followed in steps, each Newton solve starting from the last solution; a
 * step that fails is halved, one that succeeds lets the next double (the
 * natural-parameter continuation of Allgower and Georg, Introduction to
 * Numerical Continuation Methods, 1990, ch. 1).
 */
import type { CompiledCircuit } from './compile.js';
import { newtonSolve } from './newton.js';

/**
 * Follows `apply(λ)` from 0 to 1 (`apply(1)` must set the target exactly).
 * Returns true with the solution at λ = 1 in the workspace, or false after
 * more than `maxHalvings` halvings, with the last solution reached restored.
 */
export function continueAlong(c: CompiledCircuit, apply: (lambda: number) => void, maxHalvings: number): boolean {
  const ws = c.ws;
  const saved = new Float64Array(ws.x);
  let lambda = 0;
  let step = 1;
  let halvings = 0;
  while (lambda < 1) {
    const next = Math.min(1, lambda + step);
    apply(next);
    ws.ctx.initJunctions = false;
    if (newtonSolve(c).converged) {
      saved.set(ws.x);
      lambda = next;
      step = Math.min(1, step * 2);
    } else {
      ws.x.set(saved);
      if (++halvings > maxHalvings) return false;
      step /= 2;
    }
  }
  return true;
}

/** Linear interpolation that lands exactly on `to` at λ = 1. */
export function lerp(from: number, to: number, lambda: number): number {
  return lambda === 1 ? to : from + (to - from) * lambda;
}
