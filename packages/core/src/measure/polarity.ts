/**
 * Polarity of the levels a `.figure` line gives (docs/figures.md,
 * "Negative rails"): figures of a negative rail are taken on magnitudes,
 * but input levels are volts as written, with their sign. A level on the
 * other side of 0 V from the nominal input (a −12 V stage's line range
 * written `from=10.8 to=13.2`) would measure a stage fed with the wrong
 * polarity; a warning says so.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import type { FlatFigure } from '../elaborate/flat.js';
import type { Bench } from './bench.js';

/** Keys of a figure that are input levels in volts on a DC bench. */
const LEVEL_KEYS = ['from', 'to'] as const;

/** A warning for each input level (V) of a DC bench's line figure whose sign is not the nominal input's. */
export function levelSignWarnings(bench: Bench, f: FlatFigure): Diagnostic[] {
  if (bench.input.unit !== 'V' || f.figure !== 'line' || bench.input.nominal === 0) return [];
  const s = bench.input.sign;
  const out: Diagnostic[] = [];
  for (const key of LEVEL_KEYS) {
    const level = f.keys.get(key);
    if (level === undefined || !(s * level < 0)) continue;
    out.push(warningAt('level-opposite-sign', `${f.figure}: ${key}=${bench.input.describe(level)} lies on the other side of 0 V from the nominal input ${bench.input.describe(bench.input.nominal)}; input levels are volts with their sign (write ${key}=${bench.input.describe(-level)} for that magnitude)`, f.origin.pos, f.origin.lineText));
  }
  return out;
}
