/**
 * The measurement bench: one interface through which every figure is
 * measured, with two strategies behind it (figures.md): a DC bench for a
 * stage fed with DC (dc-bench.ts: DC solutions by continuation), and a
 * sine-fed bench for a stage fed from a transformer secondary
 * (sine-fed-bench.ts: every value over one cycle at periodic steady
 * state). A figure asks the bench to solve at a setting and reads output
 * statistics; where the two definitions of figures.md genuinely differ
 * (the input axis, how dropout is judged, where the ripple comes from, how
 * a dip is applied) the bench supplies the difference.
 *
 * A bench owns a compiled circuit of its own (create-bench.ts) and sets
 * the whole setting before every solve, starting from its nominal state:
 * two benches never share state, and a figure's result does not depend on
 * which figures were measured before it.
 */
import type { BenchKind } from '../figure-registry.js';
import type { SharedStepBudget } from '../engine/transient.js';
import { Brand } from '../arguments.js';
import type { SteadyInfo } from './periodic.js';
import type { Stage } from './stage.js';
import type { SettleDistance } from './settling.js';

/** Where the bench's stage sits: input level (on the bench's axis) and load current. */
export interface StageSetting {
  /** Input level: volts on a DC bench, a ratio of the nominal amplitude on a sine-fed bench. */
  readonly level: number;
  /** Load current, A (a resistor load becomes Vout_nom / I, open for 0); undefined: the load element at its own value. */
  readonly loadAmps: number | undefined;
}

/** Output statistics of one solve: a DC point, or one cycle at periodic steady state. */
export interface OutputStats {
  /** Mean output, V, on the rail's side (railSign·Vout, see {@link BenchCommon.railSign}): a DC point, or the cycle mean on a sine-fed bench. */
  readonly mean: number;
  /** Least and greatest output over the cycle, V, on the rail's side (equal to `mean` at a DC point). */
  readonly min: number;
  readonly max: number;
  /** max − min, V (0 at a DC point). */
  readonly pp: number;
  /** Absorbed power per element name, W (a cycle average on a sine-fed bench); present when asked for. */
  readonly power: Readonly<Record<string, number>> | undefined;
  /** With `feed=` on a sine-fed bench: the feed's peak-to-peak (V) and the least V(feed) − Vout over the cycle on the rail's side (V; railSign·(V(feed) − Vout)). */
  readonly feed: { readonly pp: number; readonly headroomMin: number } | undefined;
  /** How the periodic steady state was found (undefined at a DC point). */
  readonly steady: SteadyInfo | undefined;
}

/** One node's voltage over the settled cycle, V. */
export interface NodeCycle {
  readonly mean: number;
  readonly min: number;
  readonly max: number;
}

/**
 * The operating point of a sine-fed stage as a user reads it: cycle
 * averages at periodic steady state (node voltages with their least and
 * greatest value over the cycle, element currents, absorbed power), not the
 * DC solution at switch-on.
 */
export interface CycleOperatingPoint {
  /** Node name → voltage against ground over the cycle, V. */
  readonly nodes: Readonly<Record<string, NodeCycle>>;
  /** Element current (names as in the DC operating point) → its cycle average, A. */
  readonly currents: Readonly<Record<string, number>>;
  /** Element name → absorbed power averaged over the cycle, W. */
  readonly power: Readonly<Record<string, number>>;
  /** How the steady state was found. */
  readonly steady: SteadyInfo;
}

/** A sequence of solves: the first starts from the nominal state, each later one from the one before (DC continuation). */
export interface SteadyWalk {
  /** Solves at `setting`; `what` names the solve in error messages; `power` asks for per-element power. Throws RailcheckError. */
  solve(setting: StageSetting, what: string, power?: boolean): OutputStats;
}

/** The input axis of a bench: what a {@link StageSetting.level} means. */
export interface InputAxis {
  /** `V`: the input source's volts; `ratio`: a ratio of the nominal sine amplitude. */
  readonly unit: 'V' | 'ratio';
  /** The nominal level (the input's DC value in V, or 1). */
  readonly nominal: number;
  /** Sign of the nominal level (+1, or −1 for a negative input): input differences are taken on magnitudes. */
  readonly sign: 1 | -1;
  /** A level in words, for conditions and messages. */
  describe(level: number): string;
}

/**
 * How dropout is judged (figures.md): on a DC bench, where the output
 * crosses Vout_nom − fall, a continuous function of the input solved to
 * `tolerance` V; on a sine-fed bench, whether the stage still holds its
 * output, a yes-or-no per cycle-statistics judged to `resolution` of the
 * amplitude ratio.
 */
export type DropoutRule =
  | { readonly kind: 'crossing'; readonly target: number; readonly tolerance: number }
  | {
      readonly kind: 'holding';
      /** How far the statistics are from losing hold, V: ≥ 0 holds (the smaller of the two margins of figures.md). */
      readonly margin: (s: OutputStats) => number;
      /** Width of the final bracket, as a ratio of the nominal amplitude. */
      readonly resolution: number;
    };

/** Ripple at periodic steady state: the input's and the output's peak-to-peak (V). */
export interface SteadyRipple {
  /** Peak-to-peak of the ripple the stage works against, V (undefined when a sine-fed stage names no `feed=`). */
  readonly inputPp: number | undefined;
  /** Output peak-to-peak, V. */
  readonly outputPp: number;
  /** How the periodic steady state was found. */
  readonly steady: SteadyInfo;
}

/** The shape of an input dip (figures.md, sag); times in s, `ripple` V peak at `freq` Hz. */
export interface DipShape {
  readonly edge: number;
  readonly dur: number;
  /** Ripple added to a DC input all along, V peak (0: none). */
  readonly ripple: number;
  readonly freq: number;
}

/** Dips of one shape, as a bench runs them. */
export interface DipPlan {
  /** Start of the dip, s: the run reaches steady state first. */
  readonly t0: number;
  /** Time at the bottom as run, s (whole cycles on a sine-fed bench). */
  readonly dur: number;
  /** Length of one ripple cycle, s: the windows of sag.out_pp and sag.out_pp_before. */
  readonly period: number;
  /** True when the output carries a ripple to watch (a DC input with `ripple` > 0; a sine-fed stage always). */
  readonly rippled: boolean;
  /**
   * Runs one dip of `depth` (a ratio of the nominal level) until `tEnd` s,
   * handing every accepted point's time (s), output (V, rail side) and
   * solution (V, A by unknown index) to `observe`; every step tried takes
   * one from `shared` (the figure's MAX_FIGURE_STEPS). Throws
   * RailcheckError (code `budget-…` when a budget is exceeded).
   */
  run(depth: number, tEnd: number, observe: (timeSeconds: number, outputVolts: number, x: Float64Array) => void, shared: SharedStepBudget): void;
}

/** How a settling run ended: judged settled at time `at` (s), or not by its end, with the unknown furthest from the steady state. */
export type SettlingOutcome = { readonly settled: true; readonly at: number } | { readonly settled: false; readonly furthest: SettleDistance };

/**
 * A transient towards a known steady state, as a bench runs it
 * (figures.md, startup and step): a switch-on from everything discharged,
 * or a load step from the steady state at the first current.
 */
export interface SettlingPlan {
  /** Least and greatest output of the steady state the run settles to, V on the rail side (equal on a DC bench; the settled cycle's on a sine-fed one). */
  readonly steadyMin: number;
  readonly steadyMax: number;
  /** Mean output of that steady state, V on the rail side (the settled cycle's mean on a sine-fed bench). */
  readonly steadyMean: number;
  /**
   * Output before the run, V on the rail side: at the first current of a
   * load step the steady output (DC bench) or the settled cycle's extreme
   * the step pushes towards (its least for a rising load, its greatest for
   * a falling one; sine-fed bench); 0 at switch-on.
   */
  readonly before: number;
  /** Length of one source cycle, s, between the checks of a sine-fed bench; 0 on a DC bench, which checks at every accepted point. */
  readonly checkEvery: number;
  /**
   * Runs until `tEnd` s, handing every accepted point's time (s),
   * solution (V, A by unknown index) and charge state to `observe`. It
   * ends early, settled, at the first check where the state is close to
   * the steady one (settling.ts, SteadyCheck: node voltages within `voltTol`
   * V). Every step tried takes one from `shared`. Throws RailcheckError
   * when the transient fails (code `budget-…` for a budget).
   */
  run(tEnd: number, voltTol: number, observe: (timeSeconds: number, x: Float64Array, state: Float64Array) => void, shared: SharedStepBudget): SettlingOutcome;
}

/** Waveforms at the accepted points of a run: time (s), the input source's voltage, the feed node's (when the stage names one) and the output (V, as signed, against ground and ref). */
export interface StageWaveform {
  readonly time: readonly number[];
  readonly input: readonly number[];
  readonly feed: readonly number[] | undefined;
  readonly output: readonly number[];
}

/** A load step (figures.md, step): currents drawn from the rail, A, and the rise time, s. */
export interface LoadStepShape {
  readonly from: number;
  readonly to: number;
  readonly rise: number;
}

/** What every bench offers the figures. */
export interface BenchCommon {
  /** Which strategy: `dc` or `sine-fed` (figure registry). */
  readonly kind: BenchKind;
  /** The stage on the bench's own circuit. */
  readonly stage: Stage;
  readonly input: InputAxis;
  /** Nominal output as the figures use it, V: |Vout| on a DC bench, |cycle mean| on a sine-fed bench. */
  readonly voutNominal: number;
  /** +1 for a positive rail, −1 for a negative one (by the sign of the nominal output or its cycle mean): the signed nominal output is railSign·voutNominal. */
  readonly railSign: 1 | -1;
  /** Nominal load current, A (undefined without a load element). */
  readonly loadNominal: number | undefined;
  /** The nominal solve's statistics. */
  readonly nominal: OutputStats;
  /** The operating point at nominal as a cycle average (sine-fed benches; undefined on a DC bench, whose operating point is its DC solution). */
  readonly cycleOperatingPoint: CycleOperatingPoint | undefined;
  /**
   * Where the nominal solve of a neighbouring circuit (the same stage with
   * other part values, a tolerance run) can start: the nominal DC solution
   * (start 0 s) on a DC bench, the start of the first settled cycle on a
   * sine-fed bench (solution in V and A by unknown index, start in s).
   */
  readonly warmStart: BenchStart;
  /** A sequence of solves from the nominal state. */
  walk(): SteadyWalk;
  /** One solve from the nominal state: `walk().solve(...)`. */
  solve(setting: StageSetting, what: string, power?: boolean): OutputStats;
  /** How dropout with an output fall of `fall` V is judged. */
  dropoutRule(fall: number): DropoutRule;
  /** −20·log10|Vout/Vin| (dB) at `hertz`, the stage linearised at its nominal DC point; undefined on a bench without one (sine-fed). Throws RailcheckError. */
  smallSignalRejection(hertz: number): number | undefined;
  /** Ripple at periodic steady state: a DC bench adds `amp` V peak at `hertz` Hz to the input; a sine-fed stage's ripple is its own at nominal. Throws RailcheckError. */
  steadyRipple(hertz: number, amp: number): SteadyRipple;
  /**
   * The waveforms of `cycles` cycles at periodic steady state: on a DC
   * bench with `amp` V peak at `hertz` Hz added to the input (the ripple
   * figure's run), on a sine-fed bench its own nominal cycle (hertz and amp
   * not used). Throws RailcheckError.
   */
  rippleWaveform(hertz: number, amp: number, cycles: number): StageWaveform;
  /** Plans dips of one shape. Throws RailcheckError. */
  planDip(shape: DipShape): DipPlan;
  /** Plans the switch-on from everything discharged, with the input and load at nominal. Throws RailcheckError. */
  planStartup(): SettlingPlan;
  /** Plans a load step at nominal input, from the steady state at `step.from` (on a sine-fed bench the step starts at a whole source cycle; its run's times are from the start of the step). Throws RailcheckError. */
  planStep(step: LoadStepShape): SettlingPlan;
}

/** A DC-fed stage's bench. */
export interface DcBench extends BenchCommon {
  readonly kind: 'dc';
}

/** A sine-fed stage's bench: the source's amplitude (V peak) and frequency (Hz). */
export interface SineFedBench extends BenchCommon {
  readonly kind: 'sine-fed';
  /** The source's amplitude as written, V peak. */
  readonly amplitude: number;
  /** The source's frequency, Hz. */
  readonly frequency: number;
}

/** A solution to start a solve from: values by unknown index (V, A) and, for a periodic one, the time it holds at (s). */
export interface BenchStart {
  readonly solution: Float64Array;
  readonly start: number;
}

/** A bench: a DC or a sine-fed one. */
export type Bench = DcBench | SineFedBench;

/** Benches createBench made; the only ones the figure functions accept. */
export const BENCHES: Brand<Bench> = new Brand<Bench>('a bench as createBench returns it');

/** The corner times of a dip starting at `t0` (s), with edges of `edge` s and `dur` s at the bottom. */
export function dipCorners(t0: number, edge: number, dur: number): number[] {
  return [0, t0, t0 + edge, t0 + edge + dur, t0 + 2 * edge + dur];
}

/** End of the last whole ripple cycle at the bottom of a dip, s. */
export function dipBottomEnd(plan: DipPlan, edge: number): number {
  return Math.floor((plan.t0 + edge + plan.dur) / plan.period + 1e-9) * plan.period;
}
