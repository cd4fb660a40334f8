/**
 * Small tables besides manifests: response tables for `calibrate --responses` and exposure-limit
 * files for `--limits`.
 */
import { BandwrightError } from '../errors.js';
import type { ResponseRow } from '../calibration/build.js';
import type { ExposureLimit, LimitUnit } from '../gas/safety.js';
import { requireInfraredSpecies } from '../gas/species.js';
import { parseConcentrationUnit } from '../gas/units.js';
import { parseNumberCell, parseTable, type Table } from '../formats/csv-table.js';
import { readText } from './text-file.js';

function requireColumns(table: Table, source: string, columns: readonly string[]): void {
  const keys = table.columns.map((c) => c.toLowerCase());
  const missing = columns.filter((c) => !keys.includes(c));
  if (missing.length > 0) {
    throw new BandwrightError(
      'PARSE',
      `${source} line 1: missing column(s) ${missing.join(', ')} (found: ${table.columns.join(', ')})`,
      { file: source, line: 1 },
    );
  }
}

/**
 * Reads a responses table: columns `concentration,response`, replicates as repeated rows.
 *
 * @param path - CSV file
 * @returns rows with line numbers
 * @throws BandwrightError `PARSE` (missing columns, no rows), `INVALID_VALUE` (non-numeric, negative concentration)
 */
export function readResponseTable(path: string): ResponseRow[] {
  const table = parseTable(readText(path), path);
  requireColumns(table, path, ['concentration', 'response']);
  if (table.rows.length === 0)
    throw new BandwrightError('PARSE', `${path}: no rows below the header`, { file: path });
  return table.rows.map((row) => {
    const get = (column: string): number =>
      parseNumberCell(
        row.cells.get(column) ?? '',
        { file: path, line: row.line, column },
        { decimalComma: table.decimalComma },
      );
    const concentration = get('concentration');
    if (concentration < 0) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: concentration = ${concentration}, must be >= 0`,
        { file: path, line: row.line, parameter: 'concentration' },
      );
    }
    return { line: row.line, concentration, response: get('response') };
  });
}

/**
 * Reads an exposure-limits file: columns `gas,limit,unit,basis,source` (unit ppm, ppb, pct or mg/m3).
 *
 * @param path - CSV file
 * @throws BandwrightError `PARSE`, `INVALID_VALUE`, `UNKNOWN_GAS`
 */
export function readLimits(path: string): ExposureLimit[] {
  const table = parseTable(readText(path), path);
  requireColumns(table, path, ['gas', 'limit', 'unit', 'basis', 'source']);
  return table.rows.map((row) => {
    const cell = (column: string): string => row.cells.get(column) ?? '';
    const gas = requireInfraredSpecies(cell('gas'), `${path} line ${row.line}: gas`).name;
    const limit = parseNumberCell(
      cell('limit'),
      { file: path, line: row.line, column: 'limit' },
      { decimalComma: table.decimalComma },
    );
    if (!(limit > 0))
      throw new BandwrightError('INVALID_VALUE', `${path} line ${row.line}: limit = ${limit}, must be > 0`, {
        file: path,
        line: row.line,
        parameter: 'limit',
      });
    const unitText = cell('unit').toLowerCase().replace('³', '3');
    const unit: LimitUnit =
      unitText === 'mg/m3' ? 'mg/m3' : parseConcentrationUnit(unitText, `${path} line ${row.line}: unit`);
    if (cell('source') === '') {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: source is empty; name where the limit comes from`,
        { file: path, line: row.line, parameter: 'source' },
      );
    }
    return { gas, limit, unit, basis: cell('basis') || 'limit', source: cell('source') };
  });
}
