/**
 * Example plot specs of every kind, for the renderer's tests and the
 * gallery in docs/plots/ (scripts/plot-gallery.mjs). The scenario is our
 * own: the 5 V sensor rail of a greenhouse valve controller, fed from a
 * rectified 12 V transformer winding. Every number here is invented demo
 * data made from simple closed shapes (no simulation), chosen only so each
 * plot looks like what the presenters will hand the renderer.
 */
import { MAINS_CAUTION } from '@railcheck/core';
import type { PlotSpec } from '../../../packages/cli/src/plot/spec.js';

/** `count` values evenly spaced from `a` to `b`. */
export function linspace(a: number, b: number, count: number): number[] {
  return Array.from({ length: count }, (_, k) => a + ((b - a) * k) / (count - 1));
}

/** `count` values spaced evenly in log from `a` to `b`. */
export function logspace(a: number, b: number, count: number): number[] {
  return linspace(Math.log10(a), Math.log10(b), count).map((e) => 10 ** e);
}

/** A smooth minimum of a and b (softness w), so a regulator's knee is rounded. Demo shape only. */
const softMin = (a: number, b: number, w: number): number => -w * Math.log(Math.exp(-a / w) + Math.exp(-b / w));

const vin = linspace(5, 16, 45);
/** Demo: output of the follower against input; 1.1 V of headroom, 4 mV/V above the knee. */
const vout = (v: number, offset = 0): number => softMin(v - 1.1, 5.0 + offset + 0.004 * (v - 12), 0.08);

/** Line regulation: output against input, nominal and dropout points marked. */
export const LINE: PlotSpec = {
  id: 'line',
  title: 'Line regulation',
  subtitle: 'output against input, load 120 mA, 25 °C',
  x: { label: 'input', unit: 'V' },
  y: { label: 'output', unit: 'V' },
  series: [{ name: 'output', x: vin, y: vin.map((v) => vout(v)) }],
  markers: [
    { x: 12, y: vout(12), label: 'nominal 12 V in: 5.000 V' },
    { x: 6.05, y: vout(6.05), label: 'dropout 6.05 V in' },
  ],
};

const iload = linspace(0, 0.3, 31);
/** Load regulation: output against load current, nominal marked. */
export const LOAD: PlotSpec = {
  id: 'load',
  title: 'Load regulation',
  subtitle: 'output against load current, input 12 V, 25 °C',
  x: { label: 'load current', unit: 'A' },
  y: { label: 'output', unit: 'V' },
  series: [{ name: 'output', x: iload, y: iload.map((i) => 5.018 - 0.12 * i - 0.05 * i * i), style: 'points' }],
  markers: [{ x: 0.12, y: 5.018 - 0.12 * 0.12 - 0.05 * 0.0144, label: 'nominal 120 mA' }],
};

const freq = logspace(10, 1e6, 61);
/** Ripple rejection against frequency (log axis) with the ripple frequency as a rule. */
export const REJECTION: PlotSpec = {
  id: 'rejection',
  title: 'Ripple rejection',
  subtitle: 'input to output, input 12 V, load 120 mA',
  x: { label: 'frequency', unit: 'Hz', log: true },
  y: { label: 'rejection', unit: 'dB' },
  series: [{ name: 'rejection', x: freq, y: freq.map((f) => 10 * Math.log10(1 / (1e-7 + (f / 2e3) ** 2 * 1e-6 + 1e-6))) }],
  xRules: [{ at: 100, label: 'ripple 100 Hz' }],
  markers: [{ x: 100, y: 10 * Math.log10(1 / (1e-7 + (100 / 2e3) ** 2 * 1e-6 + 1e-6)), label: '59.6 dB' }],
};

const t = linspace(0, 0.04, 401);
/** Rectified input: charging peaks every 10 ms, a linear sag between them. Demo shape. */
const ripple = (s: number): number => {
  const phase = (s % 0.01) / 0.01;
  return phase < 0.15 ? 13.4 - 1.2 * (1 - phase / 0.15) : 13.4 - 1.2 * ((phase - 0.15) / 0.85);
};
/** Demo: the input through a first-order lag of 0.8 ms (forward Euler on the 0.1 ms grid), as the output's ripple shape. */
const smoothed = t.reduce<number[]>((acc, s, k) => [...acc, k === 0 ? 12.8 : acc[k - 1]! + ((ripple(s) - acc[k - 1]!) * (t[1]! - t[0]!)) / 8e-4], []);
/** A ripple waveform: input on the left axis, output on the right. */
export const WAVEFORM: PlotSpec = {
  id: 'waveform',
  title: 'Ripple at the output',
  subtitle: 'steady state, input 12 V rms winding, load 120 mA',
  x: { label: 'time', unit: 's' },
  y: { label: 'input', unit: 'V' },
  y2: { label: 'output', unit: 'V' },
  series: [
    { name: 'input', x: t, y: t.map(ripple) },
    { name: 'output', x: t, y: smoothed.map((v) => 5.0 + 0.0012 * (v - 12.8)), axis: 'right' },
  ],
};

const ts = linspace(0, 0.005, 251);
/** A start-up transient: input and output on one axis. */
export const TRANSIENT: PlotSpec = {
  id: 'transient',
  title: 'Start-up',
  subtitle: 'input switched on at 0 s, load 120 mA',
  x: { label: 'time', unit: 's' },
  y: { label: 'voltage', unit: 'V' },
  series: [
    { name: 'input', x: ts, y: ts.map((s) => 12 * (1 - Math.exp(-s / 4e-4))) },
    { name: 'output', x: ts, y: ts.map((s) => { const u = Math.max(0, s - 3e-4); return 5 * (1 - Math.exp(-u / 6e-4) * (Math.cos(u / 3e-4) + 0.5 * Math.sin(u / 3e-4))); }) },
  ],
  yRules: [{ at: 4.75, label: 'in regulation above 4.75 V' }],
};

const edges = linspace(4.86, 5.14, 29);
/** A spread histogram with its limits as rules; counts from a normal shape (mean 5.003 V, sd 0.035 V) over 500 runs. */
export const HISTOGRAM: PlotSpec = {
  id: 'histogram',
  title: 'Spread of the output',
  subtitle: '500 runs, parts at their tolerances, seed 1',
  x: { label: 'output', unit: 'V' },
  y: { label: 'runs', unit: '' },
  series: [],
  histogram: {
    name: 'runs per bin',
    edges,
    counts: edges.slice(0, -1).map((e, k) => {
      const mid = (e + edges[k + 1]!) / 2;
      return Math.round(500 * 0.01 * Math.exp(-(((mid - 5.003) / 0.035) ** 2) / 2) / (0.035 * Math.sqrt(2 * Math.PI)));
    }),
  },
  xRules: [
    { at: 4.9, label: 'min 4.9 V' },
    { at: 5.1, label: 'max 5.1 V' },
  ],
};

/** A compare plot: the line-regulation curve of the original and of the modified netlist. */
export const COMPARE: PlotSpec = {
  id: 'compare',
  title: 'Line regulation, original and modified',
  subtitle: 'modified: reference resistor 1.2 kΩ instead of 1.5 kΩ',
  x: { label: 'input', unit: 'V' },
  y: { label: 'output', unit: 'V' },
  series: [
    { name: 'original', x: vin, y: vin.map((v) => vout(v)) },
    { name: 'modified', x: vin, y: vin.map((v) => vout(v, 0.12)) },
  ],
  markers: [
    { x: 12, y: vout(12), label: 'original 5.000 V' },
    { x: 12, y: vout(12, 0.12), label: 'modified 5.120 V' },
  ],
};

/** Every example, one per plot kind, named as the gallery's PNG files. */
export const EXAMPLES: readonly PlotSpec[] = [LINE, LOAD, REJECTION, WAVEFORM, TRANSIENT, HISTOGRAM, COMPARE];

/** The page of every example, as a presenter would give it: sections with facts and the mains caution. */
export const EXAMPLE_PAGE = {
  title: 'greenhouse-valve-rail.cir: plots',
  caution: MAINS_CAUTION,
  sections: [
    { heading: 'Regulation', specs: [LINE, LOAD], facts: [
      { name: 'line regulation', value: '4.1 mV/V', status: 'pass' },
      { name: 'load regulation', value: '-0.14 V/A', status: 'pass' },
      { name: 'dropout', value: '1.05 V', status: 'FAIL' },
    ] },
    { heading: 'Ripple', specs: [REJECTION, WAVEFORM], facts: [{ name: 'ripple rejection at 100 Hz', value: '59.6 dB', status: 'pass' }, { name: 'output ripple', value: '1.44 mV p-p' }] },
    { heading: 'Start-up', specs: [TRANSIENT], facts: [{ name: 'start-up time', value: '1.9 ms', status: 'pass' }] },
    { heading: 'Spread', specs: [HISTOGRAM], facts: [{ name: 'yield', value: '99.6 %', status: 'pass' }] },
    { heading: 'Compare', specs: [COMPARE] },
  ],
} as const;
