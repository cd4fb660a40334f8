/**
 * Fuzzing recheck histories: byte edits of a valid history (torn lines, duplicated cells, stray
 * delimiters and quotes, numbers beyond the double range), token soup and arbitrary text through
 * the history reader. Every case gives records whose numbers are finite where the format requires
 * them, with times in ISO 8601 UTC and increasing line numbers, or a BandwrightError with a code.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { formatHistoryHeader, parseHistory, type History } from '../../src/store/history-format.js';
import {
  FUZZ_PARAMETERS,
  FUZZ_RUNS,
  FUZZ_SEED,
  FuzzTally,
  invariant,
  mutated,
  tokenText,
} from './harness.js';

const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

const sha = 'c'.repeat(64);
// An invented record in the format-1 layout (values chosen for the test only).
const record = (day: number, measured: number): string =>
  `2026-11-${String(day).padStart(2, '0')}T09:30:00.000Z,2026-11-${String(day).padStart(2, '0')}T09:31:00.000Z,CO,ppm,100,${measured},${measured - 2.5},${measured + 2.5},1.19,4.1,${measured},0.24,pass,,1.6666666666666667,5,checks/c${day}.csv,${'a'.repeat(64)},0.1.0\n`;
const valid = fc
  .array(fc.tuple(fc.integer({ min: 1, max: 28 }), fc.double({ min: 90, max: 110, noNaN: true })), {
    maxLength: 4,
  })
  .map(
    (rows) =>
      formatHistoryHeader(sha, 'co.calibration.json') +
      rows.map(([day, measured]) => record(day, measured)).join(''),
  );
const tokens = [
  ',',
  '"',
  '\n',
  '\r\n',
  '',
  ' ',
  '1e400',
  'NaN',
  '-0',
  '-1',
  'pass',
  'fail',
  'warning',
  '1-3s',
  '2026-11-01T09:30:00.000Z',
  '2026-13-40',
  'CO',
  'XQ',
  'ppm',
  'pct',
  '#',
  "'=SUM(A1)",
  'format 9',
  sha,
];
const text = fc.oneof(
  { weight: 4, arbitrary: mutated(valid, tokens) },
  { weight: 1, arbitrary: tokenText(tokens, 60) },
  { weight: 1, arbitrary: fc.string({ unit: 'grapheme', maxLength: 200 }) },
);

function checkHistory(history: History): void {
  invariant(
    history.calibrationSha256 === sha || /^[0-9a-f]{64}$/.test(history.calibrationSha256),
    'a hex calibration hash',
  );
  let previous = 2;
  for (const r of history.records) {
    invariant(
      [r.certified, r.measured, r.tolerancePct].every(Number.isFinite),
      'finite certified, measured and tolerance',
    );
    invariant(
      [r.low, r.high, r.se, r.detectionLimit, r.recoveryPct, r.z, r.sigmaPct].every(
        (v) => v === undefined || !Number.isNaN(v),
      ),
      'no NaN',
    );
    invariant(/^\d{4}-\d{2}-\d{2}T/.test(r.time) && !Number.isNaN(Date.parse(r.time)), 'an ISO 8601 time');
    invariant(r.line === undefined || r.line > previous, 'increasing line numbers');
    previous = r.line ?? previous;
  }
}

describe(`history reader fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('returns records that keep their invariants, or a BandwrightError with a code', () => {
    const tally = new FuzzTally('recheck histories');
    fc.assert(
      fc.property(text, (input) =>
        tally.attempt(
          () => parseHistory(input, 'fuzz.history.csv', { calibrationSha256: sha }),
          checkHistory,
        ),
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});
