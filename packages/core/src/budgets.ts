/**
 * Budgets: upper bounds on the quantities a netlist controls, checked before
 * anything is allocated or looped over, so that a careless or hostile netlist
 * ends in a located error naming the budget instead of exhausting memory or
 * running forever. Each value is set far above what a discrete linear supply
 * stage needs (docs/engine.md, "Budgets", gives the reasons); they are
 * common practice, no source.
 */

/** Most frequency points of one `.ac` analysis (a decade sweep at 1000 points per decade over 12 decades is 12 001). */
export const MAX_AC_POINTS = 100_000;

/** Most points of one `.dc` sweep, (stop − start)/step + 1. */
export const MAX_DC_POINTS = 1_000_000;

/** Most output grid points of one `.tran`, (tstop − tstart)/tstep + 1 (2 s of mains at 2 µs is 1 000 001). */
export const MAX_TRAN_GRID_POINTS = 2_000_000;

/** Most time steps, accepted and rejected, one transient run may take. */
export const MAX_TRAN_STEPS = 5_000_000;

/** Most source breakpoints (waveform corners) one transient run may collect, all sources together. */
export const MAX_BREAKPOINTS = 1_000_000;

/** Most unknowns (nodes and branch currents, ground excluded) of the dense MNA matrix: 2000² doubles are 32 MB. */
export const MAX_UNKNOWNS = 2_000;
