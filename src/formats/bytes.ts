/**
 * Bytes of text files as the readers see them: the byte values they look for, the checks every
 * text format makes before reading (UTF-16, CR-only line ends) and the text of a byte range for
 * messages. The readers work on bytes so that no string is made per value.
 */
import { BandwrightError } from '../errors.js';

/**
 * The byte values the readers look for. A module takes the ones it needs as module-level
 * constants (`const { LF, CR } = BYTE;`) rather than importing single exported constants: V8
 * reads a module's own constants in optimised loops as cheaply as literals, but an imported or
 * exported binding through a cell at every use, which made the byte loops of the readers about
 * 15 % slower on 14,000-point scans (measured, Node 20).
 */
export const BYTE = Object.freeze({
  /** Line feed, `\n`. */
  LF: 0x0a,
  /** Carriage return, `\r`. */
  CR: 0x0d,
  /** Horizontal tab. */
  TAB: 0x09,
  /** Space. */
  SPACE: 0x20,
  /** Double quote `"`. */
  QUOTE: 0x22,
  /** `#`: comment lines of tables; `##` opens a JCAMP-DX label. */
  HASH: 0x23,
  /** `$`: `$$` opens a JCAMP-DX comment. */
  DOLLAR: 0x24,
  /** Plus sign. */
  PLUS: 0x2b,
  /** Comma. */
  COMMA: 0x2c,
  /** Hyphen-minus, the minus sign. */
  MINUS: 0x2d,
  /** Full stop, the decimal point. */
  PERIOD: 0x2e,
  /** Semicolon. */
  SEMICOLON: 0x3b,
  /** `?`: a missing value in JCAMP-DX data. */
  QUESTION_MARK: 0x3f,
});

const { CR, LF } = BYTE;

/**
 * Length of a UTF-8 byte-order mark at the start of the content: 3 when present, else 0.
 *
 * @param bytes - file content
 */
export function byteOrderMarkLength(bytes: Uint8Array): number {
  return bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
}

/**
 * The same bytes as a Buffer (no copy). The readers search for line breaks and other bytes with
 * `indexOf`; Buffer's is a memchr-style search, several times faster than the typed-array builtin
 * on the short line-by-line searches and over twenty times on whole-file ones (measured, Node 20).
 *
 * @param bytes - file content
 */
function asBuffer(bytes: Uint8Array): Buffer {
  return Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/**
 * Refuses UTF-16 text (as spreadsheet "Unicode text" exports write it), which would otherwise
 * fail on its first NUL byte with a puzzling message.
 *
 * @param bytes - file content
 * @param source - label for the message
 * @throws BandwrightError `PARSE` when the content starts with a UTF-16 byte-order mark or its
 *   first bytes alternate with NUL
 */
function assertNotUtf16(bytes: Uint8Array, source: string): void {
  const bom =
    bytes.length >= 2 &&
    ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff));
  const nulPattern =
    bytes.length >= 4 &&
    ((bytes[1] === 0 && bytes[3] === 0 && bytes[0] !== 0) ||
      (bytes[0] === 0 && bytes[2] === 0 && bytes[1] !== 0));
  if (bom || nulPattern) {
    throw new BandwrightError('PARSE', `${source}: the file is UTF-16 text; save it as UTF-8 (or ASCII)`, {
      file: source,
    });
  }
}

/**
 * Refuses text whose lines end with CR alone (classic Mac OS exports): read line by line at LF it
 * would be one long line, and the messages would point at line 1 with the whole file as a value.
 *
 * @param bytes - file content
 * @param source - label for the message
 * @throws BandwrightError `PARSE` when the content holds CR but no LF
 */
function assertLineEnds(bytes: Uint8Array, source: string): void {
  if (bytes.indexOf(CR) >= 0 && bytes.indexOf(LF) < 0) {
    throw new BandwrightError(
      'PARSE',
      `${source}: lines end with CR alone (an old Mac OS export); save the file with LF or CRLF line ends`,
      { file: source },
    );
  }
}

/**
 * The content of a text file, checked as every reader checks it before reading.
 *
 * @param bytes - file content
 * @param source - label for messages
 * @returns the same bytes as a Buffer (see {@link asBuffer})
 * @throws BandwrightError `PARSE` for UTF-16 text and for lines that end with CR alone
 */
export function checkedText(bytes: Uint8Array, source: string): Buffer {
  const buffer = asBuffer(bytes);
  assertNotUtf16(buffer, source);
  assertLineEnds(buffer, source);
  return buffer;
}

/**
 * The UTF-8 text of bytes[start, end), invalid bytes replaced.
 *
 * @param bytes - file content
 * @param start - first byte
 * @param end - one past the last byte
 */
export function decodeText(bytes: Uint8Array, start: number, end: number): string {
  return new TextDecoder('utf-8').decode(bytes.subarray(start, end));
}

/**
 * The text of bytes[start, end) for a message: at most 40 characters, then `…`.
 *
 * @param bytes - file content
 * @param start - first byte
 * @param end - one past the last byte
 */
export function shortText(bytes: Uint8Array, start: number, end: number): string {
  const text = decodeText(bytes, start, Math.min(end, start + 200));
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}
