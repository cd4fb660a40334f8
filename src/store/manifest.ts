/**
 * Manifest of standards (CSV): which scans, their certified concentrations and cell conditions.
 *
 * Columns (DESIGN §4): `scan` (path relative to the manifest), one column per gas named
 * `<GAS>_<unit>` (unit ppm, ppb or pct), optional `path_length_m`, `temperature_K` or `temperature_C`, `pressure_kPa`,
 * `uncertainty_pct`, `lot`. Other columns are kept as notes and reported as a warning.
 */
import { dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import { BandwrightError } from '../errors.js';
import type { PartialConditions } from '../gas/conditions.js';
import { requireInfraredSpecies } from '../gas/species.js';
import { parseConcentrationUnit, toPpm, type ConcentrationUnit } from '../gas/units.js';
import { parseNumberCell, parseTable, type Table } from '../formats/csv-table.js';
import { readText } from './text-file.js';

/** A certified concentration in a manifest row. */
export interface CertifiedValue {
  /** Canonical gas name. */
  gas: string;
  /** Unit of the column. */
  unit: ConcentrationUnit;
  /** Certified value in that unit (≥ 0). */
  value: number;
}

/** One standard in a manifest. */
export interface ManifestEntry {
  /** Line in the manifest. */
  line: number;
  /** Scan path as written in the manifest. */
  scan: string;
  /** Scan path joined to the manifest's folder as given (relative when the manifest path is). */
  scanPath: string;
  /** Certified concentrations, one per gas column. */
  concentrations: CertifiedValue[];
  /** Conditions given in the row (others come from the scan or options). */
  conditions: PartialConditions;
  /** Relative expanded uncertainty of the certified values, %. */
  uncertaintyPct?: number;
  /** Cylinder lot or certificate number. */
  lot?: string;
}

/** A parsed manifest. */
export interface Manifest {
  /** The manifest's path as given. */
  path: string;
  /** Gas columns in order. */
  gases: { gas: string; unit: ConcentrationUnit; column: string }[];
  /** The standards. */
  entries: ManifestEntry[];
  /** Plain-words notes about the file (ignored columns). */
  warnings: string[];
}

const KNOWN = new Set([
  'scan',
  'path_length_m',
  'temperature_k',
  'temperature_c',
  'pressure_kpa',
  'uncertainty_pct',
  'lot',
]);
const GAS_COLUMN = /^(.+)_(ppm|ppb|pct)$/i;

/**
 * Reads and validates a manifest file.
 *
 * @param path - manifest path
 * @returns the manifest with scan paths resolved against its folder
 * @throws BandwrightError `FILE_NOT_FOUND`/`FILE_READ`, `PARSE` (missing `scan` column, no gas
 *   column, bad cells), `INVALID_VALUE` (negative concentration, non-positive condition),
 *   `UNKNOWN_GAS`/`IR_INACTIVE` (gas columns), `WINDOW`-free; scan paths outside the manifest's
 *   folder → `INVALID_VALUE`
 */
export function readManifest(path: string): Manifest {
  return parseManifest(readText(path), path);
}

/**
 * Validates manifest text (see {@link readManifest}).
 *
 * @param text - CSV text
 * @param path - the manifest's path (for messages and resolving scans)
 */
export function parseManifest(text: string, path: string): Manifest {
  const table = parseTable(text, path);
  const folder = dirname(resolve(path));
  const keys = table.columns.map((c) => c.toLowerCase());
  if (!keys.includes('scan')) {
    throw new BandwrightError(
      'PARSE',
      `${path} line 1: no "scan" column; the header must name the scan files' column "scan" ` +
        `(found: ${table.columns.join(', ')})`,
      { file: path, line: 1 },
    );
  }
  if (keys.includes('temperature_k') && keys.includes('temperature_c')) {
    throw new BandwrightError(
      'PARSE',
      `${path} line 1: both temperature_K and temperature_C columns; keep one`,
      { file: path, line: 1 },
    );
  }
  const gases: Manifest['gases'] = [];
  const warnings: string[] = [];
  for (const column of table.columns) {
    const key = column.toLowerCase();
    if (KNOWN.has(key)) continue;
    const match = GAS_COLUMN.exec(column);
    if (match === null) {
      warnings.push(
        `${path}: column ${JSON.stringify(column)} is not a gas (<GAS>_ppm|ppb|pct) or a known column; it is ignored`,
      );
      continue;
    }
    const species = requireInfraredSpecies(match[1] as string, `${path} line 1: column ${column}`);
    if (gases.some((g) => g.gas === species.name)) {
      throw new BandwrightError('PARSE', `${path} line 1: gas ${species.name} has two columns; keep one`, {
        file: path,
        line: 1,
      });
    }
    gases.push({ gas: species.name, unit: parseConcentrationUnit(match[2] as string, column), column });
  }
  if (gases.length === 0) {
    throw new BandwrightError(
      'PARSE',
      `${path} line 1: no gas column; name one column per gas as <GAS>_<unit>, e.g. CO_ppm`,
      { file: path, line: 1 },
    );
  }
  if (table.rows.length === 0)
    throw new BandwrightError('PARSE', `${path}: no standards listed below the header`, { file: path });
  const entries = table.rows.map((row) => parseEntry(row, table, gases, path, folder));
  const firstLine = new Map<string, number>();
  for (const entry of entries) {
    const earlier = firstLine.get(entry.scanPath);
    if (earlier === undefined) firstLine.set(entry.scanPath, entry.line);
    // One scan listed twice counts one measurement as two standards and understates the scatter.
    else
      warnings.push(
        `${path} line ${entry.line}: scan ${entry.scan} is already listed at line ${earlier}; ` +
          "it counts as a second standard, which understates the calibration's scatter",
      );
  }
  return { path, gases, entries, warnings };
}

function parseEntry(
  row: Table['rows'][number],
  table: Table,
  gases: Manifest['gases'],
  path: string,
  folder: string,
): ManifestEntry {
  const cell = (key: string): string | undefined => {
    const value = row.cells.get(key);
    return value === undefined || value === '' ? undefined : value;
  };
  const number = (key: string, column: string): number | undefined => {
    const text = cell(key);
    return text === undefined
      ? undefined
      : parseNumberCell(text, { file: path, line: row.line, column }, { decimalComma: table.decimalComma });
  };
  const positive = (key: string, column: string): number | undefined => {
    const value = number(key, column);
    if (value !== undefined && !(value > 0)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: ${column} = ${value}, must be > 0`,
        { file: path, line: row.line, parameter: column },
      );
    }
    return value;
  };
  const scan = cell('scan');
  if (scan === undefined)
    throw new BandwrightError('PARSE', `${path} line ${row.line}: scan is empty, must name a scan file`, {
      file: path,
      line: row.line,
      parameter: 'scan',
    });
  insideFolder(scan, folder, { file: path, line: row.line, column: 'scan' });
  // Keep the path as the user would write it from where they ran the command, for messages.
  const scanPath = join(dirname(path), scan);
  const concentrations = gases.map(({ gas, unit, column }) => {
    const value = number(column.toLowerCase(), column);
    if (value === undefined) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: ${column} is empty; ` +
          'give the certified value (0 for a gas the standard does not contain)',
        { file: path, line: row.line, parameter: column },
      );
    }
    if (value < 0)
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: ${column} = ${value}, must be >= 0`,
        { file: path, line: row.line, parameter: column },
      );
    // A mole fraction cannot exceed 1 (100 %, 10⁶ ppm): a larger value is a typing or unit error.
    if (toPpm(value, unit) > 1e6) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: ${column} = ${value}, above 100 % by volume (10⁶ ppm); ` +
          'a concentration cannot exceed the whole gas',
        { file: path, line: row.line, parameter: column },
      );
    }
    return { gas, unit, value };
  });
  const temperatureC = number('temperature_c', 'temperature_C');
  if (temperatureC !== undefined && !(temperatureC > -273.15)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${path} line ${row.line}: temperature_C = ${temperatureC}, must be above -273.15`,
      { file: path, line: row.line, parameter: 'temperature_C' },
    );
  }
  const conditions: PartialConditions = {};
  const pathLength = positive('path_length_m', 'path_length_m');
  const temperature =
    positive('temperature_k', 'temperature_K') ??
    (temperatureC === undefined ? undefined : temperatureC + 273.15);
  const pressure = positive('pressure_kpa', 'pressure_kPa');
  if (pathLength !== undefined) conditions.pathLength_m = pathLength;
  if (temperature !== undefined) conditions.temperature_K = temperature;
  if (pressure !== undefined) conditions.pressure_kPa = pressure;
  const uncertainty = number('uncertainty_pct', 'uncertainty_pct');
  if (uncertainty !== undefined && !(uncertainty >= 0)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${path} line ${row.line}: uncertainty_pct = ${uncertainty}, must be >= 0`,
      { file: path, line: row.line, parameter: 'uncertainty_pct' },
    );
  }
  const entry: ManifestEntry = { line: row.line, scan, scanPath, concentrations, conditions };
  if (uncertainty !== undefined) entry.uncertaintyPct = uncertainty;
  const lot = cell('lot');
  if (lot !== undefined) entry.lot = lot;
  return entry;
}

/**
 * Refuses a path written in a manifest that leaves the manifest's folder (absolute paths or `..`),
 * so a manifest cannot pull in unrelated files.
 */
function insideFolder(
  written: string,
  folder: string,
  where: { file: string; line: number; column: string },
): void {
  const resolved = resolve(folder, written);
  const rel = relative(folder, resolved);
  if (isAbsolute(written) || rel === '' || rel.startsWith(`..${sep}`) || rel === '..' || isAbsolute(rel)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where.file} line ${where.line}: ${where.column} = ${JSON.stringify(written)}, ` +
        `must be a path inside the manifest's folder (relative, without "..")`,
      { file: where.file, line: where.line, parameter: where.column },
    );
  }
}
