/**
 * The curves and waveforms behind the figures (docs/plots.md), for the
 * plots and the CSV files a user asks for (`--plot`, `--csv`): measured on
 * the same bench as the figures, by the same solves.
 *
 * - line: the mean output against the input level, from above the line
 *   range down past dropout (solved by continuation from nominal in each
 *   direction), with the nominal and dropout points;
 * - load: the mean output against the load current, from 0 to 1.5 × the
 *   nominal load (or the load figure's upper end), with the nominal point;
 * - rejection: −20·log10|Vout/Vin| against frequency, 10 Hz to 1 MHz, the
 *   stage linearised at its nominal DC point (DC benches; a sine-fed stage
 *   has no small-signal method), with the ripple figure's frequency;
 * - ripple: input (and feed) and output over whole cycles at periodic
 *   steady state, the ripple figure's run (bench.ts, rippleWaveform);
 * - sag: input (and feed) and output through the sag figure's dip, at its
 *   depth.
 *
 * A curve that cannot be measured is left out with the reason, and a curve
 * stops where a solve fails (noted): never points of an unsolved stage.
 */
import { RailcheckError } from '../errors.js';
import type { FlatFigure } from '../elaborate/flat.js';
import type { BenchKind } from '../figure-registry.js';
import { MAX_FIGURE_STEPS } from '../budgets.js';
import type { SharedStepBudget } from '../engine/transient.js';
import { BENCHES, dipCorners, type Bench, type StageWaveform } from './bench.js';
import { dropout, fallVolts } from './dropout.js';
import { WaveRecorder } from './stage.js';
import { SAG_DEFAULTS } from './sag.js';
import { DEFAULT_RIPPLE_FREQ, defaultRippleAmp } from './ripple.js';
import { LINE_TO_RATIO } from './regulation.js';

/** A point of a curve: x in the curve's unit, y in volts (or dB). */
export interface CurvePoint {
  readonly x: number;
  readonly y: number;
}

/** A curve: its points in order of x. */
export interface Curve {
  readonly x: readonly number[];
  readonly y: readonly number[];
}

/** The output against the input level (V of the input on a DC bench, the amplitude ratio on a sine-fed one); mean output, V, on the rail's side. */
export interface LineCurve extends Curve {
  readonly unit: 'V' | 'ratio';
  readonly nominal: CurvePoint;
  /** The dropout point (the dropout figure's fall, or 100 mV), when the stage has one. */
  readonly dropout: CurvePoint | undefined;
}

/** The mean output (V, rail side) against the load current (A). */
export interface LoadCurve extends Curve {
  readonly nominal: CurvePoint | undefined;
}

/** Ripple rejection (dB) against frequency (Hz); `marked` is the ripple figure's frequency. */
export interface RejectionCurve extends Curve {
  readonly marked: number;
}

/** The ripple figure's waveforms: `hertz` and `amp` (V peak) of the ripple added to a DC input (0 on a sine-fed stage: its own). */
export interface RippleWaveform extends StageWaveform {
  readonly hertz: number;
  readonly amp: number;
}

/** The sag figure's dip waveforms, at its depth (ratio) and with its corner times (s). */
export interface SagWaveform extends StageWaveform {
  readonly depth: number;
  readonly corners: readonly number[];
}

/** The curves and waveforms {@link figureCurves} can measure. */
export type CurveKind = 'line' | 'load' | 'rejection' | 'ripple' | 'sag';

/** Every curve kind, in the order figureCurves measures them. */
export const CURVE_KINDS: readonly CurveKind[] = ['line', 'load', 'rejection', 'ripple', 'sag'];

/** Everything measured for the plots, and the curves that could not be, with the reason. */
export interface FigureCurves {
  readonly bench: BenchKind;
  readonly line: LineCurve | undefined;
  readonly load: LoadCurve | undefined;
  readonly rejection: RejectionCurve | undefined;
  readonly ripple: RippleWaveform | undefined;
  readonly sag: SagWaveform | undefined;
  /** Curves left out or cut short, each with the reason in words. */
  readonly notes: readonly string[];
}

/** Points of the line curve on a DC bench and on a sine-fed one (each a DC solve, or a periodic steady state). */
const LINE_POINTS: Readonly<Record<BenchKind, number>> = { dc: 41, 'sine-fed': 13 };
/** Points of the load curve. */
const LOAD_POINTS: Readonly<Record<BenchKind, number>> = { dc: 25, 'sine-fed': 9 };
/** Frequencies of the rejection curve: 10 Hz to 1 MHz, six a decade. */
const REJECTION_DECADES = [1, 6] as const;

/** `n` evenly spaced values from a to b, both included. */
function spaced(a: number, b: number, n: number): number[] {
  return Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1));
}

/** A message of a RailcheckError (or rethrows anything else). */
function reasonOf(e: unknown): string {
  if (e instanceof RailcheckError) return e.diagnostics.map((d) => d.message).join('; ');
  throw e;
}

/**
 * Solves at each x, in two walks from nominal (downward through the values
 * below it, upward through those above); a walk stops at its first failure,
 * which is noted.
 */
function walkCurve(bench: Bench, xs: readonly number[], nominal: number, solveAt: (w: ReturnType<Bench['walk']>, x: number) => number, what: string, notes: string[]): Curve {
  const below = xs.filter((x) => x < nominal).reverse();
  const above = xs.filter((x) => x >= nominal);
  const points = new Map<number, number>();
  for (const [side, list] of [['below', below], ['above', above]] as const) {
    const w = bench.walk();
    for (const x of list) {
      try {
        points.set(x, solveAt(w, x));
      } catch (e) {
        notes.push(`${what}: stopped ${side} nominal at ${Number(x.toPrecision(4))}: ${reasonOf(e)}`);
        break;
      }
    }
  }
  const x = [...points.keys()].sort((a, b) => a - b);
  return { x, y: x.map((v) => points.get(v)!) };
}

/** The line curve (see the module comment). */
function lineCurve(bench: Bench, figures: readonly FlatFigure[], notes: string[]): LineCurve {
  const n = bench.input.nominal;
  const s = bench.input.sign;
  const line = figures.find((f) => f.figure === 'line');
  const high = Math.abs(line?.keys.get('to') ?? LINE_TO_RATIO * n);
  let d: CurvePoint | undefined;
  try {
    const r = dropout(bench, fallVolts(figures.find((f) => f.figure === 'dropout'), bench.voutNominal));
    d = { x: Math.abs(r.level), y: bench.voutNominal - r.fall };
  } catch (e) {
    notes.push(`line curve: no dropout point: ${reasonOf(e)}`);
  }
  const mag = Math.abs(n);
  const low = d ? Math.max(0.05 * mag, d.x - 0.6 * (mag - d.x)) : 0.5 * mag;
  const xs = spaced(low, Math.max(high, mag), LINE_POINTS[bench.kind]);
  if (!xs.includes(mag)) xs.push(mag);
  xs.sort((a, b) => a - b);
  const curve = walkCurve(bench, xs, mag, (w, x) => w.solve({ level: s * x, loadAmps: bench.loadNominal }, `line curve at ${bench.input.describe(s * x)}`).mean, 'line curve', notes);
  return { ...curve, unit: bench.input.unit, nominal: { x: mag, y: bench.voutNominal }, dropout: d };
}

/** The load curve (see the module comment); undefined without a load element. */
function loadCurve(bench: Bench, figures: readonly FlatFigure[], notes: string[]): LoadCurve | undefined {
  const nominal = bench.loadNominal;
  if (nominal === undefined) {
    notes.push('load curve: the .supply line names no load element');
    return undefined;
  }
  const to = figures.find((f) => f.figure === 'load')?.keys.get('to');
  const high = Math.max(1.5 * nominal, to ?? 0);
  if (!(high > 0)) {
    notes.push('load curve: the nominal load draws no current');
    return undefined;
  }
  const xs = spaced(0, high, LOAD_POINTS[bench.kind]);
  if (!xs.includes(nominal)) xs.push(nominal);
  xs.sort((a, b) => a - b);
  const curve = walkCurve(bench, xs, nominal, (w, x) => w.solve({ level: bench.input.nominal, loadAmps: x }, `load curve at ${x} A`).mean, 'load curve', notes);
  return { ...curve, nominal: { x: nominal, y: bench.voutNominal } };
}

/** The rejection curve (DC benches). */
function rejectionCurve(bench: Bench, marked: number, notes: string[]): RejectionCurve | undefined {
  if (bench.kind !== 'dc') return undefined;
  const [lo, hi] = REJECTION_DECADES;
  const x: number[] = [];
  const y: number[] = [];
  for (let k = 0; k <= (hi - lo) * 6; k++) {
    const hz = 10 ** (lo + k / 6);
    try {
      const db = bench.smallSignalRejection(hz);
      if (db === undefined || !Number.isFinite(db)) continue;
      x.push(hz);
      y.push(db);
    } catch (e) {
      notes.push(`rejection curve: left out at ${Number(hz.toPrecision(3))} Hz: ${reasonOf(e)}`);
    }
  }
  return { x, y, marked };
}

/** The sag figure's dip at its depth, its waveforms recorded. */
function sagWaveform(bench: Bench, f: FlatFigure): SagWaveform {
  const k = f.keys;
  const depth = k.get('depth') ?? SAG_DEFAULTS.depth;
  const edge = k.get('edge') ?? SAG_DEFAULTS.edge;
  const dur = k.get('dur') ?? SAG_DEFAULTS.dur;
  const plan = bench.planDip({ edge, dur, ripple: k.get('ripple') ?? SAG_DEFAULTS.ripple, freq: k.get('freq') ?? SAG_DEFAULTS.freq });
  // One settled ripple cycle before the dip and five edges after the recovery, as the sag figure watches it.
  const start = Math.max(0, plan.t0 - plan.period);
  const tEnd = plan.t0 + 2 * edge + plan.dur + 5 * edge;
  const rec = new WaveRecorder(bench.stage);
  const shared: SharedStepBudget = { left: MAX_FIGURE_STEPS, budget: 'MAX_FIGURE_STEPS', limit: MAX_FIGURE_STEPS };
  plan.run(depth, tEnd, (t, _out, x) => {
    if (t >= start) rec.add(t, x, plan.t0);
  }, shared);
  return { ...rec.result(), depth, corners: dipCorners(plan.t0, edge, plan.dur).slice(1).map((t) => t - plan.t0) };
}

/**
 * Measures the curves and waveforms of the figures the netlist asks for
 * (line and dropout give the line curve, load the load curve, ripple the
 * rejection curve and the ripple waveform, sag the dip waveform), on the
 * bench; `kinds` (default all) says which of them to measure. Never throws
 * for a curve that cannot be measured: it is left out, with the reason in
 * `notes`.
 */
export function figureCurves(bench: Bench, figures: readonly FlatFigure[], kinds: readonly CurveKind[] = CURVE_KINDS): FigureCurves {
  BENCHES.check('figureCurves', 'bench', bench);
  const notes: string[] = [];
  const has = (kind: FlatFigure['figure']): boolean => figures.some((f) => f.figure === kind);
  const want = (k: CurveKind): boolean => kinds.includes(k);
  const guarded = <T>(what: string, body: () => T): T | undefined => {
    try {
      return body();
    } catch (e) {
      notes.push(`${what}: not measured: ${reasonOf(e)}`);
      return undefined;
    }
  };
  const ripple = figures.find((f) => f.figure === 'ripple');
  const hertz = ripple?.keys.get('freq') ?? DEFAULT_RIPPLE_FREQ;
  const amp = ripple?.keys.get('amp') ?? defaultRippleAmp(bench);
  const sag = figures.find((f) => f.figure === 'sag');
  return {
    bench: bench.kind,
    line: want('line') && (has('line') || has('dropout')) ? guarded('line curve', () => lineCurve(bench, figures, notes)) : undefined,
    load: want('load') && has('load') ? guarded('load curve', () => loadCurve(bench, figures, notes)) : undefined,
    rejection: want('rejection') && ripple ? guarded('rejection curve', () => rejectionCurve(bench, hertz, notes)) : undefined,
    ripple: want('ripple') && ripple ? guarded('ripple waveform', () => ({ ...bench.rippleWaveform(hertz, amp, bench.kind === 'dc' ? 3 : 2), hertz: bench.kind === 'dc' ? hertz : 0, amp: bench.kind === 'dc' ? amp : 0 })) : undefined,
    sag: want('sag') && sag ? guarded('sag waveform', () => sagWaveform(bench, sag)) : undefined,
    notes,
  };
}
