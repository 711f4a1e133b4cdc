/**
 * One `.figure` line measured on a bench: its keys handed to the figure's
 * function, and the result named as figures.md names it for that kind of
 * bench (the dotted names of the figure registry), with the conditions in
 * words. The definitions live in the figure modules; only names and words
 * differ here between the DC and the sine-fed bench.
 */
import { match } from 'ts-pattern';
import { RailcheckError, warningAt, type Diagnostic } from '../errors.js';
import type { FlatFigure } from '../elaborate/flat.js';
import type { FigureKind } from '../figure-registry.js';
import { formatSI } from '../units.js';
import type { Bench } from './bench.js';
import { dissipation } from './dissipation.js';
import { fallVolts, type Dropout } from './dropout.js';
import { describeSteady } from './periodic.js';
import { lineRegulation, loadRegulation } from './regulation.js';
import { rippleRejection } from './ripple.js';
import { sagRideThrough } from './sag.js';

/** The values of one figure that was measured, and the conditions they were measured at. */
export interface FigureValues {
  readonly kind: FigureKind;
  /** Dotted figure name (figures.md) → value in the unit the figure registry gives it. */
  readonly values: Readonly<Record<string, number>>;
  /** What it was measured at, in words. */
  readonly conditions: string;
}

/** What one figure may use of the others measured on the same bench. */
export interface FigureContext {
  /** Every `.figure` of the netlist (dissipation takes its corners from line and load). */
  readonly all: readonly FlatFigure[];
  /** Dropout at an output fall of `fall` V, measured at most once per fall: the dropout figure and the line figure's warning share it. Throws what dropout throws. */
  readonly dropoutAt: (fall: number) => Dropout;
  /** Warnings of the figures, in order. */
  readonly warnings: Diagnostic[];
}

const amps = (a: number): string => formatSI(a, 'A');
const volts = (v: number): string => formatSI(v, 'V');

/** The defined entries of a record of values, in their order. */
function defined(values: Readonly<Record<string, number | undefined>>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const [name, v] of Object.entries(values)) if (v !== undefined) out[name] = v;
  return out;
}

/** Measures one figure on the bench. Throws RailcheckError. */
export function measureFigure(bench: Bench, f: FlatFigure, ctx: FigureContext): FigureValues {
  const k = f.keys;
  const loadText = bench.loadNominal === undefined ? "the stage's own load" : `load ${amps(bench.loadNominal)}`;
  return match(f.figure)
    .returnType<FigureValues>()
    .with('line', () => {
      const r = lineRegulation(bench, { from: k.get('from'), to: k.get('to') });
      lineBelowDropout(bench, f, r.from, ctx);
      const conditions = match(bench)
        .with({ kind: 'dc' }, () => `input ${volts(r.from)} → ${volts(r.to)}, ${loadText}`)
        .with({ kind: 'sine-fed' }, (b) => `amplitude ${r.from}× → ${r.to}× of ${volts(b.amplitude)}, mean output, periodic steady state`)
        .exhaustive();
      return { kind: 'line', values: defined({ 'line.delta': r.delta, 'line.slope': r.slope, 'line.pct_per_v': r.pctPerV, 'line.pct': r.pct }), conditions };
    })
    .with('load', () => {
      const r = loadRegulation(bench, { from: k.get('from'), to: k.get('to') });
      const conditions = match(bench)
        .with({ kind: 'dc' }, () => `load ${amps(r.from)} → ${amps(r.to)}, input ${volts(bench.input.nominal)}`)
        .with({ kind: 'sine-fed' }, (b) => `load ${amps(r.from)} → ${amps(r.to)}, mean output at ${volts(b.amplitude)} amplitude`)
        .exhaustive();
      return { kind: 'load', values: { 'load.delta': r.delta, 'load.pct': r.pct, 'load.rout': r.rout }, conditions };
    })
    .with('dropout', () => {
      const r = ctx.dropoutAt(fallVolts(f, bench.voutNominal));
      const levelName = match(bench.input.unit).with('V', () => 'dropout.vin').with('ratio', () => 'dropout.ratio').exhaustive();
      const conditions = match(bench)
        .with({ kind: 'dc' }, () => `output ${volts(r.fall)} below nominal, ${loadText}`)
        .with({ kind: 'sine-fed' }, () => `lowest amplitude holding the mean within ${volts(r.fall)} and ripple below 2× nominal`)
        .exhaustive();
      return { kind: 'dropout', values: defined({ [levelName]: r.level, 'dropout.v': r.v, 'dropout.headroom': r.headroom, 'headroom.min': r.headroomMin }), conditions };
    })
    .with('ripple', () => {
      const r = rippleRejection(bench, { freq: k.get('freq'), amp: k.get('amp'), method: f.method });
      ctx.warnings.push(...r.warnings);
      return match(bench)
        .returnType<FigureValues>()
        .with({ kind: 'dc' }, () => ({
          kind: 'ripple',
          values: defined({ 'ripple.rr': r.smallSignal, 'ripple.rr_tran': r.steady, 'ripple.out_pp': r.outPp }),
          conditions: `${formatSI(r.freq, 'Hz')}, ${volts(r.amp)} peak on the input${r.steadyState ? `, periodic steady state by ${describeSteady(r.steadyState)}` : ''}`,
        }))
        .with({ kind: 'sine-fed' }, (b) => ({
          kind: 'ripple',
          values: defined({ 'ripple.out_pp': r.outPp, 'ripple.feed_pp': r.inputPp, 'ripple.rr': r.steady }),
          conditions: `at ${volts(b.amplitude)} amplitude, ${formatSI(b.frequency, 'Hz')} source, periodic steady state by ${describeSteady(b.nominal.steady!)}`,
        }))
        .exhaustive();
    })
    .with('dissipation', () => {
      const line = ctx.all.find((g) => g.figure === 'line');
      const load = ctx.all.find((g) => g.figure === 'load');
      const range = load && bench.loadNominal !== undefined ? ([load.keys.get('from') ?? 0, load.keys.get('to') ?? bench.loadNominal] as const) : undefined;
      const r = dissipation(bench, { highLevel: line?.keys.get('to'), loadRange: range, origin: f.origin });
      ctx.warnings.push(...r.warnings);
      const values: Record<string, number> = {};
      for (const [name, p] of Object.entries(r.pd)) values[`pd.${name}`] = p;
      if (r.efficiency !== undefined) values.efficiency = r.efficiency;
      const conditions = match(bench)
        .with({ kind: 'dc' }, () => `largest over input / load: ${r.corners.map((c) => `${volts(c.level)}${c.loadAmps === undefined ? '' : ` / ${amps(c.loadAmps)}`}`).join(', ')}`)
        .with({ kind: 'sine-fed' }, (b) => `cycle averages at ${volts(b.amplitude)} and at ${r.corners[1]!.level}× amplitude with the lowest and highest load`)
        .exhaustive();
      return { kind: 'dissipation', values, conditions };
    })
    .with('sag', () => {
      const r = sagRideThrough(bench, { depth: k.get('depth'), dur: k.get('dur'), edge: k.get('edge'), fall: fallVolts(f, bench.voutNominal), ripple: k.get('ripple'), freq: k.get('freq') });
      for (const t of r.failedTrials) ctx.warnings.push(warningAt('sag-trial-failed', `sag: a dip of ${(t.depth * 100).toFixed(1)} % could not be simulated (${t.reason}); counted as one the stage does not ride through, so sag.max_depth lies below it`, f.origin.pos, f.origin.lineText));
      const pct = (r.depth * 100).toFixed(1);
      const dip = match(bench)
        .with({ kind: 'dc' }, () => `dip of ${pct} % for ${formatSI(r.dur, 's')}`)
        .with({ kind: 'sine-fed' }, (b) => `amplitude dip of ${pct} % for ${Math.round(r.dur * b.frequency)} whole cycles`)
        .exhaustive();
      return {
        kind: 'sag',
        values: defined({ 'sag.fall': r.fall, 'sag.pass': r.pass, 'sag.max_depth': r.maxDepth, 'sag.out_pp': r.outPp, 'sag.out_pp_max': r.outPpMax, 'sag.out_pp_before': r.outPpBefore }),
        conditions: `${dip}, edges ${formatSI(r.edge, 's')}, pass if the fall ≤ ${volts(r.criterion)}`,
      };
    })
    .exhaustive();
}

/** figures.md, line: a warning when the line range starts below the dropout input (with the dropout figure's fall, else 100 mV). */
function lineBelowDropout(bench: Bench, f: FlatFigure, from: number, ctx: FigureContext): void {
  let d: Dropout;
  try {
    d = ctx.dropoutAt(fallVolts(ctx.all.find((g) => g.figure === 'dropout'), bench.voutNominal));
  } catch (e) {
    // A stage without a dropout (its output never falls that far) has no such range to warn about.
    if (e instanceof RailcheckError) return;
    throw e;
  }
  // Magnitudes, so that "below" means the same on a negative input; a level of the wrong sign has its own warning (polarity.ts).
  const s = bench.input.sign;
  if (s * from >= 0 && s * from < s * d.level) {
    ctx.warnings.push(warningAt('line-below-dropout', `line regulation starts at ${bench.input.describe(from)}, below the dropout input ${bench.input.describe(d.level)}: the figure describes a stage that is not regulating there`, f.origin.pos, f.origin.lineText));
  }
}
