/**
 * Ranges of valid values for model parameters and element values, as one
 * small data type that the tables carry, the elaborator checks and the docs
 * print (docs/models.md, "Valid ranges").
 */

/** Bounds of a valid value, each open or closed; an empty range accepts every finite number. */
export interface ValueRange {
  /** The value must be greater than this. */
  readonly above?: number;
  /** The value must be at least this. */
  readonly atLeast?: number;
  /** The value must be less than this. */
  readonly below?: number;
  /** The value must be at most this. */
  readonly atMost?: number;
  /** The value must not be zero. */
  readonly nonZero?: true;
}

/** Every finite number. */
export const ANY: ValueRange = {};
/** x > 0. */
export const POSITIVE: ValueRange = { above: 0 };
/** x ≥ 0. */
export const NON_NEGATIVE: ValueRange = { atLeast: 0 };
/** x ≠ 0. */
export const NON_ZERO: ValueRange = { nonZero: true };
/** 0 ≤ x < 1: grading coefficients (the depletion charge's (1 − V/VJ)^(1−M) form needs M < 1). */
export const GRADING: ValueRange = { atLeast: 0, below: 1 };
/** 0 < x ≤ 1: a coupling coefficient (netlist.md, K). */
export const COUPLING: ValueRange = { above: 0, atMost: 1 };

/** True when the finite number `x` lies in `range`. */
export function inRange(range: ValueRange, x: number): boolean {
  if (!Number.isFinite(x)) return false;
  if (range.above !== undefined && !(x > range.above)) return false;
  if (range.atLeast !== undefined && !(x >= range.atLeast)) return false;
  if (range.below !== undefined && !(x < range.below)) return false;
  if (range.atMost !== undefined && !(x <= range.atMost)) return false;
  return !(range.nonZero === true && x === 0);
}

/** The range as a reader writes it, e.g. `> 0`, `≥ 0 and < 1`, `any finite value`. */
export function describeRange(range: ValueRange): string {
  const parts: string[] = [];
  if (range.above !== undefined) parts.push(`> ${range.above}`);
  if (range.atLeast !== undefined) parts.push(`≥ ${range.atLeast}`);
  if (range.below !== undefined) parts.push(`< ${range.below}`);
  if (range.atMost !== undefined) parts.push(`≤ ${range.atMost}`);
  if (range.nonZero === true) parts.push('≠ 0');
  return parts.length === 0 ? 'any finite value' : parts.join(' and ');
}
