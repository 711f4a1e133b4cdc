export { knownParams, DIODE_PARAMS, BJT_PARAMS, diodeModel, bjtModel } from './models.js';
export type { ParamSpec, DiodeModel, BjtModel } from './models.js';
