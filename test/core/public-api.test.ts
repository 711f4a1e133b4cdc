/**
 * The public barrel exports what a tool needs (reading, elaborating,
 * compiling and running a netlist, the figures and their registry, the
 * result types, RailcheckError) and none of the solver's internals, which
 * live in `@railcheck/core/internal` for the project's tests and
 * benchmarks. The list is DEVELOPERS.md's ("The public API"); a change to
 * it is a change to what other tools may depend on.
 */
import { describe, expect, test } from 'vitest';
import * as core from '@railcheck/core';
import * as internal from '@railcheck/core/internal';

/** The public values, as DEVELOPERS.md lists them. */
const PUBLIC_VALUES = [
  'RailcheckError', 'formatDiagnostic', 'errorAt', 'warningAt',
  'parseNetlist', 'parseNetlistOrThrow', 'readNetlistFile', 'printNetlist', 'parseScaledNumber',
  'impliedDatasheet', 'readModelLine', 'findModelCard', 'modelLine', 'resolveModelCard', 'resolveNetlistModel',
  'elaborate', 'compileCircuit',
  'runNetlist', 'runNetlistFile', 'prepare',
  'compareNetlists', 'compareNetlistFiles', 'SAME_VALUE_RTOL', 'SAME_FIGURE_RTOL',
  'checkNetlists', 'mergeCheckResults', 'DEFAULT_TOLERANCES', 'readBaseline',
  'spreadNetlist', 'spreadNetlistFile', 'histogram', 'mergeSpreadResults', 'runSampleNetlist', 'runSampleNetlistFile',
  'SPREAD_FORMAT', 'SPREAD_VERSION', 'DEFAULT_SPREAD_RUNS', 'DEFAULT_SPREAD_SEED', 'DEFAULT_SPREAD_PERCENTILES', 'DEFAULT_SPREAD_CONFIDENCE', 'DEFAULT_MAX_CORNER_RUNS',
  'sampleTrace', 'acceptedTimes', 'phasorDb', 'phasorDeg',
  'MAINS_CAUTION', 'ELV_AC_RMS', 'ELV_DC', 'formatSI',
  'FIGURES', 'PART_DATA', 'PART_DATA_KEYS', 'STRESS_QUANTITIES', 'DEFAULT_DERATING', 'FIGURE_KIND_INFO', 'FIGURE_KINDS', 'BENCH_KINDS', 'figureEntry', 'figureKindOf', 'figureUnit',
  'measureFigures', 'createBench',
  'lineRegulation', 'loadRegulation', 'dropout', 'DEFAULT_DROPOUT_FALL', 'rippleRejection', 'dissipation', 'sagRideThrough', 'startup', 'loadStep', 'outputShort', 'DEFAULT_SHORT_OHMS', 'measureCurves', 'DEFAULT_SETTLE_TMAX', 'DEFAULT_SETTLE_RATIO', 'DEFAULT_STEP_RISE',
  'describeSteady',
];

describe('the public barrel', () => {
  test('exports exactly the documented values', () => {
    expect(Object.keys(core).sort()).toEqual([...PUBLIC_VALUES].sort());
  });

  test('exports no solver internals', () => {
    for (const name of ['luFactor', 'newtonSolve', 'runTransient', 'solveOperatingPoint', 'findPeriodicSteadyState', 'linearise', 'makeStage']) {
      expect(Object.keys(core)).not.toContain(name);
      expect(Object.keys(internal)).toContain(name);
    }
  });

  test('the internal entry point re-exports every public value', () => {
    for (const name of PUBLIC_VALUES) expect(Object.keys(internal)).toContain(name);
  });
});
