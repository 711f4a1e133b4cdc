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
import { stressTable } from './stress.js';
import { DEFAULT_DERATING, type Derating, type StressRow } from '../analysis/stress.js';
import { settleBandVolts, startup } from './startup.js';
import { loadStep } from './load-step.js';
// thermal figure (docs/thermal.md)
import { thermal } from './thermal.js';
import { outputShort } from './short.js';
import { requireKey } from './keys.js';

/** The values of one figure that was measured, and the conditions they were measured at. */
export interface FigureValues {
  readonly kind: FigureKind;
  /** Dotted figure name (figures.md) → value in the unit the figure registry gives it. */
  readonly values: Readonly<Record<string, number>>;
  /** What it was measured at, in words. */
  readonly conditions: string;
  /** The stress table of the stress figure, or of the short figure with the output shorted (docs/stress.md); absent on every other figure. */
  readonly stress?: readonly StressRow[];
  /** Values of the figure this stage cannot have or could not give (`startup.ipk_rect` of a stage without a diode, an infinite heatsink allowance), each with the reason in words, not naming the value; reported as not measured. */
  readonly omitted?: readonly { readonly name: string; readonly reason: string }[];
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

/** A band key (`fall=`, `band=`) in volts: written as `5%` a ratio of Vout_nom, a plain number volts; default 1 % of Vout_nom. */
function bandVolts(f: FlatFigure, key: string, voutNominal: number): number {
  const v = f.keys.get(key);
  return settleBandVolts(v === undefined ? undefined : f.percentKeys.has(key) ? v * voutNominal : v, voutNominal);
}

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
      const { highLevel, loadRange } = dissipationRanges(bench, ctx);
      const r = dissipation(bench, { highLevel, loadRange, origin: f.origin });
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
    .with('stress', () => {
      const { rows, derating } = stressTable(bench, f, derateKeys(f));
      const values: Record<string, number> = { 'stress.worst': Math.max(...rows.map((r) => r.ratio)) };
      for (const r of rows) values[`stress.${r.element}.${r.quantity}`] = r.ratio;
      const conditions = `worst over every condition of the figures before it on this bench; marked past ${derating.voltage} of voltage, ${derating.current} of current and ${derating.power} of power ratings`;
      return { kind: 'stress', values, conditions, stress: rows };
    })
    .with('short', () => {
      const r = outputShort(bench, { ohms: k.get('r'), ambient: k.get('tamb'), derating: derateKeys(f), origin: f.origin });
      const values: Record<string, number> = { 'short.current': r.current, 'short.vout': r.vout, 'short.pin': r.pin };
      for (const [name, p] of Object.entries(r.pd)) values[`short.pd.${name}`] = p;
      for (const j of r.junctions) {
        values[`short.${j.element}.tj`] = j.tj;
        if (j.tj > j.tjmax) ctx.warnings.push(warningAt('short-too-hot', `short: with the output shorted, ${j.element} dissipates ${formatSI(r.pd[j.element] ?? 0, 'W')} and its junction reaches ${j.tj.toFixed(0)} °C at ${r.ambient} °C ambient, above its tjmax of ${j.tjmax} °C: it fails by heat, whatever its power rating says`, f.origin.pos, f.origin.lineText));
      }
      const omitted: { name: string; reason: string }[] = [];
      if (r.rows.length > 0) {
        const first = r.rows.reduce((a, b) => (b.ratio > a.ratio ? b : a));
        values['short.worst'] = first.ratio;
        for (const row of r.rows) values[`short.${row.element}.${row.quantity}`] = row.ratio;
        if (first.ratio > 1) {
          ctx.warnings.push(warningAt('short-over-rating', `short: with the output shorted through ${formatSI(r.ohms, 'Ω')}, ${first.element} reaches ${first.ratio.toFixed(2)}× its ${first.quantity} rating (${first.ratedBy}), the furthest past a rating of any part: without current limiting it is the first to fail by its ratings`, f.origin.pos, f.origin.lineText));
        }
      } else omitted.push({ name: 'short.worst', reason: 'no part carries a rating to judge it by (vmax=, imax=, ipk=, irms=, pmax=, or the model VCEMAX, VCBMAX, ICMAX, PMAX)' });
      const input = match(bench)
        .with({ kind: 'dc' }, () => `input ${volts(bench.input.nominal)}`)
        .with({ kind: 'sine-fed' }, (b) => `${volts(b.amplitude)} amplitude`)
        .exhaustive();
      return { kind: 'short', values, conditions: `output shorted to its reference through ${formatSI(r.ohms, 'Ω')}, ${input}, in place of the load; ${r.how}`, stress: r.rows, omitted };
    })
    .with('startup', () => {
      const r = startup(bench, { fall: bandVolts(f, 'fall', bench.voutNominal), tmax: k.get('tmax') });
      const input = match(bench)
        .with({ kind: 'dc' }, () => `input stepped to ${volts(bench.input.nominal)}`)
        .with({ kind: 'sine-fed' }, (b) => `${volts(b.amplitude)} sine from t = 0`)
        .exhaustive();
      const band = r.steadyMin === r.steadyMax ? `within ${volts(r.fall)} of ${volts(r.steadyMax)}` : `within ${volts(r.fall)} of the settled cycle's ${volts(r.steadyMin)} … ${volts(r.steadyMax)}`;
      const rect = r.rectifier === undefined ? '' : `, rectifier peak in ${r.rectifier}`;
      return {
        kind: 'startup',
        values: defined({ 'startup.inrush': r.inrush, 'startup.ipk_rect': r.ipkRect, 'startup.settle': r.settle, 'startup.overshoot': r.overshoot }),
        conditions: `from everything discharged, ${input}, ${loadText}; settled ${band}; steady state reached at ${formatSI(r.end, 's')}${rect}`,
        omitted: r.ipkRect === undefined ? [{ name: 'startup.ipk_rect', reason: 'the stage has no diode, so there is no rectifier current to report' }] : [],
      };
    })
    .with('step', () => {
      const r = loadStep(bench, { from: k.get('from'), to: k.get('to'), rise: k.get('rise'), band: bandVolts(f, 'band', bench.voutNominal), tmax: k.get('tmax') });
      const conditions = match(bench)
        .with({ kind: 'dc' }, () => `load ${amps(r.from)} → ${amps(r.to)} in ${formatSI(r.rise, 's')}, input ${volts(bench.input.nominal)}; output ${volts(r.before)} → ${volts(r.after)}, recovery within ${volts(r.band)}; steady state reached at ${formatSI(r.end, 's')}`)
        .with({ kind: 'sine-fed' }, (b) => `load ${amps(r.from)} → ${amps(r.to)} in ${formatSI(r.rise, 's')} at the start of a source cycle, ${volts(b.amplitude)} amplitude; from the settled cycle's ${r.to > r.from ? 'trough' : 'crest'} ${volts(r.before)} to the settled cycle ${volts(r.steadyMin)} … ${volts(r.steadyMax)}, recovery within ${volts(r.band)} of it; steady state reached at ${formatSI(r.end, 's')} after the step`)
        .exhaustive();
      return { kind: 'step', values: { 'step.dip': r.dip, 'step.peak': r.peak, 'step.recovery': r.recovery }, conditions };
    })
    // thermal figure (docs/thermal.md)
    .with('thermal', () => {
      const { highLevel, loadRange } = dissipationRanges(bench, ctx);
      const selfheat = k.get('selfheat') ?? 0;
      requireKey('thermal', 'selfheat', selfheat, (v) => v === 0 || v === 1, 'is 0 (off) or 1 (on)');
      const r = thermal(bench, { ambient: k.get('tamb'), selfHeat: selfheat === 1, highLevel, loadRange, origin: f.origin });
      ctx.warnings.push(...r.notes);
      const values: Record<string, number> = { 'thermal.worst_margin': Math.min(...r.rows.map((row) => row.margin)) };
      const omitted: { name: string; reason: string }[] = [];
      for (const row of r.rows) {
        values[`thermal.${row.element}.tj`] = row.tj;
        values[`thermal.${row.element}.margin`] = row.margin;
        if (row.rthsinkMax.ok) values[`thermal.${row.element}.rthsink_max`] = row.rthsinkMax.value;
        else omitted.push({ name: `thermal.${row.element}.rthsink_max`, reason: row.rthsinkMax.reason });
      }
      if (r.selfHeat?.ok) values['thermal.vout_drift'] = r.selfHeat.drift;
      else if (r.selfHeat) omitted.push({ name: 'thermal.vout_drift', reason: r.selfHeat.reason });
      const tjmaxText = r.rows.map((row) => `${row.element} ${row.tjmax} °C${row.tjmaxFrom === 'default' ? ' (default)' : ''}`).join(', ');
      const corners = match(bench)
        .with({ kind: 'dc' }, () => `largest dissipation over input / load ${r.corners.map((c) => `${volts(c.level)}${c.loadAmps === undefined ? '' : ` / ${amps(c.loadAmps)}`}`).join(', ')}`)
        .with({ kind: 'sine-fed' }, (b) => `largest cycle-average dissipation at ${volts(b.amplitude)} and at ${r.corners[1]!.level}× amplitude`)
        .exhaustive();
      const warm = r.selfHeat?.ok ? `; self-heated at nominal in ${r.selfHeat.iterations} iterations (${Object.entries(r.selfHeat.junctions).map(([n, t]) => `${n} ${t.toFixed(1)} °C`).join(', ')})` : '';
      return { kind: 'thermal', values, conditions: `ambient ${r.ambient} °C, ${corners}; tjmax ${tjmaxText}${warm}`, omitted };
    })
    .exhaustive();
}

/** The derating keys of a stress or short figure (defaults: DEFAULT_DERATING). */
function derateKeys(f: FlatFigure): Derating {
  return {
    voltage: f.keys.get('vderate') ?? DEFAULT_DERATING.voltage,
    current: f.keys.get('iderate') ?? DEFAULT_DERATING.current,
    power: f.keys.get('pderate') ?? DEFAULT_DERATING.power,
  };
}

/** The dissipation figure's corners as the line and load figures of the netlist set them: the highest input and the load range. */
function dissipationRanges(bench: Bench, ctx: FigureContext): { highLevel: number | undefined; loadRange: readonly [number, number] | undefined } {
  const line = ctx.all.find((g) => g.figure === 'line');
  const load = ctx.all.find((g) => g.figure === 'load');
  const loadRange = load && bench.loadNominal !== undefined ? ([load.keys.get('from') ?? 0, load.keys.get('to') ?? bench.loadNominal] as const) : undefined;
  return { highLevel: line?.keys.get('to'), loadRange };
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
