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

/**
 * Most time steps, accepted and rejected, one transient run may take:
 * checked before the run against its fewest possible steps (the run over
 * its largest step) and counted as it goes. A rectifier run of 200 ms takes
 * a few thousand; 10⁶ steps are about ten seconds of stepping on a small
 * stage at the present speed (bench/), the longest a user waits for one run.
 */
export const MAX_TRAN_STEPS = 1_000_000;

/**
 * Most source breakpoints (waveform corners) one transient run may land on,
 * all sources together: counted before any is generated (a pulse train:
 * periods × corners per period). Each corner costs at least one step.
 */
export const MAX_BREAKPOINTS = 250_000;

/** Most values (accepted points × (unknowns + 1)) a transient run may store: 25·10⁶ doubles are 200 MB. */
export const MAX_TRACE_VALUES = 25_000_000;

/** Most unknowns (nodes and branch currents, ground excluded) of the dense MNA matrix: 2000² doubles are 32 MB. */
export const MAX_UNKNOWNS = 2_000;

/**
 * Most values the analyses of one run hand back, all analyses at all
 * temperatures together: points (sweep points, frequencies, `.tran` grid
 * points) × signals (nodes + branch currents; twice that for `.ac`, which is
 * complex). A `.tran` of 1 000 001 points × 20 signals fits; 2·10⁷ numbers
 * are 160 MB.
 */
export const MAX_OUTPUT_VALUES = 20_000_000;

/**
 * Most time steps, accepted and rejected, all the transient trials of one
 * figure may take together (a sag figure's bracket and bisection run about
 * twenty dips): past it the figure is not measured, with the budget named.
 */
export const MAX_FIGURE_STEPS = 2_000_000;

/**
 * Most time steps, accepted and rejected, every transient run of one
 * figure bench may take together: all the figures of a run, their steady
 * states and dips (a sine-fed stage with five figures takes some tens of
 * thousands). Past it, the figure being measured and any after it are not
 * measured, with the budget named: about twenty seconds of stepping on a
 * small stage at the present speed, so that no set of figures runs for
 * minutes.
 */
export const MAX_BENCH_STEPS = 2_000_000;

/**
 * Most cards (logical lines that are elements or directives) one netlist may
 * hold with everything it includes: well above MAX_FLAT_ELEMENTS (100 000),
 * which more element cards could never fit, and about 250 MB of read cards.
 */
export const MAX_CARDS = 150_000;

/** Most `.include` expansions one netlist may make, all levels together (the same file included twice counts twice). */
export const MAX_INCLUDES = 1_000;

/** Most characters read from all included files together (the top file has its own MAX_INPUT_LENGTH). */
export const MAX_INCLUDED_CHARACTERS = 32 * 1024 * 1024;

/** Most analysis cards (.op, .dc, .tran, .ac) of one netlist; each runs at every temperature. */
export const MAX_ANALYSES = 20;

/** Most temperatures, all `.temp` cards together; every analysis runs at each. */
export const MAX_TEMPERATURES = 20;

/**
 * Most items (words, numbers, punctuation) one card may hold: a pwl of
 * 100 000 points has about 200 000. A card's items are held at once while it
 * is read, some hundreds of bytes each.
 */
export const MAX_CARD_TOKENS = 250_000;
