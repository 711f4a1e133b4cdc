/**
 * The DC bench (figures.md): a stage fed with DC, measured by DC solutions
 * reached by continuation from the nominal point ("nominal": the input
 * source at its DC value, the load at its own value), its ripple by the
 * small-signal analysis and by a sine added to the input, and its dips by
 * a piecewise-linear input. Figures of a negative rail are taken on
 * magnitudes (|Vout|, |Vin|), so that "the output droops" and "the input
 * falls" read the same on both polarities.
 */
import { JUNCTION_CMIN } from '@railcheck/devices';
import type { WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import { FINAL_GMIN, solveOperatingPoint } from '../engine/dcop.js';
import { describeTransientFailure, runTransient, transientFailureCode } from '../engine/transient.js';
import { opFailure } from '../analysis/dc.js';
import { readSolution } from '../analysis/solution.js';
import { formatSI } from '../units.js';
import { dipBottomEnd, dipCorners, type BenchStart, type DcBench, type DipPlan, type DipShape, type LoadStepShape, type OutputStats, type SettlingOutcome, type SettlingPlan, type StageSetting, type StageWaveform, type SteadyRipple, type SteadyWalk } from './bench.js';
import { SteadyCheck } from './settling.js';
import type { SharedStepBudget } from '../engine/transient.js';
import { settleCycle, type SteadyInfo } from './periodic.js';
import { inputTransfer, smallSignalStart } from './small-signal.js';
import { applyDrive, loadCurrentOf, meterPoints, onRail, solveSetting, vout, WaveRecorder, type DcSetting, type Drive, type Stage } from './stage.js';

/** Width of the final dropout bracket, V: well inside the 1 mV figures.md asks for. */
const DROPOUT_INPUT_TOLERANCE = 1e-4;

/**
 * Truncation-error tolerance of the dip transients: the fall is compared
 * with a criterion of the order of 100 mV on rails of volts, so the step
 * control is held to 10 µV per volt rather than the analysis default
 * (1 mV per volt).
 */
const SAG_LTE_RELTOL = 1e-5;

/** Least steps per ripple cycle in a dip transient (a sine's peak-to-peak to about 0.01 %). */
const SAG_STEPS_PER_CYCLE = 200;

/** Largest internal step of a settling run (switch-on, load step), as a share of its length: the band crossing is interpolated between points at most this far apart. */
const SETTLE_MAX_STEP_SHARE = 1e-3;
/**
 * Truncation-error tolerance of a settling run: a settling time is read
 * where the output crosses a band of the order of 1 % of the output, and
 * moves by τ·(error/band), so the step control is held to 1 µV per volt.
 */
const SETTLE_LTE_RELTOL = 1e-6;
/** `tstep` of a settling run as a share of its length (the first step is a hundredth of it). */
const SETTLE_FIRST_STEP_SHARE = 1e-9;

/** The nominal state of the bench's circuit: solution and device state (junction memory, charges). */
interface Snapshot {
  readonly x: Float64Array;
  readonly state: Float64Array;
  readonly statePrev: Float64Array;
}

/**
 * Solves the nominal DC point of the stage and returns its bench. With
 * `from`, Newton starts there first (a neighbouring circuit's nominal
 * point), and from zero as usual when that fails. Throws RailcheckError.
 */
export function createDcBench(given: Stage, from?: BenchStart): DcBench {
  const c = given.compiled;
  const ws = c.ws;
  const compiledDrive: Drive = { dc: given.inputDc, waveform: given.inputWaveform, loadAmps: undefined };
  applyDrive(given, compiledDrive, 1);
  let warm = false;
  if (from !== undefined && from.solution.length === ws.x.length) {
    ws.x.set(from.solution);
    warm = solveOperatingPoint(c, true).ok;
  }
  const outcome = warm ? ({ ok: true } as const) : solveOperatingPoint(c);
  if (!outcome.ok) throw new RailcheckError([opFailure(outcome, 'nominal operating point of the stage', given.supply.origin)]);
  const signed = vout(given);
  const railSign = signed < 0 ? -1 : 1;
  const stage = onRail(given, railSign);
  const voutNominal = Math.abs(signed);
  const loadNominal = loadCurrentOf(stage, voutNominal);
  const snapshot: Snapshot = { x: new Float64Array(ws.x), state: new Float64Array(ws.states[0]), statePrev: new Float64Array(ws.states[1]) };
  stage.meter?.point(ws.x, ws.states[0], 'the nominal point');
  const nominalSetting: DcSetting = { vin: stage.inputDc, loadAmps: loadNominal };
  const nominalDrive = (extra: Partial<Drive> = {}): Drive => ({ dc: stage.inputDc, waveform: stage.inputWaveform, loadAmps: loadNominal, ...extra });

  /** Puts the circuit in `at` (solution and device state) with `drive` applied. */
  const restore = (at: Snapshot, drive: Drive): void => {
    ws.x.set(at.x);
    ws.states[0].set(at.state);
    ws.states[1].set(at.statePrev);
    ws.ctx.mode = 'dc';
    ws.ctx.time = 0;
    ws.ctx.gmin = FINAL_GMIN;
    ws.ctx.sourceScale = 1;
    applyDrive(stage, drive, voutNominal);
  };
  /** Every solve that does not continue a walk starts from the nominal state. */
  const reset = (drive: Drive): void => restore(snapshot, drive);
  const statsHere = (power: boolean, what: string): OutputStats => {
    stage.meter?.point(ws.x, ws.states[0], what);
    const v = railSign * vout(stage);
    return { mean: v, min: v, max: v, pp: 0, power: power ? readSolution(c).power : undefined, feed: undefined, steady: undefined };
  };
  // A walk keeps its own last state, so walks (and other solves) may interleave on one bench.
  const walk = (): SteadyWalk => {
    const here: Snapshot = { x: new Float64Array(snapshot.x), state: new Float64Array(snapshot.state), statePrev: new Float64Array(snapshot.statePrev) };
    let current = nominalSetting;
    return {
      solve(setting: StageSetting, what: string, power = false): OutputStats {
        restore(here, nominalDrive());
        const target: DcSetting = { vin: setting.level, loadAmps: setting.loadAmps };
        solveSetting(stage, current, target, voutNominal, what);
        current = target;
        here.x.set(ws.x);
        here.state.set(ws.states[0]);
        here.statePrev.set(ws.states[1]);
        return statsHere(power, what);
      },
    };
  };
  const sine = (amp: number, hertz: number, vo: number): WaveformSpec => ({ kind: 'sin', vo, va: amp, freq: hertz, td: 0, theta: 0, phaseDeg: 0 });
  /**
   * `amp` V peak at `hertz` Hz added to the input, run to periodic steady
   * state from the small-signal periodic state: the settled cycle's start
   * (time and solution), how it was found, and the output peak-to-peak (V).
   */
  const rippleSettle = (hertz: number, amp: number, what: string): { solution: Float64Array; start: number; steady: SteadyInfo; outPp: number } => {
    reset(nominalDrive({ inputAc: amp }));
    const start = smallSignalStart(stage, hertz);
    applyDrive(stage, nominalDrive({ waveform: sine(amp, hertz, stage.inputDc) }), voutNominal);
    stage.meter?.begin(`${what}: the settled cycle`, true);
    const periodic = settleCycle(c, { period: 1 / hertz, probes: [(x: Float64Array) => vout(stage, x)], initialSolution: start, ...meterPoints(stage) }, what, stage.supply.origin);
    stage.meter?.end();
    const last = periodic.last[0]!;
    return { solution: periodic.solution, start: periodic.start, steady: periodic.steady, outPp: last.max - last.min };
  };
  const sign: 1 | -1 = stage.inputDc < 0 ? -1 : 1;
  const copy = (): Snapshot => ({ x: new Float64Array(ws.x), state: new Float64Array(ws.states[0]), statePrev: new Float64Array(ws.states[1]) });
  /**
   * A settling run with `drive` applied: from everything discharged (`from`
   * undefined) or from the DC state `from`, until the state is close to
   * `target` (SteadyCheck) at an accepted point, or `tEnd`.
   */
  const settle = (what: string, drive: Drive, from: Snapshot | undefined, target: Float64Array, tEnd: number, voltTol: number, observe: (t: number, x: Float64Array, state: Float64Array) => void, shared: SharedStepBudget): SettlingOutcome => {
    restore(from ?? snapshot, drive);
    const check = new SteadyCheck(c, target, voltTol);
    let at: number | undefined;
    const r = runTransient(c, {
      // The first step is tstep/100 and the step at most doubles per step: starting at 1e-11 of the run
      // costs a few dozen steps and resolves a time constant far shorter than the run.
      tstep: tEnd * SETTLE_FIRST_STEP_SHARE,
      tstop: tEnd,
      tmax: tEnd * SETTLE_MAX_STEP_SHARE,
      lteReltol: SETTLE_LTE_RELTOL,
      junctionCmin: JUNCTION_CMIN,
      keepTrace: false,
      ...(from ? { initialSolution: from.x } : { discharged: true }),
      onAccept: (t, ctx) => {
        observe(t, ctx.x, ctx.state);
        check.observe(ctx.x);
        if (!check.near(ctx.x)) return false;
        at = t;
        return true;
      },
      shared,
    });
    if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `${what}: the transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))}`, stage.supply.origin.pos, stage.supply.origin.lineText)]);
    return at === undefined ? { settled: false, furthest: check.furthest() } : { settled: true, at };
  };

  return {
    kind: 'dc',
    stage,
    input: { unit: 'V', nominal: stage.inputDc, sign, describe: (level) => formatSI(level, 'V') },
    voutNominal,
    railSign,
    loadNominal,
    nominal: { mean: voutNominal, min: voutNominal, max: voutNominal, pp: 0, power: undefined, feed: undefined, steady: undefined },
    cycleOperatingPoint: undefined,
    warmStart: { solution: snapshot.x, start: 0 },
    walk,
    solve: (setting, what, power) => walk().solve(setting, what, power),
    dropoutRule: (fall) => ({ kind: 'crossing', target: voutNominal - fall, tolerance: DROPOUT_INPUT_TOLERANCE }),
    smallSignalRejection(hertz: number): number {
      reset(nominalDrive({ inputAc: 1 }));
      return -20 * Math.log10(inputTransfer(stage, hertz));
    },
    steadyRipple(hertz: number, amp: number): SteadyRipple {
      const r = rippleSettle(hertz, amp, 'ripple rejection (transient)');
      // A sine's p-p is 2·|amp| on a negative rail too.
      return { inputPp: 2 * Math.abs(amp), outputPp: r.outPp, steady: r.steady };
    },
    rippleWaveform(hertz: number, amp: number, cycles: number): StageWaveform {
      const settled = rippleSettle(hertz, amp, 'ripple waveform');
      const rec = new WaveRecorder(stage);
      // The settled cycles again, from the settled start (the sine still applied), every accepted point kept.
      const period = 1 / hertz;
      const r = runTransient(c, {
        tstep: period / 50,
        tstop: settled.start + cycles * period,
        startTime: settled.start,
        initialSolution: settled.solution,
        stepsPerCycle: SAG_STEPS_PER_CYCLE,
        junctionCmin: JUNCTION_CMIN,
        keepTrace: false,
        onAccept: (t, ctx) => rec.add(t, ctx.x, settled.start),
      });
      if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `ripple waveform: the transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))}`, stage.supply.origin.pos, stage.supply.origin.lineText)]);
      return rec.result();
    },
    planDip(shape: DipShape): DipPlan {
      const period = 1 / shape.freq;
      const rippled = shape.ripple > 0;
      // With a ripple the dip starts at a whole ripple cycle once the ripple is steady; without, from the DC point at once.
      const settled = rippled ? rippleSettle(shape.freq, shape.ripple, 'sag: ripple before the dip') : undefined;
      // One settled ripple cycle before the dip: the window of sag.out_pp_before.
      const t0 = settled ? settled.start + period : Math.max(shape.edge, 1e-6);
      const plan: DipPlan = {
        t0,
        dur: shape.dur,
        period,
        rippled,
        run(depth, tEnd, observe, shared) {
          const nominal = stage.inputDc;
          const low = nominal * (1 - depth);
          const dip: WaveformSpec = { kind: 'pwl', times: dipCorners(t0, shape.edge, shape.dur), values: [nominal, nominal, low, low, nominal] };
          reset(nominalDrive({ waveform: rippled ? { kind: 'sum', parts: [dip, sine(shape.ripple, shape.freq, 0)] } : dip }));
          stage.meter?.begin(`sag: a dip of ${(depth * 100).toFixed(1)} %`, false);
          const bottomEnd = dipBottomEnd(plan, shape.edge);
          const r = runTransient(c, {
            tstep: Math.min(shape.edge, shape.dur) / 10,
            tstop: tEnd,
            stepsPerCycle: SAG_STEPS_PER_CYCLE,
            lteReltol: SAG_LTE_RELTOL,
            junctionCmin: JUNCTION_CMIN,
            tmax: Math.min(shape.edge, shape.dur / 50),
            keepTrace: false,
            ...(settled ? { initialSolution: settled.solution, startTime: settled.start } : {}),
            extraBreakpoints: rippled ? [t0 - period, bottomEnd - period, bottomEnd].filter((t) => t > 0) : [],
            onAccept: (t, ctx) => {
              stage.meter?.sample(t, ctx.x, ctx.state);
              observe(t, railSign * vout(stage, ctx.x), ctx.x);
            },
            shared,
          });
          stage.meter?.end();
          if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `sag: the dip transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))} (depth ${(depth * 100).toFixed(1)} %)`, stage.supply.origin.pos, stage.supply.origin.lineText)]);
        },
      };
      return plan;
    },
    planStartup(): SettlingPlan {
      // The input steps to its DC value at t = 0 (no waveform), the load at nominal.
      const drive = nominalDrive({ waveform: undefined });
      return { steadyMin: voutNominal, steadyMax: voutNominal, steadyMean: voutNominal, before: 0, checkEvery: 0, run: (tEnd, voltTol, observe, shared) => settle('startup', drive, undefined, snapshot.x, tEnd, voltTol, observe, shared) };
    },
    planStep(step: LoadStepShape): SettlingPlan {
      const l = stage.load;
      const origin = stage.supply.origin;
      if (l?.kind !== 'current') {
        const why = l === undefined ? 'the step figure needs the load element named on the .supply line' : `the step figure needs a current-source load (an I element) to step; ${l.name} is a resistor`;
        throw new RailcheckError([errorAt('no-load', why, origin.pos, origin.lineText, '.supply ... load=<I element>')]);
      }
      // The DC states at both currents, by continuation from nominal and then from the first.
      const w = walk();
      const level = stage.inputDc;
      const before = w.solve({ level, loadAmps: step.from }, 'load step, first current').mean;
      const from = copy();
      const after = w.solve({ level, loadAmps: step.to }, 'load step, second current').mean;
      const target = new Float64Array(ws.x);
      // The load ramps from the first current to the second over `rise`, from t = 0 (in the source's own sense).
      const ramp: WaveformSpec = { kind: 'pwl', times: [0, step.rise], values: [l.direction * step.from, l.direction * step.to] };
      const drive = nominalDrive({ waveform: undefined, loadAmps: step.from, loadWaveform: ramp });
      return { steadyMin: after, steadyMax: after, steadyMean: after, before, checkEvery: 0, run: (tEnd, voltTol, observe, shared) => settle('load step', drive, from, target, tEnd, voltTol, observe, shared) };
    },
  };
}
