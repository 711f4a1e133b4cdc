/**
 * The two one-dimensional searches the figures use: bisection of a
 * yes-or-no question that changes once along an interval (dropout of a
 * sine-fed stage, the deepest dip a stage rides through), and the Illinois
 * variant of regula falsi for the crossing of a continuous function (DC
 * dropout; Dowell and Jarratt, BIT 11, 1971), which keeps the bracket and
 * converges superlinearly.
 */

/** A bracket of a yes-or-no boundary: `pass` answers yes, `fail` no. */
export interface Boundary {
  readonly pass: number;
  readonly fail: number;
}

/**
 * Bisects between `pass` (where `passes` holds) and `fail` (where it does
 * not) until `done(pass, fail)`; returns the last bracket. The midpoint is
 * ½·(pass + fail).
 */
export function bisectBoundary(passes: (x: number) => boolean, start: Boundary, done: (b: Boundary) => boolean): Boundary {
  let b = start;
  while (!done(b)) {
    const mid = 0.5 * (b.pass + b.fail);
    b = passes(mid) ? { pass: mid, fail: b.fail } : { pass: b.pass, fail: mid };
  }
  return b;
}

/** A bracket of a sign change: f(neg) < 0 ≤ f(pos). */
export interface SignBracket {
  readonly neg: number;
  readonly fNeg: number;
  readonly pos: number;
  readonly fPos: number;
}

/** Most Illinois steps (far more than a bracket of any width takes to shrink to a tolerance). */
const MAX_ILLINOIS_STEPS = 100;

/**
 * Illinois regula falsi on a bracket of f's sign change, until the bracket
 * is narrower than `tolerance`: each step takes the secant point (the
 * midpoint when it falls outside), and an end kept twice in a row has its
 * f halved. Returns the end whose |f| is smaller.
 */
export function illinois(f: (x: number) => number, bracket: SignBracket, tolerance: number): number {
  let { neg, fNeg, pos, fPos } = bracket;
  let side = 0;
  for (let iter = 0; iter < MAX_ILLINOIS_STEPS && Math.abs(pos - neg) > tolerance; iter++) {
    let x = (neg * fPos - pos * fNeg) / (fPos - fNeg);
    if (!(x > Math.min(neg, pos) && x < Math.max(neg, pos))) x = 0.5 * (neg + pos);
    const fx = f(x);
    if (fx < 0) {
      neg = x;
      fNeg = fx;
      if (side === -1) fPos /= 2;
      side = -1;
    } else {
      pos = x;
      fPos = fx;
      if (side === 1) fNeg /= 2;
      side = 1;
    }
  }
  return Math.abs(fNeg) < Math.abs(fPos) ? neg : pos;
}
