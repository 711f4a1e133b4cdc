/**
 * The mains caution. Extra-low voltage per IEC 61140 (and IEC 60449):
 * at most 50 V a.c. r.m.s. or 120 V ripple-free d.c. Any source above it
 * earns the caution in every report.
 */
import { warningAt, type Diagnostic } from '../errors.js';
import type { FlatCircuit } from '../elaborate/flat.js';

/** ELV limit for alternating voltage, V r.m.s. (IEC 61140). */
export const ELV_AC_RMS = 50;
/** ELV limit for ripple-free direct voltage, V (IEC 61140). */
export const ELV_DC = 120;

/** The caution text shown when a stage's input exceeds extra-low voltage. */
export const MAINS_CAUTION =
  'this stage works above extra-low voltage (IEC 61140: 50 V a.c. r.m.s., 120 V ripple-free d.c.). ' +
  'Such voltages can kill. Simulation does not make a circuit safe: isolation, creepage and clearance, fusing, ' +
  'earthing and enclosure follow local electrical codes, and mains work belongs to a licensed or competent person.';

/** Largest r.m.s. of the a.c. part and largest d.c. level among the circuit's sources, V. */
function sourceLevels(flat: FlatCircuit): { acRms: number; dc: number } {
  let acRms = 0;
  let dc = 0;
  for (const el of flat.elements) {
    if (el.kind !== 'vsource') continue;
    const w = el.spec.waveform;
    dc = Math.max(dc, Math.abs(el.spec.dc));
    if (w?.kind === 'sin') {
      acRms = Math.max(acRms, Math.abs(w.va) / Math.SQRT2);
      dc = Math.max(dc, Math.abs(w.vo));
    } else if (w?.kind === 'pulse') dc = Math.max(dc, Math.abs(w.v1), Math.abs(w.v2));
    // A loop, not Math.max(...values): spreading a long pwl overflows the call stack.
    else if (w?.kind === 'pwl') for (const v of w.values) dc = Math.max(dc, Math.abs(v));
  }
  return { acRms, dc };
}

/** The caution as a warning, when any source exceeds extra-low voltage. */
export function safetyWarnings(flat: FlatCircuit): Diagnostic[] {
  const { acRms, dc } = sourceLevels(flat);
  return acRms > ELV_AC_RMS || dc > ELV_DC ? [warningAt('above-elv', MAINS_CAUTION)] : [];
}
