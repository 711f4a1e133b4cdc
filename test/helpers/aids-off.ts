/**
 * Setup of the `aids-off` test project (vitest.config.ts): the transient
 * tests run a second time without the stepper's two aids to Newton: each
 * step's first iterate is taken from the last accepted point instead of the
 * predictor (engine/history.ts, PREDICTOR), and a time point converges on
 * the update test alone, without the contraction test (engine/newton.ts,
 * NewtonOptions.contractionSettles; CONTRACTION). Both change only where
 * Newton starts and when it stops within its tolerances, so every transient
 * test must pass both ways, against the same outside references and within
 * the same tolerances.
 */
import { CONTRACTION, PREDICTOR } from '@railcheck/core/internal';

PREDICTOR.on = false;
CONTRACTION.on = false;
