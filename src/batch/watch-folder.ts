/**
 * Watching a folder for new complete scans, as an instrument writes them.
 *
 * A file is complete when it appeared by a rename into place (its status-change time is later
 * than its modification time: a rename or link changes only the former, a write sets both) or
 * when its size and modification time have stayed the same over a settle interval of local time,
 * so a scan still being written is never read, whatever the writer's clock says. Hidden files
 * (a name starting with `.`) are never taken, which lets writers use a hidden temporary name.
 *
 * Changes are noticed through `fs.watch` and, because file-system events can be missed (network
 * folders, overflowing queues), through a periodic look at the folder as well. A record of the
 * files processed (name, size, modification time) makes each version of a file processed once;
 * it can be kept in a JSON-lines file so a later run (cron with `watch --once`) goes on from there.
 */
import {
  closeSync,
  existsSync,
  openSync,
  readFileSync,
  readdirSync,
  statSync,
  truncateSync,
  watch,
  writeSync,
  type FSWatcher,
} from 'node:fs';
import { resolve } from 'node:path';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from '../store/file-errors.js';
import { SCAN_EXTENSIONS } from './scan-paths.js';

/** What identifies one version of a file. */
export interface FileStamp {
  /** Size, bytes. */
  size: number;
  /** Modification time, ms since 1970 (fractional). */
  mtimeMs: number;
}

/** A complete file ready to be processed. */
export interface ReadyFile {
  /** Name inside the folder. */
  name: string;
  /** Path: the folder as given joined with the name. */
  path: string;
  /** Its size and modification time when found complete. */
  stamp: FileStamp;
  /** How it was judged complete. */
  how: 'renamed' | 'settled';
  /** The stamp it had when it was processed before, for a file that has changed since. */
  previously?: FileStamp;
}

/** Options of {@link createFolderWatcher}. */
export interface FolderWatcherOptions {
  /** Extensions (with the dot, any case) of scan files; default the scan extensions of `scan-paths.ts`. */
  extensions?: readonly string[];
  /** Time a file's size and modification time must stay unchanged, ms (default 500). */
  settleMs?: number;
  /** Interval of the periodic look at the folder, ms (default 1,000). */
  pollMs?: number;
  /** Files processed before (name → stamp); the watcher adds to it through {@link FolderWatcher.markProcessed}. */
  processed?: Map<string, FileStamp>;
  /** Paths never taken as scans (e.g. the results file when it lies in the folder). */
  ignore?: readonly string[];
  /** Local clock, ms (default `performance.now`). */
  now?: () => number;
}

/** A watched folder. */
export interface FolderWatcher {
  /** The folder as given. */
  readonly folder: string;
  /**
   * Looks at the folder now.
   *
   * @returns files that are complete and not processed in this version, sorted by name
   * @throws BandwrightError `FILE_NOT_FOUND` or `FILE_READ` when the folder cannot be listed
   */
  poll(): ReadyFile[];
  /** Files seen but not complete yet (still changing, or not yet settled). */
  pending(): string[];
  /** How long to wait before the next look is useful, ms: the next settle deadline, at most the poll interval. */
  nextDelayMs(): number;
  /** Records a file as processed in the version found. */
  markProcessed(file: ReadyFile): void;
  /**
   * Starts file-system notifications; `listener` is called on any change in the folder.
   * A failing notifier is closed and the periodic look carries on alone.
   */
  onChange(listener: () => void): void;
  /** Stops notifications. */
  close(): void;
}

interface Observation {
  size: number;
  mtimeNs: bigint;
  since: number;
}

function join(folder: string, name: string): string {
  return folder.endsWith('/') ? `${folder}${name}` : `${folder}/${name}`;
}

/**
 * Starts watching a folder (notifications begin with {@link FolderWatcher.onChange}).
 *
 * @param folder - the folder instruments write scans into
 * @param options - extensions, settle and poll intervals (ms), processed record, ignored paths
 * @returns the watcher
 * @throws BandwrightError `FILE_NOT_FOUND` when the folder does not exist, `FILE_READ` when it is
 *   not a folder
 * @example
 * const watcher = createFolderWatcher('incoming', { settleMs: 500 });
 * for (const file of watcher.poll()) { quantify(file.path); watcher.markProcessed(file); }
 */
export function createFolderWatcher(folder: string, options: FolderWatcherOptions = {}): FolderWatcher {
  const extensions = (options.extensions ?? SCAN_EXTENSIONS).map((e) => e.toLowerCase());
  const settleMs = options.settleMs ?? 500;
  const pollMs = options.pollMs ?? 1_000;
  const now = options.now ?? (() => performance.now());
  const processed = options.processed ?? new Map<string, FileStamp>();
  const ignore = new Set((options.ignore ?? []).map((path) => resolve(path)));
  const observations = new Map<string, Observation>();
  let notifier: FSWatcher | undefined;
  try {
    if (!statSync(folder).isDirectory())
      throw new BandwrightError(
        'FILE_READ',
        `${folder} is not a folder; watch needs the folder scans are written into`,
        { file: folder },
      );
  } catch (error) {
    throw fileSystemError(error, folder, { kind: 'folder', action: 'read' });
  }
  const isScanName = (name: string): boolean => {
    if (name.startsWith('.')) return false;
    const lower = name.toLowerCase();
    return extensions.some((extension) => lower.endsWith(extension));
  };
  return {
    folder,
    poll(): ReadyFile[] {
      let names: string[];
      try {
        names = readdirSync(folder);
      } catch (error) {
        const code = (error as NodeJS.ErrnoException).code;
        if (code === 'ENOENT')
          throw new BandwrightError(
            'FILE_NOT_FOUND',
            `${folder}: no such folder (it was removed or unmounted)`,
            { file: folder },
          );
        throw new BandwrightError(
          'FILE_READ',
          `${folder}: cannot list: ${(error as Error).message}`,
          { file: folder },
          { cause: error },
        );
      }
      const time = now();
      const present = new Set<string>();
      const ready: ReadyFile[] = [];
      for (const name of names) {
        if (!isScanName(name)) continue;
        const path = join(folder, name);
        if (ignore.has(resolve(path))) continue;
        let stats;
        try {
          stats = statSync(path, { bigint: true });
        } catch {
          continue; // gone between the listing and the look
        }
        if (!stats.isFile()) continue;
        present.add(name);
        const size = Number(stats.size);
        const stamp: FileStamp = { size, mtimeMs: Number(stats.mtimeNs) / 1e6 };
        const before = processed.get(name);
        if (before !== undefined && before.size === stamp.size && before.mtimeMs === stamp.mtimeMs) {
          observations.delete(name);
          continue;
        }
        const seen = observations.get(name);
        const changed = seen === undefined || seen.size !== size || seen.mtimeNs !== stats.mtimeNs;
        if (changed) observations.set(name, { size, mtimeNs: stats.mtimeNs, since: time });
        const renamed = stats.ctimeNs > stats.mtimeNs;
        const settled = !changed && time - seen.since >= settleMs;
        if (renamed || settled) {
          ready.push({
            name,
            path,
            stamp,
            how: renamed ? 'renamed' : 'settled',
            ...(before === undefined ? {} : { previously: before }),
          });
        }
      }
      for (const name of observations.keys()) if (!present.has(name)) observations.delete(name);
      return ready.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    },
    pending(): string[] {
      return [...observations.keys()].sort();
    },
    nextDelayMs(): number {
      const time = now();
      let delay = pollMs;
      for (const observation of observations.values())
        delay = Math.min(delay, observation.since + settleMs - time);
      return Math.max(10, Math.ceil(delay));
    },
    markProcessed(file: ReadyFile): void {
      processed.set(file.name, file.stamp);
      observations.delete(file.name);
    },
    onChange(listener: () => void): void {
      if (notifier !== undefined) return;
      try {
        notifier = watch(folder, { persistent: true }, () => listener());
        notifier.on('error', () => {
          notifier?.close();
          notifier = undefined;
        });
      } catch {
        notifier = undefined; // no notifications here (some network folders): polling alone
      }
    },
    close(): void {
      notifier?.close();
      notifier = undefined;
    },
  };
}

/**
 * Reads a processed-files record written by {@link openProcessedRecord}; a missing file is an
 * empty record, and a last line cut short (by a kill) is ignored.
 *
 * @param path - the record file
 * @returns name → stamp (the latest line for a name wins)
 * @throws BandwrightError `FILE_READ` when it exists but cannot be read; `PARSE` naming the line
 *   when a complete line is not a record
 */
export function readProcessedRecord(path: string): Map<string, FileStamp> {
  const record = new Map<string, FileStamp>();
  if (!existsSync(path)) return record;
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw fileSystemError(error, path);
  }
  const lines = text.split('\n');
  // What follows the last line break is empty, or a line cut short: either way not a record.
  for (let i = 0; i < lines.length - 1; i++) {
    const line = (lines[i] as string).trim();
    if (line === '') continue;
    let value: unknown;
    try {
      value = JSON.parse(line);
    } catch {
      value = undefined;
    }
    const entry = value as { name?: unknown; size?: unknown; mtimeMs?: unknown } | undefined;
    if (
      typeof entry !== 'object' ||
      entry === null ||
      typeof entry.name !== 'string' ||
      typeof entry.size !== 'number' ||
      typeof entry.mtimeMs !== 'number'
    ) {
      throw new BandwrightError(
        'PARSE',
        `${path} line ${i + 1}: not a processed-file record ({"name", "size", "mtimeMs"}); ` +
          'delete the file to process the folder afresh',
        { file: path, line: i + 1 },
      );
    }
    record.set(entry.name, { size: entry.size, mtimeMs: entry.mtimeMs });
  }
  return record;
}

/** An open processed-files record. */
export interface ProcessedRecordFile {
  /** Appends one processed file (a whole line per write). */
  add(name: string, stamp: FileStamp): void;
  /** Closes the file. */
  close(): void;
}

/**
 * Opens a processed-files record for appending (created when missing; a last line cut short is
 * removed first, so the next record starts on its own line).
 *
 * @param path - the record file
 * @throws BandwrightError `FILE_READ` when it cannot be opened
 */
export function openProcessedRecord(path: string): ProcessedRecordFile {
  let descriptor: number;
  try {
    if (existsSync(path) && statSync(path).size > 0) {
      const bytes = readFileSync(path);
      // A record cut short by a kill is dropped, so the next one starts on its own line.
      if (bytes[bytes.length - 1] !== 0x0a) truncateSync(path, bytes.lastIndexOf(0x0a) + 1);
    }
    descriptor = openSync(path, 'a');
  } catch (error) {
    throw fileSystemError(error, path, { kind: 'file', action: 'write' });
  }
  let open = true;
  return {
    add(name: string, stamp: FileStamp): void {
      writeSync(descriptor, `${JSON.stringify({ name, size: stamp.size, mtimeMs: stamp.mtimeMs })}\n`);
    },
    close(): void {
      if (!open) return;
      open = false;
      closeSync(descriptor);
    },
  };
}
