/**
 * An exclusive lock file, so that processes writing one file (a calibration's history) take turns.
 *
 * The lock is a file created with `open(…, 'wx')` (fails if it exists: atomic on local file
 * systems) holding the owner's pid, host and time. A lock is stale, and is broken, when its owner
 * is a process on this host that no longer runs, or when it is older than `staleMs` (default 30 s;
 * the critical sections it guards take milliseconds). Breaking renames the lock aside first and
 * checks that what was renamed is still the lock judged stale, so two waiters cannot both break
 * one lock and then delete each other's fresh one.
 */
import {
  closeSync,
  linkSync,
  openSync,
  readFileSync,
  renameSync,
  statSync,
  unlinkSync,
  writeSync,
} from 'node:fs';
import { hostname } from 'node:os';
import { BandwrightError } from '../errors.js';

/** Options of {@link withFileLock}. */
export interface LockOptions {
  /** A lock older than this is stale, ms (default 30 000). */
  staleMs?: number;
  /** Give up waiting after this long, ms (default 20 000). */
  timeoutMs?: number;
  /** Pause between attempts, ms (default 15, with jitter). */
  retryMs?: number;
}

/** What a lock file says about its owner. */
export interface LockOwner {
  pid: number;
  host: string;
  time: string;
}

const sleeper = new Int32Array(new SharedArrayBuffer(4));

function sleep(ms: number): void {
  Atomics.wait(sleeper, 0, 0, ms);
}

function readOwner(path: string): { text: string; owner?: LockOwner } | undefined {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw error;
  }
  try {
    const owner = JSON.parse(text) as LockOwner;
    if (typeof owner.pid === 'number' && typeof owner.host === 'string') return { text, owner };
  } catch {
    // An empty or partial lock file: its owner died between creating and writing it, or is writing now.
  }
  return { text };
}

/**
 * Whether a process with this id runs on this machine (one we may not signal counts as running).
 *
 * @param pid - process id
 */
export function processRuns(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function ageMs(path: string): number | undefined {
  try {
    return Date.now() - statSync(path).mtimeMs;
  } catch {
    return undefined;
  }
}

/**
 * Why a lock is stale, or undefined when it is live.
 *
 * @param path - lock file
 * @param staleMs - age beyond which any lock is stale, ms
 */
function staleReason(
  path: string,
  seen: { text: string; owner?: LockOwner },
  staleMs: number,
): string | undefined {
  const owner = seen.owner;
  if (
    owner !== undefined &&
    owner.host === hostname() &&
    owner.pid !== process.pid &&
    !processRuns(owner.pid)
  )
    return `its owner, process ${owner.pid}, no longer runs`;
  const age = ageMs(path);
  if (age !== undefined && age > staleMs) return `it is ${(age / 1000).toFixed(0)} s old`;
  return undefined;
}

/** Breaks a stale lock unless it changed since it was judged stale. */
function breakStale(path: string, judged: string): void {
  const aside = `${path}.stale-${process.pid}-${Math.random().toString(36).slice(2)}`;
  try {
    renameSync(path, aside);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return;
    throw error;
  }
  let moved = '';
  try {
    moved = readFileSync(aside, 'utf8');
  } catch {
    // unreadable: treat as changed and try to put it back
  }
  if (moved !== judged) {
    // Another waiter broke the stale lock and took a fresh one in between: give it back.
    try {
      linkSync(aside, path);
    } catch {
      // a third process holds the lock now; the fresh owner still has its critical section
    }
  }
  try {
    unlinkSync(aside);
  } catch {
    // already gone
  }
}

/**
 * Runs `action` while holding an exclusive lock file.
 *
 * @param lockPath - the lock file (created and removed here), e.g. `<history>.lock`
 * @param action - the critical section (synchronous)
 * @param options - stale age, wait timeout and retry pause (ms)
 * @returns what `action` returns
 * @throws BandwrightError `FILE_READ` when the lock cannot be created (folder not writable), `LOCKED`
 *   when it is still held by a live process after `timeoutMs`; whatever `action` throws (the lock is released)
 * @example
 * withFileLock('calibrations/lab-co.calibration.history.csv.lock', () => appendLine());
 */
export function withFileLock<T>(lockPath: string, action: () => T, options: LockOptions = {}): T {
  const staleMs = options.staleMs ?? 30_000;
  const timeoutMs = options.timeoutMs ?? 20_000;
  const retryMs = options.retryMs ?? 15;
  const mine = JSON.stringify({
    pid: process.pid,
    host: hostname(),
    time: new Date().toISOString(),
    nonce: Math.random().toString(36).slice(2),
  });
  const start = Date.now();
  for (;;) {
    let descriptor: number | undefined;
    try {
      descriptor = openSync(lockPath, 'wx');
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if (code !== 'EEXIST')
        throw new BandwrightError(
          'FILE_READ',
          `${lockPath}: cannot create the lock file: ${(error as Error).message}`,
          { file: lockPath },
          { cause: error },
        );
    }
    if (descriptor !== undefined) {
      try {
        writeSync(descriptor, mine);
      } finally {
        closeSync(descriptor);
      }
      break;
    }
    const seen = readOwner(lockPath);
    if (seen === undefined) continue;
    const stale = staleReason(lockPath, seen, staleMs);
    if (stale !== undefined) {
      breakStale(lockPath, seen.text);
      continue;
    }
    if (Date.now() - start > timeoutMs) {
      const who =
        seen.owner === undefined
          ? 'another process'
          : `process ${seen.owner.pid} on ${seen.owner.host} since ${seen.owner.time}`;
      const waited = timeoutMs >= 1000 ? `${(timeoutMs / 1000).toFixed(0)} s` : `${timeoutMs} ms`;
      throw new BandwrightError(
        'LOCKED',
        `${lockPath}: locked by ${who} for more than ${waited}; ` +
          'if no other bandwright command is writing this history, delete the lock file and retry',
        { file: lockPath },
      );
    }
    sleep(retryMs * (0.5 + Math.random()));
  }
  try {
    return action();
  } finally {
    const held = readOwner(lockPath);
    if (held !== undefined && held.text === mine) {
      try {
        unlinkSync(lockPath);
      } catch {
        // already removed
      }
    }
  }
}
