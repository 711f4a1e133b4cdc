/**
 * The measurement bench: a stage with its nominal point solved, and the
 * DC evaluations every figure is built from. "Nominal" (figures.md): the
 * input source at its DC value and the load at its own value.
 */
import { errorAt, RailcheckError } from '../errors.js';
import type { CompiledCircuit } from '../engine/compile.js';
import { solveOperatingPoint } from '../engine/dcop.js';
import { opFailure } from '../analysis/dc.js';
import { applySetting, loadCurrentOf, makeStage, restoreNominal, solveSetting, vout, type DcSetting, type Stage } from './stage.js';

/** A stage at its nominal point, ready for figures. */
export interface Bench {
  readonly stage: Stage;
  /**
   * +1 for a positive rail, −1 for a negative one. Figures of a negative
   * rail are taken on magnitudes (|Vout|, |Vin|), so that "the output
   * droops" and "the input falls" read the same on both.
   */
  readonly outputSign: 1 | -1;
  /** Sign of the nominal input (+1 or −1), for input differences. */
  readonly inputSign: 1 | -1;
  /** |Vout| at nominal, V. */
  readonly voutNominal: number;
  /** Nominal load current, A (undefined without a load element). */
  readonly loadNominal: number | undefined;
  /** The setting whose DC solution is in the workspace now. */
  current: DcSetting;
  /** The nominal DC solution, to restart from. */
  readonly nominalSolution: Float64Array;
  /** Dropout input found with the default criterion, once asked for (V). */
  dropoutCache: Map<number, number>;
}

/** Solves the nominal DC point of a compiled circuit that has a `.supply` line. Throws RailcheckError. */
export function createDcBench(c: CompiledCircuit): Bench {
  const supply = c.flat.supply;
  if (!supply) throw new RailcheckError([errorAt('no-supply', 'figures need a .supply line naming the stage')]);
  const stage = makeStage(c, supply);
  restoreNominal(stage);
  const outcome = solveOperatingPoint(c);
  if (!outcome.ok) throw new RailcheckError([opFailure(outcome, 'nominal operating point of the stage', supply.origin)]);
  const signed = vout(stage);
  const outputSign = signed < 0 ? -1 : 1;
  const voutNominal = Math.abs(signed);
  const loadNominal = loadCurrentOf(stage, voutNominal);
  return {
    stage,
    outputSign,
    inputSign: stage.nominalInput < 0 ? -1 : 1,
    voutNominal,
    loadNominal,
    current: { vin: stage.nominalInput, loadAmps: loadNominal },
    nominalSolution: new Float64Array(c.ws.x),
    dropoutCache: new Map(),
  };
}

/** Solves at `target` by continuation from the present point and returns the output on the rail's side, outputSign·Vout (V). */
export function voutAt(bench: Bench, target: DcSetting, what: string): number {
  solveSetting(bench.stage, bench.current, target, bench.voutNominal, what);
  bench.current = target;
  return bench.outputSign * vout(bench.stage);
}

/** Puts the bench back at nominal (devices and solution). */
export function backToNominal(bench: Bench): void {
  restoreNominal(bench.stage);
  bench.stage.compiled.ws.x.set(bench.nominalSolution);
  bench.current = { vin: bench.stage.nominalInput, loadAmps: bench.loadNominal };
  applySetting(bench.stage, bench.current, bench.voutNominal);
}
