/**
 * JCAMP-DX labelled data records (LDRs): a file is cut into `##NAME=value` records, each with its
 * `$$` comment, its continuation lines and, for data tables, the byte span of its data lines.
 * Label names compare case-insensitively, ignoring spaces, dashes, slashes and underscores.
 */
import { BandwrightError } from '../../errors.js';
import { BYTE, byteOrderMarkLength, decodeText } from '../bytes.js';

const { CR, DOLLAR, HASH, LF, SPACE, TAB } = BYTE;

/** One labelled data record. */
export interface JcampRecord {
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

/** Records whose continuation lines are data, not more of the value. */
const DATA_KEYS: ReadonlySet<string> = new Set([
  'XYDATA',
  'XYPOINTS',
  'PEAKTABLE',
  'PEAKASSIGNMENTS',
  'DATATABLE',
  'RADATA',
]);

/**
 * Normalises a label name by the JCAMP-DX rule.
 *
 * @param name - the label as written, e.g. `Path Length`
 * @returns upper case without spaces, dashes, slashes and underscores, e.g. `PATHLENGTH`
 */
export function normaliseJcampLabel(name: string): string {
  return name.toUpperCase().replace(/[\s\-/_]+/g, '');
}

/**
 * Where a `$$` comment starts in a line.
 *
 * @param bytes - file content
 * @param start - first byte of the line part to search
 * @param end - one past its last byte
 * @returns the index of `$$` in bytes[start, end), or -1
 */
export function commentStart(bytes: Uint8Array, start: number, end: number): number {
  for (let i = start; i < end - 1; i++) if (bytes[i] === DOLLAR && bytes[i + 1] === DOLLAR) return i;
  return -1;
}

/**
 * Cuts a JCAMP-DX file into its labelled records, up to and including `##END=`.
 *
 * @param bytes - file content (a UTF-8 byte-order mark is skipped)
 * @param source - label for messages
 * @returns the records in file order and the line of `##END=` (0 when there is none)
 * @throws BandwrightError `PARSE` for text before the first label, a label without `=`, and
 *   anything but blank or comment lines after `##END=` (a second block is named as such)
 */
export function splitRecords(bytes: Uint8Array, source: string): { records: JcampRecord[]; endLine: number } {
  const records: JcampRecord[] = [];
  const length = bytes.length;
  let pos = byteOrderMarkLength(bytes);
  let lineNumber = 0;
  let current: JcampRecord | undefined;
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
      afterEnd(decodeText(bytes, p, end), isLabel, source, lineNumber, endLine);
    }
    if (isLabel) {
      if (current !== undefined) current.dataEnd = lineStart;
      const hash = commentStart(bytes, p + 2, end);
      const text = decodeText(bytes, p + 2, hash < 0 ? end : hash);
      const comment = hash < 0 ? '' : decodeText(bytes, hash + 2, end).trim();
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
        `${source} line ${lineNumber}: ` +
          `${JSON.stringify(decodeText(bytes, p, Math.min(end, p + 40)))} before the first label; ` +
          `a JCAMP-DX file starts with ##TITLE=`,
        { file: source, line: lineNumber },
      );
    }
    if (!DATA_KEYS.has(current.key)) {
      const hash = commentStart(bytes, p, end);
      const more = decodeText(bytes, p, hash < 0 ? end : hash).trim();
      if (more !== '') current.value = current.value === '' ? more : `${current.value}\n${more}`;
    }
    current.dataEnd = pos;
  }
  if (current !== undefined) current.dataEnd = length;
  return { records, endLine };
}

/** Refuses a line after `##END=`, naming a second block as such. */
function afterEnd(
  text: string,
  isLabel: boolean,
  source: string,
  lineNumber: number,
  endLine: number,
): never {
  if (
    isLabel &&
    normaliseJcampLabel(text.slice(2, text.indexOf('=') < 0 ? undefined : text.indexOf('='))) === 'TITLE'
  ) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${lineNumber}: a second block starts after ##END= on line ${endLine}; not ` +
        `supported: single spectra only`,
      {
        file: source,
        line: lineNumber,
      },
    );
  }
  throw new BandwrightError(
    'PARSE',
    `${source} line ${lineNumber}: ${JSON.stringify(text.slice(0, 40))} after ##END= on line ` +
      `${endLine}, nothing may follow it`,
    {
      file: source,
      line: lineNumber,
    },
  );
}
