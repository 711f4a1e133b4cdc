/**
 * The contract between device models and the engine. A device knows how to
 * load its contribution (currents, conductances, charges) at a given
 * solution; it knows nothing of analyses. Layout follows modified nodal
 * analysis (Ho, Ruehli and Brennan, IEEE Trans. Circuits Syst. 22(6), 1975):
 * unknowns are node voltages and branch currents; index 0 is ground, whose
 * row and column exist in storage but are never solved (stamps there are
 * discarded), so devices stamp without testing for ground.
 */

import type { DeviceSpecs } from './registry.js';

/** Solution-vector index of the ground node. */
export const GROUND = 0;

/** Kinds of device, one per element letter that reaches the engine: the keys of the registry's {@link DeviceSpecs}. */
export type DeviceKind = keyof DeviceSpecs<number>;

/** What the engine is solving when it asks devices to load. */
export type LoadMode = 'dc' | 'tran';

/**
 * The answer to a branch look-up by element name: the branch-current unknown
 * and the device that owns it, or a typed failure (never the ground index).
 */
export type BranchRef =
  | { readonly ok: true; readonly index: number; readonly device: Device }
  | { readonly ok: false; readonly reason: 'no-such-element' | 'no-branch' };

/** Hands out solution-vector indices while a circuit compiles (phase 1). */
export interface UnknownAllocator {
  /** A new voltage unknown private to the device (e.g. behind a series resistance). */
  internalNode(label: string): number;
  /** A new branch-current unknown (voltage sources, inductors, E and H). */
  branch(label: string): number;
  /** Offset of `count` consecutive slots in the state vectors (charges, their currents). */
  state(count: number): number;
  /**
   * The branch of the element whose lower-case flat name is `key` (the
   * controlling V of F and H, the inductors of K). Elements that own a branch
   * are allocated before those that look one up. A failed look-up is recorded
   * as an error against the asking element by the allocator itself, and the
   * circuit does not compile; the failure is typed so that no caller can
   * mistake it for an index.
   */
  branchOf(key: string): BranchRef;
  /** Records a compile error against the element being allocated (e.g. a K whose element is no inductor). */
  fail(message: string): void;
}

/** Gives matrix storage offsets once every unknown is known (phase 2). */
export interface SlotBinder {
  /** Storage offset of matrix entry (row, col); any index may be {@link GROUND}. */
  slot(row: number, col: number): number;
}

/**
 * Integration coefficients of the present time step, in 1/s: the current of
 * a stored charge (or the voltage of a stored flux) is
 * `i = a0·(q − qPrev) + a1·iPrev`. Backward Euler: a0 = 1/h, a1 = 0; the
 * trapezoidal rule: a0 = 2/h, a1 = −1 (h the step in seconds; Gear 1971,
 * ch. 9). The engine sets both to 0 outside transient analyses.
 */
export interface IntegrationCoefficients {
  a0: number;
  a1: number;
}

/**
 * Everything a device reads and writes while loading. The engine owns it and
 * reuses one object for the whole run: nothing is allocated per load.
 */
export interface LoadContext {
  /** Jacobian (conductance) matrix storage, addressed by {@link SlotBinder.slot} offsets. */
  readonly matrix: Float64Array;
  /** Right-hand side, indexed by unknown (companion form: matrix · xNew = rhs). */
  readonly rhs: Float64Array;
  /** Present Newton iterate; x[GROUND] is 0. */
  readonly x: Float64Array;
  /** State at the time point being solved (devices write charges here). */
  readonly state: Float64Array;
  /** State at the last accepted time point. */
  readonly statePrev: Float64Array;
  /** DC (charges ignored) or transient (charges integrated). */
  mode: LoadMode;
  /** Scale on every independent source, 0..1, for source stepping. */
  sourceScale: number;
  /** Conductance in siemens placed across each junction (gmin stepping; 1e-12 S in the final solution). */
  gmin: number;
  /**
   * Capacitance in farads a diode with CJO = 0 places across its junction
   * (0 except in a `.tran` analysis, which sets JUNCTION_CMIN; docs/transient.md).
   */
  junctionCmin: number;
  /** Simulation time in seconds (0 at DC). */
  time: number;
  /** True on the first Newton iteration of an analysis: junctions start from their critical voltage. */
  initJunctions: boolean;
  /** Set by a device that limited a junction voltage this iteration: the iterate is not yet converged. */
  limited: boolean;
  /**
   * Integrates the charge stored at `state[offset]` (its current goes to
   * `state[offset + 1]`), given dq/dv = `capacitance` in farads, and leaves the
   * companion results in {@link chargeCurrent} and {@link chargeConductance}.
   */
  integrate(offset: number, capacitance: number): void;
  /** Output of {@link integrate}: the charge's present current in amps. */
  chargeCurrent: number;
  /** Output of {@link integrate}: dI/dV of that current in siemens. */
  chargeConductance: number;
  /**
   * The present integration coefficients (read-only to devices): what
   * {@link integrate} applies, for elements whose stamps couple several
   * stored quantities (mutual inductance) and must scale rows as the owner
   * of each row does. Meaningful in transient loads only (0 outside them).
   */
  readonly coefficients: Readonly<IntegrationCoefficients>;
}

/** Capacitance (dq/dv) and source-excitation stamps for small-signal analysis. */
export interface ReactiveContext {
  /** Capacitance matrix storage (same slots as the Jacobian), in farads or henries. */
  readonly capacitance: Float64Array;
  /** Real part of the small-signal excitation, indexed by unknown. */
  readonly excitationRe: Float64Array;
  /** Imaginary part of the small-signal excitation. */
  readonly excitationIm: Float64Array;
  /** The operating point at which devices are linearised. */
  readonly x: Float64Array;
}

/** Pairs of unknowns joined by a DC path, and voltage-defining branches, for topology checks. */
export interface Topology {
  /** Node pairs between which the device conducts at DC. */
  readonly dcPaths: ReadonlyArray<readonly [number, number]>;
  /** Node pairs whose voltage the device fixes (V, E, H, and L at DC), for loop checks. */
  readonly voltageDefined: ReadonlyArray<readonly [number, number]>;
}

/** What a device reports at a solution: terminal currents and power. */
export interface DeviceReport {
  /** Current into each terminal in amps, keyed by terminal label ('' for a two-terminal element). */
  readonly currents: ReadonlyArray<readonly [label: string, amps: number]>;
  /** Power absorbed in watts (negative for a source delivering power). */
  readonly power: number;
}

/** A device instance, compiled into the engine's workspaces. */
export interface Device {
  /** Which kind of device this is. */
  readonly kind: DeviceKind;
  /** Flat name as first written, e.g. `X1.Q2`. */
  readonly name: string;
  /** Phase 1: claims internal nodes, branches and state slots. */
  allocate(unknowns: UnknownAllocator): void;
  /** Phase 2: records the matrix offsets of every stamp. */
  bind(slots: SlotBinder): void;
  /** Sets the device temperature in kelvin (model parameters scale with it). */
  setTemperature(kelvin: number): void;
  /** Stamps the linearised contribution at `ctx.x` into `ctx.matrix` and `ctx.rhs`. */
  load(ctx: LoadContext): void;
  /** Stamps capacitances (and AC excitations for sources) at the operating point `ctx.x`. */
  loadReactive(ctx: ReactiveContext): void;
  /** DC connectivity for the floating-node and voltage-loop checks. */
  topology(): Topology;
  /** Terminal currents and absorbed power at solution `x` (not for the hot loop). */
  report(x: Float64Array, state: Float64Array): DeviceReport;
  /**
   * State-vector offsets of the charges (C) and fluxes (Wb) this device
   * integrates, each followed by its current at offset + 1; valid after
   * allocate. These are the state of the circuit in the periodic-steady-state
   * sense (Aprille and Trick 1972). Devices without stored charge omit it.
   */
  chargeSlots?(): readonly number[];
  /**
   * Elements that store energy given by `ic=` (C, L, and K for the mutual
   * flux) write the state implied by their initial conditions into `state`
   * (zero state elsewhere) and return true; valid after allocate. Used by a
   * transient started from the initial conditions. Absent on elements that
   * store nothing.
   */
  seedInitialCondition?(state: Float64Array): boolean;
}
