/**
 * The DC equations of the example stages, solved independently of
 * railcheck: Kirchhoff's current law at the one or two unknown nodes with
 * the device equations of device-equations.ts, by nested bisection. From
 * these solutions the figures are computed by their figures.md definitions
 * (line, load, dropout, dissipation, efficiency), with no railcheck code.
 */
import { bisect, diodeCurrent, diodeParams, npnAtEmitterCurrent, npnParams, type DiodeParams } from './device-equations.js';
import { modelOf, nodesOf, valueOf, type NetlistValues } from './netlist-values.js';

/** One DC solution of a stage. */
export interface HandSolution {
  readonly vout: number;
  /** Node name → volts. */
  readonly nodes: Readonly<Record<string, number>>;
  /** Dissipating element (resistor, diode, transistor) → absorbed power, W (terminal voltages × terminal currents). */
  readonly power: Readonly<Record<string, number>>;
  /** Power out of the input source, W. */
  readonly pin: number;
  /** Power into the load element, W. */
  readonly pload: number;
  /** Current through the reference element(s), A. */
  readonly iref: number;
}

/** A stage solved at an input voltage (V) and a load current (A); resistor loads as R = Vout_nom / I (open for 0). */
export interface HandStage {
  readonly vinNominal: number;
  readonly loadNominal: number;
  readonly nominal: HandSolution;
  solve(vin: number, loadAmps: number): HandSolution;
}

/** Current (A, anode to cathode) of a diode whose cathode is at `vk` and anode at `va`. */
const diodeI = (p: DiodeParams, va: number, vk: number): number => diodeCurrent(p, va - vk);

/**
 * Zener shunt (bench-reference-shunt.cir): VRAIL in 0; RS in ref; DZ 0 ref
 * (anode at ground); RBUF ref 0 as the load. One KCL equation at ref:
 * (Vin − v)/RS − I_Z(v) − v/R_load = 0, which falls with v.
 */
export function zenerShunt(v: NetlistValues): HandStage {
  if (nodesOf(v, 'RS', 2).join() !== 'in,ref' || nodesOf(v, 'DZ', 2).join() !== '0,ref' || nodesOf(v, 'RBUF', 2).join() !== 'ref,0') throw new Error('shunt topology changed');
  const rs = valueOf(v, 'RS');
  const rl = valueOf(v, 'RBUF');
  const dz = diodeParams(modelOf(v, 'DZ', 3));
  const vinNominal = valueOf(v, 'VRAIL');
  const at = (vin: number, rload: number): HandSolution => {
    const iz = (x: number): number => -diodeI(dz, 0, x);
    const vr = bisect((x) => (vin - x) / rs - iz(x) - x / rload, 0, vin);
    const i = iz(vr);
    const power = { RS: (vin - vr) ** 2 / rs, DZ: vr * i, RBUF: (vr * vr) / rload };
    return { vout: vr, nodes: { in: vin, ref: vr }, power, pin: (vin * (vin - vr)) / rs, pload: power.RBUF, iref: i };
  };
  const nominal = at(vinNominal, rl);
  const loadNominal = nominal.vout / rl;
  return { vinNominal, loadNominal, nominal, solve: (vin, amps) => at(vin, amps === 0 ? Infinity : nominal.vout / amps) };
}

/** The reference of a follower: a chain of identical diodes from `ref` to ground. */
interface Reference {
  /** Current down the chain (A) with the top at `vr` volts. */
  current(vr: number): number;
  /** Absorbed power per element at `vr`, W. */
  powers(vr: number, i: number): Record<string, number>;
}

/** A Zener from ground (anode) to ref (cathode). */
function zenerReference(v: NetlistValues, name: string): Reference {
  if (nodesOf(v, name, 2).join() !== '0,ref') throw new Error(`${name}: expected anode at 0, cathode at ref`);
  const p = diodeParams(modelOf(v, name, 3));
  return { current: (vr) => -diodeI(p, 0, vr), powers: (vr, i) => ({ [name]: vr * i }) };
}

/** Identical forward diodes in series from ref to ground: they share the current and the voltage equally. */
function ledChain(v: NetlistValues, names: readonly string[]): Reference {
  const p = diodeParams(modelOf(v, names[0]!, 3));
  for (const n of names) if (modelOf(v, n, 3) !== modelOf(v, names[0]!, 3)) throw new Error('the chain must be of one model');
  const k = names.length;
  return {
    current: (vr) => diodeCurrent(p, vr / k),
    powers: (vr, i) => Object.fromEntries(names.map((n) => [n, (vr / k) * i])),
  };
}

/** Element names of a follower stage. */
export interface FollowerNames {
  readonly source: string;
  readonly bias: string;
  readonly reference: readonly string[];
  readonly pass: string;
  readonly bleed: string;
  readonly load: string;
  /** Node that feeds the collector and the bias resistor (default `in`). */
  readonly input?: string;
}

/**
 * Emitter follower (sensor-rail-follower.cir, follower-led-reference.cir;
 * the regulator of railway-transformer-follower.cir, fed from `res`, with
 * `vinNominal` given): Vsource in 0; RB in ref; reference ref→0; Q in ref out; RBLEED out 0;
 * ILOAD out 0 (a current sink). Unknowns V(ref) and V(out). For a trial
 * V(out) the emitter current is fixed (V(out)/RBLEED + I_load); the
 * transistor equations then give Vbe, Ib and V(ref); the residual is KCL at
 * ref, (Vin − V(ref))/RB − I_ref − Ib, which falls as V(out) rises.
 */
export function emitterFollower(v: NetlistValues, n: FollowerNames, kind: 'zener' | 'leds', vinNominal = valueOf(v, n.source)): HandStage {
  const input = n.input ?? 'in';
  const q = nodesOf(v, n.pass, 3).join();
  if (q !== `${input},ref,out` || nodesOf(v, n.bias, 2).join() !== `${input},ref` || nodesOf(v, n.bleed, 2).join() !== 'out,0' || nodesOf(v, n.load, 2).join() !== 'out,0') throw new Error('follower topology changed');
  const rb = valueOf(v, n.bias);
  const rbleed = valueOf(v, n.bleed);
  const iloadNominal = valueOf(v, n.load);
  const qp = npnParams(modelOf(v, n.pass, 4));
  const ref = kind === 'zener' ? zenerReference(v, n.reference[0]!) : ledChain(v, n.reference);
  const solve = (vin: number, iload: number): HandSolution => {
    const junction = (vo: number) => npnAtEmitterCurrent(qp, vin, vo, vo / rbleed + iload);
    const residual = (vo: number): number => {
      const j = junction(vo);
      return (vin - j.vb) / rb - ref.current(j.vb) - j.ib;
    };
    const vo = bisect(residual, 0, vin - 1e-3);
    const j = junction(vo);
    const vr = j.vb;
    const ibias = (vin - vr) / rb;
    const iref = ref.current(vr);
    const power: Record<string, number> = {
      [n.bias]: (vin - vr) * ibias,
      ...ref.powers(vr, iref),
      // Terminal powers: Vc·Ic + Vb·Ib − Ve·(Ic + Ib), the internal RB included.
      [n.pass]: (vin - vo) * j.ic + (vr - vo) * j.ib,
      [n.bleed]: (vo * vo) / rbleed,
    };
    return { vout: vo, nodes: { in: vin, ref: vr, out: vo }, power, pin: vin * (ibias + j.ic), pload: vo * iload, iref };
  };
  return { vinNominal, loadNominal: iloadNominal, nominal: solve(vinNominal, iloadNominal), solve };
}

/** The figures of figures.md computed from a hand-solved stage. */
export interface HandFigures {
  readonly line: { delta: number; slope: number; pctPerV: number };
  readonly load: { delta: number; pct: number; rout: number };
  readonly dropout: { vin: number; v: number; headroom: number };
  readonly pd: Readonly<Record<string, number>>;
  readonly efficiency: number;
}

/** Input at which Vout = Vout_nom − fall, nominal load: bisection between Vout_nom − fall (the output cannot exceed the input there) and nominal. */
export function handDropoutVin(s: HandStage, fall: number): number {
  const target = s.nominal.vout - fall;
  return bisect((vin) => s.solve(vin, s.loadNominal).vout - target, target, s.vinNominal);
}

/** Line (0.9…1.1 × nominal), load (0…nominal), dropout (`fall`), dissipation corners and efficiency, by their definitions. */
export function handFigures(s: HandStage, fall: number): HandFigures {
  const vnom = s.nominal.vout;
  const from = 0.9 * s.vinNominal;
  const to = 1.1 * s.vinNominal;
  const lineDelta = s.solve(to, s.loadNominal).vout - s.solve(from, s.loadNominal).vout;
  const slope = lineDelta / (to - from);
  const v0 = s.solve(s.vinNominal, 0).vout;
  const loadDelta = v0 - s.solve(s.vinNominal, s.loadNominal).vout;
  const dvin = handDropoutVin(s, fall);
  const corners = [s.nominal, s.solve(to, 0), s.solve(to, s.loadNominal)];
  const pd: Record<string, number> = {};
  for (const c of corners) for (const [k, p] of Object.entries(c.power)) pd[k] = Math.max(pd[k] ?? -Infinity, p);
  return {
    line: { delta: lineDelta, slope, pctPerV: (100 * slope) / vnom },
    load: { delta: loadDelta, pct: (100 * loadDelta) / v0, rout: loadDelta / s.loadNominal },
    dropout: { vin: dvin, v: dvin - s.solve(dvin, s.loadNominal).vout, headroom: s.vinNominal - dvin },
    pd,
    efficiency: s.nominal.pload / s.nominal.pin,
  };
}

/**
 * Capacitance multiplier (railway-capacitance-multiplier.cir): VRAIL in 0;
 * RB in base; CB base 0; Q in base out; ILOAD out 0 (COUT, CB open at DC).
 * The emitter current is the load current; for a trial V(out) the
 * transistor equations give Ib and V(base); the residual is KCL at base,
 * (Vin − V(base))/RB − Ib. With no load no current flows anywhere, so
 * every node sits at Vin (exact).
 */
export function capacitanceMultiplier(v: NetlistValues): HandStage {
  if (nodesOf(v, 'Q1', 3).join() !== 'in,base,out' || nodesOf(v, 'RB', 2).join() !== 'in,base' || nodesOf(v, 'ILOAD', 2).join() !== 'out,0') throw new Error('multiplier topology changed');
  const rb = valueOf(v, 'RB');
  const qp = npnParams(modelOf(v, 'Q1', 4));
  const vinNominal = valueOf(v, 'VRAIL');
  const solve = (vin: number, iload: number): HandSolution => {
    if (iload === 0) return { vout: vin, nodes: { in: vin, base: vin, out: vin }, power: { RB: 0, Q1: 0 }, pin: 0, pload: 0, iref: 0 };
    const junction = (vo: number) => npnAtEmitterCurrent(qp, vin, vo, iload);
    const vo = bisect((x) => {
      const j = junction(x);
      return (vin - j.vb) / rb - j.ib;
    }, 0, vin - iload * qp.RE - 1e-3); // the internal emitter must stay below the collector
    const j = junction(vo);
    const power = { RB: (vin - j.vb) * j.ib, Q1: (vin - vo) * j.ic + (j.vb - vo) * j.ib };
    return { vout: vo, nodes: { in: vin, base: j.vb, out: vo }, power, pin: vin * (j.ic + j.ib), pload: vo * iload, iref: 0 };
  };
  const loadNominal = valueOf(v, 'ILOAD');
  return { vinNominal, loadNominal, nominal: solve(vinNominal, loadNominal), solve };
}
