/**
 * The engine's flat storage and the load context devices write into. One
 * workspace per compiled circuit, reused by every analysis.
 */
import type { IntegrationCoefficients, LoadContext, LoadMode } from '@railcheck/devices';
import { createLuWorkspace, type LuWorkspace } from './lu.js';

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

/** Preallocated storage for one circuit. */
export interface Workspace {
  /** Unknowns + 1 (the ground row). */
  readonly size: number;
  /** Number of unknowns. */
  readonly unknowns: number;
  readonly lu: LuWorkspace;
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

/** Allocates a workspace. */
export function createWorkspace(unknowns: number, stateSize: number): Workspace {
  const lu = createLuWorkspace(unknowns);
  const size = lu.size;
  const rhs = new Float64Array(size);
  const x = new Float64Array(size);
  // Each state slot pair is (charge, current); backward Euler and the trapezoidal rule need the present and the last accepted state only.
  const states = [new Float64Array(Math.max(stateSize, 1)), new Float64Array(Math.max(stateSize, 1))] as const;
  const ctx = new EngineLoadContext(lu.matrix, rhs, x, states[0], states[1]);
  return { size, unknowns, lu, rhs, x, xNext: new Float64Array(size), states, ctx, stepAllowance: undefined };
}

export type { EngineLoadContext };
