/**
 * The sample conditions of a JCAMP-DX file: `##PATH LENGTH` (cm by convention), `##TEMPERATURE`
 * (°C), `##PRESSURE` (atm), unless the value or a trailing `$$` comment names the unit (m, cm, mm;
 * K, C/°C; atm, bar, mbar, hPa, kPa, Pa, Torr, mmHg, psi). An unrecognised unit there is an error,
 * because falling back to the convention could be wrong by orders of magnitude. `##RESOLUTION`
 * (cm⁻¹) is informational and ignored when it is not a number.
 */
import { BandwrightError } from '../../errors.js';
import type { ReadWarning, ScanMetadata } from '../../spectrum/spectrum.js';
import { DECIMAL_POINT, parseNumberText } from '../number-parse.js';
import type { JcampRecord } from './records.js';

type UnitTable = ReadonlyMap<string, (value: number) => number>;

function unitKey(text: string): string {
  return text
    .toLowerCase()
    .replace(/[\s.°º]+/g, '')
    .replace(/^in/, '')
    .replace(/^\((.*)\)$/, '$1')
    .replace(/^\[(.*)\]$/, '$1');
}

const LENGTH_UNITS: UnitTable = new Map<string, (value: number) => number>([
  ...['m', 'meter', 'meters', 'metre', 'metres'].map((u) => [u, (v: number) => v] as const),
  ...['cm', 'centimeter', 'centimeters', 'centimetre', 'centimetres'].map(
    (u) => [u, (v: number) => v / 100] as const,
  ),
  ...['mm', 'millimeter', 'millimeters', 'millimetre', 'millimetres'].map(
    (u) => [u, (v: number) => v / 1000] as const,
  ),
]);
const TEMPERATURE_UNITS: UnitTable = new Map<string, (value: number) => number>([
  ...['k', 'kelvin', 'degk', 'degreesk'].map((u) => [u, (v: number) => v] as const),
  ...['c', 'degc', 'degreesc', 'celsius', 'degreescelsius', 'degcelsius', 'centigrade'].map(
    (u) => [u, (v: number) => v + 273.15] as const,
  ),
]);
/**
 * Pressure units to kPa: atm 101.325 (exact), bar 100, Torr 101.325/760, mmHg 0.133322387415,
 * psi 6.894757293168361 (all by definition).
 */
const PRESSURE_UNITS: UnitTable = new Map<string, (value: number) => number>([
  ...['atm', 'atmosphere', 'atmospheres'].map((u) => [u, (v: number) => v * 101.325] as const),
  ...['bar', 'bars'].map((u) => [u, (v: number) => v * 100] as const),
  ...['mbar', 'millibar', 'hpa'].map((u) => [u, (v: number) => v / 10] as const),
  ['kpa', (v: number) => v],
  ['pa', (v: number) => v / 1000],
  ...['torr'].map((u) => [u, (v: number) => (v * 101.325) / 760] as const),
  ...['mmhg'].map((u) => [u, (v: number) => v * 0.133322387415] as const),
  ...['psi', 'psia'].map((u) => [u, (v: number) => v * 6.894757293168361] as const),
]);

const LEADING_NUMBER = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/s;

/** A number with its unit as read: the unit key and whether the convention supplied it. */
interface Quantity {
  number: number;
  unit: string;
  conventional: boolean;
}

/**
 * A number with an optional unit after it or in the `$$` comment, converted by `units`. Free text
 * after a recognised unit (`18 CM CELL`) is ignored with a warning.
 */
function readQuantity(
  record: JcampRecord,
  source: string,
  units: UnitTable,
  conventional: string,
  unitNames: string,
  warnings: ReadWarning[],
): Quantity {
  const where = `${source} line ${record.line}: ##${record.name}`;
  const match = LEADING_NUMBER.exec(record.value);
  if (match === null) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where} = ${JSON.stringify(record.value)}, must be a number (optionally followed by a unit)`,
      {
        file: source,
        line: record.line,
        parameter: record.name,
      },
    );
  }
  const number = parseNumberText(match[1] as string, DECIMAL_POINT);
  let inline = (match[2] as string).trim();
  const words = /^(\S+)\s+(.+)$/s.exec(inline);
  if (!units.has(unitKey(inline)) && words !== null && units.has(unitKey(words[1] as string))) {
    warnings.push({
      code: 'label-text',
      message:
        `${where}=${record.value}: read as ${match[1]} ${words[1]}; the text after the unit ` +
        `(${JSON.stringify(words[2])}) is ignored`,
    });
    inline = words[1] as string;
  }
  const pick = (text: string, what: string): string | undefined => {
    if (text === '') return undefined;
    const key = unitKey(text);
    if (!units.has(key)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${where}: ${what} ${JSON.stringify(text)} is not a unit this label accepts (${unitNames})`,
        {
          file: source,
          line: record.line,
          parameter: record.name,
        },
      );
    }
    return key;
  };
  const inlineUnit = pick(inline, 'unit');
  const commentUnit = pick(record.comment, 'unit comment');
  if (
    inlineUnit !== undefined &&
    commentUnit !== undefined &&
    units.get(inlineUnit)?.(1) !== units.get(commentUnit)?.(1)
  ) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: the value says ${inline} but the comment says ${record.comment}, they must agree`,
      {
        file: source,
        line: record.line,
        parameter: record.name,
      },
    );
  }
  const unit = inlineUnit ?? commentUnit;
  return { number, unit: unit ?? conventional, conventional: unit === undefined };
}

/** The sample conditions: label, metadata field, unit tables, the convention and the unit of the result. */
const CONDITIONS: readonly {
  key: string;
  field: 'pathLength_m' | 'temperature_K' | 'pressure_kPa';
  units: UnitTable;
  /** Unit assumed when neither the value nor a comment names one. */
  conventional: string;
  /** The units accepted, for messages. */
  accepted: string;
  /** Unit of the converted value, for messages. */
  unit: string;
  /** Values a gas cell can have, in `unit`; outside them the value is reported and not used. */
  plausible: readonly [number, number];
  /**
   * A usual value, in `unit`: among other readings of the number, the nearest is suggested (NaN:
   * suggest none, as for path lengths, where a short one is more likely a film than a slip of unit).
   */
  usual: number;
}[] = [
  {
    key: 'PATHLENGTH',
    field: 'pathLength_m',
    units: LENGTH_UNITS,
    conventional: 'cm',
    accepted: 'm, cm, mm; cm when none is named',
    unit: 'm',
    plausible: [0.001, 10_000],
    usual: Number.NaN,
  },
  {
    key: 'TEMPERATURE',
    field: 'temperature_K',
    units: TEMPERATURE_UNITS,
    conventional: 'c',
    accepted: 'K, C or °C; °C when none is named',
    unit: 'K',
    plausible: [150, 1500],
    usual: 296,
  },
  {
    key: 'PRESSURE',
    field: 'pressure_kPa',
    units: PRESSURE_UNITS,
    conventional: 'atm',
    accepted: 'atm, bar, mbar, hPa, kPa, Pa, Torr, mmHg, psi; atm when none is named',
    unit: 'kPa',
    plausible: [1, 1000],
    usual: 101.325,
  },
];

function positive(record: JcampRecord, value: number, unit: string, source: string): number {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${source} line ${record.line}: ##${record.name}=${record.value} gives ${value} ${unit}, must be > 0`,
      {
        file: source,
        line: record.line,
        parameter: record.name,
      },
    );
  }
  return value;
}

const UNIT_NAMES: Readonly<Record<string, string>> = {
  m: 'm',
  cm: 'cm',
  mm: 'mm',
  k: 'K',
  c: '°C',
  atm: 'atm',
  bar: 'bar',
  mbar: 'mbar',
  hpa: 'hPa',
  kpa: 'kPa',
  pa: 'Pa',
  torr: 'Torr',
  mmhg: 'mmHg',
  psi: 'psi',
};

/** The unit under which a number would be a plausible value nearest the usual one (in log terms). */
function probableUnit(number: number, condition: (typeof CONDITIONS)[number]): string | undefined {
  if (Number.isNaN(condition.usual)) return undefined;
  let best: { unit: string; distance: number } | undefined;
  for (const [unit, convert] of condition.units) {
    const value = convert(number);
    if (!(value >= condition.plausible[0] && value <= condition.plausible[1])) continue;
    const distance = Math.abs(Math.log(value / condition.usual));
    if (best === undefined || distance < best.distance) best = { unit, distance };
  }
  return best?.unit;
}

/**
 * Reads the sample-condition labels into the metadata: path length (m), temperature (K),
 * pressure (kPa) and resolution (cm⁻¹). A condition no gas cell has (pressure below 1 kPa or
 * above 1,000 kPa, temperature below 150 K or above 1,500 K, path below 1 mm or above 10 km) is
 * not used; a warning gives the value as written and what it probably meant.
 *
 * @param byKey - the file's records by normalised label
 * @param source - label for messages
 * @param metadata - receives `pathLength_m`, `temperature_K`, `pressure_kPa`, `resolution_cm`
 * @param warnings - receives free-text and implausible-value warnings
 * @throws BandwrightError `INVALID_VALUE` for a value that is not a number, a unit the label does
 *   not accept, a value and comment that name different units, or a condition that is not > 0
 */
export function readSampleConditions(
  byKey: ReadonlyMap<string, JcampRecord>,
  source: string,
  metadata: ScanMetadata,
  warnings: ReadWarning[],
): void {
  for (const condition of CONDITIONS) {
    const record = byKey.get(condition.key);
    if (record === undefined) continue;
    const quantity = readQuantity(
      record,
      source,
      condition.units,
      condition.conventional,
      condition.accepted,
      warnings,
    );
    const value = positive(
      record,
      (condition.units.get(quantity.unit) as (value: number) => number)(quantity.number),
      condition.unit,
      source,
    );
    const [low, high] = condition.plausible;
    if (value >= low && value <= high) {
      metadata[condition.field] = value;
      continue;
    }
    const probable = probableUnit(quantity.number, condition);
    const reading = quantity.conventional
      ? `(${UNIT_NAMES[quantity.unit] ?? quantity.unit} by the JCAMP-DX convention)`
      : 'as written';
    warnings.push({
      code: 'implausible-condition',
      message:
        `${source} line ${record.line}: ##${record.name}=${record.value} is ${value.toPrecision(4)} ` +
        `${condition.unit} ${reading}, outside what a gas cell has (${low}–${high} ${condition.unit}); ` +
        (probable === undefined
          ? ''
          : `probably ${quantity.number} ${UNIT_NAMES[probable] ?? probable} was meant; `) +
        'not used: give it in the manifest or as an option',
    });
  }
  const resolution = byKey.get('RESOLUTION');
  if (resolution !== undefined) {
    const match = LEADING_NUMBER.exec(resolution.value);
    const value = match === null ? Number.NaN : parseNumberText(match[1] as string);
    if (value > 0 && Number.isFinite(value)) metadata.resolution_cm = value;
  }
}
