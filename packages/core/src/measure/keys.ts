/**
 * Range checks of the options a figure function is called with: a value
 * outside its range would make the measurement meaningless or endless (a
 * ripple at 0 Hz has an infinite period). A netlist's `.figure` keys are
 * refused earlier, at elaboration, against the figure registry's ranges
 * (docs/figures.md, "Key ranges"); these checks guard library callers.
 */
import { errorAt, RailcheckError } from '../errors.js';

export { MAX_SAG_DURATION, MAX_SETTLE_TIME } from '../figure-registry.js';

/**
 * Throws RailcheckError unless `ok(value)`; `expected` says the range in
 * words. The error names no place, so the report puts it at the `.figure`
 * line (measure/figures.ts).
 */
export function requireKey(figure: string, key: string, value: number, ok: (v: number) => boolean, expected: string): void {
  if (ok(value)) return;
  throw new RailcheckError([errorAt('bad-figure-key', `${figure}: ${key}=${value} is out of range`, undefined, undefined, `${key} ${expected}`)]);
}

/** x > 0 and finite. */
export const positive = (v: number): boolean => Number.isFinite(v) && v > 0;
