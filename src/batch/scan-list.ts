/**
 * Lists of scan paths (`quantify --from list.txt`): one path per line, as `find` or `ls` write
 * them. Blank lines and lines starting with `#` are skipped; surrounding blanks and a carriage
 * return before the line break are removed. Paths are taken as written: relative ones are relative
 * to the current folder (like the paths on the command line), not to the list file, and no glob or
 * folder expansion is done, so a list is reproducible whatever the folder holds later.
 */
import { BandwrightError } from '../errors.js';
import { readBytes } from '../store/text-file.js';

/** Largest list file accepted, bytes (about two million paths). */
export const MAX_SCAN_LIST_BYTES = 256 * 1024 * 1024;

/**
 * Parses the text of a scan list.
 *
 * @param text - the list's content
 * @param source - its name, for messages
 * @returns the paths in list order, duplicates kept
 * @throws BandwrightError `PARSE` for a line holding a NUL character
 * @example
 * parseScanList('# stack run 3\nscans/0001.jdx\nscans/0002.jdx\n', 'list.txt');
 * // ['scans/0001.jdx', 'scans/0002.jdx']
 */
export function parseScanList(text: string, source: string): string[] {
  const paths: string[] = [];
  let line = 0;
  let start = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  while (start < text.length) {
    line++;
    let end = text.indexOf('\n', start);
    if (end < 0) end = text.length;
    const entry = text.slice(start, end).trim();
    start = end + 1;
    if (entry === '' || entry.startsWith('#')) continue;
    if (entry.includes('\0'))
      throw new BandwrightError(
        'PARSE',
        `${source} line ${line}: a NUL character in the path; a scan list holds one path per line as text`,
        { file: source, line },
      );
    paths.push(entry);
  }
  return paths;
}

/**
 * Reads a scan list file.
 *
 * @param path - the list file, or `-` for standard input
 * @returns the paths in list order
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ`, `LIMIT` (above 256 MiB), `PARSE`
 */
export function readScanList(path: string): string[] {
  const bytes = readBytes(path === '-' ? '/dev/stdin' : path, { maxBytes: MAX_SCAN_LIST_BYTES });
  return parseScanList(new TextDecoder('utf-8').decode(bytes), path === '-' ? '<stdin>' : path);
}
