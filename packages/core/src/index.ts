/**
 * @railcheck/core: the netlist reader, elaboration, the MNA engine with
 * Newton iteration, and the analyses. Layers: parse → elaborate → compile →
 * analyse (→ measure → present in later layers).
 */
export { RailcheckError, errorAt, warningAt, formatDiagnostic } from './errors.js';
export type { Diagnostic, SourcePos } from './errors.js';

export { parseNetlist, parseNetlistOrThrow, readNetlistFile, parseSpiceNumber, evaluateExpr, printNetlist } from './netlist/index.js';
export type { ParseOptions, ParseResult } from './netlist/index.js';
export type {
  Netlist, Card, ElementCard, ModelCard, ParamCard, AnalysisCard, SupplyCard, SubcktDef, Value, Expr, ExprFunction,
  Waveform, Assignments, CardOrigin, FigureKind, LimitOp, ModelType, PassiveCard, SourceCard, DiodeCard, BjtCard,
  VoltageControlledCard, CurrentControlledCard, InstanceCard,
} from './netlist/ast.js';

export { elaborate } from './elaborate/elaborate.js';
export type { ElaborateResult } from './elaborate/elaborate.js';
export { GROUND_KEY } from './elaborate/flat.js';
export type { FlatCircuit, FlatElement, FlatNode, FlatAnalysis, FlatSupply, FlatFigure, FlatLimit, FlatSpread } from './elaborate/flat.js';

export { compileCircuit } from './engine/compile.js';
export type { CompiledCircuit, CompileResult, UnknownInfo } from './engine/compile.js';
export { luFactor, luSolve, createLuWorkspace, PIVOT_RELATIVE_TOLERANCE } from './engine/lu.js';
export type { LuWorkspace } from './engine/lu.js';
export { newtonSolve, DEFAULT_NEWTON } from './engine/newton.js';
export type { NewtonOptions, NewtonResult } from './engine/newton.js';
export { solveOperatingPoint, setCircuitTemperature, FINAL_GMIN } from './engine/dcop.js';
export type { OpMethod, OpOutcome, Straggler } from './engine/dcop.js';

export { operatingPoint, dcSweep } from './analysis/dc.js';
export type { OperatingPoint, DcSweep } from './analysis/dc.js';
export { readSolution, nodeVoltage } from './analysis/solution.js';
export type { SolutionValues } from './analysis/solution.js';
export { transient, outputGrid, sampleTrace } from './analysis/tran.js';
export type { TransientResult, TransientRequest } from './analysis/tran.js';
export { acSweep, phasorDb, phasorDeg, acFrequencies } from './analysis/ac.js';
export type { AcResult } from './analysis/ac.js';
export { runTransient } from './engine/transient.js';
export type { TransientOptions, TransientOutcome, TransientStats, TransientTrace, IntegrationMethod } from './engine/transient.js';
export { linearise, solveAt } from './engine/ac.js';
export type { SmallSignalSystem } from './engine/ac.js';
export { complexLuFactor, complexLuSolve, createComplexLuWorkspace } from './engine/complex-lu.js';
export type { ComplexLuWorkspace } from './engine/complex-lu.js';
export { runNetlist, runNetlistFile, prepare, analyse } from './analysis/run.js';
export type { RunReport, RunResult } from './analysis/run.js';
export { safetyWarnings, MAINS_CAUTION, ELV_AC_RMS, ELV_DC } from './analysis/safety.js';

export { formatSI } from './units.js';
