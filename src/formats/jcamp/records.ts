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

/** Most stray characters skipped before `##TITLE=` on the first line. */
const LEADING_BYTES_LIMIT = 4;

/** Bytes some writers leave after the last `##END=`: DOS end-of-file (0x1A), NUL padding, spaces. */
function isPadding(bytes: Uint8Array, start: number, end: number): boolean {
  for (let i = start; i < end; i++) {
    const b = bytes[i];
    if (b !== 0x1a && b !== 0 && b !== SPACE && b !== TAB && b !== CR && b !== 0x0c) return false;
  }
  return true;
}

/** The records of a file and what followed its last `##END=`. */
export interface SplitRecords {
  /** Every record in file order, those of later blocks too (a compound file has several `##END=`). */
  records: JcampRecord[];
  /** Padding after the last `##END=` (an end-of-file byte, NUL padding, spaces): lines and bytes. */
  trailing?: { line: number; bytes: number };
  /**
   * The first text after an `##END=` that is neither a label, a comment nor padding; reading
   * stops there. The reader refuses it once it knows the file holds an infrared spectrum (a file
   * of another kind is refused for that, whatever follows).
   */
  junk?: { line: number; text: string; endLine: number };
  /** Bytes before `##TITLE=` on the first line (a stray character some writers leave), skipped. */
  leading?: string;
}

/**
 * Cuts a JCAMP-DX file into its labelled records, block after block: a compound file's blocks
 * follow each other (and nest, for `##BLOCKS=`), each closed by `##END=`.
 *
 * @param bytes - file content (a UTF-8 byte-order mark is skipped)
 * @param source - label for messages
 * @returns the records in file order, padding after the last `##END=`, and text that cannot follow it
 * @throws BandwrightError `PARSE` for text before the first label (but up to four stray characters
 *   before `##TITLE=`) and a label without `=` (but a bare `##END` and private `##$` flags)
 */
export function splitRecords(bytes: Uint8Array, source: string): SplitRecords {
  const records: JcampRecord[] = [];
  const length = bytes.length;
  let pos = byteOrderMarkLength(bytes);
  let lineNumber = 0;
  let current: JcampRecord | undefined;
  let endLine = 0;
  let trailing: { line: number; bytes: number } | undefined;
  let leading: string | undefined;
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
    let isLabel = p + 1 < end && bytes[p] === HASH && bytes[p + 1] === HASH;
    if (current === undefined && endLine !== 0 && !isLabel) {
      if (p === end || (bytes[p] === DOLLAR && bytes[p + 1] === DOLLAR)) continue;
      if (isPadding(bytes, p, end)) {
        trailing ??= { line: lineNumber, bytes: 0 };
        trailing.bytes += end - p;
        continue;
      }
      return { records, junk: { line: lineNumber, text: decodeText(bytes, p, end), endLine } };
    }
    if (!isLabel && records.length === 0 && leading === undefined) {
      // A stray character or two before the first label (`I##TITLE=`) is skipped, not the file.
      for (let i = p + 1; i <= p + LEADING_BYTES_LIMIT && i + 1 < end; i++) {
        if (bytes[i] !== HASH || bytes[i + 1] !== HASH) continue;
        const label = decodeText(bytes, i + 2, Math.min(end, i + 12));
        if (!/^\s*TITLE\s*=/i.test(label)) break;
        leading = decodeText(bytes, p, i);
        p = i;
        break;
      }
      if (leading !== undefined) {
        isLabel = true;
      }
    }
    if (isLabel) {
      trailing = undefined;
      if (current !== undefined) current.dataEnd = lineStart;
      const hash = commentStart(bytes, p + 2, end);
      const text = decodeText(bytes, p + 2, hash < 0 ? end : hash);
      const comment = hash < 0 ? '' : decodeText(bytes, hash + 2, end).trim();
      let equals = text.indexOf('=');
      // A bare `##END` closes the block; a private `##$NAME` without a value is a flag some
      // writers use. Neither has a value to lose.
      if (equals < 0 && (normaliseJcampLabel(text) === 'END' || text.trimStart().startsWith('$'))) {
        equals = text.length;
      }
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
  return {
    records,
    ...(trailing === undefined ? {} : { trailing }),
    ...(leading === undefined ? {} : { leading }),
  };
}

/**
 * The error for text after `##END=` that is not a label, a comment or padding.
 *
 * @param source - label for messages
 * @param junk - what followed, where (see {@link SplitRecords.junk})
 * @returns the error to throw
 */
export function textAfterEnd(
  source: string,
  junk: { line: number; text: string; endLine: number },
): BandwrightError {
  return new BandwrightError(
    'PARSE',
    `${source} line ${junk.line}: ${JSON.stringify(junk.text.slice(0, 40))} after ##END= on line ` +
      `${junk.endLine}; only labels of a next block, comments, blank lines or end-of-file padding may follow it`,
    { file: source, line: junk.line },
  );
}
