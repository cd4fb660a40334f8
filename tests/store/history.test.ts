/**
 * The history file: format, round trip, formula guarding, torn and damaged lines, calibration
 * binding, appends.
 *
 * Sources: RFC 4180 (CSV quoting) with papaparse as the independent reader; OWASP CSV-injection
 * guidance (a leading apostrophe keeps `=`, `+`, `-`, `@` cells from being evaluated, common
 * practice); a record torn by a crash is a last line without its end of line (POSIX text files end
 * lines with a newline, common practice).
 */
import { readFileSync, writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import Papa from 'papaparse';
import { afterAll, describe, expect, it } from 'vitest';
import type { CheckRecord } from '../../src/drift/record.js';
import { readCheckList } from '../../src/store/check-list.js';
import {
  appendHistoryRecord,
  historyPathFor,
  readHistory,
  readHistoryIfExists,
} from '../../src/store/history.js';
import {
  HISTORY_COLUMNS,
  formatHistoryHeader,
  formatHistoryRecord,
  parseHistory,
} from '../../src/store/history-format.js';
import { temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-history-');
afterAll(() => folder.cleanup());
const at = (name: string) => join(folder.path, name);
const SHA = 'c'.repeat(64);
const OTHER = 'd'.repeat(64);

function record(extra: Partial<CheckRecord> = {}): CheckRecord {
  return {
    time: '2026-09-01T09:30:00.000Z',
    recordedAt: '2026-09-01T09:41:07.123Z',
    gas: 'CO',
    unit: 'ppm',
    certified: 100,
    measured: 100.73720425717934,
    low: 98.11612034371949,
    high: 103.3582881706392,
    se: 1.190868507877957,
    detectionLimit: 4.1365568095821805,
    recoveryPct: 100.73720425717934,
    z: 0.6190475709975641,
    verdict: 'pass',
    rules: [],
    sigmaPct: 5 / 3,
    tolerancePct: 5,
    scan: 'checks/check-2026-09-01.jdx',
    scanSha256: 'e'.repeat(64),
    toolVersion: '0.1.0',
    ...extra,
  };
}

const text = (records: CheckRecord[], sha = SHA) =>
  formatHistoryHeader(sha, 'lab-co.calibration.json') + records.map(formatHistoryRecord).join('');

describe('format', () => {
  it('names the history after the calibration', () => {
    expect(historyPathFor('calibrations/lab-co.calibration.json')).toBe(
      'calibrations/lab-co.calibration.history.csv',
    );
    expect(historyPathFor('cal.JSON')).toBe('cal.history.csv');
    expect(historyPathFor('calibration')).toBe('calibration.history.csv');
  });

  it('starts with the calibration hash and the format, then the header, one record per line', () => {
    const lines = text([
      record(),
      record({ time: '2026-09-08T09:30:00.000Z', verdict: 'warning', rules: ['1-2s'] }),
    ]).split('\n');
    expect(lines[0]).toBe(
      `# bandwright check history; format 1; calibration sha256 ${SHA}; file lab-co.calibration.json`,
    );
    expect(lines[1]).toBe(HISTORY_COLUMNS.join(','));
    expect(lines).toHaveLength(5);
    expect(lines[4]).toBe('');
  });

  it('is CSV that papaparse reads cell for cell (after the comment line)', () => {
    const records = [
      record({ scan: 'odd, "quoted" name.jdx' }),
      record({ rules: ['1-2s', '2-2s'], verdict: 'fail' }),
    ];
    const parsed = Papa.parse<Record<string, string>>(text(records).split('\n').slice(1).join('\n'), {
      header: true,
      skipEmptyLines: true,
    });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data[0]?.scan).toBe('odd, "quoted" name.jdx');
    expect(parsed.data[0]?.measured).toBe('100.73720425717934');
    expect(parsed.data[1]?.rules).toBe('1-2s 2-2s');
  });

  it('guards text cells against formula injection and restores them on reading', () => {
    const hostile = record({ scan: '=HYPERLINK("http://example.invalid","x")', gas: 'CO' });
    const line = formatHistoryRecord(hostile);
    const cells = Papa.parse<string[]>(line.trim()).data[0] as string[];
    expect(cells[HISTORY_COLUMNS.indexOf('scan')]).toBe(`'=HYPERLINK("http://example.invalid","x")`);
    const back = parseHistory(text([hostile]), 'h.csv').records[0];
    expect(back?.scan).toBe(hostile.scan);
  });

  it('writes negative numbers as numbers (not guarded) and unbounded interval ends as empty cells', () => {
    const zero = record({
      certified: 0,
      measured: -0.42,
      low: Number.NEGATIVE_INFINITY,
      high: Number.POSITIVE_INFINITY,
    });
    const { recoveryPct: _r, z: _z, sigmaPct: _s, ...withoutOptional } = zero;
    const line = formatHistoryRecord(withoutOptional);
    expect(line).toContain(',0,-0.42,,,');
    const back = parseHistory(text([withoutOptional]), 'h.csv').records[0] as CheckRecord;
    expect(back.low).toBe(Number.NEGATIVE_INFINITY);
    expect(back.high).toBe(Number.POSITIVE_INFINITY);
    expect(back.recoveryPct).toBeUndefined();
    expect(back.z).toBeUndefined();
  });

  it('round-trips any record exactly (property, seeded)', () => {
    const finite = fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 });
    const arbitraryRecord = fc.record({
      measured: finite,
      low: fc.oneof(finite, fc.constant(Number.NEGATIVE_INFINITY)),
      high: fc.oneof(finite, fc.constant(Number.POSITIVE_INFINITY)),
      se: fc.double({ noNaN: true, noDefaultInfinity: true, min: 0, max: 100 }),
      certified: fc.double({ noNaN: true, noDefaultInfinity: true, min: 0, max: 1e6 }),
      scan: fc.string({ minLength: 1, maxLength: 30 }).filter((s) => !/[\r\n]/.test(s)),
      verdict: fc.constantFrom('pass', 'warning', 'fail' as const),
      rules: fc.subarray(['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10-x'] as const),
      toolVersion: fc.constantFrom('0.1.0', '1.2.3-beta.1'),
    });
    fc.assert(
      fc.property(arbitraryRecord, (fields) => {
        const original = record({ ...fields, rules: [...fields.rules] });
        const back = parseHistory(text([original]), 'h.csv').records[0];
        expect(back).toEqual({ ...original, line: 3 });
      }),
      { seed: 1981, numRuns: 300 },
    );
  });

  it('refuses a scan path with a line break (a record is one line)', () => {
    expect(() => formatHistoryRecord(record({ scan: 'a\nb.jdx' }))).toThrow(
      /scan = "a\\nb.jdx": a line break cannot be kept in the history/,
    );
  });
});

describe('damaged histories are reported with the line, never dropped or merged', () => {
  it('reports a torn last line (no end of line) with its number and content', () => {
    const whole = text([
      record(),
      record({ time: '2026-09-08T09:30:00.000Z' }),
      record({ time: '2026-09-15T09:30:00.000Z' }),
    ]);
    const torn = whole.slice(0, whole.length - 40);
    expect(() => parseHistory(torn, 'lab.history.csv')).toThrow(
      /^lab\.history\.csv line 5: the last line is incomplete \(no end of line\), a record torn when a recheck was interrupted: "2026-09-15T09:30:00\.000Z,/,
    );
    try {
      parseHistory(torn, 'lab.history.csv');
    } catch (error) {
      expect(error).toMatchObject({ code: 'PARSE', location: { file: 'lab.history.csv', line: 5 } });
    }
  });

  it('reports a whole record missing only its end of line as torn too', () => {
    expect(() => parseHistory(text([record()]).slice(0, -1), 'h.csv')).toThrow(
      /h\.csv line 3: the last line is incomplete/,
    );
  });

  it('reports a damaged record inside the file by its line', () => {
    const lines = text([record(), record(), record()]).split('\n');
    lines[3] = lines[3]?.split(',').slice(0, 10).join(',') as string;
    expect(() => parseHistory(lines.join('\n'), 'h.csv')).toThrow(
      /^h\.csv line 4: 10 cells, a record has 19/,
    );
  });

  it('reports a bad cell by line and column', () => {
    const bad = text([record()]).replace(',pass,', ',passed,');
    expect(() => parseHistory(bad, 'h.csv')).toThrow(
      'h.csv line 3: verdict = "passed", must be one of pass, warning, fail',
    );
    const badNumber = text([record()]).replace(',100.73720425717934,98.1', ',abc,98.1');
    expect(() => parseHistory(badNumber, 'h.csv')).toThrow(
      /h\.csv line 3: measured = "abc", must be a number/,
    );
    const badTime = text([record()]).replace('2026-09-01T09:30:00.000Z', '01/09/2026');
    expect(() => parseHistory(badTime, 'h.csv')).toThrow(
      /h\.csv line 3: time = "01\/09\/2026", must be an ISO 8601 UTC time/,
    );
  });

  it('reports a blank line', () => {
    const lines = text([record(), record()]).split('\n');
    lines.splice(3, 0, '');
    expect(() => parseHistory(lines.join('\n'), 'h.csv')).toThrow(/h\.csv line 4: blank line/);
  });

  it('refuses a history of another calibration, a newer format, and a missing or wrong first line', () => {
    expect(() =>
      parseHistory(text([record()], OTHER), 'h.csv', { calibrationSha256: SHA, calibrationFile: 'lab.json' }),
    ).toThrow(
      /h\.csv line 1: this history belongs to the calibration with sha256 dddddddddddd…, but lab\.json has sha256 cccccccccccc…: the calibration was rebuilt/,
    );
    expect(() => parseHistory(text([record()]).replace('format 1', 'format 2'), 'h.csv')).toThrow(
      /history format 2 is newer than this tool reads/,
    );
    expect(() => parseHistory(text([record()]).split('\n').slice(1).join('\n'), 'h.csv')).toThrow(
      /h\.csv line 1: .* is not a bandwright history first line/,
    );
    expect(() => parseHistory('', 'h.csv')).toThrow(/h\.csv line 1: empty/);
  });

  it('accepts CRLF line ends (a history opened and saved on another system)', () => {
    const crlf = text([record(), record()]).replace(/\n/g, '\r\n');
    expect(parseHistory(crlf, 'h.csv').records).toHaveLength(2);
  });
});

describe('appending', () => {
  it('creates the history with its first line and header, then appends one line per record', () => {
    const path = at('new.history.csv');
    const first = appendHistoryRecord(path, {
      calibrationSha256: SHA,
      calibrationFile: 'new.json',
      complete: (records) => record({ measured: records.length }),
    });
    expect(first).toMatchObject({ created: true, previous: [] });
    expect(first.record.line).toBe(3);
    const second = appendHistoryRecord(path, {
      calibrationSha256: SHA,
      complete: (records) => record({ measured: records.length }),
    });
    expect(second.created).toBe(false);
    expect(second.record.line).toBe(4);
    const history = readHistory(path, { calibrationSha256: SHA });
    expect(history.records.map((r) => [r.line, r.measured])).toEqual([
      [3, 0],
      [4, 1],
    ]);
    expect(existsSync(`${path}.lock`)).toBe(false);
  });

  it('refuses to append after a torn line and leaves the file exactly as it was', () => {
    const path = at('torn.history.csv');
    const torn = text([record(), record()]).slice(0, -25);
    writeFileSync(path, torn);
    let called = false;
    expect(() =>
      appendHistoryRecord(path, {
        calibrationSha256: SHA,
        complete: () => {
          called = true;
          return record();
        },
      }),
    ).toThrow(/torn\.history\.csv line 4: the last line is incomplete/);
    expect(called).toBe(false);
    expect(readFileSync(path, 'utf8')).toBe(torn);
    expect(existsSync(`${path}.lock`)).toBe(false);
  });

  it('refuses to append to the history of another calibration, unchanged', () => {
    const path = at('other.history.csv');
    const content = text([record()], OTHER);
    writeFileSync(path, content);
    expect(() => appendHistoryRecord(path, { calibrationSha256: SHA, complete: () => record() })).toThrow(
      /belongs to the calibration with sha256 dddddddddddd…/,
    );
    expect(readFileSync(path, 'utf8')).toBe(content);
  });

  it('reads a missing history as none, but reports other problems', () => {
    expect(readHistoryIfExists(at('absent.history.csv'))).toBeUndefined();
    writeFileSync(at('junk.history.csv'), 'not a history\n');
    expect(() => readHistoryIfExists(at('junk.history.csv'))).toThrow(
      /is not a bandwright history first line/,
    );
  });
});

describe('check lists', () => {
  it('reads scan, certified_<unit> and measured_at, with scans relative to the list', () => {
    writeFileSync(
      at('checks.csv'),
      'scan,certified_ppm,measured_at\nchecks/a.jdx,100,2026-09-01T09:30:00.000Z\nchecks/b.jdx,0,2026-09-08T11:30:00+02:00\n',
    );
    expect(readCheckList(at('checks.csv'))).toEqual([
      {
        line: 2,
        scan: join(folder.path, 'checks/a.jdx'),
        certified: 100,
        unit: 'ppm',
        measuredAt: '2026-09-01T09:30:00.000Z',
      },
      {
        line: 3,
        scan: join(folder.path, 'checks/b.jdx'),
        certified: 0,
        unit: 'ppm',
        measuredAt: '2026-09-08T09:30:00.000Z',
      },
    ]);
  });

  it('refuses missing columns, a time without a zone, and a negative certified value, naming the line', () => {
    writeFileSync(at('c1.csv'), 'scan,measured_at\na.jdx,2026-09-01T09:30:00Z\n');
    expect(() => readCheckList(at('c1.csv'))).toThrow(
      /c1\.csv line 1: a check list needs the columns scan, certified_<ppm\|ppb\|pct> \(one\) and measured_at/,
    );
    writeFileSync(at('c2.csv'), 'scan,certified_ppm,measured_at\na.jdx,100,2026-09-01T09:30\n');
    expect(() => readCheckList(at('c2.csv'))).toThrow(
      /c2\.csv line 2: measured_at = "2026-09-01T09:30", must be an ISO 8601 time with a zone/,
    );
    writeFileSync(at('c3.csv'), 'scan,certified_ppm,measured_at\na.jdx,-5,2026-09-01T09:30:00Z\n');
    expect(() => readCheckList(at('c3.csv'))).toThrow(/c3\.csv line 2: certified_ppm = -5, must be >= 0/);
  });
});
