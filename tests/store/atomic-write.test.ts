/**
 * Atomic writes: the file is the old one or the new one, never half; temporaries left by a
 * process killed outright are removed by the next write of the same target, and only those
 * (common practice for write-then-rename output: a leftover is never a file anyone needs).
 */
import { existsSync, readFileSync, readdirSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import {
  LEFT_TEMPORARY_AGE_MS,
  removeLeftTemporaries,
  writeFileAtomic,
} from '../../src/store/atomic-write.js';
import { temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-atomic-');
afterAll(() => folder.cleanup());

/** A process id that does not run: above Linux's default pid_max of 4,194,304 (common practice). */
const GONE_PID = 99_999_999;

function leftover(name: string, ageMs: number): string {
  const path = join(folder.path, name);
  writeFileSync(path, '{"half": ');
  const seconds = (Date.now() - ageMs) / 1000;
  utimesSync(path, seconds, seconds);
  return path;
}

describe('writeFileAtomic', () => {
  it('writes the whole file and refuses an existing one without overwrite', () => {
    const target = join(folder.path, 'a.json');
    writeFileAtomic(target, 'first\n');
    expect(readFileSync(target, 'utf8')).toBe('first\n');
    // The core names its own parameter; a caller words it with its own names (the CLI: --force).
    let refusal: unknown;
    try {
      writeFileAtomic(target, 'second\n');
    } catch (error) {
      refusal = error;
    }
    expect(refusal).toBeInstanceOf(BandwrightError);
    const error = refusal as BandwrightError;
    expect(error.code).toBe('FILE_EXISTS');
    expect(error.message).toMatch(/a\.json exists; use `overwrite` to replace it/);
    expect(error.describe({ overwrite: '--force' })).toMatch(/a\.json exists; use --force to replace it/);
    expect(error.location.parameter).toBe('overwrite');
    writeFileAtomic(target, 'second\n', { overwrite: true });
    expect(readFileSync(target, 'utf8')).toBe('second\n');
    expect(readdirSync(folder.path).filter((name) => name.includes('.tmp-'))).toEqual([]);
  });

  it('removes an old temporary of a process that no longer runs, and nothing else', () => {
    const target = join(folder.path, 'cal.json');
    const old = LEFT_TEMPORARY_AGE_MS + 60_000;
    const abandoned = leftover(`.cal.json.tmp-${GONE_PID}-abc123`, old);
    const recent = leftover(`.cal.json.tmp-${GONE_PID}-abc124`, 1_000);
    const living = leftover(`.cal.json.tmp-${process.pid}-abc125`, old);
    const otherTarget = leftover(`.other.json.tmp-${GONE_PID}-abc126`, old);
    const notOurs = leftover(`.cal.json.tmp-notes`, old);
    writeFileAtomic(target, '{}\n');
    expect(existsSync(abandoned)).toBe(false);
    for (const kept of [recent, living, otherTarget, notOurs]) expect(existsSync(kept)).toBe(true);
    // Once old enough, the recent one goes too; the running process's own never does.
    expect(removeLeftTemporaries(target, Date.now() + LEFT_TEMPORARY_AGE_MS)).toEqual([recent]);
    expect(existsSync(living)).toBe(true);
  });
});
