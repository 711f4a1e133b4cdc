/**
 * The concrete device interfaces of the built-in elements, and the guard
 * that narrows a {@link Device} by kind (the kind → interface map is the
 * registry's {@link DeviceByKind}).
 */

import type { Device, DeviceKind } from './device.js';
import type { DeviceByKind } from './registry.js';
import type { BjtModel, DiodeModel } from './models.js';
import type { WaveformSpec } from './sources.js';

/** Linear resistor between two unknowns. */
export interface Resistor extends Device {
  readonly kind: 'resistor';
  /** Unknown indices of n+ and n−. */
  readonly nodes: readonly [number, number];
  /** Resistance in ohms, non-zero; settable (load sweeps, tolerance runs). */
  resistance: number;
}

/** What capacitors and inductors share: an optional initial condition. */
export interface ReactiveElement extends Device {
  /** Unknown indices of n+ and n−. */
  readonly nodes: readonly [number, number];
  /** The `ic=` value: volts for a capacitor, amps for an inductor; undefined when not given. */
  readonly initialCondition: number | undefined;
  /**
   * Writes the state implied by {@link initialCondition} (charge C·ic, or
   * flux L·ic, and a zero derivative) into `state`. Returns false, writing
   * nothing, when no initial condition was given. Valid after allocate.
   */
  seedInitialCondition(state: Float64Array): boolean;
}

/** Linear capacitor. State: charge q = C·v and its current. */
export interface Capacitor extends ReactiveElement {
  readonly kind: 'capacitor';
  /** Capacitance in farads; settable. */
  capacitance: number;
}

/** Linear inductor with a branch-current unknown. State: flux L·i and its derivative (the voltage). */
export interface Inductor extends ReactiveElement {
  readonly kind: 'inductor';
  /** Inductance in henries; settable. */
  inductance: number;
  /** Unknown index of the branch current (valid after allocate). */
  readonly branchIndex: number;
}

/** An independent voltage or current source. */
export interface IndependentSource extends Device {
  readonly kind: 'vsource' | 'isource';
  /** Unknown indices of n+ and n−. */
  readonly nodes: readonly [number, number];
  /** DC value in volts or amps; DC sweeps set it. */
  dc: number;
  /** Time dependence used in transient analysis; settable. */
  waveform: WaveformSpec | undefined;
  /** Small-signal magnitude in volts or amps. */
  acMag: number;
  /** Small-signal phase in degrees. */
  acPhaseDeg: number;
  /**
   * Rise and fall time in seconds used where a pulse leaves `tr`/`tf`
   * undefined; the engine sets it to the transient's output step. 0 (an
   * ideal step) until set.
   */
  defaultEdge: number;
  /** Waveform value at `timeSeconds` (V or A), else {@link dc}; formulas of netlist.md. */
  valueAt(timeSeconds: number): number;
  /** Pushes every waveform corner in (fromSeconds, toSeconds] onto `out`, ascending; a pulse train stops once `out` holds `max` entries (default unbounded). */
  breakpoints(fromSeconds: number, toSeconds: number, out: number[], max?: number): void;
  /** An upper bound on the corners {@link breakpoints} would push for (fromSeconds, toSeconds], counted without generating them. */
  cornerCount(fromSeconds: number, toSeconds: number): number;
}

/** Independent voltage source; its branch current is the source current. */
export interface VoltageSource extends IndependentSource {
  readonly kind: 'vsource';
  /** Unknown index of the branch current (valid after allocate). */
  readonly branchIndex: number;
}

/** Independent current source. */
export interface CurrentSource extends IndependentSource {
  readonly kind: 'isource';
}

/** Voltage-controlled voltage source (E). */
export interface Vcvs extends Device {
  readonly kind: 'vcvs';
  /** Unknown indices n+, n−, nc+, nc−. */
  readonly nodes: readonly [number, number, number, number];
  /** Voltage gain, V/V. */
  readonly gain: number;
  /** Unknown index of the output branch current (valid after allocate). */
  readonly branchIndex: number;
}

/** Voltage-controlled current source (G). */
export interface Vccs extends Device {
  readonly kind: 'vccs';
  /** Unknown indices n+, n−, nc+, nc−. */
  readonly nodes: readonly [number, number, number, number];
  /** Transconductance, S. */
  readonly gm: number;
}

/** Current-controlled current source (F). */
export interface Cccs extends Device {
  readonly kind: 'cccs';
  /** Unknown indices n+, n−. */
  readonly nodes: readonly [number, number];
  /** Lower-case flat name of the controlling voltage source. */
  readonly controlName: string;
  /** Current gain, A/A. */
  readonly gain: number;
}

/** Current-controlled voltage source (H). */
export interface Ccvs extends Device {
  readonly kind: 'ccvs';
  /** Unknown indices n+, n−. */
  readonly nodes: readonly [number, number];
  /** Lower-case flat name of the controlling voltage source. */
  readonly controlName: string;
  /** Transresistance, Ω. */
  readonly rm: number;
  /** Unknown index of the output branch current (valid after allocate). */
  readonly branchIndex: number;
}

/** Junction diode (Shockley with optional breakdown). */
export interface Diode extends Device {
  readonly kind: 'diode';
  /** Unknown indices of anode and cathode. */
  readonly nodes: readonly [number, number];
  /** The model as given, at Tnom, before area scaling. */
  readonly model: DiodeModel;
  /** Area factor (dimensionless). */
  readonly area: number;
  /**
   * Current from anode to cathode (A) in solution `x` with charge state
   * `state`: the junction current (Shockley, models.md) plus the charge
   * current, as {@link Device.report} gives it, without allocating.
   */
  forwardCurrent(x: Float64Array, state: Float64Array): number;
}

/** Bipolar transistor (Ebers-Moll transport form with Early effect). */
export interface Bjt extends Device {
  readonly kind: 'bjt';
  /** Unknown indices of collector, base and emitter. */
  readonly nodes: readonly [number, number, number];
  /** The model as given, at Tnom, before area scaling. */
  readonly model: BjtModel;
  /** Area factor (dimensionless). */
  readonly area: number;
}

/** Any device this package creates: a union discriminated by `kind`. */
export type AnyDevice = DeviceByKind[DeviceKind];

/** True when `device` is of kind `kind`, narrowing it to that kind's interface. */
export function isKind<K extends DeviceKind>(device: Device, kind: K): device is DeviceByKind[K] {
  return device.kind === kind;
}
