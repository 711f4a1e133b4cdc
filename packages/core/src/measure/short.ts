/**
 * The output short (figures.md, "short"; docs/stress.md, "A shorted
 * output"): the stage with its output shorted to its reference through a
 * small resistance in place of its load, as a fault the stage may meet (a
 * slipped probe, a shorted load), at nominal input. The short
 * is a circuit of its own: the bench's flat circuit with one resistor more
 * between `out` and `ref`, on a bench of its own with a stress meter of its
 * own, so the fault's stress never enters the stress table of the normal
 * conditions. Read off it: the current the stage delivers into the short,
 * the output left across it, the input power, every part's dissipation,
 * and every rated quantity against its rating, so that the part that fails
 * first without current limiting shows as the highest ratio.
 *
 * A DC-fed stage is solved at its DC operating point; a sine-fed stage at
 * its periodic steady state with the short in place (cycle averages, peaks
 * over the cycle), found as the sine-fed bench finds its nominal.
 */
import { errorAt, RailcheckError } from '../errors.js';
import { compileCircuit } from '../engine/compile.js';
import { FLAT_CIRCUITS, type FlatCircuit, type FlatElement } from '../elaborate/flat.js';
import type { CardOrigin } from '../netlist/ast.js';
import { checkOptions } from '../arguments.js';
import { DEFAULT_DERATING, judgeStress, type Derating, type StressRow } from '../analysis/stress.js';
import { BENCHES, type Bench } from './bench.js';
import { benchOnCircuit } from './create-bench.js';
import { dissipates } from './dissipation.js';
import { requireKey } from './keys.js';
import { MAX_SHORT_OHMS } from '../figure-registry.js';
import { describeSteady } from './periodic.js';
import { junctionOf } from './thermal.js';

/** Default resistance of the short, Ω: 10 mΩ, about a short wire and a clip's contact (common practice, no source). */
export const DEFAULT_SHORT_OHMS = 0.01;


/** Options of {@link outputShort}. */
export interface ShortOptions {
  /** Resistance of the short, Ω (default {@link DEFAULT_SHORT_OHMS}). */
  readonly ohms?: number | undefined;
  /** Derating ratios of the stress rows (default {@link DEFAULT_DERATING}). */
  readonly derating?: Derating | undefined;
  /** Ambient temperature for the junction temperatures, °C (default the figure temperature). */
  readonly ambient?: number | undefined;
  /** The card the short's resistor is placed at in messages (default the `.supply` line). */
  readonly origin?: CardOrigin | undefined;
}

/** Results of the output short. */
export interface OutputShort {
  /** Resistance of the short, Ω. */
  readonly ohms: number;
  /** `short.current`: the current the stage delivers into the short, A (magnitude; the cycle average on a sine-fed stage). */
  readonly current: number;
  /** `short.vout`: the output left across the short, V (magnitude of the mean). */
  readonly vout: number;
  /** `short.pin`: the power out of the input source, W (a cycle average on a sine-fed stage). */
  readonly pin: number;
  /** `short.pd.<element>`: power each resistor, diode and transistor of the stage absorbs (the load taken off), W (cycle averages on a sine-fed stage). */
  readonly pd: Readonly<Record<string, number>>;
  /** Junction temperature in the short of every diode and transistor with `rth=`: Ta + P·(rth + rthsink) (JESD51-1 series path, as the thermal figure), °C, with its tjmax. */
  readonly junctions: readonly { readonly element: string; readonly tj: number; readonly tjmax: number }[];
  /** The ambient of the junction temperatures, °C. */
  readonly ambient: number;
  /** Every rated quantity of every part in the short against its rating (empty when no part carries a rating). */
  readonly rows: readonly StressRow[];
  /** How the short's steady state was found, in words. */
  readonly how: string;
}

/** A name for the short's resistor that no element of `flat` has. */
function shortName(flat: FlatCircuit): string {
  const taken = new Set(flat.elements.map((e) => e.key));
  let name = 'R#short';
  for (let k = 2; taken.has(name.toLowerCase()); k++) name = `R#short${k}`;
  return name;
}

/** The stage's flat circuit with its load taken off and the output shorted to its reference through `ohms` Ω in its place, and the short's resistor name. */
function shortedCircuit(flat: FlatCircuit, ohms: number, origin: CardOrigin): { flat: FlatCircuit; name: string } {
  const supply = flat.supply;
  if (!supply) throw new RailcheckError([errorAt('no-supply', 'figures need a .supply line naming the stage')]);
  const name = shortName(flat);
  const short: FlatElement = { name, key: name.toLowerCase(), origin, pmax: undefined, part: {}, kind: 'resistor', nodes: [supply.out, supply.ref], ohms };
  // The short replaces the load (a current-source load would go on drawing its current at 0 V); no figures: the copy is solved, never measured.
  const elements = [...flat.elements.filter((e) => e.key !== supply.load), short];
  return { flat: FLAT_CIRCUITS.mark({ ...flat, elements, supply: { ...supply, load: undefined }, figures: [], limits: [], spreads: [] }), name };
}

/**
 * Shorts the stage's output and reads what each part goes through.
 * Throws RailcheckError when the shorted stage cannot be solved, or for an
 * option out of range.
 */
export function outputShort(bench: Bench, opts: ShortOptions = {}): OutputShort {
  BENCHES.check('outputShort', 'bench', bench);
  checkOptions('outputShort', opts, { ohms: 'finite', ambient: 'finite' });
  const ohms = opts.ohms ?? DEFAULT_SHORT_OHMS;
  requireKey('short', 'r', ohms, (v) => Number.isFinite(v) && v > 0 && v <= MAX_SHORT_OHMS, `in (0, ${MAX_SHORT_OHMS}] Ω`);
  const main = bench.stage;
  const origin = opts.origin ?? main.supply.origin;
  const { flat, name } = shortedCircuit(main.compiled.flat, ohms, origin);
  const compiled = compileCircuit(flat);
  if (!compiled.ok) throw new RailcheckError(compiled.errors);
  let shorted: Bench;
  try {
    shorted = benchOnCircuit(compiled.circuit, main.celsius, undefined, { meter: true });
  } catch (e) {
    if (!(e instanceof RailcheckError)) throw e;
    throw new RailcheckError(e.diagnostics.map((d) => ({ ...d, message: `with the output shorted: ${d.message}` })));
  }
  // The shorted bench's nominal is the short; a second solve there (from its own steady state) reads the powers.
  const stats = shorted.solve({ level: shorted.input.nominal, loadAmps: undefined }, 'the shorted output', true);
  const power = stats.power!;
  const pd: Record<string, number> = {};
  for (const el of main.compiled.elements) if (dissipates(el) && el.key !== main.supply.load) pd[el.name] = power[el.name] ?? 0;
  const meter = shorted.stage.meter!;
  const where = shorted.kind === 'dc' ? 'the shorted output' : 'the shorted output, settled cycle';
  const rows = judgeStress(shorted.stage.compiled.elements, meter.results(), opts.derating ?? DEFAULT_DERATING)
    .filter((r) => r.element !== name)
    .map((r) => ({ ...r, where }));
  const vout = Math.abs(stats.mean);
  const how = shorted.kind === 'dc' ? 'DC operating point' : `periodic steady state by ${stats.steady ? describeSteady(stats.steady) : 'whole cycles'}`;
  const ambient = opts.ambient ?? main.celsius;
  const junctions = main.compiled.elements.flatMap((el) => {
    const rth = el.part.rth;
    if (rth === undefined || (el.kind !== 'diode' && el.kind !== 'bjt')) return [];
    const { tj, tjmax } = junctionOf(el, rth, pd[el.name] ?? 0, ambient);
    return [{ element: el.name, tj, tjmax }];
  });
  return { ohms, current: vout / ohms, vout, pin: -(power[main.input.name] ?? 0), pd, junctions, ambient, rows, how };
}
