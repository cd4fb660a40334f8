/**
 * A calibration's check history: an append-only CSV file beside the calibration
 * (`<calibration without .json>.history.csv`).
 *
 * Format 1:
 * ```
 * # bandwright check history; format 1; calibration sha256 <64 hex>; file lab-co.calibration.json
 * time,recorded_at,gas,unit,certified,measured,low,high,se,detection_limit,recovery_pct,z,verdict,rules,sigma_pct,tolerance_pct,scan,scan_sha256,tool_version
 * 2026-09-01T09:30:00.000Z,2026-11-20T08:00:00.000Z,CO,ppm,100,100.7,98.1,103.4,1.19,4.14,100.7,0.62,pass,,1.667,5,checks/check-0901.jdx,3f…,0.1.0
 * ```
 * The first line ties the history to one calibration (its content hash), so a history cannot be
 * read with the wrong calibration. Times are ISO 8601 UTC. Empty cells: an unbounded interval end,
 * no detection limit, no recovery (zero gas), no z (se = 0), no rules. `rules` lists the control
 * rules that fired, separated by spaces. Text cells are guarded against spreadsheet formula
 * injection (a leading `'`, removed again on reading).
 *
 * Integrity: each record is one line written with a single `write` of the whole line under an
 * exclusive lock file (`<history>.lock`), then flushed to disk, so concurrent rechecks neither lose
 * nor interleave records. A last line without its end of line is a record torn by a crash: it is
 * reported with its line number and content and nothing more is appended until it is repaired.
 */
import {
  closeSync,
  existsSync,
  fsyncSync,
  openSync,
  readdirSync,
  renameSync,
  statSync,
  writeSync,
} from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import Papa from 'papaparse';
import { BandwrightError } from '../errors.js';
import { parseConcentrationUnit, type ConcentrationUnit } from '../gas/units.js';
import {
  CONTROL_RULE_NAMES,
  VERDICTS,
  type CheckRecord,
  type ControlRuleName,
  type Verdict,
} from '../drift/record.js';
import { writeFileAtomic } from './atomic-write.js';
import { guardCell, parseNumberCell, parseTable } from '../formats/csv-table.js';
import { parseJson } from './json-file.js';
import { withFileLock, type LockOptions } from './lock.js';
import { readText } from './text-file.js';

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
 * The history file of a calibration: beside it, named `<calibration without .json>.history.csv`.
 *
 * @param calibrationPath - calibration file
 * @returns the history path
 * @example
 * historyPathFor('calibrations/lab-co.calibration.json'); // 'calibrations/lab-co.calibration.history.csv'
 */
export function historyPathFor(calibrationPath: string): string {
  const base =
    extname(calibrationPath).toLowerCase() === '.json' ? calibrationPath.slice(0, -5) : calibrationPath;
  return `${base}.history.csv`;
}

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
      : `; file ${basename(calibrationFile).replace(/[\u0000-\u001f\u007f]/g, '?')}`;
  return `# bandwright check history; format ${HISTORY_FORMAT_VERSION}; calibration sha256 ${calibrationSha256}${name}\n${HISTORY_COLUMNS.join(',')}\n`;
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
        `${field} = ${JSON.stringify(value)}: a line break cannot be kept in the history (one record per line); rename the file`,
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
      `${where}: ${cells.length} cells, a record has ${HISTORY_COLUMNS.length} (${HISTORY_COLUMNS.join(',')}); the line is damaged: ${shown(line)}`,
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
      `${source} line ${number}: the last line is incomplete (no end of line), a record torn when a recheck was interrupted: ${shown(torn)}. ` +
        `Nothing is appended until it is repaired: compare it with the scan and the recheck output, then delete that line (or, if it is whole, end it with a line break) and run recheck again`,
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
      `${source} line 1: ${shown(first)} is not a bandwright history first line ("# bandwright check history; format 1; calibration sha256 …")`,
      { file: source, line: 1 },
    );
  const formatVersion = Number(match[1]);
  if (formatVersion > HISTORY_FORMAT_VERSION)
    throw new BandwrightError(
      'SCHEMA',
      `${source} line 1: history format ${formatVersion} is newer than this tool reads (${HISTORY_FORMAT_VERSION}); update bandwright`,
      { file: source, line: 1 },
    );
  const calibrationSha256 = match[2] as string;
  if (options.calibrationSha256 !== undefined && options.calibrationSha256 !== calibrationSha256) {
    const name = options.calibrationFile ?? 'the calibration';
    throw new BandwrightError(
      'INTEGRITY',
      `${source} line 1: this history belongs to the calibration with sha256 ${calibrationSha256.slice(0, 12)}…, but ${name} has sha256 ${options.calibrationSha256.slice(0, 12)}…: the calibration was rebuilt or the history was copied from another; move the old history aside (rename it) to start a new one`,
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
      `${source} line 2: header ${shown(header)} is not the format ${formatVersion} header (${HISTORY_COLUMNS.join(',')})`,
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

/**
 * Reads a history file.
 *
 * @param path - history file
 * @param options - the calibration it must belong to
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ`, and those of {@link parseHistory}
 * @example
 * const history = readHistory('calibrations/lab-co.calibration.history.csv', { calibrationSha256: calibration.sha256 });
 */
export function readHistory(path: string, options: ReadHistoryOptions = {}): History {
  return parseHistory(readText(path), path, options);
}

/**
 * Reads a history file, or returns undefined when it does not exist (no check yet).
 *
 * @param path - history file
 * @param options - the calibration it must belong to
 * @throws BandwrightError as {@link readHistory}, except `FILE_NOT_FOUND`
 */
export function readHistoryIfExists(path: string, options: ReadHistoryOptions = {}): History | undefined {
  try {
    return readHistory(path, options);
  } catch (error) {
    if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND') return undefined;
    throw error;
  }
}

/** Options of {@link appendHistoryRecord}. */
export interface AppendHistoryOptions {
  /** SHA-256 of the calibration (the history's first line; an existing history must match). */
  calibrationSha256: string;
  /** The calibration's file name (for the first line and messages). */
  calibrationFile?: string;
  /**
   * Makes the record to append from the records already in the history. Called while the lock
   * is held, so it sees every record appended before it.
   */
  complete: (records: readonly CheckRecord[]) => CheckRecord;
  /** Lock timing. */
  lock?: LockOptions;
}

/** What {@link appendHistoryRecord} did. */
export interface AppendedRecord {
  /** The record appended, with its line number. */
  record: CheckRecord;
  /** Whether the history file was created by this append. */
  created: boolean;
  /** Records before this one (file order). */
  previous: CheckRecord[];
}

function appendLine(path: string, line: string): void {
  let descriptor: number | undefined;
  try {
    descriptor = openSync(path, 'a');
    const bytes = Buffer.from(line, 'utf8');
    // One write of the whole line: with O_APPEND the line lands at the end in one piece.
    let offset = writeSync(descriptor, bytes, 0, bytes.length);
    while (offset < bytes.length) offset += writeSync(descriptor, bytes, offset, bytes.length - offset);
    fsyncSync(descriptor);
  } catch (error) {
    throw new BandwrightError(
      'FILE_READ',
      `${path}: cannot append: ${(error as Error).message}`,
      { file: path },
      { cause: error },
    );
  } finally {
    if (descriptor !== undefined) closeSync(descriptor);
  }
}

/**
 * Appends one record to a history under its lock file, creating the history (first line and
 * header) when it does not exist.
 *
 * @param path - history file
 * @param options - calibration hash, the function that makes the record, lock timing
 * @returns the record with its line number, whether the file was created, and the earlier records
 * @throws BandwrightError those of {@link readHistory} (a torn or damaged line, another
 *   calibration's history: nothing is appended), `INVALID_VALUE` from {@link formatHistoryRecord},
 *   `FILE_READ` (lock timeout, unwritable folder)
 */
export function appendHistoryRecord(path: string, options: AppendHistoryOptions): AppendedRecord {
  return withFileLock(
    `${path}.lock`,
    () => {
      const readOptions: ReadHistoryOptions = {
        calibrationSha256: options.calibrationSha256,
        ...(options.calibrationFile === undefined ? {} : { calibrationFile: options.calibrationFile }),
      };
      const existing = readHistoryIfExists(path, readOptions);
      const previous = existing?.records ?? [];
      const record = options.complete(previous);
      const line = formatHistoryRecord(record);
      if (existing === undefined) {
        writeFileAtomic(
          path,
          formatHistoryHeader(options.calibrationSha256, options.calibrationFile) + line,
          { overwrite: false },
        );
        return { record: { ...record, line: 3 }, created: true, previous };
      }
      appendLine(path, line);
      return { record: { ...record, line: existing.lines + 1 }, created: false, previous };
    },
    options.lock ?? {},
  );
}

/** A JSON file in a folder that is not a calibration, and why. */
export interface SkippedFile {
  path: string;
  reason: string;
}

/**
 * The calibration files in a folder (not recursive): every `*.json` file whose top level has a
 * `schemaVersion` (other JSON, such as method files, is listed as skipped with the reason). Hidden
 * files are ignored. The calibrations are not verified here; read each with `readCalibration`.
 *
 * @param folder - folder path
 * @returns calibration candidates and skipped JSON files, each sorted by name
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ` (not a folder)
 */
export function findCalibrationFiles(folder: string): { calibrations: string[]; skipped: SkippedFile[] } {
  let names: string[];
  try {
    if (!statSync(folder).isDirectory())
      throw new BandwrightError('FILE_READ', `${folder} is not a folder`, { file: folder });
    names = readdirSync(folder).sort();
  } catch (error) {
    if (error instanceof BandwrightError) throw error;
    if ((error as NodeJS.ErrnoException).code === 'ENOENT')
      throw new BandwrightError('FILE_NOT_FOUND', `${folder}: no such folder`, { file: folder });
    throw new BandwrightError(
      'FILE_READ',
      `${folder}: cannot list: ${(error as Error).message}`,
      { file: folder },
      { cause: error },
    );
  }
  const calibrations: string[] = [];
  const skipped: SkippedFile[] = [];
  for (const name of names) {
    if (name.startsWith('.') || extname(name).toLowerCase() !== '.json') continue;
    const path = join(folder, name);
    try {
      if (!statSync(path).isFile()) continue;
    } catch {
      continue;
    }
    let value: unknown;
    try {
      value = parseJson(readText(path), path);
    } catch (error) {
      // A damaged file that claims to be a calibration by its name is listed, so reading it reports the damage.
      if (name.endsWith('.calibration.json')) calibrations.push(path);
      else skipped.push({ path, reason: error instanceof Error ? error.message : String(error) });
      continue;
    }
    if (typeof value === 'object' && value !== null && !Array.isArray(value) && 'schemaVersion' in value)
      calibrations.push(path);
    else skipped.push({ path, reason: 'not a calibration (no schemaVersion)' });
  }
  return { calibrations, skipped };
}

/** What {@link collectCalibrationFiles} found. */
export interface CollectedCalibrations {
  /** Calibration files (named files as given, then those found in folders), without repeats. */
  calibrations: string[];
  /** JSON files in the folders that are not calibrations. */
  skipped: SkippedFile[];
  /** Folders given that hold no calibration. */
  emptyFolders: string[];
}

/**
 * Expands `status` targets: a folder stands for the calibrations in it ({@link findCalibrationFiles}),
 * anything else is taken as a calibration file (reading it reports a missing or damaged one).
 *
 * @param targets - files and folders
 * @returns calibration files, skipped JSON files, empty folders
 * @throws BandwrightError `FILE_READ` for a folder that cannot be listed
 */
export function collectCalibrationFiles(targets: readonly string[]): CollectedCalibrations {
  const calibrations: string[] = [];
  const skipped: SkippedFile[] = [];
  const emptyFolders: string[] = [];
  for (const target of targets) {
    let folder = false;
    try {
      folder = statSync(target).isDirectory();
    } catch {
      folder = false;
    }
    if (!folder) {
      calibrations.push(target);
      continue;
    }
    const found = findCalibrationFiles(target);
    calibrations.push(...found.calibrations);
    skipped.push(...found.skipped);
    if (found.calibrations.length === 0) emptyFolders.push(target);
  }
  return { calibrations: [...new Set(calibrations)], skipped, emptyFolders };
}

/**
 * Moves an existing history aside (to `<name>.replaced-<time>.csv` beside it), so that a rebuilt
 * calibration starts a new history while the old record is kept.
 *
 * @param path - history file
 * @returns the new name of the old history, or undefined when there was none
 * @throws BandwrightError `FILE_READ` when it cannot be renamed
 */
export function moveHistoryAside(path: string): string | undefined {
  if (!existsSync(path)) return undefined;
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const target = `${path.replace(/\.csv$/i, '')}.replaced-${stamp}.csv`;
  try {
    renameSync(path, target);
  } catch (error) {
    throw new BandwrightError(
      'FILE_READ',
      `${path}: cannot move it aside: ${(error as Error).message}`,
      { file: path },
      { cause: error },
    );
  }
  return target;
}

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
      `${path} line 1: a check list needs the columns scan, certified_<ppm|ppb|pct> (one) and measured_at (found: ${table.columns.join(', ')})`,
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
        `${path} line ${row.line}: measured_at = ${JSON.stringify(time)}, must be an ISO 8601 time with a zone, e.g. 2026-09-01T09:30:00Z`,
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
