/**
 * The mains caution. Extra-low voltage per IEC 61140 (and IEC 60449): at
 * most 50 V a.c. r.m.s. or 120 V ripple-free d.c. The caution is judged on
 * what the circuit actually reaches: every node against ground, and the
 * widest difference between two nodes at one instant, in every analysis
 * that was run (operating points, DC sweeps, transients, the sine-fed
 * figures' steady cycle), and on the sources' own waveforms (the figures
 * drive them to their line limits). A current source that drives a node to
 * a kilovolt earns it as surely as a mains source does.
 *
 * A level counts as ripple-free d.c. when its ripple is at most 10 % r.m.s.
 * of its mean; it then exceeds ELV above 120 V mean or 140 V peak (the
 * ripple-free definition of IEC 61201, from memory). Any other level is
 * judged as a.c.: its whole r.m.s. (mean and ripple together) above 50 V
 * exceeds ELV, so that 40 V of sine on a 100 V offset is cautioned.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import type { FlatCircuit } from '../elaborate/flat.js';
import type { OperatingPoint, DcSweep } from './dc.js';
import type { TransientResult } from './tran.js';
import { formatSI } from '../units.js';

/** ELV limit for alternating voltage, V r.m.s. (IEC 61140). */
export const ELV_AC_RMS = 50;
/** ELV limit for ripple-free direct voltage, V (IEC 61140). */
export const ELV_DC = 120;
/** Peak of a ripple-free 120 V d.c. level, V (IEC 61201, from memory). */
const ELV_DC_PEAK = 140;
/** Ripple share (r.m.s. of the ripple over the mean) up to which a level is ripple-free d.c. (IEC 61201, from memory). */
const RIPPLE_FREE = 0.1;

/** The caution text shown when a stage's input exceeds extra-low voltage. */
export const MAINS_CAUTION =
  'this stage works above extra-low voltage (IEC 61140: 50 V a.c. r.m.s., 120 V ripple-free d.c.). ' +
  'Such voltages can kill. Simulation does not make a circuit safe: isolation, creepage and clearance, fusing, ' +
  'earthing and enclosure follow local electrical codes, and mains work belongs to a licensed or competent person.';

/** One voltage as the caution judges it: its mean, the r.m.s. of its ripple about the mean, and its peak magnitude, V. */
export interface VoltageLevel {
  readonly mean: number;
  readonly rippleRms: number;
  readonly peak: number;
}

/** True when a level exceeds extra-low voltage (module note). */
export function exceedsElv(l: VoltageLevel): boolean {
  const m = Math.abs(l.mean);
  if (l.rippleRms <= RIPPLE_FREE * m) return m > ELV_DC || l.peak > ELV_DC_PEAK;
  return Math.hypot(m, l.rippleRms) > ELV_AC_RMS;
}

/** The level of samples on a uniform grid (a constant for a DC solution). */
function levelOf(values: ArrayLike<number>): VoltageLevel {
  const n = values.length;
  if (n === 0) return { mean: 0, rippleRms: 0, peak: 0 };
  let sum = 0;
  let peak = 0;
  for (let k = 0; k < n; k++) {
    const v = values[k]!;
    sum += v;
    peak = Math.max(peak, Math.abs(v));
  }
  const mean = sum / n;
  let sq = 0;
  for (let k = 0; k < n; k++) sq += (values[k]! - mean) ** 2;
  return { mean, rippleRms: Math.sqrt(sq / n), peak };
}

/** What each kind of result a run produced contributes; all optional. */
export interface ReachedLevels {
  readonly operatingPoints?: readonly OperatingPoint[];
  readonly sweeps?: readonly DcSweep[];
  readonly transients?: readonly TransientResult[];
  /** Sine-fed steady cycle: node → mean, least and greatest value over the cycle, V. */
  readonly cycle?: Readonly<Record<string, { readonly mean: number; readonly min: number; readonly max: number }>>;
}

/** The first level found above ELV, in words ("node hv reaches 1 kV in the operating point"), or undefined. */
function firstExceeded(flat: FlatCircuit, reached: ReachedLevels): string | undefined {
  const dc = (v: number): VoltageLevel => ({ mean: v, rippleRms: 0, peak: Math.abs(v) });
  const says = (what: string, l: VoltageLevel, where: string): string =>
    `${what} reaches ${formatSI(l.peak, 'V')} peak${l.rippleRms > 0 ? ` (${formatSI(Math.hypot(l.mean, l.rippleRms), 'V')} r.m.s.)` : ''} ${where}`;
  // Sources as written, and as the figures drive them (their line range, at most 1.1× nominal by default).
  for (const el of flat.elements) {
    if (el.kind !== 'vsource') continue;
    const w = el.spec.waveform;
    const levels: VoltageLevel[] = [dc(el.spec.dc)];
    if (w?.kind === 'sin') levels.push({ mean: w.vo, rippleRms: Math.abs(w.va) / Math.SQRT2, peak: Math.abs(w.vo) + Math.abs(w.va) });
    else if (w?.kind === 'pulse') levels.push(levelOf([w.v1, w.v2]));
    else if (w?.kind === 'pwl') levels.push(levelOf(w.values));
    for (const l of levels) if (exceedsElv(l)) return says(`source ${el.name}`, l, 'as written');
  }
  const spreadAt = (vs: readonly number[]): number => {
    let lo = 0;
    let hi = 0;
    for (const v of vs) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    return hi - lo;
  };
  for (const op of reached.operatingPoints ?? []) {
    for (const [name, v] of Object.entries(op.nodes)) if (exceedsElv(dc(v))) return says(`node ${name}`, dc(v), `in the operating point at ${op.temperature} °C`);
    const s = spreadAt(Object.values(op.nodes));
    if (exceedsElv(dc(s))) return says('the widest difference between two nodes', dc(s), `in the operating point at ${op.temperature} °C`);
  }
  for (const sw of reached.sweeps ?? []) {
    for (const [name, vs] of Object.entries(sw.nodes)) {
      for (const v of vs) if (exceedsElv(dc(v))) return says(`node ${name}`, dc(v), `in the DC sweep of ${sw.source}`);
    }
  }
  for (const tr of reached.transients ?? []) {
    const names = Object.keys(tr.nodes);
    for (const name of names) {
      const l = levelOf(tr.nodes[name]!);
      if (exceedsElv(l)) return says(`node ${name}`, l, `in the transient at ${tr.temperature} °C`);
    }
    // The widest difference at each grid point: the highest node (or ground) less the lowest.
    const hi = new Float64Array(tr.times.length);
    const lo = new Float64Array(tr.times.length);
    for (const name of names) {
      const vs = tr.nodes[name]!;
      for (let k = 0; k < vs.length; k++) {
        hi[k] = Math.max(hi[k]!, vs[k]!);
        lo[k] = Math.min(lo[k]!, vs[k]!);
      }
    }
    const l = levelOf(hi.map((h, k) => h - lo[k]!));
    if (exceedsElv(l)) return says('the widest difference between two nodes', l, `in the transient at ${tr.temperature} °C`);
  }
  for (const [name, c] of Object.entries(reached.cycle ?? {})) {
    // A cycle known by its mean and extremes: its ripple r.m.s. is taken as a sine's of that peak-to-peak.
    const l = { mean: c.mean, rippleRms: (c.max - c.min) / (2 * Math.SQRT2), peak: Math.max(Math.abs(c.max), Math.abs(c.min)) };
    if (exceedsElv(l)) return says(`node ${name}`, l, 'over the steady cycle of the sine-fed stage');
  }
  return undefined;
}

/**
 * The caution as a warning, when any source as written, or any node (or the
 * widest difference between two nodes) in the analyses that were run,
 * exceeds extra-low voltage; the warning names the first level found.
 */
export function safetyWarnings(flat: FlatCircuit, reached: ReachedLevels = {}): Diagnostic[] {
  const found = firstExceeded(flat, reached);
  return found === undefined ? [] : [warningAt('above-elv', `${MAINS_CAUTION} Here ${found}.`)];
}
