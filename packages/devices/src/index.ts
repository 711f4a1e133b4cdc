/**
 * railcheck device models: linear elements, independent and controlled
 * sources, the Shockley diode with breakdown and the Ebers-Moll transistor,
 * with the engine contract they implement.
  *
 * @packageDocumentation
 * @module @railcheck/devices
 */

export { BOLTZMANN, CHARGE, JUNCTION_CMIN, TNOM, ZERO_CELSIUS, thermalVoltage } from './constants.js';
export { GROUND } from './device.js';
export type {
  BranchRef,
  Device,
  DeviceKind,
  DeviceReport,
  IntegrationCoefficients,
  LoadContext,
  LoadMode,
  ReactiveContext,
  SlotBinder,
  Topology,
  UnknownAllocator,
} from './device.js';
export { BJT_PARAMS, DIODE_PARAMS, bjtModel, diodeModel } from './models.js';
export type { BjtModel, DiodeModel, ParamSpec } from './models.js';
export { BJT_SHEET_KEYS, DIODE_SHEET_KEYS, DEFAULT_IC_TEST, DEFAULT_IZT, DEFAULT_VCE_TEST, resolveBjtSheet, resolveDiodeSheet, resolveSheet, sheetKeys } from './datasheet.js';
export type { SheetKey, SheetProblem, SheetResolution } from './datasheet.js';
export type { SourceSpec, WaveformSpec } from './sources.js';

export {
  AREA_RANGE, DEVICES, DEVICE_KINDS, MODEL_KINDS, MODEL_TYPES, RATING_RANGE, WAVEFORM_RANGES,
  buildModel, dissipates, kindOfLetter, knownParams, modelKindOf, paramTable,
} from './registry.js';
export type { CardFamily, DeviceByKind, DeviceEntry, DeviceLetter, DeviceSpecs, ModelKind, ModelType, ValueField } from './registry.js';
export { ANY, CAPACITANCE, COUPLING, GAIN, GRADING, INDUCTANCE, LEVEL, NON_NEGATIVE, NON_ZERO, PLAUSIBLE, POSITIVE, RESISTANCE, describeRange, inRange } from './ranges.js';
export type { ValueRange } from './ranges.js';
export { createCoupling } from './coupling.js';
export type { Coupling } from './coupling.js';

export { isKind } from './types.js';
export type {
  AnyDevice,
  Bjt,
  Capacitor,
  Ccvs,
  Cccs,
  CurrentSource,
  Diode,
  IndependentSource,
  Inductor,
  ReactiveElement,
  Resistor,
  Vccs,
  Vcvs,
  VoltageSource,
} from './types.js';

export { branchRowScale, createCapacitor, createInductor, createResistor } from './passive.js';
export { createCurrentSource, createVoltageSource } from './independent.js';
export { createCccs, createCcvs, createVccs, createVcvs } from './controlled.js';
export { createDiode, diodeCharge, diodeCurrent, evalDiode, evalDiodeCharge, junctionCurrent, scaleDiodeModel } from './diode.js';
export type { CurrentOut } from './diode.js';
export { createBjt } from './bjt.js';
export { bjtCharges, bjtCurrents, evalBjtCharges, evalBjtNpn, newBjtCurrents, polaritySign, scaleBjtModel } from './bjt-model.js';
export type { BjtCurrents } from './bjt-model.js';
export {
  DEPLETION_FC,
  EXP_LINEAR_LIMIT,
  EXPM1_DIRECT_BELOW,
  criticalVoltage,
  depletion,
  depletionAt,
  depletionForm,
  expm1From,
  pnjlim,
  safeExp,
  safeExpSlope,
  safeExpm1,
} from './junction.js';
export type { ChargeOut, DepletionForm } from './junction.js';
export { pulseValue, pwlValue, sinValue, waveformBreakpoints, waveformCornerCount, waveformValue } from './waveform.js';
