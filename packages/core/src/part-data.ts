/**
 * The datasheet data an element line may carry besides `pmax=` (docs/stress.md):
 * voltage and current ratings, and the thermal data of a semiconductor. One
 * table names each key, its unit, the datasheet quantity it stands for and
 * the element letters that accept it; the netlist reader, the elaborator,
 * the stress and thermal figures and docs/stress.md (checked by a test) all
 * read it. It imports nothing, so every layer of core may.
 *
 * The datasheet quantities are those of the IEC 60747 series (discrete
 * semiconductors: part 2 rectifier diodes, part 3 voltage-reference and
 * regulator diodes, part 7 bipolar transistors), IEC 60384-1 (fixed
 * capacitors: rated voltage, rated ripple current) and IEC 60115-1 (fixed
 * resistors: limiting element voltage); the letter symbols follow IEC
 * 60747-1 and JEDEC JESD77 (terms, definitions and letter symbols for
 * discrete semiconductors). Named from memory of those documents.
 */

/** An element option of datasheet data (lower case, as written on the line). */
export type PartDataKey = 'vmax' | 'imax' | 'ipk' | 'irms' | 'rth' | 'rthsink' | 'tjmax';

/** The element letters that take part data. */
export type RatedLetter = 'R' | 'C' | 'L' | 'D' | 'Q';

/** One part-data key: unit, meaning, and the datasheet quantity per element letter that accepts it. */
export interface PartDataInfo {
  /** Unit of the value: V, A, K/W or °C. */
  readonly unit: 'V' | 'A' | 'K/W' | '°C';
  /** What it is, in a few words. */
  readonly title: string;
  /** Element letter → the datasheet quantity it means there (symbol and standard). Letters absent do not accept the key. */
  readonly on: Readonly<Partial<Record<RatedLetter, string>>>;
  /** True for a temperature (any finite value); the others must be > 0. */
  readonly temperature: boolean;
}

/** Every part-data key (docs/stress.md, "Ratings" and "Heat"), in the order the docs list them. */
export const PART_DATA: Readonly<Record<PartDataKey, PartDataInfo>> = {
  vmax: {
    unit: 'V',
    title: 'voltage rating',
    temperature: false,
    on: {
      R: 'limiting element voltage U_max (IEC 60115-1): the largest |voltage| across the resistor',
      C: 'rated voltage U_R (IEC 60384-1): the largest |voltage| across the capacitor',
      D: 'repetitive peak reverse voltage V_RRM (IEC 60747-2; V_R for a Zener is not rated this way, leave it out): the largest reverse voltage',
    },
  },
  imax: {
    unit: 'A',
    title: 'average or continuous current rating',
    temperature: false,
    on: {
      L: 'rated DC current I_DC of an inductor: the largest |mean current|',
      D: 'average forward current I_F(AV) (I_O) (IEC 60747-2): the largest mean forward current',
    },
  },
  ipk: {
    unit: 'A',
    title: 'repetitive peak current rating',
    temperature: false,
    on: {
      C: 'largest peak current the capacitor is rated for (charging pulse): the largest |current|',
      L: 'saturation current I_sat: the largest |current|',
      D: 'repetitive peak forward current I_FRM (IEC 60747-2): the largest forward current',
    },
  },
  irms: {
    unit: 'A',
    title: 'RMS current rating',
    temperature: false,
    on: {
      C: 'rated ripple current I_R, RMS (IEC 60384-1): the RMS current',
      L: 'RMS current rating (heating): the RMS current',
      D: 'RMS forward current I_F(RMS) (IEC 60747-2): the RMS current',
    },
  },
  rth: {
    unit: 'K/W',
    title: 'thermal resistance',
    temperature: false,
    on: {
      D: 'thermal resistance junction to ambient R_th(j-a), or junction to case R_th(j-c) when rthsink= is given (IEC 60747-1)',
      Q: 'thermal resistance junction to ambient R_th(j-a), or junction to case R_th(j-c) when rthsink= is given (IEC 60747-1)',
    },
  },
  rthsink: {
    unit: 'K/W',
    title: 'heatsink thermal resistance',
    temperature: false,
    on: {
      D: 'case (with its insulator) to ambient through the heatsink, R_th(c-a), added to rth=',
      Q: 'case (with its insulator) to ambient through the heatsink, R_th(c-a), added to rth=',
    },
  },
  tjmax: {
    unit: '°C',
    title: 'largest junction temperature',
    temperature: true,
    on: {
      D: 'maximum virtual junction temperature T_vj(max), T_j(max) (IEC 60747-1)',
      Q: 'maximum virtual junction temperature T_vj(max), T_j(max) (IEC 60747-1)',
    },
  },
};

/** The part-data keys in the order of {@link PART_DATA}. */
export const PART_DATA_KEYS: readonly PartDataKey[] = Object.keys(PART_DATA) as PartDataKey[];

/** The part-data keys an element letter accepts (none for a letter without part data). */
export function partDataKeysOf(letter: string): readonly PartDataKey[] {
  const l = letter.toUpperCase();
  return PART_DATA_KEYS.filter((k) => l in PART_DATA[k].on);
}

/** Part data as elaborated: key → value in the key's unit. */
export type PartData = Readonly<Partial<Record<PartDataKey, number>>>;
