/**
 * The preamble of a spectrum table: blank lines and `#` comment lines before the first content
 * line. A comment of the form `# key = value` with a key `title`, `path_length_m`,
 * `temperature_K`, `temperature_C`, `pressure_kPa`, `resolution_cm-1` or `date` sets that
 * metadata field (other comments are free text); each may be given once.
 */
import { BandwrightError } from '../../errors.js';
import type { ScanMetadata } from '../../spectrum/spectrum.js';
import { BYTE, byteOrderMarkLength, decodeText } from '../bytes.js';
import { parseNumberText } from '../number-parse.js';

const { CR, HASH, LF, SPACE, TAB } = BYTE;

/** Where the table's content starts, after its preamble, and what the preamble said. */
export interface Preamble {
  /** Title, date and conditions from `# key = value` comments, with the source and format. */
  metadata: ScanMetadata;
  /** Byte offset of the first content line (the header or the first data line). */
  contentStart: number;
  /** One past its last byte, line break excluded. */
  contentEnd: number;
  /** Byte offset of the line after it. */
  nextLine: number;
  /** Its 1-based line number. */
  contentLine: number;
}

const METADATA_KEYS: ReadonlySet<string> = new Set([
  'title',
  'path_length_m',
  'temperature_k',
  'temperature_c',
  'pressure_kpa',
  'resolution_cm-1',
  'resolution_cm',
  'date',
]);

/** Reads a `# key = value` comment into metadata; other comments are ignored. */
function readCommentLine(
  text: string,
  lineNumber: number,
  source: string,
  metadata: ScanMetadata,
  seen: Map<string, number>,
): void {
  const body = text.replace(/^\s*#+/, '');
  const equals = body.indexOf('=');
  if (equals < 0) return;
  const key = body.slice(0, equals).trim().toLowerCase().replace(/\s+/g, '_');
  if (!METADATA_KEYS.has(key)) return;
  const rawValue = body.slice(equals + 1).trim();
  const canonical =
    key === 'resolution_cm' ? 'resolution_cm-1' : key === 'temperature_c' ? 'temperature_k' : key;
  const earlier = seen.get(canonical);
  if (earlier !== undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${lineNumber}: ${body.slice(0, equals).trim()} given again (first on line ` +
        `${earlier}), must appear once`,
      {
        file: source,
        line: lineNumber,
        parameter: key,
      },
    );
  }
  seen.set(canonical, lineNumber);
  if (key === 'title') {
    metadata.title = rawValue;
    return;
  }
  if (key === 'date') {
    metadata.dateText = rawValue;
    return;
  }
  const value = parseNumberText(rawValue);
  const name = body.slice(0, equals).trim();
  const bad = (rule: string): never => {
    const shown = rawValue.length > 40 ? `${rawValue.slice(0, 40)}…` : rawValue;
    throw new BandwrightError(
      'INVALID_VALUE',
      `${source} line ${lineNumber}: ${name} = ${JSON.stringify(shown)}, ${rule}`,
      {
        file: source,
        line: lineNumber,
        parameter: name,
      },
    );
  };
  if (!Number.isFinite(value)) bad('must be a finite number');
  switch (key) {
    case 'path_length_m':
      if (!(value > 0)) bad('must be > 0');
      metadata.pathLength_m = value;
      break;
    case 'temperature_k':
      if (!(value > 0)) bad('must be > 0 K');
      metadata.temperature_K = value;
      break;
    case 'temperature_c':
      if (!(value > -273.15)) bad('must be above absolute zero (> -273.15 °C)');
      metadata.temperature_K = value + 273.15;
      break;
    case 'pressure_kpa':
      if (!(value > 0)) bad('must be > 0');
      metadata.pressure_kPa = value;
      break;
    default:
      if (!(value > 0)) bad('must be > 0');
      metadata.resolution_cm = value;
  }
}

/**
 * Reads the preamble: comment lines (conditions) and blank lines up to the first content line.
 *
 * @param bytes - file content (a UTF-8 byte-order mark is skipped)
 * @param source - label for messages and `metadata.source`
 * @returns the metadata and where the content starts
 * @throws BandwrightError `PARSE` when no content line follows, or a condition is given twice;
 *   `INVALID_VALUE` for a condition that is not a number or breaks its rule
 */
export function readPreamble(bytes: Uint8Array, source: string): Preamble {
  const length = bytes.length;
  let pos = byteOrderMarkLength(bytes);
  let lineNumber = 0;
  const metadata: ScanMetadata = { source, format: 'csv' };
  const seenKeys = new Map<string, number>();
  while (pos < length) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0) lineEnd = length;
    const nextLine = lineEnd + 1;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    let p = pos;
    while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
    if (p < end) {
      if (bytes[p] !== HASH)
        return { metadata, contentStart: pos, contentEnd: end, nextLine, contentLine: lineNumber };
      readCommentLine(decodeText(bytes, p, end), lineNumber, source, metadata, seenKeys);
    }
    pos = nextLine;
  }
  throw new BandwrightError('PARSE', `${source}: no data lines (the file is empty or has only comments)`, {
    file: source,
  });
}
