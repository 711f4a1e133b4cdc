/**
 * Setup of the `predictor-off` test project (vitest.config.ts): the
 * transient tests run a second time with each step's first Newton iterate
 * taken from the last accepted point instead of the predictor
 * (engine/history.ts, PREDICTOR). The predictor moves only Newton's
 * starting point, so every transient test must pass both ways, against the
 * same outside references and within the same tolerances.
 */
import { PREDICTOR } from '@railcheck/core/internal';

PREDICTOR.on = false;
