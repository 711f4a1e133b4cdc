/**
 * @railcheck/core/internal: every building block of the engine, for the
 * project's own tests and benchmarks (and for tools that accept that these
 * names change without notice). Tools should import the public barrel,
 * `@railcheck/core`.
 */
export { RailcheckError, errorAt, warningAt, formatDiagnostic } from './errors.js';
export type { Diagnostic, SourcePos } from './errors.js';

export { parseNetlist, parseNetlistOrThrow, readNetlistFile, parseScaledNumber, evaluateExpr, printNetlist } from './netlist/index.js';
export type { ParseOptions, ParseResult } from './netlist/index.js';
export { LIBRARY_PREFIX, partsLibraryFolder, libraryNames, withPartsLibraryFolder } from './netlist/include.js';
export type {
  Netlist, Card, ElementCard, ModelCard, ParamCard, AnalysisCard, SupplyCard, SubcktDef, Value, Expr, ExprFunction,
  Waveform, Assignments, CardOrigin, FigureKind, LimitOp, ModelType, PassiveCard, SourceCard, DiodeCard, BjtCard,
  VoltageControlledCard, CurrentControlledCard, InstanceCard,
} from './netlist/ast.js';

export { elaborate } from './elaborate/elaborate.js';
export type { ElaborateResult } from './elaborate/elaborate.js';
export { GROUND_KEY } from './elaborate/flat.js';
export type { FlatCircuit, FlatElement, FlatNode, FlatAnalysis, FlatSupply, FlatFigure, FlatLimit, FlatSpread } from './elaborate/flat.js';

export { compileCircuit, revalueCircuit } from './engine/compile.js';
export type { CompiledCircuit, CompileResult, UnknownInfo } from './engine/compile.js';
export { luFactor, luFactorBounded, luSolve, createLuWorkspace, PIVOT_RELATIVE_TOLERANCE } from './engine/lu.js';
export type { LuWorkspace } from './engine/lu.js';
export { newtonSolve, residualSettled, loadAll, DEFAULT_NEWTON, RESIDUAL_RELTOL } from './engine/newton.js';
export { ENGINE_COUNTS, resetEngineCounts } from './engine/counters.js';
export type { EngineCounts } from './engine/counters.js';
export { SparseLu, createSparseLu, sparseLuFactor, sparseLuSolve, minimumDegreeOrder, eliminationFill, REUSE_PIVOT_THRESHOLD } from './engine/sparse-lu.js';
export { SOLVER_PATH, usesSparse, denseOf, factorMatrix, solveMatrix } from './engine/workspace.js';
export type { Workspace, StampList, LinearSolver } from './engine/workspace.js';
export type { NewtonOptions, NewtonResult } from './engine/newton.js';
export { solveOperatingPoint, setCircuitTemperature, FINAL_GMIN } from './engine/dcop.js';
export type { OpMethod, OpOutcome, Straggler } from './engine/dcop.js';

export { operatingPoint, dcSweep } from './analysis/dc.js';
export type { OperatingPoint, DcSweep } from './analysis/dc.js';
export { readSolution, nodeVoltage } from './analysis/solution.js';
export type { SolutionValues } from './analysis/solution.js';
export { transient, outputGrid, sampleTrace, acceptedTimes, GridSampler } from './analysis/tran.js';
export type { TransientResult, TransientRequest } from './analysis/tran.js';
export { acSweep, phasorDb, phasorDeg, acFrequencies } from './analysis/ac.js';
export type { AcResult } from './analysis/ac.js';
export { runTransient, describeTransientFailure, transientFailureCode, PREDICTOR, CONTRACTION, PREDICTIVE_CONTROL } from './engine/transient.js';
export type { TransientOptions, TransientOutcome, TransientStats, TransientTrace, IntegrationMethod, TransientBudgetExcess, SharedStepBudget } from './engine/transient.js';
export { linearise, solveAt } from './engine/ac.js';
export type { SmallSignalSystem } from './engine/ac.js';
export { complexLuFactor, complexLuSolve, createComplexLuWorkspace } from './engine/complex-lu.js';
export type { ComplexLuWorkspace } from './engine/complex-lu.js';
export { runNetlist, runNetlistFile, prepare, analyse } from './pipeline/run.js';
export type { RunReport, RunResult } from './pipeline/run.js';
export { compareNetlists, compareNetlistFiles, SAME_VALUE_RTOL, SAME_FIGURE_RTOL, circuitChanges, inheritConditions, relativeChange, verdictOf } from './pipeline/compare.js';
export { checkNetlists, mergeCheckResults, expandCheckPaths, writeCheckBaseline, CHECK_FORMAT, CHECK_VERSION } from './pipeline/check.js';
export type { CheckResult, CheckOptions, CheckOutcome, NetlistCheck, CheckTest } from './pipeline/check.js';
export { runForCheck, netlistRunOf } from './pipeline/check-run.js';
export { spreadNetlist, spreadNetlistFile, mergeSpreadResults, runSampleNetlist, runSampleNetlistFile, spreadSetup, measureRun, factorsOf, MAX_SPREAD_RUNS } from './pipeline/spread.js';
export type { SpreadSetup } from './pipeline/spread.js';
export { SPREAD_FORMAT, SPREAD_VERSION, DEFAULT_SPREAD_RUNS, DEFAULT_SPREAD_SEED, DEFAULT_SPREAD_PERCENTILES, DEFAULT_SPREAD_CONFIDENCE, DEFAULT_MAX_CORNER_RUNS } from './pipeline/spread-types.js';
export type {
  SpreadOptions, SpreadOutcome, SpreadResult, SpreadTemperature, SpreadFigure, SpreadLimit, SpreadRun, SpreadRunAt, SpreadRunRef, SpreadSummary,
  SpreadVariable, SampledValue, SpreadDesign, SpreadMethod, ModelSampling, SpreadDistribution, SampleOptions, SampleOutcome,
} from './pipeline/spread-types.js';
export { histogram } from './stats.js';
export { spreadVariables, monteCarloFactors, cornerFactors, sampledCircuit, sampleOf } from './pipeline/spread-sample.js';
export type { NetlistRun, CheckLimit } from './pipeline/check-run.js';
export { DEFAULT_TOLERANCES, readBaseline, parseBaseline, baselineText, writeFileAtomic, compareValue, BASELINE_FORMAT, BASELINE_VERSION } from './pipeline/check-baseline.js';
export type { Baseline, BaselineEntry, BaselineRead, Tolerance } from './pipeline/check-baseline.js';
export { safetyWarnings, exceedsElv, MAINS_CAUTION, ELV_AC_RMS, ELV_DC } from './analysis/safety.js';
export type { VoltageLevel, ReachedLevels } from './analysis/safety.js';
export { sanityWarnings, operatingPointsJudged, ABSURD_CURRENT, ABSURD_POWER } from './analysis/sanity.js';
export type { JudgedPoint } from './analysis/sanity.js';

export { formatSI } from './units.js';

export { FIGURES, FIGURE_KIND_INFO, FIGURE_KINDS, BENCH_KINDS, figureEntry, figureKindOf, figureUnit, describeKeyBounds, describeKeyRange, withinKeyBounds, MAX_SAG_DURATION } from './figure-registry.js';
export type { FigureEntry, FigureKindInfo, FigureKey, FigureNumberKey, FigureMethodKey, FigureUnit, Better, BenchKind, KeyBounds, KeyRange } from './figure-registry.js';
export { measureFigures, checkLimits, unusedKeyNotes, isSineFed } from './measure/figures.js';
export type { FigureReport, MeasuredFigure, FigureMeasured, FigureNotMeasured, FigureValues, ValueNotMeasured, LimitResult } from './measure/figures.js';
export { createBench } from './measure/create-bench.js';
export type { BenchOptions } from './measure/create-bench.js';
export type { CycleOperatingPoint, NodeCycle, Bench, BenchCommon, DcBench, SineFedBench, StageSetting, OutputStats, SteadyWalk, InputAxis, DropoutRule, SteadyRipple, DipShape, DipPlan } from './measure/bench.js';
export { makeStage, vout } from './measure/stage.js';
export type { Stage, StageLoad, Drive, DcSetting } from './measure/stage.js';
export { lineRegulation, loadRegulation } from './measure/regulation.js';
export type { LineRegulation, LineOptions, LoadRegulation, LoadOptions } from './measure/regulation.js';
export { dropout, DEFAULT_DROPOUT_FALL } from './measure/dropout.js';
export type { Dropout } from './measure/dropout.js';
export { rippleRejection, RIPPLE_AGREEMENT_DB } from './measure/ripple.js';
export type { RippleOptions, RippleRejection } from './measure/ripple.js';
export { PART_DATA, PART_DATA_KEYS, partDataKeysOf } from './part-data.js';
export { STRESS_QUANTITIES, DEFAULT_DERATING, StressMeter, judgeStress, hasStressRatings } from './analysis/stress.js';
export { dissipation, ratingWarnings } from './measure/dissipation.js';
export type { Dissipation, DissipationOptions } from './measure/dissipation.js';
export { sagRideThrough } from './measure/sag.js';
export type { SagOptions, SagRideThrough } from './measure/sag.js';
export { startup, DEFAULT_SETTLE_TMAX, DEFAULT_SETTLE_RATIO } from './measure/startup.js';
export type { Startup, StartupOptions } from './measure/startup.js';
export { loadStep, DEFAULT_STEP_RISE } from './measure/load-step.js';
export type { LoadStep, LoadStepOptions } from './measure/load-step.js';
export { outputShort, DEFAULT_SHORT_OHMS } from './measure/short.js';
export { measureCurves } from './pipeline/curves.js';
export type { CurveOptions, CurvesResult } from './pipeline/curves.js';
export { figureCurves } from './measure/curves.js';
export type { CurveKind, FigureCurves, LineCurve, LoadCurve, RejectionCurve, RippleWaveform, SagWaveform, Curve, CurvePoint } from './measure/curves.js';
export type { StageWaveform } from './measure/bench.js';
export type { OutputShort, ShortOptions } from './measure/short.js';
export { BandWatch, SteadyCheck } from './measure/settling.js';
// thermal figure (docs/thermal.md)
export { thermal, DEFAULT_TJMAX, THERMAL_MIN_POWER, SELF_HEAT_TOLERANCE, SELF_HEAT_MAX_ITERATIONS, SELF_HEAT_MIN_DAMPING, RUNAWAY_CELSIUS } from './measure/thermal.js';
export type { Thermal, ThermalRow, ThermalOptions, SelfHeat } from './measure/thermal.js';
export { settleCycle, describeSteady, MinMaxWindow } from './measure/periodic.js';
export type { PeriodicOptions, PeriodicResult, CycleStats, Probe, SteadyInfo } from './measure/periodic.js';
export { findPeriodicSteadyState, SETTLE_RATIO, STATE_RELTOL, DISTANCE_RELTOL, GUIDED } from './analysis/steady-state.js';
export type { SteadyState, SteadyStateMethod, SteadyStateOptions, SteadyStateOutcome } from './analysis/steady-state.js';
export { impliedDatasheet, readModelLine, findModelCard, modelLine, resolveModelCard, resolveNetlistModel } from './pipeline/model-sheet.js';
export type { ImpliedSheet, SheetConditions, SheetValue, ResolvedModel, ResolveModelOptions } from './pipeline/model-sheet.js';
