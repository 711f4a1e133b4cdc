/**
 * Work counters of the engine, for the benchmarks (bench/run.mjs) only:
 * how many Newton solves and iterations were spent in DC mode (operating
 * points, sweeps, figure walks) and in transient mode (every step tried,
 * accepted or rejected). Nothing in the engine reads them; a benchmark
 * zeroes them with {@link resetEngineCounts} and reads them after a run.
 * Two additions per Newton solve (not per iteration).
 */

/** Counts since the last reset. */
export interface EngineCounts {
  /** Newton solves with the load context in DC mode. */
  dcSolves: number;
  /** Newton iterations (factor and solve) of those solves. */
  dcIterations: number;
  /** Newton solves in transient mode: one per time step tried. */
  tranSolves: number;
  /** Newton iterations of those solves. */
  tranIterations: number;
}

/** The counters (module state, process-wide). */
export const ENGINE_COUNTS: EngineCounts = { dcSolves: 0, dcIterations: 0, tranSolves: 0, tranIterations: 0 };

/** Sets every counter to zero. */
export function resetEngineCounts(): void {
  ENGINE_COUNTS.dcSolves = 0;
  ENGINE_COUNTS.dcIterations = 0;
  ENGINE_COUNTS.tranSolves = 0;
  ENGINE_COUNTS.tranIterations = 0;
}
