/**
 * The history's lock file: taken and released, stale locks broken, live locks waited for.
 *
 * Sources: `open(…, O_CREAT | O_EXCL)` (Node's `'wx'`) fails when the file exists (POSIX
 * open(2)); `kill(pid, 0)` tests whether a process exists without signalling it (POSIX kill(2)).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, utimesSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { withFileLock } from '../../src/store/lock.js';
import { temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-lock-');
afterAll(() => folder.cleanup());
const at = (name: string) => join(folder.path, name);

/** The pid of a process that has exited (a child that ran and ended). */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], {
    encoding: 'utf8',
  });
  return Number(child.stdout);
}

describe('withFileLock', () => {
  it('holds the lock during the action (with its owner) and removes it after', () => {
    const lock = at('a.lock');
    const seen = withFileLock(
      lock,
      () => JSON.parse(readFileSync(lock, 'utf8')) as { pid: number; host: string },
    );
    expect(seen.pid).toBe(process.pid);
    expect(seen.host).toBe(hostname());
    expect(existsSync(lock)).toBe(false);
  });

  it('releases the lock when the action throws', () => {
    const lock = at('b.lock');
    expect(() =>
      withFileLock(lock, () => {
        throw new Error('boom');
      }),
    ).toThrow('boom');
    expect(existsSync(lock)).toBe(false);
  });

  it('breaks a lock left by a process that no longer runs', () => {
    const lock = at('c.lock');
    const pid = deadPid();
    writeFileSync(lock, JSON.stringify({ pid, host: hostname(), time: '2026-09-01T09:30:00.000Z' }));
    expect(withFileLock(lock, () => 'ran', { timeoutMs: 2000 })).toBe('ran');
    expect(existsSync(lock)).toBe(false);
  });

  it('breaks a lock older than the stale age even when its owner seems alive (pid reuse, another host)', () => {
    const lock = at('d.lock');
    writeFileSync(
      lock,
      JSON.stringify({ pid: process.ppid, host: 'another-host', time: '2026-09-01T09:30:00.000Z' }),
    );
    const old = new Date(Date.now() - 120_000);
    utimesSync(lock, old, old);
    expect(withFileLock(lock, () => 'ran', { staleMs: 30_000, timeoutMs: 2000 })).toBe('ran');
  });

  it('breaks an empty lock file (its owner died before writing) once it is stale', () => {
    const lock = at('e.lock');
    writeFileSync(lock, '');
    const old = new Date(Date.now() - 60_000);
    utimesSync(lock, old, old);
    expect(withFileLock(lock, () => 'ran', { timeoutMs: 2000 })).toBe('ran');
  });

  it('waits for a live lock and gives up with a message naming the owner and the remedy', () => {
    const lock = at('f.lock');
    // The test runner's parent process is alive on this host: a live owner.
    const owner = { pid: process.ppid, host: hostname(), time: '2026-09-01T09:30:00.000Z' };
    writeFileSync(lock, JSON.stringify(owner));
    let ran = false;
    expect(() =>
      withFileLock(
        lock,
        () => {
          ran = true;
        },
        { timeoutMs: 150, retryMs: 10 },
      ),
    ).toThrow(
      new RegExp(
        `f\\.lock: locked by process ${owner.pid} on ${hostname().replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} since 2026-09-01T09:30:00.000Z for more than 150 ms; if no other bandwright command is writing this history, delete the lock file and retry`,
      ),
    );
    expect(ran).toBe(false);
    // The other owner's lock is left alone.
    expect(JSON.parse(readFileSync(lock, 'utf8'))).toEqual(owner);
  });

  it('refuses, naming the file, when the lock cannot be created', () => {
    expect(() => withFileLock(at('no-such-folder/x.lock'), () => 1)).toThrow(
      /no-such-folder\/x\.lock: cannot create the lock file/,
    );
  });
});
