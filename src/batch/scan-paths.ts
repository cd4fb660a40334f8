/**
 * Turns scan arguments (files, folders, globs, `-`) into a list of paths, deterministically.
 *
 * - A file is kept as given, whatever its extension.
 * - A folder gives every regular file in it (not in subfolders) whose extension is a scan
 *   extension (default `.csv .tsv .txt .jdx .dx .jcamp`, case-insensitive), sorted by name;
 *   hidden files (name starting with `.`, such as editor backups or `._` resource forks) are
 *   skipped.
 * - A glob (an argument containing `*`, `?` or `[` that is not itself an existing path) matches
 *   regular files: `*` any run of
 *   characters within a path segment, `?` one character, `[abc]`, `[a-z]`, `[!abc]`/`[^abc]` a
 *   character class, `**` as a whole segment any number of folders (zero or more); `\` escapes
 *   the next character. As in POSIX shells, `*`, `?` and classes do not match a leading `.` of a
 *   name unless the pattern segment starts with `.`; `**` does not enter hidden folders or follow
 *   symbolic links to folders. Matches are sorted; a glob that matches nothing is an error.
 * - `-` (standard input) passes through.
 * Results keep argument order; a path met twice (same absolute path) is kept the first time.
 */
import { readdirSync, statSync, type Dirent } from 'node:fs';
import { resolve } from 'node:path';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from '../store/file-errors.js';

/** Extensions a folder is searched for by default. */
export const SCAN_EXTENSIONS: readonly string[] = ['.csv', '.tsv', '.txt', '.jdx', '.dx', '.jcamp'];

/** Options of {@link expandScanArguments}. */
export interface ExpandScanOptions {
  /** Extensions (with the dot) taken from folders; default {@link SCAN_EXTENSIONS}. */
  extensions?: readonly string[];
}

function compareNames(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** True when the argument has an unescaped glob character. */
export function isGlob(argument: string): boolean {
  for (let i = 0; i < argument.length; i++) {
    const c = argument[i];
    if (c === '\\') i++;
    else if (c === '*' || c === '?' || c === '[') return true;
  }
  return false;
}

/**
 * Compiles one path segment of a glob into a regular expression.
 *
 * @param segment - e.g. `std-*.jdx` or `run[0-9]?.csv`
 * @returns an anchored expression matching whole names
 */
export function segmentToRegExp(segment: string): RegExp {
  let source = '';
  const leadingDotLiteral = segment.startsWith('.') || segment.startsWith('\\.');
  for (let i = 0; i < segment.length; i++) {
    const c = segment[i] as string;
    const atStart = source === '';
    if (c === '\\' && i + 1 < segment.length) {
      source += escapeRegExp(segment[++i] as string);
    } else if (c === '*') {
      source += atStart && !leadingDotLiteral ? '(?!\\.)[^/]*' : '[^/]*';
    } else if (c === '?') {
      source += atStart && !leadingDotLiteral ? '[^/.]' : '[^/]';
    } else if (c === '[') {
      const close = findClassEnd(segment, i);
      if (close < 0) {
        source += '\\[';
        continue;
      }
      let body = segment.slice(i + 1, close);
      let negate = false;
      if (body.startsWith('!') || body.startsWith('^')) {
        negate = true;
        body = body.slice(1);
      }
      const escaped = body.replace(/\\/g, '\\\\').replace(/]/g, '\\]').replace(/\[/g, '\\[');
      const classSource = negate ? `[^/${escaped}]` : `[${escaped}]`;
      source += atStart && !leadingDotLiteral ? `(?!\\.)${classSource}` : classSource;
      i = close;
    } else source += escapeRegExp(c);
  }
  return new RegExp(`^${source}$`, 'u');
}

function findClassEnd(segment: string, open: number): number {
  let i = open + 1;
  if (segment[i] === '!' || segment[i] === '^') i++;
  if (segment[i] === ']') i++; // a leading ] is literal
  for (; i < segment.length; i++) if (segment[i] === ']') return i;
  return -1;
}

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/-]/g, '\\$&');
}

function unescapeGlob(text: string): string {
  return text.replace(/\\(.)/g, '$1');
}

function listFolder(folder: string): Dirent[] {
  try {
    return readdirSync(folder, { withFileTypes: true });
  } catch (error) {
    throw fileSystemError(error, folder, { kind: 'folder', action: 'list' });
  }
}

function isFile(path: string, entry: Dirent): boolean {
  if (entry.isFile()) return true;
  if (!entry.isSymbolicLink()) return false;
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

function join(folder: string, name: string): string {
  if (folder === '') return name;
  return folder.endsWith('/') ? `${folder}${name}` : `${folder}/${name}`;
}

function expandGlob(pattern: string): string[] {
  const absolute = pattern.startsWith('/');
  const segments = pattern.split('/').filter((segment, index) => segment !== '' || index === 0);
  if (absolute) segments.shift();
  // Fixed leading segments need no listing.
  let base = absolute ? '/' : '';
  let index = 0;
  while (index < segments.length - 1 && !isGlob(segments[index] as string)) {
    const literal = unescapeGlob(segments[index] as string);
    base = base === '' ? literal : join(base, literal);
    index++;
  }
  const results: string[] = [];
  const walk = (folder: string, at: number): void => {
    const segment = segments[at] as string;
    const last = at === segments.length - 1;
    if (segment === '**') {
      // Zero folders …
      if (last) collectAll(folder, results);
      else walk(folder, at + 1);
      // … or one more, recursively.
      if (!last) {
        for (const entry of sortedEntries(folder)) {
          if (entry.name.startsWith('.')) continue;
          if (entry.isDirectory()) walk(join(folder, entry.name), at);
        }
      }
      return;
    }
    if (!isGlob(segment)) {
      const literal = unescapeGlob(segment);
      const path = folder === '' ? literal : join(folder, literal);
      let stats;
      try {
        stats = statSync(path === '' ? '.' : path);
      } catch {
        return;
      }
      if (last ? stats.isFile() : stats.isDirectory()) {
        if (last) results.push(path);
        else walk(path, at + 1);
      }
      return;
    }
    const matcher = segmentToRegExp(segment);
    for (const entry of sortedEntries(folder)) {
      if (!matcher.test(entry.name)) continue;
      const path = join(folder, entry.name);
      if (last) {
        if (isFile(path, entry)) results.push(path);
      } else if (entry.isDirectory() || (entry.isSymbolicLink() && isDirectory(path))) walk(path, at + 1);
    }
  };
  const sortedEntries = (folder: string): Dirent[] => {
    let entries: Dirent[];
    try {
      entries = readdirSync(folder === '' ? '.' : folder, { withFileTypes: true });
    } catch {
      return [];
    }
    return entries.sort((a, b) => compareNames(a.name, b.name));
  };
  const collectAll = (folder: string, into: string[]): void => {
    for (const entry of sortedEntries(folder)) {
      if (entry.name.startsWith('.')) continue;
      const path = join(folder, entry.name);
      if (entry.isDirectory()) collectAll(path, into);
      else if (isFile(path, entry)) into.push(path);
    }
  };
  if (index >= segments.length) return [];
  walk(base, index);
  return [...new Set(results)].sort(compareNames);
}

function exists(path: string): boolean {
  try {
    statSync(path);
    return true;
  } catch {
    return false;
  }
}

function isDirectory(path: string): boolean {
  try {
    return statSync(path).isDirectory();
  } catch {
    return false;
  }
}

/**
 * Expands scan arguments into scan paths.
 *
 * @param args - files, folders, globs or `-`, as typed by the user
 * @param options - extensions taken from folders
 * @returns paths in argument order, each folder's and glob's matches sorted by name, duplicates
 *   removed
 * @throws BandwrightError `FILE_NOT_FOUND` naming a path that does not exist, a folder with no
 *   scan files, or a glob that matches nothing; `FILE_READ` for a folder that cannot be listed
 * @example
 * expandScanArguments(['standards/', 'extra/*.jdx', '-']);
 * // ['standards/co-050.jdx', 'standards/co-100.jdx', 'extra/blank.jdx', '-']
 */
export function expandScanArguments(args: readonly string[], options: ExpandScanOptions = {}): string[] {
  const extensions = (options.extensions ?? SCAN_EXTENSIONS).map((e) => e.toLowerCase());
  const seen = new Set<string>();
  const out: string[] = [];
  const add = (path: string): void => {
    const key = path === '-' ? '-' : resolve(path);
    if (seen.has(key)) return;
    seen.add(key);
    out.push(path);
  };
  for (const argument of args) {
    if (argument === '-') {
      add('-');
      continue;
    }
    if (isGlob(argument) && !exists(argument)) {
      const matches = expandGlob(argument);
      if (matches.length === 0) {
        throw new BandwrightError('FILE_NOT_FOUND', `${argument}: the pattern matches no file`, {
          file: argument,
        });
      }
      matches.forEach(add);
      continue;
    }
    let stats;
    try {
      stats = statSync(argument);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'ENOENT')
        throw new BandwrightError('FILE_NOT_FOUND', `${argument}: no such file or folder`, {
          file: argument,
        });
      throw new BandwrightError(
        'FILE_READ',
        `${argument}: cannot read: ${(error as Error).message}`,
        { file: argument },
        { cause: error },
      );
    }
    if (!stats.isDirectory()) {
      add(argument);
      continue;
    }
    const scans = listFolder(argument)
      .filter((entry) => {
        const name = entry.name.toLowerCase();
        if (name.startsWith('.')) return false;
        return (
          extensions.some((extension) => name.endsWith(extension)) &&
          isFile(join(argument, entry.name), entry)
        );
      })
      .map((entry) => entry.name)
      .sort(compareNames);
    if (scans.length === 0) {
      throw new BandwrightError(
        'FILE_NOT_FOUND',
        `${argument}: the folder has no scan files (${extensions.join(' ')})`,
        { file: argument },
      );
    }
    for (const name of scans) add(join(argument, name));
  }
  return out;
}
