/**
 * Dropout (figures.md): lower the input from nominal, at nominal load,
 * until the stage no longer holds its output; the lowest input that still
 * does. The bench says how holding is judged ({@link DropoutRule}): on a
 * DC bench, the input at which Vout = Vout_nom − fall (default 100 mV, the
 * customary regulator-datasheet criterion, common practice), bracketed by
 * steps down from nominal and narrowed by Illinois regula falsi to 0.1 mV;
 * on a sine-fed bench, the lowest amplitude ratio at which the mean output
 * stays within `fall` of nominal and the ripple below twice its nominal
 * value, by the same bracketing and regula falsi on the smaller of the two
 * margins (V), to 1e-5 of the amplitude.
 */
import { match } from 'ts-pattern';
import { errorAt, RailcheckError } from '../errors.js';
import type { FlatFigure } from '../elaborate/flat.js';
import { formatSI } from '../units.js';
import type { Bench, DropoutRule } from './bench.js';
import { illinois } from './search.js';
import { BENCHES } from './bench.js';
import { checkFinite } from '../arguments.js';

/** The dropout figures. */
export interface Dropout {
  /** The fall that defines dropout, V. */
  readonly fall: number;
  /** The lowest input level that holds: `dropout.vin` (V) on a DC bench, `dropout.ratio` (ratio) on a sine-fed one. */
  readonly level: number;
  /** `dropout.v` = level − Vout(level), V, the input-output differential (magnitudes on a negative rail); DC benches only. */
  readonly v: number | undefined;
  /** `dropout.headroom` = nominal − level: V on a DC bench (magnitudes on a negative rail), a ratio on a sine-fed one. */
  readonly headroom: number;
  /** `headroom.min`: the least V(feed) − Vout over the nominal cycle, V (a sine-fed bench with `feed=`). */
  readonly headroomMin: number | undefined;
}

/** Default fall, V (figures.md). */
export const DEFAULT_DROPOUT_FALL = 0.1;

/** The `fall=` key of a figure in volts: written as `5%` it is a ratio of Vout_nom, a plain number is volts; default 100 mV. */
export function fallVolts(f: FlatFigure | undefined, voutNominal: number): number {
  const v = f?.keys.get('fall');
  if (v === undefined) return DEFAULT_DROPOUT_FALL;
  return f!.percentKeys.has('fall') ? v * voutNominal : v;
}

/** Bracketing steps from nominal down to zero input (each a solve continuing from the last). */
const BRACKET_STEPS = 40;

/** The crossing of Vout = target, walking down from nominal; the level and the output there. */
function crossing(bench: Bench, rule: Extract<DropoutRule, { kind: 'crossing' }>, fall: number): { level: number; output: number } {
  const origin = bench.stage.supply.origin;
  const nominal = bench.input.nominal;
  const walk = bench.walk();
  const f = (level: number): number => walk.solve({ level, loadAmps: bench.loadNominal }, 'dropout search').mean - rule.target;
  let pos = nominal;
  let fPos = bench.voutNominal - rule.target;
  for (let k = 1; k <= BRACKET_STEPS; k++) {
    const level = nominal * (1 - k / BRACKET_STEPS);
    const fv = f(level);
    if (fv < 0) {
      // `neg` is where the output has fallen too far, `pos` where it has not; on a negative rail neg > pos.
      const level0 = illinois(f, { neg: level, fNeg: fv, pos, fPos }, rule.tolerance);
      return { level: level0, output: f(level0) + rule.target };
    }
    pos = level;
    fPos = fv;
  }
  throw new RailcheckError([errorAt('no-dropout', `the output never falls by ${formatSI(fall, 'V')} below its nominal ${formatSI(bench.voutNominal, 'V')}, even with the input at 0 V`, origin.pos, origin.lineText, 'a stage whose output depends on its input, or a smaller fall=')]);
}

/**
 * The lowest level in [0, nominal] that holds: the margin of the holding
 * rule (V, ≥ 0 holds) is continuous in the level, so its crossing is
 * bracketed by steps down from nominal, each solve warm-started from the
 * last, and narrowed by Illinois regula falsi to the rule's resolution.
 */
function lowestHolding(bench: Bench, rule: Extract<DropoutRule, { kind: 'holding' }>): number {
  const walk = bench.walk();
  const f = (level: number): number => rule.margin(walk.solve({ level, loadAmps: bench.loadNominal }, 'dropout search'));
  const nominal = bench.input.nominal;
  let pos = nominal;
  let fPos = rule.margin(bench.nominal);
  for (let k = 1; k <= BRACKET_STEPS; k++) {
    const level = nominal * (1 - k / BRACKET_STEPS);
    const fv = f(level);
    if (fv < 0) return illinois(f, { neg: level, fNeg: fv, pos, fPos }, rule.resolution * nominal);
    pos = level;
    fPos = fv;
  }
  return 0;
}

/** Finds dropout with an output fall of `fall` V (default 100 mV). Throws RailcheckError when a DC stage's output never falls that far. */
export function dropout(bench: Bench, fall = DEFAULT_DROPOUT_FALL): Dropout {
  BENCHES.check('dropout', 'bench', bench);
  checkFinite('dropout', 'fall', fall);
  const rule = bench.dropoutRule(fall);
  const { level, output } = match(rule)
    .returnType<{ level: number; output: number | undefined }>()
    .with({ kind: 'crossing' }, (r) => crossing(bench, r, fall))
    .with({ kind: 'holding' }, (r) => ({ level: lowestHolding(bench, r), output: undefined }))
    .exhaustive();
  // On a negative rail both are magnitudes: |Vin*| − |Vout|, |Vin_nom| − |Vin*|.
  const s = bench.input.sign;
  return { fall, level, v: output === undefined ? undefined : s * level - output, headroom: s * (bench.input.nominal - level), headroomMin: bench.nominal.feed?.headroomMin };
}
