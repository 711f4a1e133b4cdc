/**
 * The stage linearised at its nominal DC point with only the input driven
 * (the `.ac` machinery, engine/ac.ts): the small-signal transfer from the
 * input to the output, and the state at t = 0 of the small-signal periodic
 * steady state under a sine on the input. Used by the DC bench.
 */
import { errorAt, RailcheckError } from '../errors.js';
import { linearise, solveAt, type SmallSignalSystem } from '../engine/ac.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from '../analysis/dc.js';
import { vout, type Stage } from './stage.js';

/**
 * Solves the nominal operating point (warm, from the solution in the
 * workspace, which the caller has set to the nominal one), linearises
 * there and solves at `hertz`; hands the solved system and the index of a
 * singular pivot (0 when none) to `read`. The caller has set the input's
 * small-signal drive (stage.ts, applyDrive).
 */
function linearisedAt<T>(stage: Stage, hertz: number, what: string, read: (sys: SmallSignalSystem, singular: number) => T): T {
  const c = stage.compiled;
  const op = solveOperatingPoint(c, true);
  if (!op.ok) throw new RailcheckError([opFailure(op, `${what}: nominal operating point`, stage.supply.origin)]);
  const sys = linearise(c);
  return read(sys, solveAt(sys, hertz));
}

/** |Vout/Vin| (ratio) at `hertz` with the input driven by 1 V. Throws RailcheckError for a singular small-signal matrix. */
export function inputTransfer(stage: Stage, hertz: number): number {
  return linearisedAt(stage, hertz, 'ripple rejection', (sys, singular) => {
    if (singular !== 0) throw new RailcheckError([errorAt('ac-singular', `ripple rejection: small-signal matrix singular at ${hertz} Hz`, stage.supply.origin.pos)]);
    return Math.hypot(vout(stage, sys.xRe), vout(stage, sys.xIm));
  });
}

/**
 * The state at t = 0 of the small-signal periodic steady state for a sine
 * of the input's drive amplitude at `hertz` on the input: x_op + Im(X), X
 * the phasor solution (sin ωt = Im e^{jωt}). Starting a ripple transient
 * there leaves only the nonlinear part of the start-up to decay, instead
 * of a transient as large as the ripple itself that decays with the
 * stage's slowest time constant.
 */
export function smallSignalStart(stage: Stage, hertz: number): Float64Array {
  const c = stage.compiled;
  return linearisedAt(stage, hertz, 'ripple', (sys, singular) => {
    const start = new Float64Array(c.ws.x);
    if (singular === 0) for (let i = 1; i < start.length; i++) start[i] = start[i]! + sys.xIm[i]!;
    return start;
  });
}
