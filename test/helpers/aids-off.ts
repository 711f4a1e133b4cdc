/**
 * Setup of the `aids-off` test project (vitest.config.ts): the transient
 * tests run a second time without the stepper's three speed measures: each
 * step's first iterate is taken from the last accepted point instead of the
 * predictor (engine/history.ts, PREDICTOR); a time point converges on the
 * update test alone, without the contraction test (engine/newton.ts,
 * NewtonOptions.contractionSettles; CONTRACTION); and the next step comes
 * from the elementary controller alone, without the predictive one
 * (engine/transient.ts, stepGrowth; PREDICTIVE_CONTROL). The first two
 * change only where Newton starts and when it stops within its tolerances,
 * the third which steps are tried under the same truncation-error test, so
 * every transient test must pass both ways, against the same outside
 * references and within the same tolerances.
 */
import { CONTRACTION, PREDICTIVE_CONTROL, PREDICTOR } from '@railcheck/core/internal';

PREDICTOR.on = false;
CONTRACTION.on = false;
PREDICTIVE_CONTROL.on = false;
