/**
 * ml-matrix, the general-purpose matrix library used as a reference in
 * tests (a root dev dependency; the engine itself solves with its own
 * in-place LU).
 */
import * as mlMatrix from 'ml-matrix';

/** The ml-matrix module (Matrix, solve, inverse, LuDecomposition, ...). */
export const ml = mlMatrix;
