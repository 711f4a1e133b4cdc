/**
 * The samples of a tolerance run (docs/spread.md, "Sampling"): the random
 * variables a netlist's `.spread` lines make, each run's factors (Monte
 * Carlo: drawn from the run's own stream, which depends only on the seed
 * and the run index; corners: a row of the corner design), and the flat
 * circuit with a run's values in it. A run's values are applied as
 * absolute values (nominal × factor) to a copy of the nominal flat
 * circuit, so no run sees what another left behind.
 */
import { BJT_PARAMS, DEVICES, DIODE_PARAMS, inRange, type ParamSpec, type WaveformSpec } from '@railcheck/devices';
import { match } from 'ts-pattern';
import type { FlatCircuit, FlatElement, FlatSpread } from '../elaborate/flat.js';
import { runStream, toleranceFactor } from '../stats.js';
import type { ModelSampling, SampledValue, SpreadVariable } from './spread-types.js';

/** A variable with what applies it: the elements it scales and, for a model spread, the parameter. */
export interface BoundVariable extends SpreadVariable {
  /** Indices into `flat.elements` of the elements it scales. */
  readonly elements: readonly number[];
  /** The upper-case model parameter, or undefined for an element spread. */
  readonly param: string | undefined;
}

/** Splits a model target `model.PARAM` (the model lower-case as elaborated). */
function modelTarget(s: FlatSpread): { model: string; param: string } | undefined {
  const dot = s.target.lastIndexOf('.');
  return dot < 0 ? undefined : { model: s.target.slice(0, dot).toLowerCase(), param: s.target.slice(dot + 1).toUpperCase() };
}

/** The element's value a spread scales: R, C, L, a gain, or a source's DC value. */
function elementValue(el: FlatElement): number {
  return match(el)
    .with({ kind: 'resistor' }, (e) => e.ohms)
    .with({ kind: 'capacitor' }, (e) => e.farads)
    .with({ kind: 'inductor' }, (e) => e.henries)
    .with({ kind: 'vcvs' }, { kind: 'vccs' }, { kind: 'cccs' }, { kind: 'ccvs' }, (e) => e.gain)
    .with({ kind: 'vsource' }, { kind: 'isource' }, (e) => e.spec.dc)
    .with({ kind: 'diode' }, { kind: 'bjt' }, { kind: 'coupling' }, () => Number.NaN)
    .exhaustive();
}

/** The parameter table of a model-bound element's kind. */
function paramsOf(el: FlatElement): readonly ParamSpec[] {
  return el.kind === 'diode' ? DIODE_PARAMS : el.kind === 'bjt' ? BJT_PARAMS : [];
}

const modelOf = (el: FlatElement): { name: string; values: Readonly<Record<string, unknown>> } | undefined =>
  el.kind === 'diode' || el.kind === 'bjt' ? { name: el.modelName.toLowerCase(), values: el.model as unknown as Record<string, unknown> } : undefined;

/**
 * The variables of a flat circuit's spreads, in the order they are drawn:
 * the `.spread` lines in netlist order; an `each` model spread gives one
 * variable per element of the model, in flat element order. `sampling` is
 * the mode of model spreads whose line names none. A spread on a model
 * that no element uses gives no variable.
 */
export function spreadVariables(flat: FlatCircuit, sampling: ModelSampling): BoundVariable[] {
  const out: BoundVariable[] = [];
  for (const s of flat.spreads) {
    const line = `${s.origin.pos.file}:${s.origin.pos.line}`;
    const common = { target: s.target, ratio: s.ratio, distribution: s.distribution, line };
    const m = modelTarget(s);
    if (!m) {
      const i = flat.elements.findIndex((e) => e.key === s.target);
      const el = flat.elements[i]!;
      out.push({ ...common, name: el.name, element: null, sampling: null, nominal: elementValue(el), elements: [i], param: undefined });
      continue;
    }
    const users = flat.elements.flatMap((e, i) => (modelOf(e)?.name === m.model ? [i] : []));
    // A model no element uses has nothing to vary: no variable (spreadSetup notes it).
    if (users.length === 0) continue;
    const first = users[0] === undefined ? undefined : modelOf(flat.elements[users[0]]!);
    const nominal = Number(first?.values[m.param]);
    const mode = s.sampling ?? sampling;
    const shown = `${s.origin.lineText.trim().split(/\s+/)[1] ?? s.target}`;
    if (mode === 'lot' || users.length <= 1) {
      out.push({ ...common, name: shown, element: null, sampling: mode, nominal, elements: users, param: m.param });
    } else {
      for (const i of users) {
        const el = flat.elements[i]!;
        out.push({ ...common, name: `${shown}@${el.name}`, element: el.name, sampling: mode, nominal, elements: [i], param: m.param });
      }
    }
  }
  return out;
}

/** Monte Carlo factors of run `run`: one draw per variable, in variable order, from the run's stream (stats.ts runStream, toleranceFactor). */
export function monteCarloFactors(variables: readonly SpreadVariable[], seed: number, run: number): number[] {
  const next = runStream(seed, run);
  return variables.map((v) => toleranceFactor(next, v.ratio, v.distribution));
}

/** Corner factors of a design row: 1 − ratio for −1, 1 + ratio for +1 (for `gauss` the ±3σ ends). */
export function cornerFactors(variables: readonly SpreadVariable[], row: readonly (-1 | 1)[]): number[] {
  return variables.map((v, i) => 1 + (row[i] ?? 1) * v.ratio);
}

/** The sampled values of a run, in variable order. */
export function sampleOf(variables: readonly SpreadVariable[], factors: readonly number[]): SampledValue[] {
  return variables.map((v, i) => ({ name: v.name, factor: factors[i]!, value: v.nominal * factors[i]! }));
}

/** A waveform with every level (not times or frequencies) multiplied by `f`. */
function scaleWaveform(w: WaveformSpec, f: number): WaveformSpec {
  return match(w)
    .with({ kind: 'sin' }, (s) => ({ ...s, vo: s.vo * f, va: s.va * f }))
    .with({ kind: 'pulse' }, (p) => ({ ...p, v1: p.v1 * f, v2: p.v2 * f }))
    .with({ kind: 'pwl' }, (p) => ({ ...p, values: p.values.map((v) => v * f) }))
    .with({ kind: 'sum' }, (s) => ({ ...s, parts: s.parts.map((q) => scaleWaveform(q, f)) }))
    .with({ kind: 'modulated' }, (m) => ({ ...m, vo: m.vo * f, amplitudes: m.amplitudes.map((a) => a * f) }))
    .exhaustive();
}

/** An element with its value multiplied by `f` (a source as a whole: its DC value and its waveform's levels; its small-signal drive stays, it is a stimulus). */
function scaledElement(el: FlatElement, f: number): FlatElement {
  return match(el)
    .with({ kind: 'resistor' }, (e) => ({ ...e, ohms: e.ohms * f }))
    .with({ kind: 'capacitor' }, (e) => ({ ...e, farads: e.farads * f }))
    .with({ kind: 'inductor' }, (e) => ({ ...e, henries: e.henries * f }))
    .with({ kind: 'vcvs' }, { kind: 'vccs' }, { kind: 'cccs' }, { kind: 'ccvs' }, (e) => ({ ...e, gain: e.gain * f }))
    .with({ kind: 'vsource' }, { kind: 'isource' }, (e) => ({ ...e, spec: { ...e.spec, dc: e.spec.dc * f, waveform: e.spec.waveform && scaleWaveform(e.spec.waveform, f) } }))
    .with({ kind: 'diode' }, { kind: 'bjt' }, { kind: 'coupling' }, (e) => e)
    .exhaustive() as FlatElement;
}

/** What a run's values make: the flat circuit with them, or why they cannot be simulated (a value outside its valid range). */
export type SampledCircuit = { readonly ok: true; readonly flat: FlatCircuit } | { readonly ok: false; readonly reason: string };

/**
 * The flat circuit with the run's values: each variable's elements get
 * nominal × factor (absolute, from the nominal circuit). A value outside
 * its valid range (registry value range; model parameter range; a factor
 * ≤ 0, which a gaussian far tail can give) makes the run fail, with the
 * reason; nothing is clamped.
 */
export function sampledCircuit(flat: FlatCircuit, variables: readonly BoundVariable[], factors: readonly number[]): SampledCircuit {
  const elements = [...flat.elements];
  for (const [k, v] of variables.entries()) {
    const f = factors[k]!;
    const value = v.nominal * f;
    if (!(f > 0) || !Number.isFinite(value)) return { ok: false, reason: `${v.name}: factor ${f} gives ${value}, not a value a part can have` };
    for (const i of v.elements) {
      const el = elements[i]!;
      if (v.param === undefined) {
        const range = DEVICES[el.kind].value?.range;
        if (range !== undefined && !inRange(range, value)) return { ok: false, reason: `${v.name}: the sampled value ${value.toPrecision(6)} is outside the element's valid range` };
        elements[i] = scaledElement(el, f);
        continue;
      }
      const spec = paramsOf(el).find((p) => p.name === v.param);
      if (spec && !inRange(spec.range, value)) return { ok: false, reason: `${v.name}: the sampled ${v.param} = ${value.toPrecision(6)} is outside its valid range` };
      if (el.kind === 'diode' || el.kind === 'bjt') elements[i] = { ...el, model: { ...el.model, [v.param]: value } } as FlatElement;
    }
  }
  return { ok: true, flat: { ...flat, elements } };
}
