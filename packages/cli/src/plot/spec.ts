/**
 * What a plot shows, as data (docs/plots.md): the presenters of run,
 * compare and spread build these from a report, and the renderer
 * (svg.ts) draws any of them. No drawing here and no report reading:
 * the two sides meet only in this type.
 */

/** One axis: its quantity in words, its SI unit (the renderer adds engineering prefixes to the tick labels), and its scale. */
export interface PlotAxis {
  /** The quantity, e.g. `input`, `output`, `frequency`. */
  readonly label: string;
  /** SI unit symbol (`V`, `A`, `Hz`, `dB`, `s`, `W`, `%`); '' for a plain number. */
  readonly unit: string;
  /** Logarithmic scale (frequency axes); every value on it must be > 0. */
  readonly log?: boolean;
  /** Range to show at least (the data range is widened to it), in the axis unit. */
  readonly include?: readonly number[];
}

/** A series of points, drawn as a line through them (`line`), as marks (`points`), or as a staircase (`step`). */
export interface PlotSeries {
  /** Legend entry. */
  readonly name: string;
  readonly x: readonly number[];
  readonly y: readonly number[];
  readonly style?: 'line' | 'points' | 'step';
  /** Which axis the series is read against: the left (default) or the right y axis. */
  readonly axis?: 'left' | 'right';
}

/** A marked point with its label (the nominal point, the dropout point). */
export interface PlotMarker {
  readonly x: number;
  readonly y: number;
  readonly label: string;
}

/** A vertical or horizontal reference line with its label (a ripple frequency, a limit). */
export interface PlotRule {
  readonly at: number;
  readonly label: string;
}

/** A histogram: bin edges (n + 1, ascending) and counts (n). */
export interface PlotHistogram {
  readonly name: string;
  readonly edges: readonly number[];
  readonly counts: readonly number[];
}

/** One plot. */
export interface PlotSpec {
  /** File stem, unique within one --plot folder: letters, digits and `-` (`line`, `ripple-waveform`). */
  readonly id: string;
  /** Title shown above the plot. */
  readonly title: string;
  /** A line under the title: the conditions (as the text report gives them). */
  readonly subtitle?: string;
  readonly x: PlotAxis;
  readonly y: PlotAxis;
  /** A second y axis on the right (waveforms of input and output), when a series asks for it. */
  readonly y2?: PlotAxis;
  readonly series: readonly PlotSeries[];
  readonly markers?: readonly PlotMarker[];
  /** Vertical lines at x values. */
  readonly xRules?: readonly PlotRule[];
  /** Horizontal lines at y values (left axis). */
  readonly yRules?: readonly PlotRule[];
  /** A histogram drawn as bars (spread); with `series` empty the y axis counts runs. */
  readonly histogram?: PlotHistogram;
}
