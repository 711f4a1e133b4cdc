/**
 * Numeric waveform descriptions for independent sources, after elaboration
 * (every value evaluated). Shapes as netlist.md defines them.
 */

/** A source waveform with evaluated numbers (seconds, volts or amps, hertz, degrees). */
export type WaveformSpec =
  | {
      readonly kind: 'sin';
      /** Offset. */ readonly vo: number;
      /** Peak amplitude. */ readonly va: number;
      /** Frequency, Hz. */ readonly freq: number;
      /** Delay, s. */ readonly td: number;
      /** Damping factor, 1/s. */ readonly theta: number;
      /** Phase, degrees. */ readonly phaseDeg: number;
    }
  | {
      readonly kind: 'pulse';
      readonly v1: number;
      readonly v2: number;
      /** Delay, s. */ readonly td: number;
      /** Rise time, s; undefined = the transient's output step. */ readonly tr: number | undefined;
      /** Fall time, s; undefined = the transient's output step. */ readonly tf: number | undefined;
      /** Pulse width, s; undefined = for ever. */ readonly pw: number | undefined;
      /** Period, s; undefined = a single pulse. */ readonly per: number | undefined;
    }
  | {
      readonly kind: 'pwl';
      /** Times in s, strictly increasing. */ readonly times: readonly number[];
      /** Values at those times. */ readonly values: readonly number[];
    }
  | {
      /** The sum of several waveforms (built by measurements, e.g. a dip with ripple on it; not netlist syntax). */
      readonly kind: 'sum';
      readonly parts: readonly WaveformSpec[];
    }
  | {
      /**
       * A sine whose amplitude follows a piecewise-linear envelope:
       * vo + envelope(t)·sin(2π·freq·t + phase°). Built by measurements on
       * stages fed from a transformer secondary; not netlist syntax.
       */
      readonly kind: 'modulated';
      readonly vo: number;
      /** Hz. */ readonly freq: number;
      readonly phaseDeg: number;
      /** Envelope corner times, s, increasing. */ readonly times: readonly number[];
      /** Peak amplitudes at those times. */ readonly amplitudes: readonly number[];
    };

/** Everything an independent source is given by the elaborator. */
export interface SourceSpec {
  /** DC value used by operating point and DC analyses (the `dc` value, else the waveform at t = 0). */
  readonly dc: number;
  /** Small-signal magnitude (V or A). */
  readonly acMag: number;
  /** Small-signal phase in degrees. */
  readonly acPhaseDeg: number;
  /** Time dependence, if any. */
  readonly waveform: WaveformSpec | undefined;
}
