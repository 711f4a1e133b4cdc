/**
 * The thermal figure (docs/thermal.md): for every diode and transistor with
 * `rth=`, its junction temperature at its largest dissipation over the
 * dissipation figure's conditions, Tj = Ta + P·(rth + rthsink), the margin
 * to its largest junction temperature, and the largest heatsink thermal
 * resistance that keeps the junction at that temperature; optionally the
 * electro-thermal operating point at nominal (each such part at its own
 * junction temperature, found by damped fixed-point iteration) and the
 * output's drift from cold to warm. The steady-state thermal network is the
 * series one of JEDEC JESD51-1 (junction to case to ambient, thermal
 * resistances in K/W); the fixed point is the relaxation method of coupled
 * electro-thermal simulation (docs/thermal.md names the sources).
 */
import { ZERO_CELSIUS } from '@railcheck/devices';
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import type { FlatElement } from '../elaborate/flat.js';
import type { CardOrigin } from '../netlist/ast.js';
import { setCircuitTemperature } from '../engine/dcop.js';
import { formatSI } from '../units.js';
import type { Bench, StageSetting } from './bench.js';
import { dissipation } from './dissipation.js';

/**
 * Largest junction temperature when `tjmax=` is not given, °C, per device
 * kind: 150 °C for silicon diodes and bipolar transistors, the rating most
 * datasheets of small-signal and power silicon parts in plastic packages
 * give (from memory of typical datasheets; some power parts in metal cans
 * are rated 175 or 200 °C: give `tjmax=` for them).
 */
export const DEFAULT_TJMAX: Readonly<Record<'diode' | 'bjt', number>> = { diode: 150, bjt: 150 };

/** Least dissipation the heatsink question is asked for, W: below it rthsink_max would exceed 1e9 K/W per kelvin of margin, and is left out (common practice, no source). */
export const THERMAL_MIN_POWER = 1e-9;

/** Tolerance of the self-heating fixed point, K: the largest change of a junction temperature from one iteration to the next when it stops (docs/thermal.md). */
export const SELF_HEAT_TOLERANCE = 1e-3;

/** Most iterations of the self-heating fixed point, each one DC solve (docs/thermal.md). */
export const SELF_HEAT_MAX_ITERATIONS = 60;

/** Smallest damping factor of the fixed point: the factor halves from 1 whenever the change grows, down to this. */
export const SELF_HEAT_MIN_DAMPING = 1 / 16;

/** A junction temperature past which the fixed point stops as thermal runaway, °C: far beyond any silicon rating (150–200 °C), where the models mean nothing (common practice, no source). */
export const RUNAWAY_CELSIUS = 400;

/** One part with `rth=`: its thermal data and its junction temperature at its largest dissipation. */
export interface ThermalRow {
  /** Element name as written (`X1.Q2` inside subcircuits). */
  readonly element: string;
  readonly kind: 'diode' | 'bjt';
  /** Largest dissipation over nominal and the corners, W (the dissipation figure's `pd.<element>`, measured with the parts at ambient). */
  readonly power: number;
  /** `rth=`, K/W: junction to ambient, or junction to case when `rthsink` is given. */
  readonly rth: number;
  /** `rthsink=`, K/W (case to ambient through the heatsink), or undefined. */
  readonly rthsink: number | undefined;
  /** Junction temperature Ta + P·(rth + rthsink), °C. */
  readonly tj: number;
  /** Largest junction temperature, °C, and where it came from (`tjmax=`, or {@link DEFAULT_TJMAX}). */
  readonly tjmax: number;
  readonly tjmaxFrom: 'part' | 'default';
  /** tjmax − tj, K. */
  readonly margin: number;
  /** (tjmax − Ta)/P − rth with rthsink given, (tjmax − Ta)/P without, K/W; undefined with the reason when it has no finite positive value. */
  readonly rthsinkMax: { readonly ok: true; readonly value: number } | { readonly ok: false; readonly reason: string };
}

/** The electro-thermal operating point at nominal: converged, or not with the reason. */
export type SelfHeat =
  | {
      readonly ok: true;
      /** Output at nominal with every part at ambient, and with each part with rth= at its own junction temperature, V on the rail's side. */
      readonly voutCold: number;
      readonly voutWarm: number;
      /** voutWarm − voutCold, V. */
      readonly drift: number;
      /** Element name → junction temperature at the fixed point, °C. */
      readonly junctions: Readonly<Record<string, number>>;
      /** Iterations taken (DC solves after the cold one). */
      readonly iterations: number;
    }
  | { readonly ok: false; readonly reason: string };

/** The thermal figure's result. */
export interface Thermal {
  /** Ambient temperature, °C. */
  readonly ambient: number;
  /** The parts with `rth=`, in netlist order. */
  readonly rows: readonly ThermalRow[];
  /** The settings the dissipation was taken over, nominal first. */
  readonly corners: readonly StageSetting[];
  /** With `selfHeat`: the electro-thermal operating point. */
  readonly selfHeat: SelfHeat | undefined;
  /** Parts given `rthsink=` or `tjmax=` without `rth=`: left out, with a note each. */
  readonly notes: readonly Diagnostic[];
}

/** Options of {@link thermal}. */
export interface ThermalOptions {
  /** Ambient, °C (default: the bench's temperature, the figure temperature). */
  readonly ambient?: number | undefined;
  /** True: also find the electro-thermal operating point at nominal (DC benches only). */
  readonly selfHeat?: boolean | undefined;
  /** Highest input level and load range of the corners (as the dissipation figure takes them). */
  readonly highLevel?: number | undefined;
  readonly loadRange?: readonly [number, number] | undefined;
  /** The `.figure` line, where an error without a place of its own is put. */
  readonly origin?: CardOrigin | undefined;
}

type Semiconductor = Extract<FlatElement, { kind: 'diode' | 'bjt' }>;
const isSemiconductor = (el: FlatElement): el is Semiconductor => el.kind === 'diode' || el.kind === 'bjt';

/** Total thermal resistance junction to ambient, K/W. */
const totalRth = (rth: number, rthsink: number | undefined): number => rth + (rthsink ?? 0);

/**
 * The junction of a diode or transistor of thermal resistance `rth` (K/W,
 * its `rth=`) dissipating `power` W in `ambient` °C: Tj = Ta + P·(rth +
 * rthsink) (JEDEC JESD51-1: the rise is
 * P·(R_th(j-c) + R_th(c-a)), or P·R_th(j-a)), a negative P counting as 0,
 * and its tjmax (`tjmax=`, else {@link DEFAULT_TJMAX}), °C.
 */
export function junctionOf(el: Extract<FlatElement, { kind: 'diode' | 'bjt' }>, rth: number, power: number, ambient: number): { tj: number; tjmax: number; tjmaxFrom: 'part' | 'default' } {
  return { tj: ambient + Math.max(power, 0) * totalRth(rth, el.part.rthsink), tjmax: el.part.tjmax ?? DEFAULT_TJMAX[el.kind], tjmaxFrom: el.part.tjmax === undefined ? 'default' : 'part' };
}

/** The largest heatsink (or, without rthsink=, total) thermal resistance that keeps the junction at tjmax, with the reason when it has no finite positive value. */
function rthsinkMaxOf(power: number, rth: number, rthsink: number | undefined, tjmax: number, ambient: number): ThermalRow['rthsinkMax'] {
  if (!(power > THERMAL_MIN_POWER)) return { ok: false, reason: `it dissipates ${formatSI(Math.max(power, 0), 'W')} (below ${formatSI(THERMAL_MIN_POWER, 'W')}): any heatsink keeps the junction at ambient` };
  if (!(ambient < tjmax)) return { ok: false, reason: `the ambient ${ambient} °C is not below tjmax ${tjmax} °C: no thermal resistance keeps the junction below it` };
  const total = (tjmax - ambient) / power;
  if (rthsink === undefined) return { ok: true, value: total };
  const sink = total - rth;
  if (!(sink > 0)) return { ok: false, reason: `even an ideal heatsink (0 K/W) leaves the junction at ${(ambient + power * rth).toFixed(1)} °C, above tjmax ${tjmax} °C: rth= (junction to case) alone is too high for ${formatSI(power, 'W')}` };
  return { ok: true, value: sink };
}

/**
 * Measures junction temperatures on the bench with every device at
 * `ambient` (default the bench's temperature), the bench's temperature put
 * back afterwards. Throws RailcheckError when no diode or transistor has
 * `rth=`, or when a corner cannot be solved; a self-heating point that
 * cannot be found is returned with its reason instead.
 */
export function thermal(bench: Bench, opts: ThermalOptions = {}): Thermal {
  const { stage } = bench;
  const c = stage.compiled;
  const origin = opts.origin ?? stage.supply.origin;
  const ambient = opts.ambient ?? stage.celsius;
  const parts = c.elements.filter(isSemiconductor);
  const rated = parts.filter((el) => el.part.rth !== undefined);
  const notes = parts
    .filter((el) => el.part.rth === undefined && (el.part.rthsink !== undefined || el.part.tjmax !== undefined))
    .map((el) => warningAt('no-rth', `thermal: ${el.name} has ${el.part.rthsink !== undefined ? 'rthsink=' : 'tjmax='} but no rth=, so its junction temperature is not figured`, el.origin.pos, el.origin.lineText));
  if (rated.length === 0) {
    throw new RailcheckError([errorAt('no-thermal-data', 'thermal: no diode or transistor carries rth= (its thermal resistance), so no junction temperature can be figured', origin.pos, origin.lineText, 'rth=<K/W> on a D or Q line (with rthsink= and tjmax= as needed; docs/thermal.md)')]);
  }
  try {
    if (ambient !== stage.celsius) setCircuitTemperature(c, ambient);
    const d = dissipation(bench, { highLevel: opts.highLevel, loadRange: opts.loadRange, origin });
    const rows = rated.map((el): ThermalRow => {
      const rth = el.part.rth!;
      const rthsink = el.part.rthsink;
      const power = d.pd[el.name] ?? 0;
      const { tj, tjmax, tjmaxFrom } = junctionOf(el, rth, power, ambient);
      return { element: el.name, kind: el.kind, power, rth, rthsink, tj, tjmax, tjmaxFrom, margin: tjmax - tj, rthsinkMax: rthsinkMaxOf(power, rth, rthsink, tjmax, ambient) };
    });
    const selfHeat = opts.selfHeat ? selfHeatedPoint(bench, rated, ambient) : undefined;
    return { ambient, rows, corners: d.corners, selfHeat, notes };
  } finally {
    setCircuitTemperature(c, stage.celsius);
  }
}

/**
 * The electro-thermal operating point at nominal (docs/thermal.md): every
 * device at `ambient`, a cold solve, then T_i ← T_i + α·(Ta + P_i(T)·Rth_i
 * − T_i) for each part with rth=, one DC solve per iteration (continued
 * from the last), until the largest change is at most
 * {@link SELF_HEAT_TOLERANCE}; α starts at 1 and halves (down to
 * {@link SELF_HEAT_MIN_DAMPING}) whenever the change grows. Stops with a
 * reason after {@link SELF_HEAT_MAX_ITERATIONS}, past
 * {@link RUNAWAY_CELSIUS}, or when a solve fails. Leaves the devices at
 * their last temperatures: the caller puts them back.
 */
function selfHeatedPoint(bench: Bench, rated: readonly Semiconductor[], ambient: number): SelfHeat {
  const c = bench.stage.compiled;
  const devices = rated.map((el) => c.deviceByKey.get(el.key)!);
  const rth = rated.map((el) => totalRth(el.part.rth!, el.part.rthsink));
  const setting: StageSetting = { level: bench.input.nominal, loadAmps: bench.loadNominal };
  const walk = bench.walk();
  try {
    setCircuitTemperature(c, ambient);
    const cold = walk.solve(setting, 'thermal: the stage at ambient', true);
    let power = rated.map((el) => cold.power![el.name] ?? 0);
    let vout = cold.mean;
    const temps = rated.map(() => ambient);
    let damping = 1;
    let lastChange = Infinity;
    let change = Infinity;
    for (let iteration = 0; iteration <= SELF_HEAT_MAX_ITERATIONS; iteration++) {
      change = 0;
      for (let i = 0; i < temps.length; i++) change = Math.max(change, Math.abs(ambient + Math.max(power[i]!, 0) * rth[i]! - temps[i]!));
      if (change <= SELF_HEAT_TOLERANCE) {
        return { ok: true, voutCold: cold.mean, voutWarm: vout, drift: vout - cold.mean, junctions: Object.fromEntries(rated.map((el, i) => [el.name, temps[i]!])), iterations: iteration };
      }
      if (iteration === SELF_HEAT_MAX_ITERATIONS) break;
      if (change > lastChange) damping = Math.max(damping / 2, SELF_HEAT_MIN_DAMPING);
      lastChange = change;
      for (let i = 0; i < temps.length; i++) {
        temps[i] = temps[i]! + damping * (ambient + Math.max(power[i]!, 0) * rth[i]! - temps[i]!);
        if (temps[i]! > RUNAWAY_CELSIUS) return { ok: false, reason: `thermal runaway: the junction temperature of ${rated[i]!.name} passed ${RUNAWAY_CELSIUS} °C at iteration ${iteration + 1} of the self-heating point` };
        devices[i]!.setTemperature(temps[i]! + ZERO_CELSIUS);
      }
      const warm = walk.solve(setting, 'thermal: the self-heated stage', true);
      power = rated.map((el) => warm.power![el.name] ?? 0);
      vout = warm.mean;
    }
    return { ok: false, reason: `the self-heating point did not settle within ${SELF_HEAT_MAX_ITERATIONS} iterations to ${SELF_HEAT_TOLERANCE} K (last change ${change.toPrecision(3)} K)` };
  } catch (e) {
    if (!(e instanceof RailcheckError)) throw e;
    return { ok: false, reason: `a solve of the self-heating point failed: ${e.diagnostics.map((x) => x.message).join('; ')}` };
  }
}
