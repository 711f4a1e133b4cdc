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
export { runNetlist, runNetlistFile, prepare, analyse } from './analysis/run.js';
export type { RunReport, RunResult } from './analysis/run.js';
export { safetyWarnings, MAINS_CAUTION, ELV_AC_RMS, ELV_DC } from './analysis/safety.js';

export { formatSI } from './units.js';
