/**
 * A vitest setup file that puts every circuit compiled in the test file on
 * the sparse solver (engine/sparse-lu.ts), whatever its size, so that the
 * engine's and the analyses' tests can be run through it:
 * `FORCE_SPARSE=1 npx vitest run test/core/engine` (vitest.config.ts adds this file then).
 */
import { SOLVER_PATH } from '@railcheck/core/internal';

SOLVER_PATH.force = 'sparse';
