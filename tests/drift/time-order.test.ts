/**
 * Checks recorded out of time order: a late entry (recorded later for an earlier time) is judged
 * in time order, the checks after it are judged again with it, and a verdict it changes is
 * reported once by the recheck that causes it, and afterwards as one note per check with its cause.
 *
 * Sources: 2-2s, two consecutive checks beyond the same 2σ limit (Westgard et al., Clinical
 * Chemistry 27 (1981) 493); σ = tolerance/3 = 1.667 % before the baseline (DESIGN §3), so 96.5 %
 * recovery is at −2.10σ.
 */
import { describe, expect, it } from 'vitest';
import { evaluateHistory, judgeCheck } from '../../src/drift/evaluate.js';
import type { CheckRecord } from '../../src/drift/record.js';
import { DAY_MS } from '../../src/drift/trend.js';

const START = Date.parse('2026-03-02T09:00:00Z');
const policy = { everyDays: 7, tolerancePct: 5 };

function record(
  day: number,
  recovery: number,
  recordedDay: number,
  extra: Partial<CheckRecord> = {},
): CheckRecord {
  return {
    time: new Date(START + day * DAY_MS).toISOString(),
    recordedAt: new Date(START + recordedDay * DAY_MS + 60_000).toISOString(),
    gas: 'CO',
    unit: 'ppm',
    certified: 100,
    measured: recovery,
    low: recovery - 1,
    high: recovery + 1,
    se: 0.5,
    recoveryPct: recovery,
    verdict: 'pass',
    rules: [],
    tolerancePct: 5,
    scan: `check-${day}.jdx`,
    scanSha256: 'a'.repeat(64),
    toolVersion: '0.1.0',
    ...extra,
  };
}

function measurementOf(r: CheckRecord) {
  const { verdict: _v, rules: _r, tolerancePct: _t, line: _l, ...measurement } = r;
  return measurement;
}

// Recorded in order: 03-02 100 % pass, 03-09 100 % pass, 03-23 96.5 % warning (1-2s alone).
const history: CheckRecord[] = [
  record(0, 100, 0, { line: 3 }),
  record(7, 100, 7, { line: 4 }),
  record(21, 96.5, 21, { line: 5, verdict: 'warning', rules: ['1-2s'] }),
];
// Then, on 03-24, the check measured on 03-16 (96.5 %) is recorded late.
const late = record(14, 96.5, 22);

describe('a check recorded late for an earlier time', () => {
  it('is judged with the checks before it in time only', () => {
    const judged = judgeCheck(history, measurementOf(late), { policy });
    expect(judged.check.index).toBe(2);
    // Only 03-09 (100 %) precedes it: 1-2s alone, a warning; not 2-2s with the later 03-23.
    expect(judged.record.verdict).toBe('warning');
    expect(judged.record.rules).toEqual(['1-2s']);
  });

  it('changes the verdict of the later check it now precedes, and the recheck says so once', () => {
    const judged = judgeCheck(history, measurementOf(late), { policy });
    expect(judged.changed).toHaveLength(1);
    const [change] = judged.changed;
    expect(change?.check.record.time).toBe('2026-03-23T09:00:00.000Z');
    expect([change?.before, change?.after]).toEqual(['warning', 'fail']);
    expect(change?.note).toBe(
      'this check is recorded for 2026-03-16, before the check of 2026-03-23 (history line 5), which is ' +
        'judged again in time order with it: its verdict changes from warning to fail (1-2s, 2-2s)',
    );
    // The same change is the one standing revision of the history, with its cause.
    expect(judged.evaluation.revisions).toMatchObject([
      { time: '2026-03-23T09:00:00.000Z', recorded: 'warning', now: 'fail', cause: 'late-entry' },
    ]);

    // A later check recorded in order changes nothing: the recheck reports no change.
    const appended = [...history, { ...judged.record, line: 6 }];
    const next = judgeCheck(appended, measurementOf(record(28, 100, 28)), { policy });
    expect(next.changed).toEqual([]);
    // The history's evaluation keeps one note for the revised check, naming the late entry.
    expect(next.evaluation.notes).toEqual([
      'the check of 2026-03-23 (history line 5) was recorded as warning and is judged fail now: ' +
        'the check of 2026-03-16 (history line 6), recorded on 2026-03-24 for an earlier time, now comes before it',
    ]);
  });

  it('is judged the same whatever the order of the file', () => {
    const all = [...history, { ...late, verdict: 'warning' as const, rules: ['1-2s' as const], line: 6 }];
    const a = evaluateHistory(all, { policy });
    const b = evaluateHistory([all[3], all[1], all[0], all[2]] as CheckRecord[], { policy });
    expect(b.checks.map((c) => [c.record.time, c.verdict])).toEqual(
      a.checks.map((c) => [c.record.time, c.verdict]),
    );
    expect(a.checks.map((c) => c.verdict)).toEqual(['pass', 'pass', 'warning', 'fail']);
    expect(b.notes).toEqual(a.notes);
  });

  it('does not blame a late entry for a difference it did not cause', () => {
    // The 03-23 check was recorded as pass, which no set of these records gives: the rules now
    // differ from those it was recorded with, late entry or not.
    const edited = [
      history[0],
      history[1],
      { ...(history[2] as CheckRecord), verdict: 'pass' as const },
      { ...late, line: 6 },
    ];
    const evaluation = evaluateHistory(edited as CheckRecord[], { policy });
    const revision = evaluation.revisions.find((r) => r.time === '2026-03-23T09:00:00.000Z');
    expect(revision?.cause).toBe('rules');
  });
});

describe('checks recorded under earlier rules', () => {
  it('are reported in one note per change of verdict, not one per check', () => {
    // Twenty identical checks; the ninth on were recorded as fail when σ collapsed to the
    // baseline SD (about 1e-14 %).
    const records = Array.from({ length: 20 }, (_, day) =>
      record(day, 100.74, day, {
        se: 1.2,
        line: day + 3,
        ...(day >= 8
          ? { verdict: 'fail' as const, rules: ['1-2s' as const, '1-3s' as const], sigmaPct: 1.5e-14 }
          : {}),
      }),
    );
    const evaluation = evaluateHistory(records, { policy });
    expect(evaluation.revisions).toHaveLength(12);
    expect(evaluation.revisions.every((r) => r.cause === 'rules' && r.now === 'pass')).toBe(true);
    expect(evaluation.notes).toEqual([
      '12 checks (2026-03-10, 2026-03-11, 2026-03-12, 2026-03-13, 2026-03-14, 2026-03-15 and 6 more) were ' +
        'recorded as fail and are judged pass now: the σ and control rules in force now differ from those ' +
        'they were recorded with',
    ]);
  });

  it('names σ then and now for a single such check', () => {
    const records = Array.from({ length: 9 }, (_, day) =>
      record(day, 100.74, day, {
        se: 1.2,
        ...(day === 8 ? { verdict: 'fail' as const, sigmaPct: 1.5e-14, line: 11 } : {}),
      }),
    );
    expect(evaluateHistory(records, { policy }).notes).toEqual([
      'the check of 2026-03-10 (history line 11) was recorded as fail (σ then 0.000 %) and is judged pass now ' +
        "(σ 1.200 %, set by the check's own standard error): the σ and control rules in force now differ " +
        'from those it was recorded with',
    ]);
  });
});
