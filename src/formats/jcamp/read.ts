/**
 * Reader for single-spectrum JCAMP-DX files (versions 4.24 and 5.x), the IUPAC open format for
 * infrared spectra (McDonald & Wilks, Applied Spectroscopy 42 (1988) 151; JCAMP-DX 5.01).
 *
 * It validates what other readers take on trust:
 * - `##XYDATA=(X++(Y..Y))` in AFFN or ASDF (SQZ, DIF, DUP, mixed on a line; PAC/AFFN separated by
 *   `+`, `-`, space, tab or `,`). In DIF form the last ordinate of a line is repeated as the first
 *   of the next (the Y check); a mismatch is a `YCHECK` error, never silently decoded.
 * - the X at the start of each line against FIRSTX + i·DELTAX, within 0.1·|DELTAX| plus half a
 *   unit of the last digit printed in that X (times XFACTOR), since writers round it;
 * - `##NPOINTS` against the decoded count, `##DELTAX` against FIRSTX/LASTX (the whole span may
 *   disagree by at most half a step), `##FIRSTY` against the first ordinate within one YFACTOR
 *   step plus half a unit of its last printed digit.
 * - `##XYPOINTS=(XY..XY)` AFFN pairs separated by `;`, `,`, spaces or line breaks.
 *
 * A line of XYDATA that reads entirely as AFFN numbers with exponents (`4000 1.5E-03 1.6E-03`)
 * is AFFN; otherwise `E`/`e` are the SQZ characters +5/−5, as ASDF defines them.
 *
 * Units: `##XUNITS=1/CM`, `MICROMETERS` (ν = 10⁴/λ) or `NANOMETERS` (ν = 10⁷/λ); the result always
 * ascends in cm⁻¹. `##YUNITS=ABSORBANCE` (decadic), `TRANSMITTANCE` (a fraction; values above 1.5
 * are refused as mislabelled percent), `% TRANSMITTANCE` / `PERCENT TRANSMITTANCE`. Natural-log
 * absorbance only when declared by the private label `##$Y KIND=absorbance-natural` together with
 * `##YUNITS=ABSORBANCE`; a YUNITS comment that mentions a natural log without that label is an
 * error rather than a guess.
 *
 * Sample labels: `##PATH LENGTH` (cm by convention), `##TEMPERATURE` (°C), `##PRESSURE` (atm),
 * unless the value or a trailing `$$` comment names the unit (m, cm, mm; K, C/°C; atm, bar, mbar,
 * hPa, kPa, Pa, Torr, mmHg, psi). An unrecognised unit there is an error, because falling back to
 * the convention could be wrong by orders of magnitude. `##RESOLUTION` (cm⁻¹) is informational and
 * ignored when it is not a number. Label names compare case-insensitively, ignoring spaces,
 * dashes, slashes and underscores.
 */
import { BandwrightError } from '../../errors.js';
import {
  makeSpectrum,
  spectrumFromCheckedArrays,
  type ScanMetadata,
  type Spectrum,
  type YKind,
} from '../../spectrum/spectrum.js';
import {
  DECIMAL_POINT,
  DECIMAL_POINT_NO_EXPONENT,
  parseNumberText,
  scanNumber,
  type ScanCursor,
} from '../number-parse.js';
import {
  DEFAULT_MAX_POINTS,
  asBuffer,
  assertLineEnds,
  assertNotUtf16,
  assertTransmittanceFraction,
} from '../spectrum-table.js';

/** Options of {@link parseJcamp}. */
export interface JcampOptions {
  /** Label used in messages and stored as `metadata.source`, e.g. the path as the user gave it. */
  source: string;
  /** Most data points accepted before a `LIMIT` error; default 2,000,000. */
  maxPoints?: number;
  /**
   * Return x and y of an `##XYDATA` table as views on buffers that the next parse in this thread
   * overwrites (default false: arrays of their own). For callers done with a spectrum before
   * they parse the next, such as a batch, it saves two allocations a file.
   */
  reuseOutput?: boolean;
}

interface Record_ {
  /** Normalised label: upper case, no spaces, dashes, slashes or underscores. */
  key: string;
  /** Label as written. */
  name: string;
  /** Value with `$$` comments removed, continuation lines joined by `\n`. */
  value: string;
  /** Text after `$$` on the label line, trimmed ('' when none). */
  comment: string;
  /** 1-based line of the label. */
  line: number;
  /** Byte offset of the first continuation line. */
  dataStart: number;
  /** Byte offset one past the last continuation line. */
  dataEnd: number;
}

const LF = 0x0a;
const CR = 0x0d;
const SPACE = 0x20;
const TAB = 0x09;
const DOLLAR = 0x24;
const HASH = 0x23;

const DATA_KEYS = new Set(['XYDATA', 'XYPOINTS', 'PEAKTABLE', 'PEAKASSIGNMENTS', 'DATATABLE', 'RADATA']);
/** Labels this reader uses; each may appear once. */
const USED_KEYS = new Set([
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

/** Normalises a label name by the JCAMP-DX rule. */
export function normaliseJcampLabel(name: string): string {
  return name.toUpperCase().replace(/[\s\-/_]+/g, '');
}

function decode(bytes: Uint8Array, start: number, end: number): string {
  return new TextDecoder('utf-8').decode(bytes.subarray(start, end));
}

/** Index of `$$` in bytes[start, end), or -1. */
function commentStart(bytes: Uint8Array, start: number, end: number): number {
  for (let i = start; i < end - 1; i++) if (bytes[i] === DOLLAR && bytes[i + 1] === DOLLAR) return i;
  return -1;
}

function splitRecords(bytes: Uint8Array, source: string): { records: Record_[]; endLine: number } {
  const records: Record_[] = [];
  const length = bytes.length;
  let pos = length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let lineNumber = 0;
  let current: Record_ | undefined;
  let endLine = 0;
  while (pos < length) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0) lineEnd = length;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    const lineStart = pos;
    pos = lineEnd + 1;
    let p = lineStart;
    while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
    const isLabel = p + 1 < end && bytes[p] === HASH && bytes[p + 1] === HASH;
    if (endLine !== 0) {
      if (p === end || (bytes[p] === DOLLAR && bytes[p + 1] === DOLLAR)) continue;
      const text = decode(bytes, p, end);
      if (
        isLabel &&
        normaliseJcampLabel(text.slice(2, text.indexOf('=') < 0 ? undefined : text.indexOf('='))) === 'TITLE'
      ) {
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: a second block starts after ##END= on line ${endLine}; not supported: single spectra only`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      throw new BandwrightError(
        'PARSE',
        `${source} line ${lineNumber}: ${JSON.stringify(text.slice(0, 40))} after ##END= on line ${endLine}, nothing may follow it`,
        {
          file: source,
          line: lineNumber,
        },
      );
    }
    if (isLabel) {
      if (current !== undefined) current.dataEnd = lineStart;
      const hash = commentStart(bytes, p + 2, end);
      const text = decode(bytes, p + 2, hash < 0 ? end : hash);
      const comment = hash < 0 ? '' : decode(bytes, hash + 2, end).trim();
      const equals = text.indexOf('=');
      if (equals < 0) {
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: label ##${text.trim()} has no '='; labels are written ##NAME=value`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      const name = text.slice(0, equals).trim();
      current = {
        key: normaliseJcampLabel(name),
        name,
        value: text.slice(equals + 1).trim(),
        comment,
        line: lineNumber,
        dataStart: pos,
        dataEnd: pos,
      };
      records.push(current);
      if (current.key === 'END') {
        endLine = lineNumber;
        current = undefined;
      }
      continue;
    }
    if (current === undefined) {
      if (p === end || (bytes[p] === DOLLAR && bytes[p + 1] === DOLLAR)) continue;
      throw new BandwrightError(
        'PARSE',
        `${source} line ${lineNumber}: ${JSON.stringify(decode(bytes, p, Math.min(end, p + 40)))} before the first label; a JCAMP-DX file starts with ##TITLE=`,
        { file: source, line: lineNumber },
      );
    }
    if (!DATA_KEYS.has(current.key)) {
      const hash = commentStart(bytes, p, end);
      const more = decode(bytes, p, hash < 0 ? end : hash).trim();
      if (more !== '') current.value = current.value === '' ? more : `${current.value}\n${more}`;
    }
    current.dataEnd = pos;
  }
  if (current !== undefined) current.dataEnd = length;
  return { records, endLine };
}

// ---------------------------------------------------------------- units and quantities

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
/** Pressure units to kPa: atm 101.325 (exact), bar 100, Torr 101.325/760, mmHg 0.133322387415, psi 6.894757293168361 (all by definition). */
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

function readQuantity(
  record: Record_,
  source: string,
  units: UnitTable,
  conventional: string,
  unitNames: string,
): number {
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
  const inline = (match[2] as string).trim();
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
  const unit = inlineUnit ?? commentUnit ?? conventional;
  return (units.get(unit) as (value: number) => number)(number);
}

// ---------------------------------------------------------------- header

interface Header {
  xUnit: 'cm-1' | 'um' | 'nm';
  yKind: YKind;
  xFactor: number;
  yFactor: number;
  firstX?: { value: number; unit: number };
  lastX?: { value: number; unit: number };
  deltaX?: number;
  nPoints?: number;
  firstY?: { value: number; unit: number };
  metadata: ScanMetadata;
}

/** One unit of the last printed digit of a decimal literal (1 for "4000", 0.01 for "3999.04"). */
function lastDigitUnit(text: string): number {
  const match = /^[+-]?(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text.trim());
  if (match === null) return 0;
  const fraction = (match[2] ?? '').length;
  const exponent = match[3] === undefined ? 0 : Number(match[3]);
  return 10 ** (exponent - fraction);
}

function readHeader(records: Record_[], source: string): Header {
  const byKey = new Map<string, Record_>();
  for (const record of records) {
    if (record.key === '') continue; // `##=` comment record
    if (record.key === 'BLOCKS' || (record.key === 'DATATYPE' && /^LINK\b/i.test(record.value))) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${record.line}: compound JCAMP-DX file (##${record.name}=${record.value}); not supported: single spectra only`,
        {
          file: source,
          line: record.line,
        },
      );
    }
    if (record.key === 'NTUPLES') {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${record.line}: ##NTUPLES (multi-dimensional data) not supported: single spectra only`,
        {
          file: source,
          line: record.line,
        },
      );
    }
    const earlier = byKey.get(record.key);
    if (earlier !== undefined && USED_KEYS.has(record.key)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${record.line}: ##${record.name} given again (first on line ${earlier.line}), must appear once in a single spectrum`,
        {
          file: source,
          line: record.line,
        },
      );
    }
    if (earlier === undefined) byKey.set(record.key, record);
  }
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
  const second = records[1];
  if (second === undefined || second.key !== 'JCAMPDX') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${second?.line ?? first.line}: ##JCAMP-DX= must follow ##TITLE=${second === undefined ? '' : `, found ##${second.name}`}`,
      { file: source, line: second?.line ?? first.line },
    );
  }
  const version = parseNumberText(/^\s*[\d.]+/.exec(second.value)?.[0] ?? '');
  if (!(version >= 4 && version < 6)) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${second.line}: ##JCAMP-DX=${second.value}, supported versions are 4.24 and 5.x`,
      {
        file: source,
        line: second.line,
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
  const required = (key: string, name: string): Record_ => {
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
  const numberOf = (
    record: Record_,
    rule: 'finite' | 'non-zero' | 'count',
  ): { value: number; unit: number } => {
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

  const xUnitsRecord = required('XUNITS', 'XUNITS');
  const xUnitsKey = xUnitsRecord.value.toUpperCase().replace(/\s+/g, '');
  let xUnit: Header['xUnit'];
  if (['1/CM', 'CM-1', 'CM^-1', 'CM**-1', 'WAVENUMBER', 'WAVENUMBERS'].includes(xUnitsKey)) xUnit = 'cm-1';
  else if (['MICROMETERS', 'MICROMETRES', 'MICRONS', 'UM', 'µM', 'ΜM'].includes(xUnitsKey)) xUnit = 'um';
  else if (['NANOMETERS', 'NANOMETRES', 'NM'].includes(xUnitsKey)) xUnit = 'nm';
  else {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${xUnitsRecord.line}: ##XUNITS=${xUnitsRecord.value} not supported; use 1/CM, MICROMETERS or NANOMETERS`,
      {
        file: source,
        line: xUnitsRecord.line,
        parameter: 'XUNITS',
      },
    );
  }

  const yUnitsRecord = required('YUNITS', 'YUNITS');
  const yUnitsKey = yUnitsRecord.value.toUpperCase().replace(/[\s(),]+/g, '');
  let yKind: YKind;
  if (yUnitsKey === 'ABSORBANCE' || yUnitsKey === 'ABSORBANCEUNITS') yKind = 'absorbance';
  else if (yUnitsKey === 'TRANSMITTANCE') yKind = 'transmittance';
  else if (
    ['%TRANSMITTANCE', 'PERCENTTRANSMITTANCE', '%T', 'TRANSMITTANCE%', 'TRANSMITTANCEPERCENT'].includes(
      yUnitsKey,
    )
  )
    yKind = 'transmittance-percent';
  else {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${yUnitsRecord.line}: ##YUNITS=${yUnitsRecord.value} not supported; bandwright reads ABSORBANCE, TRANSMITTANCE (a fraction) or % TRANSMITTANCE`,
      { file: source, line: yUnitsRecord.line, parameter: 'YUNITS' },
    );
  }
  const yKindRecord = byKey.get('$YKIND');
  if (yKindRecord !== undefined) {
    const declared = yKindRecord.value.trim().toLowerCase();
    const allowed: YKind[] = ['absorbance', 'absorbance-natural', 'transmittance', 'transmittance-percent'];
    if (!(allowed as string[]).includes(declared)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${yKindRecord.line}: ##$Y KIND=${yKindRecord.value}, must be one of ${allowed.join(', ')}`,
        {
          file: source,
          line: yKindRecord.line,
          parameter: '$Y KIND',
        },
      );
    }
    const kind = declared as YKind;
    const compatible = kind === yKind || (kind === 'absorbance-natural' && yKind === 'absorbance');
    if (!compatible) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${yKindRecord.line}: ##$Y KIND=${kind} contradicts ##YUNITS=${yUnitsRecord.value} (line ${yUnitsRecord.line})`,
        {
          file: source,
          line: yKindRecord.line,
          parameter: '$Y KIND',
        },
      );
    }
    yKind = kind;
  } else if (
    yKind === 'absorbance' &&
    /\b(natural|ln|napierian|base\s*e|neperian)\b/i.test(yUnitsRecord.comment)
  ) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${yUnitsRecord.line}: ##YUNITS comment "${yUnitsRecord.comment}" suggests natural-log absorbance; declare it with ##$Y KIND=absorbance-natural, or remove the comment for decadic absorbance`,
      { file: source, line: yUnitsRecord.line, parameter: 'YUNITS' },
    );
  }

  const optionalNumber = (
    key: string,
    rule: 'finite' | 'non-zero' | 'count',
  ): { value: number; unit: number } | undefined => {
    const record = byKey.get(key);
    return record === undefined ? undefined : numberOf(record, rule);
  };
  const metadata: ScanMetadata = { source, format: 'jcamp' };
  const title = first.value.trim();
  if (title !== '') metadata.title = title;
  const path = byKey.get('PATHLENGTH');
  const positive = (record: Record_, value: number, unit: string): number => {
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
  };
  if (path !== undefined)
    metadata.pathLength_m = positive(
      path,
      readQuantity(path, source, LENGTH_UNITS, 'cm', 'm, cm, mm; cm when none is named'),
      'm',
    );
  const temperature = byKey.get('TEMPERATURE');
  if (temperature !== undefined) {
    metadata.temperature_K = positive(
      temperature,
      readQuantity(temperature, source, TEMPERATURE_UNITS, 'c', 'K, C or °C; °C when none is named'),
      'K',
    );
  }
  const pressure = byKey.get('PRESSURE');
  if (pressure !== undefined) {
    metadata.pressure_kPa = positive(
      pressure,
      readQuantity(
        pressure,
        source,
        PRESSURE_UNITS,
        'atm',
        'atm, bar, mbar, hPa, kPa, Pa, Torr, mmHg, psi; atm when none is named',
      ),
      'kPa',
    );
  }
  const resolution = byKey.get('RESOLUTION');
  if (resolution !== undefined) {
    const match = LEADING_NUMBER.exec(resolution.value);
    const value = match === null ? Number.NaN : parseNumberText(match[1] as string);
    if (value > 0 && Number.isFinite(value)) metadata.resolution_cm = value;
  }
  const longDate = byKey.get('LONGDATE')?.value.trim();
  const date = byKey.get('DATE')?.value.trim();
  const time = byKey.get('TIME')?.value.trim();
  if (longDate !== undefined && longDate !== '') metadata.dateText = longDate;
  else if (date !== undefined && date !== '')
    metadata.dateText = time !== undefined && time !== '' ? `${date} ${time}` : date;

  const header: Header = {
    xUnit,
    yKind,
    xFactor: optionalNumber('XFACTOR', 'non-zero')?.value ?? 1,
    yFactor: optionalNumber('YFACTOR', 'non-zero')?.value ?? 1,
    metadata,
  };
  const firstX = optionalNumber('FIRSTX', 'finite');
  const lastX = optionalNumber('LASTX', 'finite');
  const deltaX = optionalNumber('DELTAX', 'non-zero');
  const nPoints = optionalNumber('NPOINTS', 'count');
  const firstY = optionalNumber('FIRSTY', 'finite');
  if (firstX !== undefined) header.firstX = firstX;
  if (lastX !== undefined) header.lastX = lastX;
  if (deltaX !== undefined) header.deltaX = deltaX.value;
  if (nPoints !== undefined) header.nPoints = nPoints.value;
  if (firstY !== undefined) header.firstY = firstY;
  return header;
}

// ---------------------------------------------------------------- XYDATA (ASDF)

const ABSOLUTE = 0;
const DIFFERENCE = 1;

/** Growing output buffer for decoded ordinates. */
class Ordinates {
  values: Float64Array;
  length = 0;
  /** @param reuse - a buffer to start in when long enough (its content is overwritten) */
  constructor(capacity: number, reuse?: Float64Array) {
    this.values =
      reuse !== undefined && reuse.length >= capacity ? reuse : new Float64Array(Math.max(16, capacity));
  }
  push(value: number): void {
    if (this.length === this.values.length) {
      const bigger = new Float64Array(this.values.length * 2);
      bigger.set(this.values);
      this.values = bigger;
    }
    this.values[this.length++] = value;
  }
}

/**
 * Decoder state across the data lines of one `##XYDATA` table. `emit` adds one ordinate, or checks
 * it when it is the Y-check value that opens a line after a line ending in DIF form.
 */
class OrdinateStream {
  readonly out: Ordinates;
  readonly maxPoints: number;
  /** The previous line ended in DIF form, so this line's first ordinate repeats its last. */
  yCheckPending = false;
  /** Last ordinate of the current line (or the Y-check value). */
  previous = 0;
  lastKind = ABSOLUTE;
  lastDifference = 0;
  ordinatesOnLine = 0;
  /** Set when a Y-check value disagrees: [found, expected]. */
  mismatch: [number, number] | undefined;
  constructor(capacity: number, maxPoints: number, reuse?: Float64Array) {
    this.out = new Ordinates(capacity, reuse);
    this.maxPoints = maxPoints;
  }
  startLine(): void {
    this.ordinatesOnLine = 0;
  }
  /** @returns false when the point limit is reached or a Y check fails (see `mismatch`). */
  emit(value: number, kind: number): boolean {
    if (this.ordinatesOnLine === 0 && this.yCheckPending) {
      const expected = this.out.values[this.out.length - 1] as number;
      if (value !== expected) {
        this.mismatch = [value, expected];
        return false;
      }
    } else {
      if (this.out.length >= this.maxPoints) return false;
      this.out.push(value);
    }
    this.previous = value;
    this.lastKind = kind;
    this.ordinatesOnLine++;
    return true;
  }
}

/** True when the line [start, end) reads entirely as blank/comma separated AFFN numbers with at least one exponent. */
function isExponentAffnLine(bytes: Uint8Array, start: number, end: number, cursor: ScanCursor): boolean {
  let sawExponent = false;
  for (let i = start + 1; i < end && !sawExponent; i++) {
    const c = bytes[i];
    const before = bytes[i - 1] as number;
    sawExponent = (c === 0x45 || c === 0x65) && ((before >= 0x30 && before <= 0x39) || before === 0x2e);
  }
  if (!sawExponent) return false;
  let p = start;
  let tokens = 0;
  while (p < end) {
    const c = bytes[p];
    if (c === SPACE || c === TAB || c === 0x2c) {
      p++;
      continue;
    }
    scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
    if (cursor.end === p) return false;
    p = cursor.end;
    if (p < end && bytes[p] !== SPACE && bytes[p] !== TAB && bytes[p] !== 0x2c) return false;
    tokens++;
  }
  return tokens >= 2;
}

/** One unit of the last printed digit of the AFFN literal in bytes[start, end) (1 for "4000", 0.01 for "3999.04"). */
function printedUnitOf(bytes: Uint8Array, start: number, end: number): number {
  let fraction = -1;
  let exponent = 0;
  for (let i = start; i < end; i++) {
    const c = bytes[i] as number;
    if (c === 0x2e) fraction = 0;
    else if (c === 0x45 || c === 0x65) {
      exponent = parseNumberText(
        String.fromCharCode.apply(null, bytes.subarray(i + 1, end) as unknown as number[]),
      );
      break;
    } else if (fraction >= 0 && c >= 0x30 && c <= 0x39) fraction++;
  }
  const power = (Number.isFinite(exponent) ? exponent : 0) - Math.max(0, fraction);
  // Plain decimals (once per data line): a table of 10^-k instead of a pow call.
  return power <= 0 && power > -NEGATIVE_POWERS_OF_TEN.length
    ? (NEGATIVE_POWERS_OF_TEN[-power] as number)
    : 10 ** power;
}

/** 10^0 … 10^-22 as correctly rounded literals. */
const NEGATIVE_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_, k) => Number(`1e-${k}`));

/**
 * Ordinate buffer reused by the next `##XYDATA` table (a batch reads thousands of files); the
 * decoded values are copied out, scaled, before the parse returns. Not kept above 2^18 points.
 */
let xyDataScratch: Float64Array = new Float64Array(0);

/** What {@link decodeAsdfLineFast} read as the X of a line. */
interface FastLineX {
  x: number;
  printedUnit: number;
}
const fastLineX: FastLineX = { x: 0, printedUnit: 0 };
const TWO_TO_53 = 2 ** 53;

// One table entry per byte for the line decoder below: bits 0–3 the first digit a lead
// character stands for, bits 4–5 its kind, bit 6 a negative sign; 0x80 and above: no lead.
const CODE_SQZ = 0x00;
const CODE_DIF = 0x10;
const CODE_DUP = 0x20;
const CODE_SEPARATOR = 0x30;
const CODE_KIND = 0x30;
const CODE_NEGATIVE = 0x40;
const CODE_OTHER = 0x80;
const ASDF_CODE: Uint8Array = new Uint8Array(256).fill(CODE_OTHER);
{
  const lead = (text: string, code: number, firstDigit: number): void => {
    for (let k = 0; k < text.length; k++) ASDF_CODE[text.charCodeAt(k)] = code | (firstDigit + k);
  };
  // JCAMP-DX 5.01 ASDF tables: SQZ @A–I (0…9) a–i (−1…−9), DIF %J–R (0…9) j–r (−1…−9), DUP S–Z s (1…9).
  lead('@ABCDEFGHI', CODE_SQZ, 0);
  lead('abcdefghi', CODE_SQZ | CODE_NEGATIVE, 1);
  lead('%JKLMNOPQR', CODE_DIF, 0);
  lead('jklmnopqr', CODE_DIF | CODE_NEGATIVE, 1);
  lead('STUVWXYZs', CODE_DUP, 1);
  for (const c of [SPACE, TAB, 0x2c]) ASDF_CODE[c] = CODE_SEPARATOR;
}

/**
 * Decodes one ordinary ASDF data line — an AFFN X followed only by SQZ, DIF and DUP tokens — in
 * one pass over its bytes, straight into the ordinate buffer. It gives the same values as the
 * general token loop (the same integer arithmetic in the same order) but never reports an error:
 * at anything unusual (AFFN ordinates, exponents, '?', a decimal point, a DIF or DUP opening the
 * line, DUP after DUP, a failed Y check, the point limit, an overflow) it returns false without
 * changing the stream, and the general loop decodes the line again and words the error. A line it
 * accepts has only letter-led tokens after the X, so it can never be an AFFN line with exponents.
 *
 * @returns true when the line was decoded (X in `lineX`), false to leave it to the general loop
 */
function decodeAsdfLineFast(
  bytes: Uint8Array,
  start: number,
  end: number,
  stream: OrdinateStream,
  cursor: ScanCursor,
  lineX: FastLineX,
): boolean {
  const c0 = bytes[start] as number;
  if (!((c0 >= 0x30 && c0 <= 0x39) || c0 === 0x2e || c0 === 0x2b || c0 === 0x2d)) return false;
  const x = scanNumber(bytes, start, end, DECIMAL_POINT_NO_EXPONENT, cursor);
  const xEnd = cursor.end;
  if (xEnd === start || !Number.isFinite(x)) return false;
  if (end >= bytes.length || ((bytes[end] as number) - 0x30) >>> 0 <= 9) return false;
  const out = stream.out;
  const maxPoints = stream.maxPoints;
  let values = out.values;
  let length = out.length;
  // Every token but a DUP adds at most one ordinate and takes at least one byte.
  if (values.length < length + (end - xEnd)) {
    const bigger = new Float64Array(Math.max(values.length * 2, length + (end - xEnd)));
    bigger.set(values.subarray(0, length));
    values = bigger;
  }
  let previous = stream.previous;
  let lastKind = stream.lastKind;
  let lastDifference = stream.lastDifference;
  const yCheck = stream.yCheckPending;
  let count = 0;
  let lastWasDup = false;
  let i = xEnd;
  while (i < end) {
    const code = ASDF_CODE[bytes[i] as number] as number;
    if (code >= CODE_OTHER) return false;
    i++;
    const kind = code & CODE_KIND;
    if (kind === CODE_SEPARATOR) continue;
    let magnitude = code & 0x0f;
    // bytes[end] is a non-digit (checked above), so the digits stop by themselves. A decimal
    // point after the digits is a byte of class other and ends the fast decoding below.
    for (;;) {
      const digit = (bytes[i] as number) - 0x30;
      if (digit >>> 0 > 9) break;
      magnitude = magnitude * 10 + digit;
      i++;
    }
    // Beyond 2^53 the general loop decodes the same arithmetic and checks for overflow.
    if (magnitude > TWO_TO_53) return false;
    // A negative lead's magnitude is at least 1, so no −0 arises.
    const value = (code & CODE_NEGATIVE) === 0 ? magnitude : -magnitude;
    if (kind === CODE_DIF) {
      if (count === 0 || length >= maxPoints) return false;
      lastDifference = value;
      previous = previous + value;
      values[length++] = previous;
      lastKind = DIFFERENCE;
      lastWasDup = false;
      count++;
    } else if (kind === CODE_SQZ) {
      if (count === 0 && yCheck) {
        if (value !== values[length - 1]) return false;
      } else {
        if (length >= maxPoints) return false;
        values[length++] = value;
      }
      previous = value;
      lastKind = ABSOLUTE;
      lastWasDup = false;
      count++;
    } else {
      if (count === 0 || lastWasDup || value < 1 || length + value - 1 > maxPoints) return false;
      const needed = length + value - 1 + (end - i);
      if (values.length < needed) {
        const bigger = new Float64Array(Math.max(values.length * 2, needed));
        bigger.set(values.subarray(0, length));
        values = bigger;
      }
      if (lastKind === DIFFERENCE) {
        for (let k = 1; k < value; k++) {
          previous = previous + lastDifference;
          values[length++] = previous;
        }
      } else {
        for (let k = 1; k < value; k++) values[length++] = previous;
      }
      count += value - 1;
      lastWasDup = true;
    }
  }
  if (count === 0) return false;
  out.values = values;
  out.length = length;
  stream.previous = previous;
  stream.lastKind = lastKind;
  stream.lastDifference = lastDifference;
  stream.ordinatesOnLine = count;
  stream.yCheckPending = lastKind === DIFFERENCE;
  lineX.x = x;
  lineX.printedUnit = printedUnitOf(bytes, start, xEnd);
  return true;
}

interface LineStart {
  line: number;
  x: number;
  index: number;
  printedUnit: number;
}

function decodeXyData(
  bytes: Uint8Array,
  record: Record_,
  header: Header,
  source: string,
  maxPoints: number,
): { y: Float64Array; lineStarts: LineStart[] } {
  const format = record.value.toUpperCase().replace(/\s+/g, '');
  if (format !== '(X++(Y..Y))') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYDATA=${record.value} not supported; only (X++(Y..Y))`,
      { file: source, line: record.line },
    );
  }
  const stream = new OrdinateStream(header.nPoints ?? 1024, maxPoints, xyDataScratch);
  const lineStarts: LineStart[] = [];
  const cursor: ScanCursor = { end: 0 };
  let lineNumber = record.line;
  let pos = record.dataStart;
  const stop = record.dataEnd;
  // Next `$`, `e` and `E` at or after the current line (-1: none left), found by indexOf so that
  // lines without them are not scanned byte by byte for a comment or an exponent.
  let nextDollar = bytes.indexOf(DOLLAR, pos);
  let nextLowerE = bytes.indexOf(0x65, pos);
  let nextUpperE = bytes.indexOf(0x45, pos);
  while (pos < stop) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0 || lineEnd > stop) lineEnd = stop;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    const lineStart = pos;
    pos = lineEnd + 1;
    if (nextDollar >= 0 && nextDollar < lineStart) nextDollar = bytes.indexOf(DOLLAR, lineStart);
    const hash = nextDollar >= 0 && nextDollar < end ? commentStart(bytes, nextDollar, end) : -1;
    if (hash >= 0) end = hash;
    let p = lineStart;
    while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
    while (end > p && (bytes[end - 1] === SPACE || bytes[end - 1] === TAB)) end--;
    if (p === end) continue;
    stream.startLine();
    const lineBase = stream.out.length;
    const lineIndex = stream.yCheckPending ? lineBase - 1 : lineBase;
    if (decodeAsdfLineFast(bytes, p, end, stream, cursor, fastLineX)) {
      lineStarts.push({
        line: lineNumber,
        x: fastLineX.x,
        index: lineIndex,
        printedUnit: fastLineX.printedUnit,
      });
      continue;
    }
    let tokenCount = 0;
    let lastWasDup = false;

    if (nextLowerE >= 0 && nextLowerE < p) nextLowerE = bytes.indexOf(0x65, p);
    if (nextUpperE >= 0 && nextUpperE < p) nextUpperE = bytes.indexOf(0x45, p);
    const mayHaveExponent = (nextLowerE >= 0 && nextLowerE < end) || (nextUpperE >= 0 && nextUpperE < end);
    if (mayHaveExponent && isExponentAffnLine(bytes, p, end, cursor)) {
      while (p < end) {
        const c = bytes[p];
        if (c === SPACE || c === TAB || c === 0x2c) {
          p++;
          continue;
        }
        const tokenStart = p;
        const value = scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
        p = cursor.end;
        if (!Number.isFinite(value))
          dataError(
            source,
            lineNumber,
            'PARSE',
            `${JSON.stringify(decode(bytes, tokenStart, p))} overflows a double`,
          );
        if (tokenCount === 0)
          lineStarts.push({
            line: lineNumber,
            x: value,
            index: lineIndex,
            printedUnit: printedUnitOf(bytes, tokenStart, p),
          });
        else if (!stream.emit(value, ABSOLUTE)) emitError(stream, source, lineNumber);
        tokenCount++;
      }
      if (stream.ordinatesOnLine === 0)
        dataError(source, lineNumber, 'PARSE', 'a data line needs an X value and at least one ordinate');
      stream.yCheckPending = false;
      continue;
    }

    while (p < end) {
      const c = bytes[p] as number;
      if (c === SPACE || c === TAB || c === 0x2c) {
        p++;
        continue;
      }
      const tokenStart = p;
      let value: number;
      let kind: number; // 0 absolute, 1 difference, 2 duplicate count
      if ((c >= 0x30 && c <= 0x39) || c === 0x2e || c === 0x2b || c === 0x2d) {
        value = scanNumber(bytes, p, end, DECIMAL_POINT_NO_EXPONENT, cursor);
        if (cursor.end === p)
          dataError(
            source,
            lineNumber,
            'PARSE',
            `${JSON.stringify(decode(bytes, p, Math.min(end, p + 12)))} is not a number`,
          );
        p = cursor.end;
        kind = 0;
      } else {
        let first: number;
        if (c === 0x40) {
          first = 0;
          kind = 0;
        } else if (c >= 0x41 && c <= 0x49) {
          first = c - 0x40;
          kind = 0;
        } else if (c >= 0x61 && c <= 0x69) {
          first = -(c - 0x60);
          kind = 0;
        } else if (c === 0x25) {
          first = 0;
          kind = 1;
        } else if (c >= 0x4a && c <= 0x52) {
          first = c - 0x49;
          kind = 1;
        } else if (c >= 0x6a && c <= 0x72) {
          first = -(c - 0x69);
          kind = 1;
        } else if (c >= 0x53 && c <= 0x5a) {
          first = c - 0x52;
          kind = 2;
        } else if (c === 0x73) {
          first = 9;
          kind = 2;
        } else if (c === 0x3f) {
          return dataError(
            source,
            lineNumber,
            'PARSE',
            `'?' (a missing value) at column ${p - lineStart + 1}; a spectrum needs every ordinate`,
          );
        } else {
          return dataError(
            source,
            lineNumber,
            'PARSE',
            `unexpected character ${JSON.stringify(String.fromCharCode(c))} at column ${p - lineStart + 1}; not AFFN, SQZ, DIF or DUP`,
          );
        }
        p++;
        const negative = first < 0;
        let magnitude = negative ? -first : first;
        while (p < end) {
          const digit = (bytes[p] as number) - 0x30;
          if (digit >>> 0 > 9) break;
          magnitude = magnitude * 10 + digit;
          p++;
        }
        if (p < end && bytes[p] === 0x2e) {
          dataError(
            source,
            lineNumber,
            'PARSE',
            `decimal point after the ASDF value ${JSON.stringify(decode(bytes, tokenStart, p + 1))}; SQZ, DIF and DUP values are integers`,
          );
        }
        value = negative ? -magnitude : magnitude;
      }
      if (!Number.isFinite(value))
        dataError(
          source,
          lineNumber,
          'PARSE',
          `${JSON.stringify(decode(bytes, tokenStart, p))} overflows a double`,
        );
      if (tokenCount === 0) {
        if (kind !== 0)
          dataError(
            source,
            lineNumber,
            'PARSE',
            `the line starts with ${JSON.stringify(decode(bytes, tokenStart, p))}, must start with the X value (AFFN or SQZ)`,
          );
        lineStarts.push({
          line: lineNumber,
          x: value,
          index: lineIndex,
          printedUnit: c >= 0x40 ? 1 : printedUnitOf(bytes, tokenStart, p),
        });
        tokenCount++;
        continue;
      }
      tokenCount++;
      if (kind === 0) {
        if (!stream.emit(value, ABSOLUTE)) emitError(stream, source, lineNumber);
        lastWasDup = false;
      } else if (kind === 1) {
        if (stream.ordinatesOnLine === 0) {
          dataError(
            source,
            lineNumber,
            'PARSE',
            `DIF value ${JSON.stringify(decode(bytes, tokenStart, p))} is the first ordinate of the line; the first ordinate must be absolute (SQZ or AFFN)`,
          );
        }
        stream.lastDifference = value;
        if (!stream.emit(stream.previous + value, DIFFERENCE)) emitError(stream, source, lineNumber);
        lastWasDup = false;
      } else {
        if (stream.ordinatesOnLine === 0 || lastWasDup) {
          dataError(
            source,
            lineNumber,
            'PARSE',
            `DUP count ${JSON.stringify(decode(bytes, tokenStart, p))} ${lastWasDup ? 'follows another DUP' : 'has no value before it to repeat'}`,
          );
        }
        if (value < 1) dataError(source, lineNumber, 'PARSE', `DUP count ${value}, must be >= 1`);
        if (stream.out.length + value - 1 > maxPoints)
          dataError(
            source,
            lineNumber,
            'LIMIT',
            `DUP count ${value} gives more than ${maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
          );
        const repeated = stream.lastKind;
        for (let k = 1; k < value; k++) {
          const next = repeated === DIFFERENCE ? stream.previous + stream.lastDifference : stream.previous;
          if (!stream.emit(next, repeated)) emitError(stream, source, lineNumber);
        }
        lastWasDup = true;
      }
    }
    if (stream.ordinatesOnLine === 0)
      dataError(source, lineNumber, 'PARSE', 'a data line needs an X value and at least one ordinate');
    stream.yCheckPending = stream.lastKind === DIFFERENCE;
  }
  if (stream.out.values.length <= 1 << 18) xyDataScratch = stream.out.values;
  // A view on the reused buffer: assembleXyData copies it (scaled) before the parse returns.
  return { y: stream.out.values.subarray(0, stream.out.length), lineStarts };
}

function dataError(source: string, line: number, code: 'PARSE' | 'LIMIT', message: string): never {
  throw new BandwrightError(code, `${source} line ${line}: ${message}`, { file: source, line });
}

function emitError(stream: OrdinateStream, source: string, line: number): never {
  if (stream.mismatch !== undefined) {
    const [found, expected] = stream.mismatch;
    throw new BandwrightError(
      'YCHECK',
      `${source} line ${line}: Y-check value ${found} differs from the last ordinate of the previous data line (${expected}); the DIF data are corrupt or a line is missing`,
      { file: source, line },
    );
  }
  return dataError(
    source,
    line,
    'LIMIT',
    `more than ${stream.maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
  );
}

// ---------------------------------------------------------------- XYPOINTS (AFFN pairs)

function decodeXyPoints(
  bytes: Uint8Array,
  record: Record_,
  source: string,
  maxPoints: number,
): { x: Float64Array; y: Float64Array; lines: Int32Array } {
  const format = record.value.toUpperCase().replace(/\s+/g, '');
  if (format !== '(XY..XY)') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYPOINTS=${record.value} not supported; only (XY..XY)`,
      { file: source, line: record.line },
    );
  }
  const xs = new Ordinates(1024);
  const ys = new Ordinates(1024);
  const lines: number[] = [];
  const cursor: ScanCursor = { end: 0 };
  let lineNumber = record.line;
  let pos = record.dataStart;
  const stop = record.dataEnd;
  let count = 0;
  while (pos < stop) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0 || lineEnd > stop) lineEnd = stop;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    let p = pos;
    pos = lineEnd + 1;
    const hash = commentStart(bytes, p, end);
    if (hash >= 0) end = hash;
    while (p < end) {
      const c = bytes[p] as number;
      if (c === SPACE || c === TAB || c === 0x2c || c === 0x3b) {
        p++;
        continue;
      }
      if (c === 0x3f) {
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: '?' (a missing value); a spectrum needs every point`,
          { file: source, line: lineNumber },
        );
      }
      const value = scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
      const next = cursor.end < end ? (bytes[cursor.end] as number) : SPACE;
      if (cursor.end === p || !(next === SPACE || next === TAB || next === 0x2c || next === 0x3b)) {
        let stopAt = p;
        while (stopAt < end && bytes[stopAt] !== SPACE && bytes[stopAt] !== 0x2c && bytes[stopAt] !== 0x3b)
          stopAt++;
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: ${JSON.stringify(decode(bytes, p, stopAt))} is not a number (XYPOINTS holds AFFN x, y pairs)`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      if (!Number.isFinite(value)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${source} line ${lineNumber}: ${JSON.stringify(decode(bytes, p, cursor.end))} overflows a double, must be finite`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      p = cursor.end;
      if (count % 2 === 0) {
        if (xs.length >= maxPoints) {
          throw new BandwrightError(
            'LIMIT',
            `${source} line ${lineNumber}: more than ${maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
            { file: source, line: lineNumber },
          );
        }
        xs.push(value);
        lines.push(lineNumber);
      } else ys.push(value);
      count++;
    }
  }
  if (count % 2 !== 0) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${lineNumber}: ##XYPOINTS ends with an x value without its y (${count} numbers, must be pairs)`,
      { file: source, line: lineNumber },
    );
  }
  return {
    x: xs.values.slice(0, xs.length),
    y: ys.values.slice(0, ys.length),
    lines: Int32Array.from(lines),
  };
}

// ---------------------------------------------------------------- assembly

/**
 * Parses one JCAMP-DX spectrum.
 *
 * @param input - the file content as bytes (UTF-8/ASCII) or text
 * @param options - source label for messages and metadata; point limit
 * @returns the spectrum on ascending wavenumbers (cm⁻¹) with `metadata.format = 'jcamp'`, the
 *   title, date text and sample conditions converted to m, K, kPa (resolution in cm⁻¹)
 * @throws BandwrightError `PARSE` (structure, labels, units, data syntax, NPOINTS, line X,
 *   FIRSTY, compound files), `YCHECK` (DIF check value mismatch), `INVALID_VALUE` (bad label
 *   values, transmittance fraction above 1.5), `NOT_MONOTONIC`, `LIMIT`. Messages name the line.
 * @example
 * const spectrum = parseJcamp(readFileSync('co.jdx'), { source: 'co.jdx' });
 */
export function parseJcamp(input: Uint8Array | string, options: JcampOptions): Spectrum {
  const source = options.source;
  const maxPoints = options.maxPoints ?? DEFAULT_MAX_POINTS;
  if (!Number.isInteger(maxPoints) || maxPoints < 2) {
    throw new BandwrightError('INVALID_VALUE', `maxPoints = ${maxPoints}, must be an integer >= 2`, {
      parameter: 'maxPoints',
    });
  }
  const bytes = asBuffer(typeof input === 'string' ? new TextEncoder().encode(input) : input);
  assertNotUtf16(bytes, source);
  assertLineEnds(bytes, source);
  const { records } = splitRecords(bytes, source);
  const header = readHeader(records, source);
  const xyData = records.find((r) => r.key === 'XYDATA');
  const xyPoints = records.find((r) => r.key === 'XYPOINTS');
  if (xyData !== undefined && xyPoints !== undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${xyPoints.line}: both ##XYDATA (line ${xyData.line}) and ##XYPOINTS; a single spectrum has one data table`,
      {
        file: source,
        line: xyPoints.line,
      },
    );
  }
  if (header.nPoints !== undefined && header.nPoints > maxPoints) {
    throw new BandwrightError(
      'LIMIT',
      `${source}: ##NPOINTS=${header.nPoints}, more than ${maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
      { file: source },
    );
  }
  let x: Float64Array;
  let y: Float64Array;
  // Set when the XYDATA assembly has already seen finite, strictly monotonic x and finite y.
  let checked = false;
  if (xyData !== undefined)
    ({ x, y, checked } = assembleXyData(
      bytes,
      xyData,
      header,
      source,
      maxPoints,
      options.reuseOutput === true,
    ));
  else if (xyPoints !== undefined) ({ x, y } = assembleXyPoints(bytes, xyPoints, header, source, maxPoints));
  else {
    const peaks = records.find((r) => r.key === 'PEAKTABLE');
    throw new BandwrightError(
      'PARSE',
      peaks !== undefined
        ? `${source} line ${peaks.line}: ##PEAK TABLE is a list of peaks, not a spectrum; a spectrum needs ##XYDATA or ##XYPOINTS`
        : `${source}: no ##XYDATA= or ##XYPOINTS= data table`,
      { file: source },
    );
  }
  if (header.xUnit !== 'cm-1') {
    checked = false;
    const scale = header.xUnit === 'um' ? 1e4 : 1e7;
    for (let i = 0; i < x.length; i++) {
      const lambda = x[i] as number;
      if (!(lambda > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${source}: point ${i + 1}: wavelength ${lambda} ${header.xUnit === 'um' ? 'µm' : 'nm'}, must be > 0 to give a wavenumber`,
          {
            file: source,
          },
        );
      }
      x[i] = scale / lambda;
    }
  }
  if (x.length >= 2 && (x[1] as number) < (x[0] as number)) {
    x.reverse();
    y.reverse();
  }
  if (header.yKind === 'transmittance')
    assertTransmittanceFraction(y, source, 'declare ##YUNITS=% TRANSMITTANCE if they are percent');
  const init: Spectrum = { x, y, yKind: header.yKind, metadata: header.metadata };
  // Reversal keeps x strictly monotonic; anything the assembly did not vouch for, and every
  // failure message, goes through makeSpectrum's full checks.
  return checked && header.yKind !== 'single-beam' ? spectrumFromCheckedArrays(init) : makeSpectrum(init);
}

/** x buffer reused by `reuseOutput` parses (see {@link JcampOptions.reuseOutput}). */
let xOutputScratch: Float64Array = new Float64Array(0);

function assembleXyData(
  bytes: Uint8Array,
  record: Record_,
  header: Header,
  source: string,
  maxPoints: number,
  reuseOutput: boolean,
): { x: Float64Array; y: Float64Array; checked: boolean } {
  const { y, lineStarts } = decodeXyData(bytes, record, header, source, maxPoints);
  const n = y.length;
  if (header.nPoints !== undefined && header.nPoints !== n) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##NPOINTS=${header.nPoints} but ##XYDATA (line ${record.line}) holds ${n} points; the data or the count is wrong`,
      {
        file: source,
        line: record.line,
        parameter: 'NPOINTS',
      },
    );
  }
  if (n < 2)
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYDATA holds ${n} point(s), a spectrum needs at least 2`,
      { file: source, line: record.line },
    );
  if (header.firstX === undefined)
    throw new BandwrightError('PARSE', `${source}: ##FIRSTX= missing, ##XYDATA needs it`, {
      file: source,
      parameter: 'FIRSTX',
    });
  const firstX = header.firstX.value;
  let step: number;
  if (header.lastX !== undefined) {
    step = (header.lastX.value - firstX) / (n - 1);
    if (header.deltaX !== undefined) {
      const span = Math.abs(firstX + (n - 1) * header.deltaX - header.lastX.value);
      if (!(span <= 0.5 * Math.abs(step))) {
        throw new BandwrightError(
          'PARSE',
          `${source}: ##DELTAX=${header.deltaX} disagrees with ##FIRSTX=${firstX}, ##LASTX=${header.lastX.value} and ${n} points (which give ${step}); FIRSTX + (n−1)·DELTAX misses LASTX by ${span}`,
          { file: source, parameter: 'DELTAX' },
        );
      }
    }
  } else if (header.deltaX !== undefined) step = header.deltaX;
  else
    throw new BandwrightError(
      'PARSE',
      `${source}: neither ##LASTX= nor ##DELTAX= given, the x spacing of ##XYDATA is unknown`,
      { file: source, parameter: 'DELTAX' },
    );
  if (!(step !== 0 && Number.isFinite(step))) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${source}: ##FIRSTX and ##LASTX give an x step of ${step}, must be non-zero`,
      { file: source },
    );
  }
  const xFactor = header.xFactor;
  for (const start of lineStarts) {
    const actual = start.x * xFactor;
    const expected = firstX + start.index * step;
    const tolerance =
      0.1 * Math.abs(step) + 0.5 * start.printedUnit * Math.abs(xFactor) + 1e-12 * Math.abs(expected);
    if (!(Math.abs(actual - expected) <= tolerance)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${start.line}: X = ${actual} at the start of the line, but point ${start.index + 1} lies at FIRSTX + ${start.index}·DELTAX = ${expected} (tolerance ${tolerance.toPrecision(3)}); points are missing or extra before this line, or DELTAX is wrong`,
        { file: source, line: start.line },
      );
    }
  }
  const yFactor = header.yFactor;
  // y is a view on the decoder's reused buffer: scaled in place when the output may reuse it.
  const yOut = reuseOutput ? y : new Float64Array(n);
  let yFinite = true;
  for (let i = 0; i < n; i++) {
    const value = (y[i] as number) * yFactor;
    yOut[i] = value;
    // value − value is 0 exactly for finite values, NaN for ±Infinity and NaN.
    if (value - value !== 0) yFinite = false;
  }
  if (header.firstY !== undefined) {
    const tolerance = Math.abs(yFactor) + 0.5 * header.firstY.unit + 1e-9 * Math.abs(header.firstY.value);
    if (!(Math.abs((yOut[0] as number) - header.firstY.value) <= tolerance)) {
      throw new BandwrightError(
        'PARSE',
        `${source}: ##FIRSTY=${header.firstY.value} but the first ordinate decodes to ${yOut[0]} (tolerance ${tolerance.toPrecision(3)}); YFACTOR or the data are wrong`,
        { file: source, parameter: 'FIRSTY' },
      );
    }
  }
  if (reuseOutput && xOutputScratch.length < n) xOutputScratch = new Float64Array(n);
  const xOut = reuseOutput ? xOutputScratch.subarray(0, n) : new Float64Array(n);
  // x is checked for strict monotony as it is made (firstX + i·step can repeat a value when the
  // step is below the rounding of firstX), so makeSpectrum need not pass over it again.
  let monotonic = true;
  let previous = firstX;
  xOut[0] = firstX;
  if (step > 0) {
    for (let i = 1; i < n; i++) {
      const value = firstX + i * step;
      xOut[i] = value;
      if (!(value > previous)) monotonic = false;
      previous = value;
    }
  } else {
    for (let i = 1; i < n; i++) {
      const value = firstX + i * step;
      xOut[i] = value;
      if (!(value < previous)) monotonic = false;
      previous = value;
    }
  }
  if (header.lastX !== undefined) {
    const last = header.lastX.value;
    xOut[n - 1] = last;
    const before = xOut[n - 2] as number;
    if (!(step > 0 ? last > before : last < before)) monotonic = false;
  }
  // Strictly monotonic with finite ends means every x is finite.
  const last = xOut[n - 1] as number;
  const checked = yFinite && monotonic && firstX - firstX === 0 && last - last === 0;
  return { x: xOut, y: yOut, checked };
}

function assembleXyPoints(
  bytes: Uint8Array,
  record: Record_,
  header: Header,
  source: string,
  maxPoints: number,
): { x: Float64Array; y: Float64Array } {
  const { x, y, lines } = decodeXyPoints(bytes, record, source, maxPoints);
  const n = x.length;
  if (header.nPoints !== undefined && header.nPoints !== n) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##NPOINTS=${header.nPoints} but ##XYPOINTS (line ${record.line}) holds ${n} points; the data or the count is wrong`,
      {
        file: source,
        line: record.line,
        parameter: 'NPOINTS',
      },
    );
  }
  for (let i = 0; i < n; i++) {
    x[i] = (x[i] as number) * header.xFactor;
    y[i] = (y[i] as number) * header.yFactor;
  }
  let direction = 0;
  for (let i = 1; i < n; i++) {
    const stepSign = Math.sign((x[i] as number) - (x[i - 1] as number));
    const line = lines[i] as number;
    if (stepSign === 0 || (direction !== 0 && stepSign !== direction)) {
      throw new BandwrightError(
        'NOT_MONOTONIC',
        `${source} line ${line}: x = ${x[i]} after ${x[i - 1]}, ${stepSign === 0 ? 'duplicate x value' : 'x values must be strictly increasing or strictly decreasing'}`,
        { file: source, line },
      );
    }
    direction = stepSign;
  }
  const check = (
    label: 'FIRSTX' | 'LASTX',
    given: { value: number; unit: number } | undefined,
    actual: number | undefined,
  ): void => {
    if (given === undefined || actual === undefined) return;
    const tolerance = 0.5 * given.unit + 1e-9 * Math.abs(given.value);
    if (!(Math.abs(actual - given.value) <= tolerance)) {
      throw new BandwrightError(
        'PARSE',
        `${source}: ##${label}=${given.value} but ##XYPOINTS ${label === 'FIRSTX' ? 'starts' : 'ends'} at x = ${actual}`,
        { file: source, parameter: label },
      );
    }
  };
  check('FIRSTX', header.firstX, x[0]);
  check('LASTX', header.lastX, x[n - 1]);
  return { x, y };
}
