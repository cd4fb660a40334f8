/**
 * The recheck schedule: when the next check is due, and whether a calibration is ok, due soon,
 * overdue or failed (DESIGN §1.4, §4 `status`). Pure.
 *
 * Next due = time of the latest passing (or warning) check + the interval; with no check yet, the
 * calibration's creation time + the interval. After a failed check the calibration is failed until
 * a later check passes (or it is rebuilt, which starts a new history).
 */
import { BandwrightError } from '../errors.js';
import type { CheckRecord, Verdict } from './record.js';
import { DAY_MS } from './trend.js';

/** Where a calibration stands. */
export type ScheduleState = 'ok' | 'due' | 'overdue' | 'failed';

/** Options of {@link scheduleFor}. */
export interface ScheduleOptions {
  /** Days between rechecks, > 0. */
  everyDays: number;
  /** When the calibration was built, ISO (the start of the schedule before any check). */
  calibrationCreatedAt: string;
  /** The time to judge at, ISO (default: now). */
  now?: string;
  /** "Due" means due within this many days (default 1). */
  dueWithinDays?: number;
}

/** The schedule of one gas of a calibration. */
export interface Schedule {
  /** ok, due (within `dueWithinDays`), overdue, or failed (latest check failed). */
  state: ScheduleState;
  /** Latest check by time, if any. */
  lastCheck?: { time: string; verdict: Verdict };
  /** What the due date counts from. */
  basis: 'check' | 'calibration';
  /** Next due time, ISO; absent when failed (a recheck is needed now). */
  nextDue?: string;
  /** Days from `now` to `nextDue` (negative when overdue). */
  daysUntilDue?: number;
  /** Days overdue (0 unless overdue; for failed, days since the failed check). */
  daysOverdue: number;
  /** Plain words. */
  reason: string;
}

function parseTime(text: string, parameter: string): number {
  const ms = Date.parse(text);
  if (!Number.isFinite(ms))
    throw new BandwrightError(
      'INVALID_VALUE',
      `${parameter} = ${JSON.stringify(text)}, must be an ISO 8601 time`,
      { parameter },
    );
  return ms;
}

function day(iso: string): string {
  return iso.slice(0, 10);
}

/**
 * The schedule of a gas from its checks.
 *
 * @param checks - the gas's checks (records, or anything with a time and a verdict), any order;
 *   the verdict used is the one given (pass the evaluated verdicts to judge under a new policy)
 * @param options - interval (days), calibration creation time, now, due-soon window (days)
 * @returns state, next due time, days until due / overdue, reason
 * @throws BandwrightError `INVALID_VALUE` for a non-positive interval or an unreadable time
 * @example
 * scheduleFor([{ time: '2026-09-01T09:30:00Z', verdict: 'pass' }], {
 *   everyDays: 7,
 *   calibrationCreatedAt: '2026-08-30T00:00:00Z',
 *   now: '2026-09-07T12:00:00Z',
 * });
 * // { state: 'due', nextDue: '2026-09-08T09:30:00.000Z', … }
 */
export function scheduleFor(
  checks: readonly Pick<CheckRecord, 'time' | 'verdict'>[],
  options: ScheduleOptions,
): Schedule {
  if (!(options.everyDays > 0) || !Number.isFinite(options.everyDays)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `recheck interval = ${options.everyDays} days, must be a number of days > 0`,
      { parameter: 'everyDays' },
    );
  }
  const nowMs = options.now === undefined ? Date.now() : parseTime(options.now, 'now');
  const soon = options.dueWithinDays ?? 1;
  const ordered = checks
    .map((c, i) => ({ c, i, ms: parseTime(c.time, 'time') }))
    .sort((a, b) => a.ms - b.ms || a.i - b.i);
  const latest = ordered[ordered.length - 1];
  const schedule: Pick<Schedule, 'lastCheck'> =
    latest === undefined
      ? {}
      : { lastCheck: { time: new Date(latest.ms).toISOString(), verdict: latest.c.verdict } };
  if (latest !== undefined && latest.c.verdict === 'fail') {
    const since = (nowMs - latest.ms) / DAY_MS;
    return {
      state: 'failed',
      ...schedule,
      basis: 'check',
      daysOverdue: Math.max(0, since),
      reason:
        `the latest check (${day(new Date(latest.ms).toISOString())}) failed: ` +
        'find the cause, then recheck, or rebuild the calibration',
    };
  }
  const fromCheck = latest !== undefined;
  const startMs = fromCheck ? latest.ms : parseTime(options.calibrationCreatedAt, 'calibrationCreatedAt');
  const dueMs = startMs + options.everyDays * DAY_MS;
  const until = (dueMs - nowMs) / DAY_MS;
  const nextDue = new Date(dueMs).toISOString();
  const from = fromCheck
    ? `the latest check (${day(new Date(startMs).toISOString())}, ${latest.c.verdict})`
    : `the calibration's creation (${day(new Date(startMs).toISOString())}), no check yet`;
  const state: ScheduleState = until < 0 ? 'overdue' : until <= soon ? 'due' : 'ok';
  const reason =
    state === 'overdue'
      ? `overdue by ${(-until).toFixed(1)} days: due ${options.everyDays} days after ${from}`
      : state === 'due'
        ? `due within ${soon} day${soon === 1 ? '' : 's'}: ${options.everyDays} days after ${from}`
        : `next due in ${until.toFixed(1)} days: ${options.everyDays} days after ${from}`;
  return {
    state,
    ...schedule,
    basis: fromCheck ? 'check' : 'calibration',
    nextDue,
    daysUntilDue: until,
    daysOverdue: Math.max(0, -until),
    reason,
  };
}
