/**
 * @railcheck/core: what a tool needs to read, run and measure a supply
 * stage: the netlist reader, elaboration and compilation, the whole run,
 * the power-supply figures with their registry, and the result types.
 * Everything returns values or throws only {@link RailcheckError}. Solver
 * internals (LU, Newton, the transient stepper, the steady-state search)
 * are in `@railcheck/core/internal`, for the project's tests and
 * benchmarks.
 *
 * Layers, each importing only those before it (test/core/layers.test.ts):
 * netlist → elaborate → engine → analysis → measure → pipeline, with the
 * shared errors.ts, units.ts and figure-registry.ts below them all.
  *
 * @packageDocumentation
 * @module @railcheck/core
 */
export { RailcheckError, formatDiagnostic, errorAt, warningAt } from './errors.js';
export type { Diagnostic, SourcePos } from './errors.js';

export { parseNetlist, parseNetlistOrThrow, readNetlistFile, printNetlist, parseScaledNumber } from './netlist/index.js';
export type { ParseOptions, ParseResult } from './netlist/index.js';
export type {
  Netlist, Card, ElementCard, ModelCard, ParamCard, AnalysisCard, SupplyCard, SubcktDef, Value, Expr, ExprFunction,
  Waveform, Assignments, CardOrigin, FigureKind, LimitOp, ModelType, PassiveCard, SourceCard, DiodeCard, BjtCard,
  VoltageControlledCard, CurrentControlledCard, InstanceCard,
} from './netlist/ast.js';

export { elaborate } from './elaborate/elaborate.js';
export type { ElaborateResult } from './elaborate/elaborate.js';
export type { FlatCircuit, FlatElement, FlatNode, FlatAnalysis, FlatSupply, FlatFigure, FlatLimit, FlatSpread, FlatParam } from './elaborate/flat.js';

export { compileCircuit } from './engine/compile.js';
export type { CompiledCircuit, CompileResult } from './engine/compile.js';

export { runNetlist, runNetlistFile, prepare } from './pipeline/run.js';
export type { RunReport, RunResult } from './pipeline/run.js';
export { compareNetlists, compareNetlistFiles, SAME_VALUE_RTOL, SAME_FIGURE_RTOL } from './pipeline/compare.js';
export type {
  CompareResult, CompareReport, CompareSide, ConditionsUsed, ConditionSource, CircuitChanges, ElementChange, ModelChange, ParamChange,
  QuantityChange, QuantityValue, FigureComparison, FigureSide, Verdict, LimitComparison, LimitSide, NodeComparison, DissipationComparison, DissipationSide,
} from './pipeline/compare.js';
export { checkNetlists, mergeCheckResults } from './pipeline/check.js';
export type { CheckResult, CheckOptions, CheckOutcome, NetlistCheck, CheckTest } from './pipeline/check.js';
export type { NetlistRun, CheckLimit } from './pipeline/check-run.js';
export { DEFAULT_TOLERANCES, readBaseline } from './pipeline/check-baseline.js';
export type { Baseline, BaselineEntry, BaselineRead, Tolerance } from './pipeline/check-baseline.js';
export { impliedDatasheet, readModelLine, findModelCard, modelLine, resolveModelCard, resolveNetlistModel } from './pipeline/model-sheet.js';
export type { ImpliedSheet, SheetConditions, SheetValue, ResolvedModel, ResolveModelOptions } from './pipeline/model-sheet.js';
export { histogram } from './stats.js';
export { spreadNetlist, spreadNetlistFile, mergeSpreadResults, runSampleNetlist, runSampleNetlistFile } from './pipeline/spread.js';
export { SPREAD_FORMAT, SPREAD_VERSION, DEFAULT_SPREAD_RUNS, DEFAULT_SPREAD_SEED, DEFAULT_SPREAD_PERCENTILES, DEFAULT_SPREAD_CONFIDENCE, DEFAULT_MAX_CORNER_RUNS } from './pipeline/spread-types.js';
export type {
  SpreadOptions, SpreadOutcome, SpreadResult, SpreadTemperature, SpreadFigure, SpreadLimit, SpreadRun, SpreadRunAt, SpreadRunRef, SpreadStage, SpreadSummary,
  SpreadVariable, SampledValue, SpreadDesign, SpreadMethod, ModelSampling, SpreadDistribution, SampleOptions, SampleOutcome,
} from './pipeline/spread-types.js';
export type { OperatingPoint, DcSweep } from './analysis/dc.js';
export { sampleTrace, acceptedTimes } from './analysis/tran.js';
export type { TransientResult } from './analysis/tran.js';
export { phasorDb, phasorDeg } from './analysis/ac.js';
export type { AcResult } from './analysis/ac.js';
export { MAINS_CAUTION, ELV_AC_RMS, ELV_DC } from './analysis/safety.js';

export { formatSI } from './units.js';

export { FIGURES, FIGURE_KIND_INFO, FIGURE_KINDS, BENCH_KINDS, figureEntry, figureKindOf, figureUnit } from './figure-registry.js';
export type { FigureEntry, FigureKindInfo, FigureKey, FigureNumberKey, FigureMethodKey, FigureUnit, Better, BenchKind, KeyBounds, KeyRange } from './figure-registry.js';
export { measureFigures } from './measure/figures.js';
export type { FigureReport, MeasuredFigure, FigureMeasured, FigureNotMeasured, FigureValues, ValueNotMeasured, LimitResult } from './measure/figures.js';
export { createBench } from './measure/create-bench.js';
export type { BenchOptions } from './measure/create-bench.js';
export type { CycleOperatingPoint, NodeCycle, Bench, BenchCommon, DcBench, SineFedBench, StageSetting, OutputStats } from './measure/bench.js';
export { lineRegulation, loadRegulation } from './measure/regulation.js';
export type { LineRegulation, LineOptions, LoadRegulation, LoadOptions } from './measure/regulation.js';
export { dropout, DEFAULT_DROPOUT_FALL } from './measure/dropout.js';
export type { Dropout } from './measure/dropout.js';
export { rippleRejection } from './measure/ripple.js';
export type { RippleOptions, RippleRejection } from './measure/ripple.js';
export { PART_DATA, PART_DATA_KEYS } from './part-data.js';
export type { PartDataKey, PartDataInfo, PartData, RatedLetter } from './part-data.js';
export { STRESS_QUANTITIES, DEFAULT_DERATING } from './analysis/stress.js';
export type { StressRow, StressWorst, StressQuantity, StressQuantityInfo, StressStatus, StressClass, StressedKind, RatingSource, Derating } from './analysis/stress.js';
export { dissipation } from './measure/dissipation.js';
export type { Dissipation, DissipationOptions } from './measure/dissipation.js';
export { sagRideThrough } from './measure/sag.js';
export type { SagOptions, SagRideThrough, SagTrialFailure } from './measure/sag.js';
export { startup, DEFAULT_SETTLE_TMAX, DEFAULT_SETTLE_RATIO } from './measure/startup.js';
export type { Startup, StartupOptions } from './measure/startup.js';
export { loadStep, DEFAULT_STEP_RISE } from './measure/load-step.js';
export type { LoadStep, LoadStepOptions } from './measure/load-step.js';
export { outputShort, DEFAULT_SHORT_OHMS } from './measure/short.js';
export { measureCurves } from './pipeline/curves.js';
export type { CurveOptions, CurvesResult } from './pipeline/curves.js';
export type { CurveKind, FigureCurves, LineCurve, LoadCurve, RejectionCurve, RippleWaveform, SagWaveform, Curve, CurvePoint } from './measure/curves.js';
export type { StageWaveform } from './measure/bench.js';
export type { OutputShort, ShortOptions } from './measure/short.js';
export { describeSteady } from './measure/periodic.js';
export type { SteadyInfo } from './measure/periodic.js';
