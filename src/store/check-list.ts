/**
 * Check lists: a table of check scans with their certified values and measurement times, for
 * recording a series of earlier checks in order.
 */
import { dirname, join } from 'node:path';
import { BandwrightError } from '../errors.js';
import { parseConcentrationUnit, type ConcentrationUnit } from '../gas/units.js';
import { parseNumberCell, parseTable } from '../formats/csv-table.js';
import { readText } from './text-file.js';

/** One planned or past check of a check list (see {@link readCheckList}). */
export interface CheckListEntry {
  /** 1-based line in the list. */
  line: number;
  /** Scan path, joined to the list's folder. */
  scan: string;
  /** Certified value. */
  certified: number;
  /** Unit of `certified`, from the column name. */
  unit: ConcentrationUnit;
  /** When the check was measured, ISO 8601 UTC. */
  measuredAt: string;
  /** Gas, when the list names one. */
  gas?: string;
}

/**
 * Reads a list of check scans: columns `scan` (relative to the list's folder), one
 * `certified_<unit>` column (ppm, ppb or pct), `measured_at` (ISO 8601 with a zone), optional
 * `gas`. Used to record a series of earlier checks in order.
 *
 * @param path - CSV file
 * @returns the entries in file order
 * @throws BandwrightError `PARSE` (missing columns, bad times), `INVALID_VALUE` (bad or negative values)
 */
export function readCheckList(path: string): CheckListEntry[] {
  const table = parseTable(readText(path), path);
  const keys = table.columns.map((c) => c.toLowerCase());
  const certifiedColumns = keys.filter((k) => /^certified_(ppm|ppb|pct)$/.test(k));
  if (!keys.includes('scan') || !keys.includes('measured_at') || certifiedColumns.length !== 1) {
    throw new BandwrightError(
      'PARSE',
      `${path} line 1: a check list needs the columns scan, ` +
        `certified_<ppm|ppb|pct> (one) and measured_at (found: ${table.columns.join(', ')})`,
      { file: path, line: 1 },
    );
  }
  const certifiedKey = certifiedColumns[0] as string;
  const unit = parseConcentrationUnit(certifiedKey.slice('certified_'.length), `${path}: ${certifiedKey}`);
  return table.rows.map((row) => {
    const scan = row.cells.get('scan') ?? '';
    if (scan === '')
      throw new BandwrightError('PARSE', `${path} line ${row.line}: scan is empty, must name a scan file`, {
        file: path,
        line: row.line,
        parameter: 'scan',
      });
    const certified = parseNumberCell(
      row.cells.get(certifiedKey) ?? '',
      { file: path, line: row.line, column: certifiedKey },
      { decimalComma: table.decimalComma },
    );
    if (certified < 0)
      throw new BandwrightError(
        'INVALID_VALUE',
        `${path} line ${row.line}: ${certifiedKey} = ${certified}, must be >= 0`,
        { file: path, line: row.line, parameter: certifiedKey },
      );
    const time = row.cells.get('measured_at') ?? '';
    const ms = /(Z|[+-]\d{2}:\d{2})$/.test(time) ? Date.parse(time) : Number.NaN;
    if (!Number.isFinite(ms))
      throw new BandwrightError(
        'PARSE',
        `${path} line ${row.line}: measured_at = ${JSON.stringify(time)}, ` +
          'must be an ISO 8601 time with a zone, e.g. 2026-09-01T09:30:00Z',
        { file: path, line: row.line, parameter: 'measured_at' },
      );
    const entry: CheckListEntry = {
      line: row.line,
      scan: join(dirname(path), scan),
      certified,
      unit,
      measuredAt: new Date(ms).toISOString(),
    };
    const gas = row.cells.get('gas');
    if (gas !== undefined && gas !== '') entry.gas = gas;
    return entry;
  });
}
