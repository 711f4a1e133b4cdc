/**
 * The sine-fed bench (figures.md, "Stages fed from a transformer
 * secondary"): the stage's input is a `sin` source, and every value is
 * taken over one cycle at periodic steady state (periodic.ts), each solve
 * starting at switch-on from the DC solution with the source at its t = 0
 * value. The input axis is the ratio of the nominal amplitude; values are
 * the mean output on the rail's side (magnitudes on a negative rail) and
 * its peak-to-peak; dropout is the lowest ratio
 * that still holds the output; the ripple is the stage's own; a dip is an
 * amplitude envelope over whole cycles.
 */
import type { WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError } from '../errors.js';
import { dipCorners, type DipPlan, type DipShape, type OutputStats, type SineFedBench, type StageSetting, type SteadyWalk } from './bench.js';
import { runToPeriodicSteadyState, type Probe } from './periodic.js';
import { applyDrive, loadCurrentOf, onRail, vout, type Stage } from './stage.js';

type Sine = Extract<WaveformSpec, { kind: 'sin' }>;

/** Resolution of the dropout ratio (figures.md: to within 0.5 %). */
const DROPOUT_RATIO_RESOLUTION = 0.005;

/** Fewest source cycles before a dip starts, whatever the nominal run took to settle. */
const MIN_SETTLE_CYCLES = 3;

/**
 * Runs the stage to periodic steady state with the source's amplitude at
 * `ratio` × nominal (or following `waveform` when given) and the load at
 * `loadAmps` (A; undefined: its own value), and returns the statistics of
 * the last cycle on the rail's side: output and margin multiplied by
 * `railSign` (−1 on a negative rail, so that figures are on magnitudes);
 * per-element power is the cycle average of the absorbed power
 * (trapezoidal energy over the cycle / period) when asked for.
 */
function steadyCycle(stage: Stage, sine: Sine, voutNominal: number, setting: StageSetting, power: boolean, what: string, railSign: 1 | -1): OutputStats {
  const c = stage.compiled;
  const period = 1 / sine.freq;
  const out: Probe = (x) => railSign * vout(stage, x);
  const fi = stage.feedIndex;
  const probes: Probe[] = [out];
  if (fi !== undefined) probes.push((x) => x[fi]! - x[stage.refIndex]!, (x) => railSign * (x[fi]! - x[stage.outIndex]!));
  const names = power ? c.devices.map((d) => d.name) : [];
  const energy = new Float64Array(names.length);
  const lastP = new Float64Array(names.length);
  let lastT = Number.NaN;
  let lastCycle = 0;
  applyDrive(stage, { dc: stage.inputDc, waveform: { ...sine, va: sine.va * setting.level }, loadAmps: setting.loadAmps }, voutNominal);
  const periodic = runToPeriodicSteadyState(c, {
    period,
    probes,
    ...(power
      ? {
          onPoint: (t, cycle, ctx) => {
            if (cycle !== lastCycle) {
              energy.fill(0);
              lastCycle = cycle;
            }
            for (let k = 0; k < names.length; k++) {
              const p = c.devices[k]!.report(ctx.x, ctx.state).power;
              if (!Number.isNaN(lastT)) energy[k] = energy[k]! + 0.5 * (p + lastP[k]!) * (t - lastT);
              lastP[k] = p;
            }
            lastT = t;
          },
        }
      : {}),
  }, what, stage.supply.origin);
  const [o, feed, margin] = periodic.last;
  const perElement: Record<string, number> = {};
  names.forEach((n, k) => (perElement[n] = energy[k]! / period));
  return {
    mean: o!.mean,
    min: o!.min,
    max: o!.max,
    pp: o!.max - o!.min,
    power: power ? perElement : undefined,
    feed: feed && margin ? { pp: feed.max - feed.min, headroomMin: margin.min } : undefined,
    cycles: periodic.cycles,
  };
}

/** Finds the nominal periodic steady state of a sine-fed stage and returns its bench. Throws RailcheckError. */
export function createSineFedBench(given: Stage): SineFedBench {
  const w = given.inputWaveform;
  const origin = given.supply.origin;
  if (w?.kind !== 'sin' || !(w.freq > 0)) throw new RailcheckError([errorAt('bad-supply-input', 'a sine-fed stage needs a sin source with a positive frequency', origin.pos, origin.lineText)]);
  const sine = w;
  const period = 1 / sine.freq;
  // The load current of a resistor load follows from the nominal output, and the rail's sign from its mean: a first run at the load's own value finds both.
  const what = 'periodic steady state of the sine-fed stage';
  const first = steadyCycle(given, sine, 1, { level: 1, loadAmps: undefined }, false, what, 1);
  const railSign = first.mean < 0 ? -1 : 1;
  const stage = onRail(given, railSign);
  const nominal = railSign > 0 ? first : steadyCycle(stage, sine, 1, { level: 1, loadAmps: undefined }, false, what, railSign);
  const voutNominal = nominal.mean;
  const loadNominal = loadCurrentOf(stage, voutNominal);
  const walk = (): SteadyWalk => ({
    solve: (setting, what, power = false) => steadyCycle(stage, sine, voutNominal, setting, power, `${what}: periodic steady state of the sine-fed stage`, railSign),
  });
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
    walk,
    solve: (setting, what, power) => walk().solve(setting, what, power),
    dropoutRule: (fall) => ({
      kind: 'holding',
      holds: (s) => Math.abs(s.mean - voutNominal) <= fall && s.pp < 2 * nominal.pp,
      resolution: DROPOUT_RATIO_RESOLUTION,
    }),
    smallSignalRejection: () => undefined,
    steadyRipple: () => ({ inputPp: nominal.feed?.pp, outputPp: nominal.pp, cycles: nominal.cycles }),
    planDip(shape: DipShape): DipPlan {
      const t0 = Math.max(MIN_SETTLE_CYCLES, nominal.cycles) * period;
      // figures.md: the dip is applied to whole cycles.
      const dur = Math.max(1, Math.ceil(shape.dur * sine.freq - 1e-9)) * period;
      return {
        t0,
        dur,
        period,
        rippled: true,
        run(depth, tEnd, observe) {
          const a = sine.va;
          const envelope: WaveformSpec = { kind: 'modulated', vo: sine.vo, freq: sine.freq, phaseDeg: sine.phaseDeg, times: dipCorners(t0, shape.edge, dur), amplitudes: [a, a, a * (1 - depth), a * (1 - depth), a] };
          applyDrive(stage, { dc: stage.inputDc, waveform: envelope, loadAmps: loadNominal }, voutNominal);
          // Whole cycles are landed on, and the windows of the dip lie on them.
          const cycles = Math.ceil(tEnd / period);
          runToPeriodicSteadyState(stage.compiled, {
            period,
            probes: [(x) => vout(stage, x)],
            minCycles: cycles + 1,
            maxCycles: cycles + 400,
            endAt: tEnd,
            onPoint: (t, _cycle, ctx) => observe(t, railSign * vout(stage, ctx.x)),
          }, 'sag of the sine-fed stage', origin);
        },
      };
    },
  };
}
