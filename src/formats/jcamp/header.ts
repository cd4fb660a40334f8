/**
 * The header of one JCAMP-DX spectrum block (versions 4.24 and 5.x): the structure every block
 * must have (`##TITLE=` first, `##JCAMP-DX=` in it, `##END=` last, each label this reader uses
 * given once or repeated with the same value), the axis units, scale factors and the
 * declared first and last abscissae, step, count and first ordinate, and the metadata (title,
 * date, sample conditions).
 */
import { BandwrightError } from '../../errors.js';
import type { ReadWarning, ScanMetadata, YKind } from '../../spectrum/spectrum.js';
import { parseNumberText } from '../number-parse.js';
import type { AbscissaUnit } from '../reader-checks.js';
import type { JcampRecord } from './records.js';
import { readSampleConditions } from './sample-labels.js';
import { readXUnit, readYKind } from './units.js';

/** A declared number with one unit of its last printed digit (the half-unit is its rounding). */
export interface PrintedNumber {
  value: number;
  /** One unit of the last printed digit: 1 for "4000", 0.01 for "3999.04". */
  unit: number;
}

/** What the header declares about the data table and the sample. */
export interface JcampHeader {
  xUnit: AbscissaUnit;
  yKind: YKind;
  /** `##XFACTOR` (1 when absent): X values as written times this give the abscissae. */
  xFactor: number;
  /** `##YFACTOR` (1 when absent): Y values as written times this give the ordinates. */
  yFactor: number;
  firstX?: PrintedNumber;
  lastX?: PrintedNumber;
  deltaX?: PrintedNumber;
  nPoints?: number;
  firstY?: PrintedNumber;
  metadata: ScanMetadata;
  /** What was accepted leniently, in file order; the reader adds its own and puts them in the metadata. */
  warnings: ReadWarning[];
}

/** Labels this reader uses; each may appear once. */
const USED_KEYS: ReadonlySet<string> = new Set([
  'TITLE',
  'JCAMPDX',
  'XUNITS',
  'YUNITS',
  'XFACTOR',
  'YFACTOR',
  'FIRSTX',
  'LASTX',
  'DELTAX',
  'NPOINTS',
  'FIRSTY',
  'XYDATA',
  'XYPOINTS',
  'PATHLENGTH',
  'TEMPERATURE',
  'PRESSURE',
  'RESOLUTION',
  'DATE',
  'LONGDATE',
  'TIME',
  '$YKIND',
  'END',
]);

/** One unit of the last printed digit of a decimal literal (1 for "4000", 0.01 for "3999.04"). */
function lastDigitUnit(text: string): number {
  const match = /^[+-]?(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text.trim());
  if (match === null) return 0;
  const fraction = (match[2] ?? '').length;
  const exponent = match[3] === undefined ? 0 : Number(match[3]);
  return 10 ** (exponent - fraction);
}

/** Two values of a label that say the same: equal as numbers when both are, else as trimmed text. */
function sameValue(a: string, b: string): boolean {
  const x = parseNumberText(a);
  const y = parseNumberText(b);
  return Number.isFinite(x) && Number.isFinite(y) ? x === y : a.trim() === b.trim();
}

/**
 * The records by normalised label. A label this reader uses, given twice with the same value, is
 * read once with a warning; with different values it is refused, naming both.
 */
function recordsByKey(
  records: JcampRecord[],
  source: string,
  warnings: ReadWarning[],
): Map<string, JcampRecord> {
  const byKey = new Map<string, JcampRecord>();
  for (const record of records) {
    if (record.key === '') continue; // `##=` comment record
    const earlier = byKey.get(record.key);
    if (earlier === undefined) {
      byKey.set(record.key, record);
      continue;
    }
    if (!USED_KEYS.has(record.key)) continue;
    if (!sameValue(earlier.value, record.value)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${record.line}: ##${record.name}=${record.value} contradicts ##${earlier.name}=` +
          `${earlier.value} on line ${earlier.line}; a label given twice must say the same`,
        { file: source, line: record.line, parameter: record.name },
      );
    }
    warnings.push({
      code: 'duplicate-label',
      message:
        `${source} line ${record.line}: ##${record.name}=${record.value} given again (first on line ` +
        `${earlier.line}) with the same value; read once`,
    });
  }
  return byKey;
}

/**
 * Checks `##TITLE=` first, `##JCAMP-DX=` of a supported version (second by the standard; later
 * with a warning), and `##END=`; returns the title record.
 */
function checkFraming(
  records: JcampRecord[],
  byKey: Map<string, JcampRecord>,
  source: string,
  warnings: ReadWarning[],
): JcampRecord {
  const first = records[0];
  if (first === undefined || first.key !== 'TITLE') {
    throw new BandwrightError(
      'PARSE',
      first === undefined
        ? `${source}: no JCAMP-DX labels; a JCAMP-DX file starts with ##TITLE= then ##JCAMP-DX=`
        : `${source} line ${first.line}: first label is ##${first.name}, must be ##TITLE= (then ##JCAMP-DX=)`,
      { file: source, line: first?.line },
    );
  }
  const version = byKey.get('JCAMPDX');
  if (version === undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${first.line}: no ##JCAMP-DX= label in the block of ##TITLE=${first.value}; the ` +
        'version must follow the title',
      { file: source, line: first.line },
    );
  }
  if (records[1] !== version) {
    warnings.push({
      code: 'label-order',
      message:
        `${source} line ${version.line}: ##JCAMP-DX= comes after ##${records[1]?.name ?? ''}=; the ` +
        'standard puts it right after ##TITLE=, read anyway',
    });
  }
  const number = parseNumberText(/^\s*[\d.]+/.exec(version.value)?.[0] ?? '');
  if (!(number >= 4 && number < 6)) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${version.line}: ##JCAMP-DX=${version.value}, supported versions are 4.24 and 5.x`,
      {
        file: source,
        line: version.line,
      },
    );
  }
  if (!byKey.has('END')) {
    throw new BandwrightError(
      'PARSE',
      `${source}: no ##END= label; the file is truncated or not a complete JCAMP-DX block`,
      { file: source },
    );
  }
  return first;
}

/**
 * Reads the header of a single JCAMP-DX spectrum from its records.
 *
 * @param records - the file's records in order (see `splitRecords`)
 * @param source - label for messages and `metadata.source`
 * @returns units, factors, declared abscissae and counts, and the metadata (conditions in m, K,
 *   kPa; resolution in cm⁻¹)
 * @throws BandwrightError `PARSE` (structure, version, missing labels or repeated ones that
 *   disagree, units), `INVALID_VALUE` (label values that are not numbers or break their rule)
 */
export function readHeader(records: JcampRecord[], source: string): JcampHeader {
  const warnings: ReadWarning[] = [];
  const byKey = recordsByKey(records, source, warnings);
  const title = checkFraming(records, byKey, source, warnings);
  const required = (key: string, name: string): JcampRecord => {
    const record = byKey.get(key);
    if (record === undefined) {
      throw new BandwrightError(
        'PARSE',
        `${source}: ##${name}= missing, a JCAMP-DX spectrum must declare it`,
        { file: source, parameter: name },
      );
    }
    return record;
  };
  const optionalNumber = (key: string, rule: 'finite' | 'non-zero' | 'count'): PrintedNumber | undefined => {
    const record = byKey.get(key);
    if (record === undefined) return undefined;
    const value = parseNumberText(record.value);
    const bad = (what: string): never => {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${source} line ${record.line}: ##${record.name}=${record.value}, ${what}`,
        {
          file: source,
          line: record.line,
          parameter: record.name,
        },
      );
    };
    if (!Number.isFinite(value)) bad('must be a finite number');
    if (rule === 'non-zero' && value === 0) bad('must not be zero');
    if (rule === 'count' && !(Number.isInteger(value) && value >= 1)) bad('must be a whole number >= 1');
    return { value, unit: lastDigitUnit(record.value) };
  };

  const xUnit = readXUnit(required('XUNITS', 'XUNITS'), source);
  const yKind = readYKind(required('YUNITS', 'YUNITS'), byKey.get('$YKIND'), source);
  const metadata: ScanMetadata = { source, format: 'jcamp' };
  const titleText = title.value.trim();
  if (titleText !== '') metadata.title = titleText;
  readSampleConditions(byKey, source, metadata, warnings);
  const longDate = byKey.get('LONGDATE')?.value.trim();
  const date = byKey.get('DATE')?.value.trim();
  const time = byKey.get('TIME')?.value.trim();
  if (longDate !== undefined && longDate !== '') metadata.dateText = longDate;
  else if (date !== undefined && date !== '')
    metadata.dateText = time !== undefined && time !== '' ? `${date} ${time}` : date;

  const header: JcampHeader = {
    xUnit,
    yKind,
    xFactor: optionalNumber('XFACTOR', 'non-zero')?.value ?? 1,
    yFactor: optionalNumber('YFACTOR', 'non-zero')?.value ?? 1,
    metadata,
    warnings,
  };
  const firstX = optionalNumber('FIRSTX', 'finite');
  const lastX = optionalNumber('LASTX', 'finite');
  const deltaX = optionalNumber('DELTAX', 'non-zero');
  const nPoints = optionalNumber('NPOINTS', 'count');
  const firstY = optionalNumber('FIRSTY', 'finite');
  if (firstX !== undefined) header.firstX = firstX;
  if (lastX !== undefined) header.lastX = lastX;
  if (deltaX !== undefined) header.deltaX = deltaX;
  if (nPoints !== undefined) header.nPoints = nPoints.value;
  if (firstY !== undefined) header.firstY = firstY;
  return header;
}
