/**
 * The sine-fed bench (figures.md, "Stages fed from a transformer
 * secondary"): the stage's input is a `sin` source, and every value is
 * taken over one cycle at periodic steady state (periodic.ts), each solve
 * starting at switch-on from the DC solution with the source at its t = 0
 * value. The input axis is the ratio of the nominal amplitude; values are
 * the signed mean output and its peak-to-peak; dropout is the lowest ratio
 * that still holds the output; the ripple is the stage's own; a dip is an
 * amplitude envelope over whole cycles.
 */
import { JUNCTION_CMIN } from '@railcheck/devices';
import type { WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import { describeTransientFailure, runTransient, transientFailureCode, type SharedStepBudget, type TransientOptions } from '../engine/transient.js';
import { MAX_BREAKPOINTS } from '../budgets.js';
import { formatSI } from '../units.js';
import { dipCorners, type BenchStart, type CycleOperatingPoint, type DipPlan, type DipShape, type LoadStepShape, type NodeCycle, type StageWaveform, type OutputStats, type SettlingOutcome, type SettlingPlan, type SineFedBench, type StageSetting, type SteadyWalk } from './bench.js';
import { SteadyCheck } from './settling.js';
import { settleCycle, type Probe } from './periodic.js';
import { applyDrive, loadCurrentOf, onRail, vout, WaveRecorder, type Stage } from './stage.js';

type Sine = Extract<WaveformSpec, { kind: 'sin' }>;

/**
 * Width of the final dropout bracket, as a ratio of the amplitude: 1e-5,
 * the resolution of the DC search (0.1 mV on inputs of about 10 V), well
 * inside the 0.5 % figures.md asks for.
 */
const DROPOUT_RATIO_RESOLUTION = 1e-5;

/** Least steps per source cycle in a dip transient (as in every periodic run). */
const DIP_STEPS_PER_CYCLE = 200;

/**
 * Least steps per source cycle in a switch-on run: twice the periodic runs'
 * 200, so that the sampled peak of a rectifier's conduction pulse (a small
 * share of the cycle) lies close to the true one.
 */
const STARTUP_STEPS_PER_CYCLE = 400;

/** Truncation-error tolerance of the switch-on run (the analysis default is 1e-3): the inrush peak is read off the accepted points. */
const STARTUP_LTE_RELTOL = 1e-4;

/** Where a solve starts: the solution at the start of a settled cycle, and that start time (s). */
interface WarmStart {
  readonly solution: Float64Array;
  readonly start: number;
}

/** One settled cycle with the start it can hand on. */
interface Settled {
  readonly stats: OutputStats;
  readonly next: WarmStart;
}

/**
 * Finds the periodic steady state with the source's amplitude at
 * `ratio` × nominal and the load at `loadAmps` (A; undefined: its own
 * value), starting from `from` (or from switch-on), and returns the
 * statistics of the settled cycle on the rail's side: output and margin
 * multiplied by `railSign` (−1 on a negative rail, so that figures are on
 * magnitudes); per-element power is the cycle average of the absorbed
 * power (trapezoidal energy over the cycle / period) when asked for, and
 * with `operatingPoint` the whole cycle-average table (signed, as measured).
 */
function steadyCycle(stage: Stage, sine: Sine, voutNominal: number, setting: StageSetting, power: boolean, what: string, railSign: 1 | -1, from: WarmStart | undefined, operatingPoint?: (op: CycleOperatingPoint) => void): Settled {
  const c = stage.compiled;
  const period = 1 / sine.freq;
  const out: Probe = (x) => railSign * vout(stage, x);
  const fi = stage.feedIndex;
  const probes: Probe[] = [out];
  if (fi !== undefined) probes.push((x) => x[fi]! - x[stage.refIndex]!, (x) => railSign * (x[fi]! - x[stage.outIndex]!));
  const wantTable = operatingPoint !== undefined;
  const names = power || wantTable ? c.devices.map((d) => d.name) : [];
  const meter = stage.meter;
  const energy = new Float64Array(names.length);
  const lastP = new Float64Array(names.length);
  const charge = new Map<string, number>();
  const lastI = new Map<string, number>();
  const nodeIndex = wantTable ? c.flat.nodes.map((n) => [n.name, c.nodeIndex.get(n.key)!] as const) : [];
  const nodeSum = new Float64Array(nodeIndex.length);
  const nodeMin = new Float64Array(nodeIndex.length).fill(Infinity);
  const nodeMax = new Float64Array(nodeIndex.length).fill(-Infinity);
  const lastV = new Float64Array(nodeIndex.length);
  let lastT = Number.NaN;
  applyDrive(stage, { dc: stage.inputDc, waveform: { ...sine, va: sine.va * setting.level }, loadAmps: setting.loadAmps }, voutNominal);
  meter?.begin(`${what.replace(/: periodic steady state of the sine-fed stage$/, '')} (amplitude ${setting.level}×${setting.loadAmps === undefined ? '' : `, load ${formatSI(setting.loadAmps, 'A')}`})`, true);
  const periodic = settleCycle(c, {
    period,
    probes,
    ...(from ? { initialSolution: from.solution, start: from.start } : {}),
    ...(names.length > 0 || meter
      ? {
          onPoint: (t, ctx) => {
            meter?.sample(t, ctx.x, ctx.state);
            if (names.length === 0) return;
            const dt = Number.isNaN(lastT) ? 0 : t - lastT;
            for (let k = 0; k < names.length; k++) {
              const rep = c.devices[k]!.report(ctx.x, ctx.state);
              energy[k] = energy[k]! + 0.5 * (rep.power + lastP[k]!) * dt;
              lastP[k] = rep.power;
              if (!wantTable) continue;
              for (const [label, amps] of rep.currents) {
                const key = label ? `${names[k]}.${label}` : names[k]!;
                charge.set(key, (charge.get(key) ?? 0) + 0.5 * (amps + (lastI.get(key) ?? amps)) * dt);
                lastI.set(key, amps);
              }
            }
            for (let k = 0; k < nodeIndex.length; k++) {
              const v = ctx.x[nodeIndex[k]![1]]!;
              nodeSum[k] = nodeSum[k]! + 0.5 * (v + lastV[k]!) * dt;
              lastV[k] = v;
              if (v < nodeMin[k]!) nodeMin[k] = v;
              if (v > nodeMax[k]!) nodeMax[k] = v;
            }
            lastT = t;
          },
        }
      : {}),
  }, what, stage.supply.origin);
  meter?.end();
  const [o, feed, margin] = periodic.last;
  const perElement: Record<string, number> = {};
  names.forEach((n, k) => (perElement[n] = energy[k]! / period));
  if (operatingPoint) {
    const nodes: Record<string, NodeCycle> = {};
    nodeIndex.forEach(([name], k) => (nodes[name] = { mean: nodeSum[k]! / period, min: nodeMin[k]!, max: nodeMax[k]! }));
    const currents: Record<string, number> = {};
    for (const [key, q] of charge) currents[key] = q / period;
    operatingPoint({ nodes, currents, power: perElement, steady: periodic.steady });
  }
  return {
    stats: {
      mean: o!.mean,
      min: o!.min,
      max: o!.max,
      pp: o!.max - o!.min,
      power: power ? perElement : undefined,
      feed: feed && margin ? { pp: feed.max - feed.min, headroomMin: margin.min } : undefined,
      steady: periodic.steady,
    },
    next: { solution: periodic.solution, start: periodic.start },
  };
}

/** Finds the nominal periodic steady state of a sine-fed stage and returns its bench. Throws RailcheckError. */
export function createSineFedBench(given: Stage, from?: BenchStart): SineFedBench {
  const w = given.inputWaveform;
  const origin = given.supply.origin;
  if (w?.kind !== 'sin' || !(w.freq > 0)) throw new RailcheckError([errorAt('bad-supply-input', 'a sine-fed stage needs a sin source with a positive frequency', origin.pos, origin.lineText)]);
  if (w.td !== 0 || w.theta !== 0) {
    throw new RailcheckError([errorAt('bad-supply-input', 'the sine feeding a stage must repeat from t = 0 for its periodic steady state: no delay and no damping', origin.pos, origin.lineText, 'sin(vo va freq) or sin(vo va freq 0 0 phase)')]);
  }
  const sine = w;
  const period = 1 / sine.freq;
  let cycleOperatingPoint: CycleOperatingPoint | undefined;
  // The load current of a resistor load follows from the nominal output, and the rail's sign from its mean: a
  // first run at the load's own value finds both (and the cycle-average operating point, signed as measured).
  const what = 'periodic steady state of the sine-fed stage';
  const firstFrom = (start: WarmStart | undefined): Settled => steadyCycle(given, sine, 1, { level: 1, loadAmps: undefined }, false, what, 1, start, (op) => (cycleOperatingPoint = op));
  // A neighbouring circuit's settled cycle (a tolerance run's nominal) is tried first; switch-on as usual when it does not settle from there.
  let first: Settled;
  try {
    first = firstFrom(from !== undefined && from.solution.length === given.compiled.ws.x.length ? from : undefined);
  } catch (e) {
    if (from === undefined || !(e instanceof RailcheckError)) throw e;
    first = firstFrom(undefined);
  }
  const railSign = first.stats.mean < 0 ? -1 : 1;
  const stage = onRail(given, railSign);
  // The rerun starts from switch-on like the first, so a negative rail and its positive mirror take the same path.
  const rerun = railSign > 0 ? first : steadyCycle(stage, sine, 1, { level: 1, loadAmps: undefined }, false, what, railSign, undefined);
  const nominal = rerun.stats;
  const nominalStart = rerun.next;
  const voutNominal = nominal.mean;
  const loadNominal = loadCurrentOf(stage, voutNominal);
  // A walk starts from the nominal steady state and each later solve from the one before (the shooting method's warm start).
  const walk = (): SteadyWalk => {
    let from = nominalStart;
    return {
      solve: (setting, what, power = false) => {
        const r = steadyCycle(stage, sine, voutNominal, setting, power, `${what}: periodic steady state of the sine-fed stage`, railSign, from);
        from = r.next;
        return r.stats;
      },
    };
  };
  /**
   * A settling run (bench.ts, SettlingPlan.run) of `what` from `t0` for
   * `tEnd` s, begun as `begin` says (runTransient's start options, step
   * count and tolerance), its state compared with `target` at every whole
   * source cycle from `t0`, each landed on (counted first, against
   * MAX_BREAKPOINTS); times handed to `observe` and the settling time are
   * from `t0`. Throws RailcheckError.
   */
  const settleOnCycles = (what: string, t0: number, tEnd: number, begin: Partial<TransientOptions>, extraBreakpoints: readonly number[], target: Float64Array, voltTol: number, observe: (t: number, x: Float64Array, state: Float64Array) => void, shared: SharedStepBudget): SettlingOutcome => {
    const cycles = tEnd / period;
    if (!(cycles <= MAX_BREAKPOINTS)) {
      throw new RailcheckError([errorAt('budget-breakpoints', `${what} of the sine-fed stage: tmax spans ${cycles.toPrecision(3)} cycles of the source, each landed on, over the budget MAX_BREAKPOINTS = ${MAX_BREAKPOINTS}`, origin.pos, origin.lineText, 'a shorter tmax= or a lower source frequency')]);
    }
    const boundaries: number[] = [];
    for (let k = 1; k * period < tEnd; k++) boundaries.push(t0 + k * period);
    const check = new SteadyCheck(stage.compiled, target, voltTol);
    let next = 0;
    let at: number | undefined;
    const r = runTransient(stage.compiled, {
      tstep: period / 50,
      tstop: t0 + tEnd,
      junctionCmin: JUNCTION_CMIN,
      ...begin,
      extraBreakpoints: [...extraBreakpoints, ...boundaries],
      keepTrace: false,
      onAccept: (t, ctx) => {
        observe(t - t0, ctx.x, ctx.state);
        check.observe(ctx.x);
        if (next >= boundaries.length || t < boundaries[next]! - 1e-9 * period) return false;
        next++;
        if (!check.near(ctx.x)) return false;
        at = t - t0;
        return true;
      },
      shared,
    });
    if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `${what} of the sine-fed stage: the transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))}`, origin.pos, origin.lineText)]);
    return at === undefined ? { settled: false, furthest: check.furthest() } : { settled: true, at };
  };
  return {
    kind: 'sine-fed',
    stage,
    amplitude: sine.va,
    frequency: sine.freq,
    input: { unit: 'ratio', nominal: 1, sign: 1, describe: (level) => `${Number(level.toPrecision(4))}× the nominal amplitude` },
    voutNominal,
    railSign,
    loadNominal,
    nominal,
    cycleOperatingPoint,
    warmStart: first.next,
    walk,
    solve: (setting, what, power) => walk().solve(setting, what, power),
    dropoutRule: (fall) => ({
      kind: 'holding',
      margin: (s) => Math.min(fall - Math.abs(s.mean - voutNominal), 2 * nominal.pp - s.pp),
      resolution: DROPOUT_RATIO_RESOLUTION,
    }),
    smallSignalRejection: () => undefined,
    steadyRipple: () => ({ inputPp: nominal.feed?.pp, outputPp: nominal.pp, steady: nominal.steady! }),
    rippleWaveform(_hertz: number, _amp: number, cycles: number): StageWaveform {
      // The nominal settled cycles, from the settled start, every accepted point kept.
      applyDrive(stage, { dc: stage.inputDc, waveform: sine, loadAmps: loadNominal }, voutNominal);
      const rec = new WaveRecorder(stage);
      const boundaries: number[] = [];
      for (let k = 1; k < cycles; k++) boundaries.push(nominalStart.start + k * period);
      const r = runTransient(stage.compiled, {
        tstep: period / 50,
        tstop: nominalStart.start + cycles * period,
        startTime: nominalStart.start,
        initialSolution: nominalStart.solution,
        stepsPerCycle: DIP_STEPS_PER_CYCLE,
        junctionCmin: JUNCTION_CMIN,
        extraBreakpoints: boundaries,
        keepTrace: false,
        onAccept: (t, ctx) => rec.add(t, ctx.x, nominalStart.start),
      });
      if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `ripple waveform of the sine-fed stage: the transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))}`, origin.pos, origin.lineText)]);
      return rec.result();
    },
    planDip(shape: DipShape): DipPlan {
      // From the nominal steady state, one settled cycle before the dip (the window of sag.out_pp_before).
      const t0 = nominalStart.start + period;
      // figures.md: the dip is applied to whole cycles.
      const dur = Math.max(1, Math.ceil(shape.dur * sine.freq - 1e-9)) * period;
      return {
        t0,
        dur,
        period,
        rippled: true,
        run(depth, tEnd, observe, shared) {
          // One breakpoint per cycle is landed on: count them before listing them.
          const cycles = (tEnd - nominalStart.start) / period;
          if (!(cycles <= MAX_BREAKPOINTS)) {
            throw new RailcheckError([errorAt('budget-breakpoints', `sag of the sine-fed stage: the dip run spans ${cycles.toPrecision(3)} cycles of the source, each landed on, over the budget MAX_BREAKPOINTS = ${MAX_BREAKPOINTS}`, origin.pos, origin.lineText, 'a shorter dip or a lower source frequency')]);
          }
          const a = sine.va;
          const envelope: WaveformSpec = { kind: 'modulated', vo: sine.vo, freq: sine.freq, phaseDeg: sine.phaseDeg, times: dipCorners(t0, shape.edge, dur), amplitudes: [a, a, a * (1 - depth), a * (1 - depth), a] };
          applyDrive(stage, { dc: stage.inputDc, waveform: envelope, loadAmps: loadNominal }, voutNominal);
          // Whole cycles are landed on, and the windows of the dip lie on them.
          const boundaries: number[] = [];
          for (let t = nominalStart.start + period; t < tEnd; t += period) boundaries.push(t);
          stage.meter?.begin(`sag: an amplitude dip of ${(depth * 100).toFixed(1)} %`, false);
          const r = runTransient(stage.compiled, {
            tstep: period / 50,
            tstop: tEnd,
            startTime: nominalStart.start,
            initialSolution: nominalStart.solution,
            stepsPerCycle: DIP_STEPS_PER_CYCLE,
            junctionCmin: JUNCTION_CMIN,
            extraBreakpoints: boundaries,
            keepTrace: false,
            onAccept: (t, ctx) => {
              stage.meter?.sample(t, ctx.x, ctx.state);
              observe(t, railSign * vout(stage, ctx.x), ctx.x);
            },
            shared,
          });
          stage.meter?.end();
          if (!r.ok) throw new RailcheckError([errorAt(transientFailureCode(r), `sag of the sine-fed stage: the dip transient failed ${describeTransientFailure(r, (t) => formatSI(t, 's'))} (depth ${(depth * 100).toFixed(1)} %)`, origin.pos, origin.lineText)]);
        },
      };
    },
    planStartup(): SettlingPlan {
      return {
        steadyMin: nominal.min,
        steadyMax: nominal.max,
        steadyMean: nominal.mean,
        before: 0,
        checkEvery: period,
        run(tEnd, voltTol, observe, shared) {
          // The sine from t = 0, the load at its own value: the nominal run's setting, from everything discharged.
          applyDrive(stage, { dc: stage.inputDc, waveform: sine, loadAmps: undefined }, voutNominal);
          // The settled cycle starts at a whole number of periods after t = 0, as every cycle boundary here does.
          const begin: Partial<TransientOptions> = { discharged: true, stepsPerCycle: STARTUP_STEPS_PER_CYCLE, lteReltol: STARTUP_LTE_RELTOL };
          return settleOnCycles('startup', 0, tEnd, begin, [], nominalStart.solution, voltTol, observe, shared);
        },
      };
    },
    planStep(step: LoadStepShape): SettlingPlan {
      const l = stage.load;
      if (l?.kind !== 'current') {
        const why = l === undefined ? 'the step figure needs the load element named on the .supply line' : `the step figure needs a current-source load (an I element) to step; ${l.name} is a resistor`;
        throw new RailcheckError([errorAt('no-load', why, origin.pos, origin.lineText, '.supply ... load=<I element>')]);
      }
      // The settled cycles at both currents, from the nominal one and then from the first (whole cycles apart, so in phase).
      const first = steadyCycle(stage, sine, voutNominal, { level: 1, loadAmps: step.from }, false, 'load step, first current: periodic steady state of the sine-fed stage', railSign, nominalStart);
      const second = steadyCycle(stage, sine, voutNominal, { level: 1, loadAmps: step.to }, false, 'load step, second current: periodic steady state of the sine-fed stage', railSign, first.next);
      const t0 = first.next.start;
      const rising = step.to > step.from;
      return {
        steadyMin: second.stats.min,
        steadyMax: second.stats.max,
        steadyMean: second.stats.mean,
        // The settled cycle's extreme on the side the step pushes the output: its trough for a rising load, its crest for a falling one.
        before: rising ? first.stats.min : first.stats.max,
        checkEvery: period,
        run(tEnd, voltTol, observe, shared) {
          // The step starts at the start of a source cycle (the sine's phase as written) and ramps over `rise`, in the source's own sense.
          const ramp: WaveformSpec = { kind: 'pwl', times: [t0, t0 + step.rise], values: [l.direction * step.from, l.direction * step.to] };
          applyDrive(stage, { dc: stage.inputDc, waveform: sine, loadAmps: step.from, loadWaveform: ramp }, voutNominal);
          // Times from the start of the step.
          const begin: Partial<TransientOptions> = { startTime: t0, initialSolution: first.next.solution, stepsPerCycle: DIP_STEPS_PER_CYCLE };
          return settleOnCycles('load step', t0, tEnd, begin, [t0 + step.rise], second.next.solution, voltTol, observe, shared);
        },
      };
    },
  };
}
