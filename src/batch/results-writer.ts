/**
 * Streaming results files (CSV or JSON lines) that honour the rule "no partial or overwritten
 * output":
 *
 * - `replace` mode (batch `quantify --csv/--jsonl`): rows stream into a temporary file beside the
 *   target, named `.<name>.partial-<pid>`, flushed as they come and fsynced every so often; on
 *   {@link ResultsWriter.commit} the file is fsynced and renamed into place. An existing target is
 *   refused unless `overwrite` is set. A process killed outright (SIGKILL, power loss) leaves any
 *   previous target untouched and only the recognisable temporary file behind.
 * - `append` mode (`watch`): rows are appended to the target itself, one whole row per write, the
 *   point being that the file grows while the instrument works. A new file gets its header through
 *   an atomic write first; an existing one must start with the same header (CSV) or with a results
 *   line (JSON lines), and end with a line break (a last line cut short is refused, not extended).
 */
import {
  closeSync,
  existsSync,
  fsyncSync,
  mkdirSync,
  openSync,
  readSync,
  renameSync,
  statSync,
  unlinkSync,
  writeSync,
} from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from '../store/file-errors.js';
import { writeFileAtomic } from '../store/atomic-write.js';

/** Options of {@link openResultsWriter}. */
export interface ResultsWriterOptions {
  /** `replace`: temporary file renamed into place at the end; `append`: grow the file itself. */
  mode: 'replace' | 'append';
  /**
   * CSV: the header line (with its line break) that starts the file, and that an appended-to file
   * must start with. Absent for JSON lines.
   */
  header?: string;
  /** `replace` mode: replace an existing target (default false: refuse with `FILE_EXISTS`). */
  overwrite?: boolean;
  /** Create the target's folder when missing (default false). */
  createFolder?: boolean;
  /**
   * Buffered text is written out when it exceeds this many characters (default 65,536; append mode
   * writes every row).
   */
  bufferCharacters?: number;
  /** Buffered text is written out when older than this, ms (default 250). */
  flushIntervalMs?: number;
  /** The file is fsynced at most this often while rows come in, ms (default 1,000), and always at the end. */
  syncIntervalMs?: number;
  /** Clock in ms, for tests (default `Date.now`). */
  now?: () => number;
}

/** An open results file. */
export interface ResultsWriter {
  /** The target path. */
  readonly path: string;
  /** Where rows go until {@link commit}: the temporary file (`replace`) or the target (`append`). */
  readonly writingPath: string;
  /** Rows written so far (not counting the header). */
  readonly rows: number;
  /**
   * Adds one row.
   *
   * @param text - the row, ending with a line break (a quoted CSV cell may hold more breaks)
   */
  write(text: string): void;
  /** Writes out buffered text (no fsync). */
  flush(): void;
  /**
   * Flushes, fsyncs and closes; in `replace` mode renames the temporary file into place.
   *
   * @throws BandwrightError `FILE_EXISTS` when the target appeared meanwhile and overwrite is off
   *   (the temporary file is kept and named in the message); `FILE_READ` when writing fails
   */
  commit(): void;
  /** Closes without renaming and removes the temporary file (`replace`); append mode just closes. */
  abort(): void;
}

/**
 * The temporary name rows stream into in `replace` mode: `.<name>.partial-<pid>` beside the target.
 *
 * @param path - the target
 * @param pid - process id (default this process's)
 */
export function partialResultsPath(path: string, pid: number = process.pid): string {
  return join(dirname(path), `.${basename(path)}.partial-${pid}`);
}

function writeFailure(path: string, error: unknown): BandwrightError {
  if (error instanceof BandwrightError) return error;
  return new BandwrightError(
    'FILE_READ',
    `${path}: cannot write: ${(error as Error).message}`,
    { file: path },
    { cause: error },
  );
}

/** First bytes and last byte of a file (enough to check a header and a final line break). */
function fileEnds(
  path: string,
  headBytes: number,
): { head: string; size: number; lastByte: number | undefined } {
  const descriptor = openSync(path, 'r');
  try {
    const size = statSync(path).size;
    const head = Buffer.alloc(Math.min(headBytes, size));
    let offset = 0;
    while (offset < head.length) {
      const count = readSync(descriptor, head, offset, head.length - offset, offset);
      if (count === 0) break;
      offset += count;
    }
    let lastByte: number | undefined;
    if (size > 0) {
      const one = Buffer.alloc(1);
      readSync(descriptor, one, 0, 1, size - 1);
      lastByte = one[0];
    }
    return { head: head.subarray(0, offset).toString('utf8'), size, lastByte };
  } finally {
    closeSync(descriptor);
  }
}

/**
 * Checks that rows may be appended to an existing results file.
 *
 * @param path - the results file
 * @param header - the CSV header line the file must start with, or undefined for JSON lines
 * @throws BandwrightError `PARSE` naming the file when its header differs (saying which columns were
 *   expected), when a JSON-lines file does not start with a results line, or when the last line is
 *   incomplete; `FILE_READ` when it cannot be read
 */
export function assertAppendable(path: string, header: string | undefined): void {
  let ends: ReturnType<typeof fileEnds>;
  try {
    if (statSync(path).isDirectory())
      throw new BandwrightError('FILE_READ', `${path} is a folder, expected a results file`, { file: path });
    ends = fileEnds(path, Math.max(header?.length ?? 0, 64 * 1024) + 4);
  } catch (error) {
    throw fileSystemError(error, path);
  }
  if (ends.size === 0) return;
  if (ends.lastByte !== 0x0a) {
    throw new BandwrightError(
      'PARSE',
      `${path}: the last line is incomplete (no line break at the end); the file was cut short, ` +
        'repair or move it before appending',
      { file: path },
    );
  }
  const firstLine = ends.head.slice(0, ends.head.indexOf('\n') + 1);
  if (header !== undefined) {
    if (firstLine !== header) {
      const found = firstLine.replace(/\r?\n$/, '');
      throw new BandwrightError(
        'PARSE',
        `${path} line 1: the header ${JSON.stringify(found.length > 200 ? `${found.slice(0, 200)}…` : found)} ` +
          `does not match this calibration's columns ${JSON.stringify(header.trimEnd())}; ` +
          'results of another calibration or unit cannot be appended, choose another file',
        { file: path, line: 1 },
      );
    }
    return;
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(firstLine);
  } catch {
    parsed = undefined;
  }
  const record = parsed as Record<string, unknown> | undefined;
  if (
    typeof record !== 'object' ||
    record === null ||
    typeof record.scan !== 'string' ||
    typeof record.calibrationSha256 !== 'string'
  ) {
    throw new BandwrightError(
      'PARSE',
      `${path} line 1: not a bandwright results line ` +
        '(a JSON object with "scan" and "calibrationSha256"); choose another file',
      { file: path, line: 1 },
    );
  }
}

/**
 * Opens a results file for streaming rows.
 *
 * @param path - the target file
 * @param options - mode, CSV header, overwrite, folder creation, flush and fsync intervals
 * @returns the writer; in `replace` mode the temporary file already holds the header
 * @throws BandwrightError `FILE_EXISTS` (replace mode, target exists, no overwrite); the errors of
 *   {@link assertAppendable} (append mode); `FILE_READ` when the file cannot be created
 * @example
 * const writer = openResultsWriter('results.csv', { mode: 'replace', header: 'scan,CO_ppm\n' });
 * writer.write('s1.jdx,71.3\n');
 * writer.commit(); // results.csv now exists, complete
 */
export function openResultsWriter(path: string, options: ResultsWriterOptions): ResultsWriter {
  const now = options.now ?? Date.now;
  const bufferCharacters = options.bufferCharacters ?? 65_536;
  const flushIntervalMs = options.flushIntervalMs ?? 250;
  const syncIntervalMs = options.syncIntervalMs ?? 1_000;
  const append = options.mode === 'append';
  const folder = dirname(path);
  if (options.createFolder) mkdirSync(folder, { recursive: true });
  let writingPath: string;
  let descriptor: number;
  if (append) {
    if (existsSync(path)) assertAppendable(path, options.header);
    else if (options.header !== undefined) writeFileAtomic(path, options.header, { overwrite: false });
    writingPath = path;
    try {
      descriptor = openSync(path, 'a');
    } catch (error) {
      throw writeFailure(path, error);
    }
  } else {
    if (!options.overwrite && existsSync(path)) {
      throw new BandwrightError(
        'FILE_EXISTS',
        (name) => `${path} exists; use ${name('overwrite')} to replace it`,
        {
          file: path,
          parameter: 'overwrite',
        },
      );
    }
    writingPath = partialResultsPath(path);
    try {
      descriptor = openSync(writingPath, 'w');
    } catch (error) {
      throw writeFailure(path, error);
    }
  }
  let open = true;
  let pending = append ? '' : (options.header ?? '');
  let pendingSince = now();
  let lastSync = now();
  let rows = 0;
  let dirty = false;

  const writeOut = (): void => {
    if (pending === '') return;
    const bytes = Buffer.from(pending, 'utf8');
    pending = '';
    let offset = 0;
    try {
      while (offset < bytes.length) offset += writeSync(descriptor, bytes, offset, bytes.length - offset);
    } catch (error) {
      throw writeFailure(writingPath, error);
    }
    dirty = true;
  };
  const sync = (): void => {
    if (!dirty) return;
    try {
      fsyncSync(descriptor);
    } catch (error) {
      throw writeFailure(writingPath, error);
    }
    dirty = false;
    lastSync = now();
  };
  const close = (): void => {
    if (!open) return;
    open = false;
    try {
      closeSync(descriptor);
    } catch {
      // closing after a failed write; the original error is the one reported
    }
  };

  return {
    path,
    writingPath,
    get rows() {
      return rows;
    },
    write(text: string): void {
      if (!open)
        throw new BandwrightError('INVALID_VALUE', `${path}: results file already closed`, { file: path });
      if (pending === '') pendingSince = now();
      pending += text;
      rows++;
      const time = now();
      if (append || pending.length >= bufferCharacters || time - pendingSince >= flushIntervalMs) writeOut();
      if (time - lastSync >= syncIntervalMs) sync();
    },
    flush(): void {
      if (open) writeOut();
    },
    commit(): void {
      if (!open) return;
      try {
        writeOut();
        dirty = true;
        sync();
      } catch (error) {
        close();
        throw error;
      }
      close();
      if (append) return;
      if (!options.overwrite && existsSync(path)) {
        throw new BandwrightError(
          'FILE_EXISTS',
          (name) =>
            `${path} appeared while the results were written; they are kept in ${writingPath}; ` +
            `use ${name('overwrite')} to replace it`,
          { file: path, parameter: 'overwrite' },
        );
      }
      try {
        renameSync(writingPath, path);
      } catch (error) {
        throw writeFailure(path, error);
      }
    },
    abort(): void {
      close();
      if (append) return;
      try {
        unlinkSync(writingPath);
      } catch {
        // already gone
      }
    },
  };
}
