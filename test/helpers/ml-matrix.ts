/**
 * ml-matrix, the general-purpose matrix library used as a reference in
 * tests. It is a dependency of @railcheck/core rather than of the workspace
 * root, so test files cannot import it by bare name; it is resolved from
 * that package instead.
 */
import { createRequire } from 'node:module';

type MlMatrix = typeof import('../../packages/core/node_modules/ml-matrix/matrix.js');

const requireFromCore = createRequire(new URL('../../packages/core/package.json', import.meta.url));

/** The ml-matrix module (Matrix, solve, inverse, LuDecomposition, ...). */
export const ml: MlMatrix = requireFromCore('ml-matrix') as MlMatrix;
