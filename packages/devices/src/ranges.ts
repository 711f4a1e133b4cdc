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

/**
 * Plausibility bounds on the magnitudes of element values: far beyond any
 * part of a discrete supply stage, yet well inside the range where the
 * engine's double-precision sums (conductances, powers) stay finite and
 * meaningful. Common practice, no source; docs/models.md, "Valid ranges",
 * gives each one's reason.
 */
export const PLAUSIBLE = {
  /** Largest resistance, Ω (1 PΩ: an insulator; beyond it, gmin 1e-12 S dominates anyway). */
  resistanceMax: 1e15,
  /** Smallest resistance, Ω (1 nΩ: a busbar is µΩ; below it the conductance swamps every other stamp). */
  resistanceMin: 1e-9,
  /** Largest capacitance or inductance, F or H (10 kF or 10 kH: beyond the largest supercapacitor or choke). */
  reactiveMax: 1e4,
  /** Largest source level, amplitude or ac magnitude, V or A (1 MV, 1 MA). */
  levelMax: 1e6,
  /** Largest gain of a controlled source, in its own unit (V/V, S, A/A, Ω). */
  gainMax: 1e12,
  /** Largest time argument of a waveform, s (1e6 s: eleven days). */
  timeMax: 1e6,
  /** Highest sine frequency, Hz (1 GHz: far above any supply stage's ripple). */
  frequencyMax: 1e9,
  /** Largest area factor or `pmax=` rating (dimensionless, W). */
  scaleMax: 1e6,
} as const;

/** A positive resistance within {@link PLAUSIBLE}, Ω. */
export const RESISTANCE: ValueRange = { atLeast: PLAUSIBLE.resistanceMin, atMost: PLAUSIBLE.resistanceMax };
/** A capacitance ≥ 0 within {@link PLAUSIBLE}, F. */
export const CAPACITANCE: ValueRange = { atLeast: 0, atMost: PLAUSIBLE.reactiveMax };
/** An inductance > 0 within {@link PLAUSIBLE}, H. */
export const INDUCTANCE: ValueRange = { above: 0, atMost: PLAUSIBLE.reactiveMax };
/** A controlled-source gain of either sign within {@link PLAUSIBLE}. */
export const GAIN: ValueRange = { atLeast: -PLAUSIBLE.gainMax, atMost: PLAUSIBLE.gainMax };
/** A source level of either sign within {@link PLAUSIBLE}, V or A. */
export const LEVEL: ValueRange = { atLeast: -PLAUSIBLE.levelMax, atMost: PLAUSIBLE.levelMax };

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
  const n = (x: number): string => (x !== 0 && (Math.abs(x) >= 1e4 || Math.abs(x) < 1e-3) ? x.toExponential().replace('e+', 'e') : String(x));
  if (range.above !== undefined) parts.push(`> ${n(range.above)}`);
  if (range.atLeast !== undefined) parts.push(`≥ ${n(range.atLeast)}`);
  if (range.below !== undefined) parts.push(`< ${n(range.below)}`);
  if (range.atMost !== undefined) parts.push(`≤ ${n(range.atMost)}`);
  if (range.nonZero === true) parts.push('≠ 0');
  return parts.length === 0 ? 'any finite value' : parts.join(' and ');
}
