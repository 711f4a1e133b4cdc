/**
 * Figures of a stage fed from a transformer secondary (a `sin` input),
 * every one taken at periodic steady state (figures.md, "Stages fed from a
 * transformer secondary"): the transient runs whole cycles of the source
 * until the mean and peak-to-peak of the output over two successive
 * cycles agree within 1 %, and values are taken over the last cycle.
 */
import { match } from 'ts-pattern';
import type { WaveformSpec } from '@railcheck/devices';
import { errorAt, RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatFigure } from '../elaborate/flat.js';
import { formatSI } from '../units.js';
import { applySetting, loadCurrentOf, makeStage, restoreNominal, vout, type Stage } from './stage.js';
import { MinMaxWindow, runToPeriodicSteadyState, type Probe } from './periodic.js';
import { fallVolts } from './dropout.js';
import { dissipates, ratingWarnings } from './dissipation.js';
import type { MeasuredFigure } from './figures.js';

type Sine = Extract<WaveformSpec, { kind: 'sin' }>;

/** A sine-fed stage with its nominal periodic steady state. */
export interface AcBench {
  readonly stage: Stage;
  readonly sine: Sine;
  readonly period: number;
  /** Mean output over the nominal cycle, V. */
  readonly voutNominal: number;
  readonly outPpNominal: number;
  readonly loadNominal: number | undefined;
  /** The nominal cycle's results. */
  readonly nominal: PssPoint;
}

/** One periodic-steady-state solution's statistics over its last cycle. */
export interface PssPoint {
  readonly meanOut: number;
  readonly ppOut: number;
  readonly minOut: number;
  readonly feedPp: number | undefined;
  /** Least V(feed) − Vout over the cycle, V. */
  readonly headroomMin: number | undefined;
  /** Average absorbed power per element over the cycle, W (when asked for). */
  readonly power: Readonly<Record<string, number>> | undefined;
  readonly cycles: number;
}

/** Runs to periodic steady state at `ratio` × the nominal amplitude and load current `loadAmps` (A). */
export function pssAt(stage: Stage, sine: Sine, voutNominal: number, ratio: number, loadAmps: number | undefined, withPower: boolean, envelope?: { times: number[]; amplitudes: number[] }): PssPoint {
  const c = stage.compiled;
  const period = 1 / sine.freq;
  const saved = stage.input.waveform;
  const out: Probe = (x) => vout(stage, x);
  const fi = stage.feedIndex;
  const probes: Probe[] = [out];
  if (fi !== undefined) probes.push((x) => x[fi]! - x[stage.refIndex]!, (x) => x[fi]! - x[stage.outIndex]!);
  const names = withPower ? c.devices.map((d) => d.name) : [];
  const energy = new Float64Array(names.length);
  const lastP = new Float64Array(names.length);
  let lastT = Number.NaN;
  let lastCycle = 0;
  try {
    applySetting(stage, { vin: stage.inputDc, loadAmps }, voutNominal);
    stage.input.waveform = envelope
      ? { kind: 'modulated', vo: sine.vo, freq: sine.freq, phaseDeg: sine.phaseDeg, times: envelope.times, amplitudes: envelope.amplitudes }
      : { ...sine, va: sine.va * ratio };
    const pss = runToPeriodicSteadyState(c, {
      period,
      probes,
      ...(withPower
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
    }, 'periodic steady state of the sine-fed stage', stage.supply.origin);
    const [o, feed, margin] = pss.last;
    const power: Record<string, number> = {};
    names.forEach((n, k) => (power[n] = energy[k]! / period));
    return {
      meanOut: o!.mean,
      ppOut: o!.max - o!.min,
      minOut: o!.min,
      feedPp: feed ? feed.max - feed.min : undefined,
      headroomMin: margin ? margin.min : undefined,
      power: withPower ? power : undefined,
      cycles: pss.cycles,
    };
  } finally {
    stage.input.waveform = saved;
    restoreNominal(stage);
  }
}

/** Finds the nominal periodic steady state of a sine-fed stage. Throws RailcheckError. */
export function createAcBench(c: CompiledCircuit): AcBench {
  const supply = c.flat.supply;
  if (!supply) throw new RailcheckError([errorAt('no-supply', 'figures need a .supply line naming the stage')]);
  const stage = makeStage(c, supply);
  const w = stage.input.waveform;
  if (w?.kind !== 'sin' || !(w.freq > 0)) throw new RailcheckError([errorAt('bad-supply-input', 'a sine-fed stage needs a sin source with a positive frequency', supply.origin.pos, supply.origin.lineText)]);
  restoreNominal(stage);
  // The load current of a resistor load follows from the nominal output; a first pass finds it.
  const first = pssAt(stage, w, 1, 1, undefined, false);
  const loadNominal = loadCurrentOf(stage, first.meanOut);
  return { stage, sine: w, period: 1 / w.freq, voutNominal: first.meanOut, outPpNominal: first.ppOut, loadNominal, nominal: first };
}

/** Lowest amplitude ratio (to 0.5 %) at which the stage still holds its output (figures.md dropout rule). */
function dropoutRatio(b: AcBench, fall: number): number {
  const holds = (ratio: number): boolean => {
    const p = pssAt(b.stage, b.sine, b.voutNominal, ratio, b.loadNominal, false);
    return Math.abs(p.meanOut - b.voutNominal) <= fall && p.ppOut < 2 * b.outPpNominal;
  };
  let lo = 0;
  let hi = 1;
  while (hi - lo > 0.005) {
    const mid = 0.5 * (lo + hi);
    if (holds(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

interface Dip {
  fall: number;
  outPp: number;
  outPpBefore: number;
}

/** One amplitude dip of `depth` over whole cycles; lowest output from the dip start until 5·edge after recovery. */
function acDip(b: AcBench, depth: number, durCycles: number, edge: number): Dip {
  const { stage, sine, period } = b;
  const settle = Math.max(3, b.nominal.cycles);
  const t0 = settle * period;
  const a = sine.va;
  const times = [0, t0, t0 + edge, t0 + edge + durCycles * period, t0 + 2 * edge + durCycles * period];
  const env = { times, amplitudes: [a, a, a * (1 - depth), a * (1 - depth), a] };
  const tEnd = times[4]! + 5 * edge;
  const saved = stage.input.waveform;
  const whole = new MinMaxWindow(t0, tEnd);
  const before = new MinMaxWindow(t0 - period, t0);
  const lastDipCycleEnd = Math.floor((t0 + edge + durCycles * period) / period + 1e-9) * period;
  const during = new MinMaxWindow(lastDipCycleEnd - period, lastDipCycleEnd);
  try {
    applySetting(stage, { vin: stage.inputDc, loadAmps: b.loadNominal }, b.voutNominal);
    stage.input.waveform = { kind: 'modulated', vo: sine.vo, freq: sine.freq, phaseDeg: sine.phaseDeg, times: env.times, amplitudes: env.amplitudes };
    runToPeriodicSteadyState(stage.compiled, {
      period, probes: [(x) => vout(stage, x)], minCycles: Math.ceil(tEnd / period) + 1, maxCycles: Math.ceil(tEnd / period) + 400,
      onPoint: (t, _cycle, ctx) => {
        const v = vout(stage, ctx.x);
        whole.add(t, v);
        before.add(t, v);
        during.add(t, v);
      },
    }, 'sag of the sine-fed stage', stage.supply.origin);
  } finally {
    stage.input.waveform = saved;
    restoreNominal(stage);
  }
  return { fall: b.voutNominal - whole.min, outPp: during.max - during.min, outPpBefore: before.max - before.min };
}

/** Measures one figure of a sine-fed stage. */
export function measureAcFedFigure(b: AcBench, f: FlatFigure, all: readonly FlatFigure[], warnings: Diagnostic[]): MeasuredFigure {
  const k = f.keys;
  const amp = formatSI(b.sine.va, 'V');
  const at = (ratio: number, load: number | undefined, power = false): PssPoint => pssAt(b.stage, b.sine, b.voutNominal, ratio, load, power);
  return match(f.figure)
    .returnType<MeasuredFigure>()
    .with('line', () => {
      const from = k.get('from') ?? 0.9;
      const to = k.get('to') ?? 1.1;
      const delta = at(to, b.loadNominal).meanOut - at(from, b.loadNominal).meanOut;
      return { kind: 'line', values: { 'line.delta': delta, 'line.pct': (100 * delta) / b.voutNominal }, conditions: `amplitude ${from}× → ${to}× of ${amp}, mean output, periodic steady state` };
    })
    .with('load', () => {
      if (b.loadNominal === undefined) throw new RailcheckError([errorAt('no-load', 'the load figure needs the load element named on the .supply line', f.origin.pos, f.origin.lineText)]);
      const from = k.get('from') ?? 0;
      const to = k.get('to') ?? b.loadNominal;
      const vFrom = at(1, from).meanOut;
      const delta = vFrom - at(1, to).meanOut;
      return { kind: 'load', values: { 'load.delta': delta, 'load.pct': (100 * delta) / vFrom, 'load.rout': delta / (to - from) }, conditions: `load ${formatSI(from, 'A')} → ${formatSI(to, 'A')}, mean output at ${amp} amplitude` };
    })
    .with('ripple', () => {
      const values: Record<string, number> = { 'ripple.out_pp': b.outPpNominal };
      if (b.nominal.feedPp !== undefined) {
        values['ripple.feed_pp'] = b.nominal.feedPp;
        values['ripple.rr'] = 20 * Math.log10(b.nominal.feedPp / b.outPpNominal);
      }
      return { kind: 'ripple', values, conditions: `at ${amp} amplitude, ${formatSI(b.sine.freq, 'Hz')} source, periodic steady state` };
    })
    .with('dropout', () => {
      const ratio = dropoutRatio(b, fallVolts(f, b.voutNominal));
      const values: Record<string, number> = { 'dropout.ratio': ratio, 'dropout.headroom': 1 - ratio };
      if (b.nominal.headroomMin !== undefined) values['headroom.min'] = b.nominal.headroomMin;
      return { kind: 'dropout', values, conditions: `lowest amplitude holding the mean within ${formatSI(fallVolts(f, b.voutNominal), 'V')} and ripple below 2× nominal` };
    })
    .with('dissipation', () => {
      const line = all.find((g) => g.figure === 'line');
      const load = all.find((g) => g.figure === 'load');
      const high = line?.keys.get('to') ?? 1.1;
      const loads = b.loadNominal === undefined ? [undefined] : [load?.keys.get('from') ?? 0, load?.keys.get('to') ?? b.loadNominal];
      const points = [at(1, b.loadNominal, true), ...loads.map((l) => at(high, l, true))];
      const pd: Record<string, number> = {};
      for (const el of b.stage.compiled.elements) {
        if (!dissipates(el)) continue;
        pd[el.name] = Math.max(...points.map((p) => p.power?.[el.name] ?? 0));
      }
      warnings.push(...ratingWarnings(b.stage.compiled.elements, pd));
      const values: Record<string, number> = {};
      for (const [n, p] of Object.entries(pd)) values[`pd.${n}`] = p;
      const nominal = points[0]!.power!;
      if (b.stage.load) {
        const pin = -(nominal[b.stage.input.name] ?? 0);
        if (pin > 0) values.efficiency = (nominal[b.stage.load.name] ?? 0) / pin;
      } else warnings.push(warningAt('no-efficiency', 'efficiency needs the load element on the .supply line (load=...)', f.origin.pos, f.origin.lineText));
      return { kind: 'dissipation', values, conditions: `cycle averages at ${amp} and at ${high}× amplitude with the lowest and highest load` };
    })
    .with('sag', () => {
      const depth = k.get('depth') ?? 0.2;
      const durCycles = Math.max(1, Math.ceil((k.get('dur') ?? 0.1) * b.sine.freq - 1e-9));
      const edge = k.get('edge') ?? 1e-3;
      const fall = fallVolts(f, b.voutNominal);
      const main = acDip(b, depth, durCycles, edge);
      const passes = (d: number): boolean => acDip(b, d, durCycles, edge).fall <= fall;
      let lo = main.fall <= fall ? depth : 0;
      let hi = main.fall <= fall ? 1 : depth;
      if (passes(1)) lo = hi = 1;
      while (hi - lo > Math.max(0.005 * hi, 1e-4)) {
        const mid = 0.5 * (lo + hi);
        if (passes(mid)) lo = mid;
        else hi = mid;
      }
      return {
        kind: 'sag',
        values: { 'sag.fall': main.fall, 'sag.pass': main.fall <= fall ? 1 : 0, 'sag.max_depth': lo, 'sag.out_pp': main.outPp, 'sag.out_pp_before': main.outPpBefore },
        conditions: `amplitude dip of ${(depth * 100).toFixed(1)} % for ${durCycles} whole cycles, edges ${formatSI(edge, 's')}, pass if the fall ≤ ${formatSI(fall, 'V')}`,
      };
    })
    .exhaustive();
}
