/**
 * The engine's flat storage and the load context devices write into. One
 * workspace per compiled circuit, reused by every analysis.
 *
 * Devices stamp through the offsets compile handed them ({@link StampList}):
 * on the dense path offsets into the dense LU's row-major matrix, on the
 * sparse path indices into a compact array with one value per stamped entry
 * (engine/sparse-lu.ts). Either way every stamp into a ground row or column
 * lands on one dump position (offset 0), which no solver reads.
 */
import type { IntegrationCoefficients, LoadContext, LoadMode } from '@railcheck/devices';
import { createLuWorkspace, luFactor, luSolve, type LuWorkspace } from './lu.js';
import { createSparseLu, type SparseLu } from './sparse-lu.js';

export type { IntegrationCoefficients };

/** The engine's implementation of {@link LoadContext}. */
class EngineLoadContext implements LoadContext {
  mode: LoadMode = 'dc';
  sourceScale = 1;
  gmin = 0;
  junctionCmin = 0;
  time = 0;
  initJunctions = false;
  limited = false;
  chargeCurrent = 0;
  chargeConductance = 0;
  readonly coefficients: IntegrationCoefficients = { a0: 0, a1: 0 };

  constructor(
    readonly matrix: Float64Array,
    readonly rhs: Float64Array,
    readonly x: Float64Array,
    public state: Float64Array,
    public statePrev: Float64Array,
  ) {}

  integrate(offset: number, capacitance: number): void {
    const { a0, a1 } = this.coefficients;
    const i = a0 * (this.state[offset]! - this.statePrev[offset]!) + a1 * this.statePrev[offset + 1]!;
    this.state[offset + 1] = i;
    this.chargeCurrent = i;
    this.chargeConductance = a0 * capacitance;
  }
}

/** Steps left to a group of transient runs, and the budget they come from (budgets.ts). */
export interface SharedStepBudget {
  left: number;
  readonly budget: 'MAX_FIGURE_STEPS' | 'MAX_BENCH_STEPS';
  readonly limit: number;
}

/**
 * The distinct matrix entries the devices of a circuit stamp (ground rows and
 * columns left out: they share the dump position 0), sorted by row, then
 * column.
 */
export interface StampList {
  /** Number of entries. */
  readonly count: number;
  /** Row (unknown) of each entry. */
  readonly rows: Int32Array;
  /** Column (unknown) of each entry. */
  readonly cols: Int32Array;
  /** Storage position of each entry in the matrix array devices stamp into. */
  readonly offsets: Int32Array;
  /** Entries of row i are rowStart[i] .. rowStart[i + 1] − 1 (size + 1 values; row 0 has none). */
  readonly rowStart: Int32Array;
  /** (row · size + column) → storage position, for binding devices of the same circuit again. */
  readonly positions: ReadonlyMap<number, number>;
}

/** The linear solver of a workspace: the dense LU on its own matrix, or the sparse LU on the compact values. */
export type LinearSolver = { readonly kind: 'dense'; readonly lu: LuWorkspace } | { readonly kind: 'sparse'; readonly lu: SparseLu };

/** Preallocated storage for one circuit. */
export interface Workspace {
  /** Unknowns + 1 (the ground row). */
  readonly size: number;
  /** Number of unknowns. */
  readonly unknowns: number;
  /** What devices stamp into: the dense LU's matrix, or the sparse path's compact values. */
  readonly matrix: Float64Array;
  /** The stamped entries and their positions in `matrix`. */
  readonly stamps: StampList;
  readonly solver: LinearSolver;
  /** Right-hand side loaded by devices. */
  readonly rhs: Float64Array;
  /** Present iterate (what devices read). */
  readonly x: Float64Array;
  /** Next iterate (solution of the linearised system). */
  readonly xNext: Float64Array;
  /** Device state (charges and their currents, junction memory): [0] at the point being solved, [1] at the last accepted time point. */
  readonly states: readonly [Float64Array, Float64Array];
  readonly ctx: EngineLoadContext;
  /** A step allowance every transient run on this circuit draws from (a figure bench's MAX_BENCH_STEPS), or none. */
  stepAllowance: SharedStepBudget | undefined;
}

/**
 * Which linear solver compile gives a circuit: the sparse one from
 * `threshold` unknowns up (measured by bench/sparse-threshold.mjs, see
 * docs/engine.md, "Sparse path"), unless `force` names one. A switch for the
 * benchmark and for running the engine's tests through either path.
 */
export const SOLVER_PATH: { force: 'dense' | 'sparse' | undefined; threshold: number } = { force: undefined, threshold: 20 };

/** Whether a circuit of `unknowns` unknowns gets the sparse solver ({@link SOLVER_PATH}). */
export function usesSparse(unknowns: number): boolean {
  return SOLVER_PATH.force === undefined ? unknowns >= SOLVER_PATH.threshold : SOLVER_PATH.force === 'sparse';
}

/**
 * Collects the entries devices bind while they are bound, and answers each
 * `slot(row, col)` with its storage position: row·size + col on the dense
 * path, the next compact index on the sparse path (0 for every ground entry).
 */
export class StampCollector {
  private readonly positions = new Map<number, number>();
  private readonly rows: number[] = [];
  private readonly cols: number[] = [];
  private next = 1;

  constructor(
    readonly size: number,
    readonly sparse: boolean,
  ) {}

  /** Storage position of matrix entry (row, col). */
  slot(row: number, col: number): number {
    if (row === 0 || col === 0) return 0;
    const key = row * this.size + col;
    const known = this.positions.get(key);
    if (known !== undefined) return known;
    const at = this.sparse ? this.next++ : key;
    this.positions.set(key, at);
    this.rows.push(row);
    this.cols.push(col);
    return at;
  }

  /** The entries bound so far, sorted by row and column. */
  list(): StampList {
    const count = this.rows.length;
    const idx = Array.from({ length: count }, (_, k) => k).sort((a, b) => this.rows[a]! - this.rows[b]! || this.cols[a]! - this.cols[b]!);
    const rows = Int32Array.from(idx, (k) => this.rows[k]!);
    const cols = Int32Array.from(idx, (k) => this.cols[k]!);
    const offsets = Int32Array.from(idx, (k) => this.positions.get(this.rows[k]! * this.size + this.cols[k]!)!);
    const rowStart = new Int32Array(this.size + 1);
    for (let k = 0; k < count; k++) rowStart[rows[k]! + 1]!++;
    for (let i = 1; i <= this.size; i++) rowStart[i] = rowStart[i]! + rowStart[i - 1]!;
    return { count, rows, cols, offsets, rowStart, positions: new Map(this.positions) };
  }
}

/** Allocates a workspace for the entries `stamps` (dense or sparse as the collector that listed them). */
export function createWorkspace(unknowns: number, stateSize: number, stamps: StampList, sparse: boolean): Workspace {
  const size = unknowns + 1;
  let solver: LinearSolver;
  let matrix: Float64Array;
  if (sparse) {
    // Entry k of the sparse LU's pattern is compact position k; position 0 is the dump (row 0).
    const rows = new Int32Array(stamps.count + 1);
    const cols = new Int32Array(stamps.count + 1);
    for (let k = 0; k < stamps.count; k++) {
      rows[stamps.offsets[k]!] = stamps.rows[k]!;
      cols[stamps.offsets[k]!] = stamps.cols[k]!;
    }
    matrix = new Float64Array(stamps.count + 1);
    solver = { kind: 'sparse', lu: createSparseLu(unknowns, rows, cols) };
  } else {
    const lu = createLuWorkspace(unknowns);
    matrix = lu.matrix;
    solver = { kind: 'dense', lu };
  }
  const rhs = new Float64Array(size);
  const x = new Float64Array(size);
  // Each state slot pair is (charge, current); backward Euler and the trapezoidal rule need the present and the last accepted state only.
  const states = [new Float64Array(Math.max(stateSize, 1)), new Float64Array(Math.max(stateSize, 1))] as const;
  const ctx = new EngineLoadContext(matrix, rhs, x, states[0], states[1]);
  return { size, unknowns, matrix, stamps, solver, rhs, x, xNext: new Float64Array(size), states, ctx, stepAllowance: undefined };
}

/**
 * Clears the matrix before the devices load it. On the sparse path the
 * compact array holds exactly the stamped entries and the dump, and the
 * factors live elsewhere, so this clears only what was stamped. The dense LU
 * factors in place and leaves L and U (fill, swapped rows) in every
 * position, so there the whole matrix is cleared: clearing the stamped
 * offsets alone would leave the last factors in the others.
 */
export function clearStamps(ws: Workspace): void {
  ws.matrix.fill(0);
}

/** Factors the loaded matrix with the workspace's solver: 0, or the unknown without an acceptable pivot. */
export function factorMatrix(ws: Workspace): number {
  const s = ws.solver;
  return s.kind === 'dense' ? luFactor(s.lu) : s.lu.factor(ws.matrix);
}

/** Solves with the last factors: `b`, `x` indexed by unknown, different arrays, x[0] = 0. */
export function solveMatrix(ws: Workspace, b: Float64Array, x: Float64Array): void {
  const s = ws.solver;
  if (s.kind === 'dense') luSolve(s.lu, b, x);
  else s.lu.solve(b, x);
}

/**
 * The stamped entries of `values` (a matrix in the workspace's storage: the
 * loaded `ws.matrix`, before it is factored, or a capacitance matrix stamped
 * through the same slots) as a new dense row-major matrix of stride `size`,
 * ground row and column zero. For the paths that are not hot (small-signal
 * analysis, diagnostics).
 */
export function denseOf(ws: Workspace, values: Float64Array): Float64Array {
  const { stamps, size } = ws;
  const out = new Float64Array(size * size);
  for (let k = 0; k < stamps.count; k++) out[stamps.rows[k]! * size + stamps.cols[k]!] = values[stamps.offsets[k]!]!;
  return out;
}

/** A fresh array for a matrix stamped through the workspace's slots (such as the small-signal capacitances). */
export function stampStorage(ws: Workspace): Float64Array {
  return new Float64Array(ws.matrix.length);
}

export type { EngineLoadContext };
