/**
 * A bench for the stage of a compiled circuit: its own compiled circuit
 * (compiled again from the caller's flat circuit; compiling is cheap), set
 * to the temperature of the figures, with the strategy the stage's input
 * asks for: a `sin` input gets the sine-fed bench, any other the DC bench.
 */
import { MAX_BENCH_STEPS } from '../budgets.js';
import { errorAt, RailcheckError } from '../errors.js';
import { compileCircuit, type CompiledCircuit } from '../engine/compile.js';
import { setCircuitTemperature } from '../engine/dcop.js';
import { BENCHES, type Bench, type BenchStart } from './bench.js';
import { createDcBench } from './dc-bench.js';
import { createSineFedBench } from './sine-fed-bench.js';
import { makeStage } from './stage.js';
import { COMPILED_CIRCUITS } from '../engine/compile.js';
import { checkOptions } from '../arguments.js';

/** Options of {@link createBench}. */
export interface BenchOptions {
  /** Temperature of the measurement, °C (default: the circuit's first `.temp`, 27 °C without one; figures.md). */
  readonly celsius?: number | undefined;
}

/**
 * Builds the bench for the stage named by the circuit's `.supply` line and
 * solves its nominal point. The caller's compiled circuit is only read: the
 * bench compiles its own from `compiled.flat`. Throws RailcheckError
 * (`bad-argument` for a `compiled` that compileCircuit did not return).
 */
export function createBench(compiled: CompiledCircuit, options: BenchOptions = {}): Bench {
  COMPILED_CIRCUITS.check('createBench', 'compiled', compiled);
  checkOptions('createBench', options, { celsius: 'finite' });
  const flat = compiled.flat;
  const supply = flat.supply;
  if (!supply) throw new RailcheckError([errorAt('no-supply', 'figures need a .supply line naming the stage')]);
  const own = compileCircuit(flat);
  if (!own.ok) throw new RailcheckError(own.errors);
  return benchOnCircuit(own.circuit, options.celsius ?? flat.temperatures[0] ?? 27);
}

/**
 * The bench on `circuit` itself (which the bench takes over: its
 * workspace and sources are the bench's from now on), at `celsius` °C,
 * its nominal solve started from `from` when given (a neighbouring
 * circuit's {@link Bench.warmStart}; from zero or switch-on when that
 * fails), with a stress meter when `watch.meter` (default: when the
 * netlist asks for stress, stage.ts wantsStress). Internal to core:
 * tolerance runs build their benches this way on a revalued circuit, the
 * output short on a shorted one. Throws RailcheckError.
 */
export function benchOnCircuit(circuit: CompiledCircuit, celsius: number, from?: BenchStart, watch: { readonly meter?: boolean } = {}): Bench {
  const supply = circuit.flat.supply;
  if (!supply) throw new RailcheckError([errorAt('no-supply', 'figures need a .supply line naming the stage')]);
  setCircuitTemperature(circuit, celsius);
  // Every transient of every figure on this bench draws from one allowance (budgets.ts).
  circuit.ws.stepAllowance = { left: MAX_BENCH_STEPS, budget: 'MAX_BENCH_STEPS', limit: MAX_BENCH_STEPS };
  const stage = makeStage(circuit, supply, celsius, watch.meter);
  return BENCHES.mark(stage.inputWaveform?.kind === 'sin' ? createSineFedBench(stage, from) : createDcBench(stage, from));
}
