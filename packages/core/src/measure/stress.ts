/**
 * The stress figure (docs/stress.md): the stress table of the bench's
 * stage, built from what its stress meter saw over every solve of the
 * figures measured before it on the same bench (so it is measured last),
 * and the rating notes every bench adds for a part past a rating.
 */
import { errorAt, RailcheckError, type Diagnostic } from '../errors.js';
import type { FlatFigure } from '../elaborate/flat.js';
import { judgeStress, overRatingWarnings, type Derating, type StressRow } from '../analysis/stress.js';
import type { Bench } from './bench.js';

/** The stress table of the bench's stage with the figure's `derating`. Throws RailcheckError (at the figure's line) when no part carries a rating. */
export function stressTable(bench: Bench, f: FlatFigure, derating: Derating): { rows: StressRow[]; derating: Derating } {
  const meter = bench.stage.meter;
  const rows = meter ? judgeStress(bench.stage.compiled.elements, meter.results(), derating) : [];
  if (rows.length === 0) {
    throw new RailcheckError([errorAt('no-ratings', 'stress: no part carries a rating to judge it by', f.origin.pos, f.origin.lineText, 'a rating on some part: vmax=, imax=, ipk=, irms=, pmax= on its line, or VCEMAX, VCBMAX, ICMAX, PMAX in its model (docs/stress.md)')]);
  }
  return { rows, derating };
}

/** A note for every voltage or current past its rating that the stage's stress meter saw on this bench, at the part's line (analysis/stress.ts). */
export function overRatingNotes(bench: Bench): Diagnostic[] {
  const meter = bench.stage.meter;
  if (!meter) return [];
  const elements = bench.stage.compiled.elements;
  return overRatingWarnings(elements, judgeStress(elements, meter.results()));
}
