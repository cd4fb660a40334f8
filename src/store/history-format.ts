/**
 * The format of a calibration's check history: an append-only CSV file beside the calibration
 * (`<calibration without .json>.history.csv`).
 *
 * Format 1 (the header and the record are wrapped here; in the file each is one line):
 * ```
 * # bandwright check history; format 1; calibration sha256 <64 hex>; file lab-co.calibration.json
 * time,recorded_at,gas,unit,certified,measured,low,high,se,detection_limit,recovery_pct,z,verdict,
 *   rules,sigma_pct,tolerance_pct,scan,scan_sha256,tool_version
 * 2026-09-01T09:30:00.000Z,2026-11-20T08:00:00.000Z,CO,ppm,100,100.7,98.1,103.4,1.19,4.14,100.7,
 *   0.62,pass,,1.667,5,checks/check-0901.jdx,3f…,0.1.0
 * ```
 * The first line ties the history to one calibration (its content hash), so a history cannot be
 * read with the wrong calibration. Times are ISO 8601 UTC. Empty cells: an unbounded interval end,
 * no detection limit, no recovery (zero gas), no z (se = 0), no rules. `rules` lists the control
 * rules that fired, separated by spaces. Text cells are guarded against spreadsheet formula
 * injection (a leading `'`, removed again on reading).
 */
import { basename } from 'node:path';
import Papa from 'papaparse';
import { BandwrightError } from '../errors.js';
import { parseConcentrationUnit } from '../gas/units.js';
import {
  CONTROL_RULE_NAMES,
  VERDICTS,
  type CheckRecord,
  type ControlRuleName,
  type Verdict,
} from '../drift/record.js';
import { guardCell, parseNumberCell } from '../formats/csv-table.js';

/** Current history format. A newer format is refused. */
export const HISTORY_FORMAT_VERSION = 1;

/** Columns of format 1, in order. */
export const HISTORY_COLUMNS = [
  'time',
  'recorded_at',
  'gas',
  'unit',
  'certified',
  'measured',
  'low',
  'high',
  'se',
  'detection_limit',
  'recovery_pct',
  'z',
  'verdict',
  'rules',
  'sigma_pct',
  'tolerance_pct',
  'scan',
  'scan_sha256',
  'tool_version',
] as const;

/** A history as read. */
export interface History {
  /** File as named by the caller. */
  path: string;
  /** Format version of the file. */
  formatVersion: number;
  /** SHA-256 of the calibration the history belongs to (its `sha256` field). */
  calibrationSha256: string;
  /** Records in file (append) order, each with its line number. */
  records: CheckRecord[];
  /** Number of lines in the file (the next record goes on line `lines + 1`). */
  lines: number;
}

/** Options for reading a history. */
export interface ReadHistoryOptions {
  /** Refuse the history unless it belongs to the calibration with this SHA-256. */
  calibrationSha256?: string;
  /** The calibration's file name, for messages. */
  calibrationFile?: string;
}

const HEADER_PATTERN =
  /^# bandwright check history; format (\d+); calibration sha256 ([0-9a-f]{64})(?:;.*)?$/;
const ISO_UTC = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(?:\.\d{1,9})?Z$/;
const HEX64 = /^[0-9a-f]{64}$/;

/**
 * The first two lines of a new history.
 *
 * @param calibrationSha256 - the calibration's `sha256`
 * @param calibrationFile - the calibration's file name (shown for people; not checked)
 */
export function formatHistoryHeader(calibrationSha256: string, calibrationFile?: string): string {
  const name =
    calibrationFile === undefined
      ? ''
      : // Control characters in a file name would break the one-line header: they are what is matched.
        // eslint-disable-next-line no-control-regex
        `; file ${basename(calibrationFile).replace(/[\u0000-\u001f\u007f]/g, '?')}`;
  return (
    `# bandwright check history; format ${HISTORY_FORMAT_VERSION}; ` +
    `calibration sha256 ${calibrationSha256}${name}\n${HISTORY_COLUMNS.join(',')}\n`
  );
}

function quote(cell: string): string {
  return /[",\n\r]/.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}

function numberCell(value: number | undefined): string {
  if (value === undefined || !Number.isFinite(value)) return '';
  return Object.is(value, -0) ? '-0' : String(value);
}

function textCell(value: string): string {
  return quote(guardCell(value));
}

/**
 * One record as a line of the history (with its end of line).
 *
 * @param record - the record
 * @throws BandwrightError `INVALID_VALUE` when a text field holds a line break (a record is one line)
 *   or a time is not ISO 8601 UTC
 */
export function formatHistoryRecord(record: CheckRecord): string {
  for (const [field, value] of [
    ['scan', record.scan],
    ['gas', record.gas],
    ['tool version', record.toolVersion],
  ] as const) {
    if (/[\r\n]/.test(value))
      throw new BandwrightError(
        'INVALID_VALUE',
        `${field} = ${JSON.stringify(value)}: a line break cannot be kept in the history ` +
          '(one record per line); rename the file',
        { parameter: field },
      );
  }
  for (const [field, value] of [
    ['time', record.time],
    ['recorded_at', record.recordedAt],
  ] as const) {
    if (!ISO_UTC.test(value))
      throw new BandwrightError(
        'INVALID_VALUE',
        `${field} = ${JSON.stringify(value)}, must be an ISO 8601 UTC time such as 2026-09-01T09:30:00.000Z`,
        { parameter: field },
      );
  }
  const cells = [
    textCell(record.time),
    textCell(record.recordedAt),
    textCell(record.gas),
    textCell(record.unit),
    numberCell(record.certified),
    numberCell(record.measured),
    numberCell(record.low),
    numberCell(record.high),
    numberCell(record.se),
    numberCell(record.detectionLimit),
    numberCell(record.recoveryPct),
    numberCell(record.z),
    textCell(record.verdict),
    textCell(record.rules.join(' ')),
    numberCell(record.sigmaPct),
    numberCell(record.tolerancePct),
    textCell(record.scan),
    textCell(record.scanSha256),
    textCell(record.toolVersion),
  ];
  return `${cells.join(',')}\n`;
}

function unguard(cell: string): string {
  return /^'[=+\-@\t\r]/.test(cell) ? cell.slice(1) : cell;
}

function shown(line: string): string {
  return JSON.stringify(line.length > 240 ? `${line.slice(0, 240)}…` : line);
}

function parseRecord(line: string, lineNumber: number, source: string): CheckRecord {
  const parsed = Papa.parse<string[]>(line, { delimiter: ',', header: false, skipEmptyLines: false });
  const problem = parsed.errors[0];
  const cells = parsed.data[0];
  const where = `${source} line ${lineNumber}`;
  if (problem !== undefined || cells === undefined || parsed.data.length !== 1) {
    throw new BandwrightError(
      'PARSE',
      `${where}: not a valid CSV record (${problem?.message ?? 'more than one row'}): ${shown(line)}`,
      { file: source, line: lineNumber },
    );
  }
  if (cells.length !== HISTORY_COLUMNS.length) {
    throw new BandwrightError(
      'PARSE',
      `${where}: ${cells.length} cells, a record has ${HISTORY_COLUMNS.length} ` +
        `(${HISTORY_COLUMNS.join(',')}); the line is damaged: ${shown(line)}`,
      { file: source, line: lineNumber },
    );
  }
  const cell = (column: (typeof HISTORY_COLUMNS)[number]): string =>
    unguard(cells[HISTORY_COLUMNS.indexOf(column)] as string);
  const fail = (column: string, value: string, rule: string): never => {
    throw new BandwrightError('PARSE', `${where}: ${column} = ${JSON.stringify(value)}, ${rule}`, {
      file: source,
      line: lineNumber,
      parameter: column,
    });
  };
  const number = (column: (typeof HISTORY_COLUMNS)[number]): number => {
    try {
      return parseNumberCell(cell(column), { file: source, line: lineNumber, column });
    } catch (error) {
      if (error instanceof BandwrightError) throw new BandwrightError('PARSE', error.message, error.location);
      throw error;
    }
  };
  const optionalNumber = (column: (typeof HISTORY_COLUMNS)[number]): number | undefined =>
    cell(column) === '' ? undefined : number(column);
  const time = (column: 'time' | 'recorded_at'): string => {
    const value = cell(column);
    if (!ISO_UTC.test(value) || !Number.isFinite(Date.parse(value)))
      fail(column, value, 'must be an ISO 8601 UTC time such as 2026-09-01T09:30:00.000Z');
    return value;
  };
  const gas = cell('gas');
  if (gas === '') fail('gas', gas, 'must name the gas');
  let unit;
  try {
    unit = parseConcentrationUnit(cell('unit'), `${where}: unit`);
  } catch {
    fail('unit', cell('unit'), 'must be ppm, ppb or pct');
  }
  const verdict = cell('verdict');
  if (!(VERDICTS as readonly string[]).includes(verdict))
    fail('verdict', verdict, `must be one of ${VERDICTS.join(', ')}`);
  const rulesText = cell('rules').trim();
  const rules = rulesText === '' ? [] : rulesText.split(/\s+/);
  for (const rule of rules)
    if (!(CONTROL_RULE_NAMES as readonly string[]).includes(rule))
      fail(
        'rules',
        rulesText,
        `${JSON.stringify(rule)} is not a control rule (${CONTROL_RULE_NAMES.join(', ')})`,
      );
  const scanSha256 = cell('scan_sha256');
  if (!HEX64.test(scanSha256))
    fail('scan_sha256', scanSha256, 'must be 64 lower-case hexadecimal characters');
  const certified = number('certified');
  if (certified < 0) fail('certified', cell('certified'), 'must be >= 0');
  const tolerancePct = number('tolerance_pct');
  if (!(tolerancePct > 0)) fail('tolerance_pct', cell('tolerance_pct'), 'must be > 0');
  const record: CheckRecord = {
    time: time('time'),
    recordedAt: time('recorded_at'),
    gas,
    unit: unit as CheckRecord['unit'],
    certified,
    measured: number('measured'),
    low: optionalNumber('low') ?? Number.NEGATIVE_INFINITY,
    high: optionalNumber('high') ?? Number.POSITIVE_INFINITY,
    se: number('se'),
    verdict: verdict as Verdict,
    rules: rules as ControlRuleName[],
    tolerancePct,
    scan: cell('scan'),
    scanSha256,
    toolVersion: cell('tool_version'),
    line: lineNumber,
  };
  const optional = {
    detectionLimit: optionalNumber('detection_limit'),
    recoveryPct: optionalNumber('recovery_pct'),
    z: optionalNumber('z'),
    sigmaPct: optionalNumber('sigma_pct'),
  };
  for (const [key, value] of Object.entries(optional))
    if (value !== undefined) (record as unknown as Record<string, number>)[key] = value;
  return record;
}

/**
 * Parses the text of a history file.
 *
 * @param text - file content
 * @param source - file name for messages
 * @param options - the calibration it must belong to
 * @returns the history
 * @throws BandwrightError `PARSE` naming the line for a missing or damaged first line or header, a
 *   torn last line (no end of line: the content is shown), a blank line or a damaged record;
 *   `SCHEMA` for a newer format; `INTEGRITY` when the history belongs to another calibration
 */
export function parseHistory(text: string, source: string, options: ReadHistoryOptions = {}): History {
  const pieces = text.split('\n');
  const complete = text.endsWith('\n');
  if (complete) pieces.pop();
  const lines = pieces.map((line) => (line.endsWith('\r') ? line.slice(0, -1) : line));
  if (!complete && text.length > 0) {
    const number = lines.length;
    const torn = lines[number - 1] as string;
    throw new BandwrightError(
      'PARSE',
      `${source} line ${number}: the last line is incomplete (no end of line), ` +
        `a record torn when a recheck was interrupted: ${shown(torn)}. ` +
        'Nothing is appended until it is repaired: compare it with the scan and the recheck output, ' +
        'then delete that line (or, if it is whole, end it with a line break) and run recheck again',
      { file: source, line: number },
    );
  }
  const first = lines[0];
  if (first === undefined || first === '')
    throw new BandwrightError(
      'PARSE',
      `${source} line 1: empty; a history starts with "# bandwright check history; format 1; calibration sha256 …"`,
      { file: source, line: 1 },
    );
  const match = HEADER_PATTERN.exec(first);
  if (match === null)
    throw new BandwrightError(
      'PARSE',
      `${source} line 1: ${shown(first)} is not a bandwright history first line ` +
        '("# bandwright check history; format 1; calibration sha256 …")',
      { file: source, line: 1 },
    );
  const formatVersion = Number(match[1]);
  if (formatVersion > HISTORY_FORMAT_VERSION)
    throw new BandwrightError(
      'SCHEMA',
      `${source} line 1: history format ${formatVersion} is newer than this tool reads ` +
        `(${HISTORY_FORMAT_VERSION}); update bandwright`,
      { file: source, line: 1 },
    );
  const calibrationSha256 = match[2] as string;
  if (options.calibrationSha256 !== undefined && options.calibrationSha256 !== calibrationSha256) {
    const name = options.calibrationFile ?? 'the calibration';
    throw new BandwrightError(
      'INTEGRITY',
      `${source} line 1: this history belongs to the calibration with sha256 ` +
        `${calibrationSha256.slice(0, 12)}…, but ${name} ` +
        `has sha256 ${options.calibrationSha256.slice(0, 12)}…: ` +
        'the calibration was rebuilt or the history was copied from another; ' +
        'move the old history aside (rename it) to start a new one',
      { file: source, line: 1 },
    );
  }
  const header = lines[1];
  if (header === undefined)
    throw new BandwrightError(
      'PARSE',
      `${source} line 2: missing the header line (${HISTORY_COLUMNS.join(',')})`,
      { file: source, line: 2 },
    );
  if (header !== HISTORY_COLUMNS.join(','))
    throw new BandwrightError(
      'PARSE',
      `${source} line 2: header ${shown(header)} is not the format ${formatVersion} header ` +
        `(${HISTORY_COLUMNS.join(',')})`,
      { file: source, line: 2 },
    );
  const records: CheckRecord[] = [];
  for (let i = 2; i < lines.length; i++) {
    const line = lines[i] as string;
    if (line.trim() === '')
      throw new BandwrightError(
        'PARSE',
        `${source} line ${i + 1}: blank line; a history has one record per line and no blank lines (delete it)`,
        { file: source, line: i + 1 },
      );
    records.push(parseRecord(line, i + 1, source));
  }
  return { path: source, formatVersion, calibrationSha256, records, lines: lines.length };
}
