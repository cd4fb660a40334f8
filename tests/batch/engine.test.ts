/**
 * How many worker threads a batch takes: explicit counts as given (never more than the scans),
 * `auto` only for long batches with two or more idle cores (cores less the 1-minute load
 * average), and none for a scan from standard input. The rule and its measurements are in
 * src/batch/engine.ts and bench/batch.ts.
 */
import { describe, expect, it } from 'vitest';
import { MIN_SCANS_FOR_WORKERS, workerCount } from '../../src/batch/engine.js';

describe('workerCount', () => {
  const long = MIN_SCANS_FOR_WORKERS;
  it.each([
    ['2 idle cores', 2, 0, long, 2],
    ['2 cores, one busy', 2, 1, long, 0],
    ['2 cores, 0.4 busy', 2, 0.4, long, 2],
    ['8 cores, 3 busy', 8, 3, long, 5],
    ['16 idle cores (at most 8)', 16, 0, long, 8],
    ['1 core', 1, 0, long, 0],
    ['a short batch', 2, 0, long - 1, 0],
  ])('auto with %s', (_name, cores, load, scans, expected) => {
    expect(workerCount('auto', scans, false, { cores, load })).toBe(expected);
  });

  it('takes an explicit count as given, capped by the scans, and none for standard input', () => {
    expect(workerCount(3, 100, false, { cores: 2, load: 5 })).toBe(3);
    expect(workerCount(4, 2, false)).toBe(2);
    expect(workerCount(0, 10_000, false)).toBe(0);
    expect(workerCount(2, 10_000, true)).toBe(0);
    expect(workerCount('auto', 0, false, { cores: 8, load: 0 })).toBe(0);
  });
});
