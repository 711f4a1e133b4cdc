/**
 * Part stress (docs/stress.md): what each resistor, capacitor, inductor,
 * diode and transistor goes through, as the quantities its datasheet rates
 * (part-data.ts), taken over solutions of the compiled circuit. A
 * {@link StressMeter} watches DC points (each value is the point's own),
 * settled cycles (peaks over the cycle; mean and RMS as trapezoidal
 * integrals over the cycle divided by its length) and transients (peaks
 * only: a mean over a switch-on or a dip is no rated quantity), and keeps,
 * per part and quantity, the worst value with the condition it came from.
 * {@link judgeStress} sets the worst values against the ratings.
 */
import { match } from 'ts-pattern';
import type { CompiledCircuit } from '../engine/compile.js';
import type { FlatElement } from '../elaborate/flat.js';
import type { PartDataKey } from '../part-data.js';
import { warningAt, type Diagnostic } from '../errors.js';
import { formatSI } from '../units.js';

/**
 * A rated quantity: `v` the largest |voltage| across a resistor or
 * capacitor; `vr` a diode's largest reverse voltage; `vce`, `vcb` a
 * transistor's largest collector-emitter and collector-base voltage in the
 * direction that reverse-biases the collector (NPN: V_C − V_E, V_C − V_B;
 * PNP the negatives); `iavg` the largest |mean current| (a diode's mean
 * forward current); `ipk` the largest |current| (a diode's forward
 * current); `irms` the largest RMS current; `ic` a transistor's largest
 * |mean collector current|; `p` the largest mean absorbed power. Volts,
 * amps, watts.
 */
export type StressQuantity = 'v' | 'vr' | 'vce' | 'vcb' | 'iavg' | 'ipk' | 'irms' | 'ic' | 'p';

/** Where a quantity's rating comes from: an element option (part-data.ts), `pmax`, or a transistor model parameter. */
export type RatingSource =
  /** An element option; for a diode, when the line has none, the model's datasheet rating `param` (VRRM, IFAV, IFRM). */
  | { readonly kind: 'option'; readonly key: PartDataKey; readonly param?: DiodeRatingParam }
  | { readonly kind: 'pmax' }
  | { readonly kind: 'model'; readonly param: 'VCEMAX' | 'VCBMAX' | 'ICMAX' };

/** A diode model's ratings (datasheet symbols, IEC 60747-2). */
export type DiodeRatingParam = 'VRRM' | 'IFAV' | 'IFRM';

/** Whether a quantity is a voltage, a current or a power: each has its own derating ratio. */
export type StressClass = 'voltage' | 'current' | 'power';

/** One quantity a kind of part is judged by, and where its rating comes from. */
export interface StressQuantityInfo {
  readonly quantity: StressQuantity;
  readonly unit: 'V' | 'A' | 'W';
  readonly class: StressClass;
  readonly rating: RatingSource;
}

const q = (quantity: StressQuantity, unit: 'V' | 'A' | 'W', cls: StressClass, rating: RatingSource): StressQuantityInfo => ({ quantity, unit, class: cls, rating });
const opt = (key: PartDataKey, param?: DiodeRatingParam): RatingSource => (param ? { kind: 'option', key, param } : { kind: 'option', key });
const PMAX: RatingSource = { kind: 'pmax' };

/** The element kinds whose stress is measured. */
export type StressedKind = 'resistor' | 'capacitor' | 'inductor' | 'diode' | 'bjt';

/** The quantities of each stressed kind, in table order (docs/stress.md, "Quantities"). */
export const STRESS_QUANTITIES: Readonly<Record<StressedKind, readonly StressQuantityInfo[]>> = {
  resistor: [q('v', 'V', 'voltage', opt('vmax')), q('p', 'W', 'power', PMAX)],
  capacitor: [q('v', 'V', 'voltage', opt('vmax')), q('ipk', 'A', 'current', opt('ipk')), q('irms', 'A', 'current', opt('irms'))],
  inductor: [q('iavg', 'A', 'current', opt('imax')), q('ipk', 'A', 'current', opt('ipk')), q('irms', 'A', 'current', opt('irms'))],
  diode: [q('vr', 'V', 'voltage', opt('vmax', 'VRRM')), q('iavg', 'A', 'current', opt('imax', 'IFAV')), q('ipk', 'A', 'current', opt('ipk', 'IFRM')), q('irms', 'A', 'current', opt('irms')), q('p', 'W', 'power', PMAX)],
  bjt: [
    q('vce', 'V', 'voltage', { kind: 'model', param: 'VCEMAX' }),
    q('vcb', 'V', 'voltage', { kind: 'model', param: 'VCBMAX' }),
    q('ic', 'A', 'current', { kind: 'model', param: 'ICMAX' }),
    q('p', 'W', 'power', PMAX),
  ],
};

/** True for the element kinds whose stress is measured. */
export function isStressed(el: FlatElement): el is Extract<FlatElement, { kind: StressedKind }> {
  return el.kind in STRESS_QUANTITIES;
}

/** An element's rating of a quantity, in the quantity's unit; undefined when the part has none. */
export function ratingOf(el: FlatElement, r: RatingSource): number | undefined {
  return match(r)
    .with({ kind: 'option' }, (o) => el.part[o.key] ?? (o.param !== undefined && el.kind === 'diode' ? el.model[o.param] : undefined))
    .with({ kind: 'pmax' }, () => el.pmax)
    .with({ kind: 'model' }, (m) => (el.kind === 'bjt' ? el.model[m.param] : undefined))
    .exhaustive();
}

/** True when some part of the circuit has a rating other than `pmax` (the meter is worth running wherever the stage is simulated). */
export function hasStressRatings(elements: readonly FlatElement[]): boolean {
  return elements.some((el) => isStressed(el) && STRESS_QUANTITIES[el.kind].some((info) => info.rating.kind !== 'pmax' && ratingOf(el, info.rating) !== undefined));
}

/** The worst value of one quantity of one part, and where it was reached (a condition in words). */
export interface StressWorst {
  /** Element name as written (flat). */
  readonly element: string;
  readonly kind: StressedKind;
  readonly quantity: StressQuantity;
  readonly unit: 'V' | 'A' | 'W';
  /** The worst value, in `unit`. */
  readonly value: number;
  /** The condition it was reached in, in words. */
  readonly where: string;
}

/** The instantaneous values of one part at one solution: voltage (V, by the quantity's sign convention), current (A), power (W). */
interface Instant {
  v: number;
  /** The second voltage of a transistor (vcb), V. */
  v2: number;
  i: number;
  p: number;
}

/** Per part: the node indices and device index it reads. */
interface Watched {
  readonly el: Extract<FlatElement, { kind: StressedKind }>;
  readonly device: number;
  readonly nodes: readonly number[];
}

/** Running sums over a window, per part. */
interface Window {
  where: string;
  averages: boolean;
  t0: number;
  lastT: number;
  started: boolean;
  /** Per part: ∫i dt, ∫i² dt, ∫p dt, last i, last p; peaks of v, v2, |i| (forward i for a diode). */
  readonly sums: Float64Array[];
}

/**
 * Watches solutions of one compiled circuit and keeps each part's worst
 * stress (see the module comment). Not for the hot loop: a sample reads
 * every part's report.
 */
export class StressMeter {
  private readonly watched: Watched[];
  private readonly worst = new Map<string, StressWorst>();
  private window: Window | undefined;

  /** A meter of every stressed part of `c`. */
  constructor(private readonly c: CompiledCircuit) {
    this.watched = [];
    c.elements.forEach((el, device) => {
      if (!isStressed(el)) return;
      this.watched.push({ el, device, nodes: el.nodes.map((key) => c.nodeIndex.get(key) ?? 0) });
    });
  }

  /** The part's instantaneous values at `x`, `state`. */
  private instant(w: Watched, x: Float64Array, state: Float64Array): Instant {
    const rep = this.c.devices[w.device]!.report(x, state);
    const v = (a: number, b: number): number => (x[w.nodes[a]!] ?? 0) - (x[w.nodes[b]!] ?? 0);
    return match(w.el)
      .with({ kind: 'bjt' }, (el) => {
        const s = el.model.polarity === 'npn' ? 1 : -1;
        const ic = rep.currents.find(([label]) => label === 'c')?.[1] ?? 0;
        return { v: s * v(0, 2), v2: s * v(0, 1), i: ic, p: rep.power };
      })
      .with({ kind: 'diode' }, () => ({ v: -v(0, 1), v2: 0, i: rep.currents[0]?.[1] ?? 0, p: rep.power }))
      .otherwise(() => ({ v: Math.abs(v(0, 1)), v2: 0, i: rep.currents[0]?.[1] ?? 0, p: rep.power }));
  }

  /** Keeps `value` as the worst of (part, quantity) when it is larger than the one kept. */
  private keep(w: Watched, quantity: StressQuantity, given: number, where: string): void {
    if (!Number.isFinite(given)) return;
    // Every quantity is a magnitude in its rated direction: a diode's forward voltage is no reverse stress.
    const value = Math.max(0, given);
    const info = STRESS_QUANTITIES[w.el.kind].find((i) => i.quantity === quantity);
    if (!info) return;
    const key = `${w.el.key} ${quantity}`;
    const was = this.worst.get(key);
    if (was && !(value > was.value)) return;
    this.worst.set(key, { element: w.el.name, kind: w.el.kind, quantity, unit: info.unit, value, where });
  }

  /** Keeps the values of one DC solution (`x` volts and amps by unknown, `state` the charges' state), reached in the condition `where`. */
  point(x: Float64Array, state: Float64Array, where: string): void {
    for (const w of this.watched) {
      const s = this.instant(w, x, state);
      this.keepPeaks(w, s.v, s.v2, s.i, where);
      this.keep(w, 'iavg', w.el.kind === 'diode' ? s.i : Math.abs(s.i), where);
      this.keep(w, 'ic', Math.abs(s.i), where);
      this.keep(w, 'irms', Math.abs(s.i), where);
      this.keep(w, 'p', s.p, where);
    }
  }

  /** The peak quantities of one part. */
  private keepPeaks(w: Watched, v: number, v2: number, i: number, where: string): void {
    this.keep(w, w.el.kind === 'diode' ? 'vr' : w.el.kind === 'bjt' ? 'vce' : 'v', v, where);
    if (w.el.kind === 'bjt') this.keep(w, 'vcb', v2, where);
    this.keep(w, 'ipk', w.el.kind === 'diode' ? i : Math.abs(i), where);
  }

  /**
   * Opens a window of samples in the condition `where`: a settled cycle
   * (`averages` true: means and RMS over the window are kept too) or a
   * transient (peaks only). A window still open (a run that failed) is
   * dropped: its peaks are kept, its averages over a part of a cycle are not.
   */
  begin(where: string, averages: boolean): void {
    this.window = { where, averages, t0: 0, lastT: 0, started: false, sums: this.watched.map(() => new Float64Array(8)) };
  }

  /** One accepted point of the open window at time `t` s (ignored when none is open). */
  sample(t: number, x: Float64Array, state: Float64Array): void {
    const win = this.window;
    if (!win) return;
    const dt = win.started ? t - win.lastT : 0;
    if (!win.started) win.t0 = t;
    this.watched.forEach((w, k) => {
      const s = this.instant(w, x, state);
      const sum = win.sums[k]!;
      if (win.started && dt > 0) {
        sum[0] = sum[0]! + 0.5 * (s.i + sum[3]!) * dt;
        sum[1] = sum[1]! + 0.5 * (s.i * s.i + sum[3]! * sum[3]!) * dt;
        sum[2] = sum[2]! + 0.5 * (s.p + sum[4]!) * dt;
      }
      sum[3] = s.i;
      sum[4] = s.p;
      this.keepPeaks(w, s.v, s.v2, s.i, win.where);
    });
    win.lastT = t;
    win.started = true;
  }

  /** Closes the open window, keeping its means and RMS values when it was a settled cycle. */
  end(): void {
    const win = this.window;
    this.window = undefined;
    if (!win || !win.averages) return;
    const span = win.lastT - win.t0;
    if (!(span > 0)) return;
    this.watched.forEach((w, k) => {
      const sum = win.sums[k]!;
      const mean = sum[0]! / span;
      this.keep(w, 'iavg', w.el.kind === 'diode' ? mean : Math.abs(mean), win.where);
      this.keep(w, 'ic', Math.abs(mean), win.where);
      this.keep(w, 'irms', Math.sqrt(Math.max(0, sum[1]! / span)), win.where);
      this.keep(w, 'p', sum[2]! / span, win.where);
    });
  }

  /** Every worst value kept, in element order and each kind's quantity order. */
  results(): StressWorst[] {
    this.window = undefined;
    const out: StressWorst[] = [];
    for (const w of this.watched) {
      for (const info of STRESS_QUANTITIES[w.el.kind]) {
        const kept = this.worst.get(`${w.el.key} ${info.quantity}`);
        if (kept) out.push(kept);
      }
    }
    return out;
  }
}

/** Derating ratios per class of quantity: a value above ratio × rating is marked, below the rating itself. */
export interface Derating {
  readonly voltage: number;
  readonly current: number;
  readonly power: number;
}

/**
 * Default derating ratios: voltages 0.8 of their rating, currents and
 * powers 1 (marked only past the rating). 0.8 of the voltage rating is the
 * common design margin for capacitors and semiconductors (common practice,
 * no source; derating standards such as ECSS-Q-ST-30-11 ask for 0.5 to 0.8
 * depending on the part, from memory).
 */
export const DEFAULT_DERATING: Derating = { voltage: 0.8, current: 1, power: 1 };

/** `over`: past the rating; `margin`: past the derating ratio but within the rating; `ok`: within the derated rating. */
export type StressStatus = 'over' | 'margin' | 'ok';

/** One row of the stress table: a part's rated quantity, its worst value, the rating and their ratio. */
export interface StressRow extends StressWorst {
  /** The rating, in `unit`. */
  readonly rating: number;
  /** Where the rating comes from, as written (`vmax=`, `pmax=`, `model VCEMAX`). */
  readonly ratedBy: string;
  /** value / rating. */
  readonly ratio: number;
  /** The derating ratio that applied. */
  readonly derate: number;
  readonly status: StressStatus;
}

/** Where an element's rating comes from, in words (an option on its line wins over its model's rating). */
function ratedBy(el: FlatElement, r: RatingSource): string {
  return match(r)
    .with({ kind: 'option' }, (o) => (el.part[o.key] === undefined && o.param !== undefined ? `model ${o.param}` : `${o.key}=`))
    .with({ kind: 'pmax' }, () => 'pmax or PMAX')
    .with({ kind: 'model' }, (m) => `model ${m.param}`)
    .exhaustive();
}

/** The stress table: every worst value of a rated quantity against its rating, in the order of `worst`. */
export function judgeStress(elements: readonly FlatElement[], worst: readonly StressWorst[], derating: Derating = DEFAULT_DERATING): StressRow[] {
  const byName = new Map(elements.map((el) => [el.name, el] as const));
  const rows: StressRow[] = [];
  for (const w of worst) {
    const el = byName.get(w.element);
    const info = STRESS_QUANTITIES[w.kind].find((i) => i.quantity === w.quantity);
    if (!el || !info) continue;
    const rating = ratingOf(el, info.rating);
    if (rating === undefined) continue;
    const ratio = w.value / rating;
    const derate = derating[info.class];
    const status: StressStatus = ratio > 1 ? 'over' : ratio > derate ? 'margin' : 'ok';
    rows.push({ ...w, rating, ratedBy: ratedBy(el, info.rating), ratio, derate, status });
  }
  return rows;
}

/**
 * A warning at the part's line for every row past its rating, voltages and
 * currents only (power ratings have the dissipation figure's and the
 * operating point's own notes), leaving out rows whose part and quantity
 * are in `skip` (`"D1 ipk"`: already named elsewhere).
 */
export function overRatingWarnings(elements: readonly FlatElement[], rows: readonly StressRow[], skip: ReadonlySet<string> = new Set()): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const r of rows) {
    if (r.status !== 'over' || r.quantity === 'p' || skip.has(`${r.element} ${r.quantity}`)) continue;
    const el = elements.find((e) => e.name === r.element)!;
    out.push(warningAt('over-rating', `${r.element} goes through ${formatSI(r.value, r.unit)} (${r.quantity}) in ${r.where}, over its rating of ${formatSI(r.rating, r.unit)} (${r.ratedBy}, ${r.ratio.toFixed(2)}×)`, el.origin.pos, el.origin.lineText));
  }
  return out;
}

/** The "part quantity" keys of over-rating warnings made by {@link overRatingWarnings}, so that a later judge does not name them again. */
export function namedOverRatings(warnings: readonly Diagnostic[]): Set<string> {
  const out = new Set<string>();
  for (const w of warnings) {
    const m = w.code === 'over-rating' ? /^(\S+) goes through \S+ \S+ \((\w+)\)/.exec(w.message) : null;
    if (m) out.add(`${m[1]} ${m[2]}`);
  }
  return out;
}
