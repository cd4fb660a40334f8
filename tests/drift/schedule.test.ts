/**
 * Recheck schedule and exit statuses.
 *
 * Sources: next due = last passing check + interval, due within a day, overdue after the due time,
 * failed until a passing recheck (DESIGN §1.4 and §4, common practice for check-standard
 * schedules); exit statuses of DESIGN §4 (status: 0 all current, 3 due within a day, 4 overdue or
 * failed; recheck: 0 pass, 3 warning, 4 fail).
 */
import { describe, expect, it } from 'vitest';
import { scheduleFor } from '../../src/drift/schedule.js';
import { recheckExitCode, statusExitCode } from '../../src/drift/status.js';

const created = '2026-08-30T00:00:00.000Z';
const check = (time: string, verdict: 'pass' | 'warning' | 'fail') => ({ time, verdict });

describe('next due and state', () => {
  it('counts the interval from the latest passing check', () => {
    const schedule = scheduleFor(
      [check('2026-09-01T09:30:00Z', 'pass'), check('2026-09-08T09:30:00Z', 'pass')],
      { everyDays: 7, calibrationCreatedAt: created, now: '2026-09-10T09:30:00Z' },
    );
    expect(schedule).toMatchObject({
      state: 'ok',
      basis: 'check',
      nextDue: '2026-09-15T09:30:00.000Z',
      daysOverdue: 0,
    });
    expect(schedule.daysUntilDue).toBeCloseTo(5, 12);
    expect(schedule.lastCheck).toEqual({ time: '2026-09-08T09:30:00.000Z', verdict: 'pass' });
  });

  it('counts a warning as a passing check', () => {
    expect(
      scheduleFor([check('2026-09-08T09:30:00Z', 'warning')], {
        everyDays: 7,
        calibrationCreatedAt: created,
        now: '2026-09-09T00:00:00Z',
      }).nextDue,
    ).toBe('2026-09-15T09:30:00.000Z');
  });

  it('is due within a day of the due time, overdue after it (the due time itself is still due)', () => {
    const checks = [check('2026-09-08T09:30:00Z', 'pass')];
    const at = (now: string) => scheduleFor(checks, { everyDays: 7, calibrationCreatedAt: created, now });
    expect(at('2026-09-14T09:29:00Z').state).toBe('ok');
    expect(at('2026-09-14T09:30:00Z').state).toBe('due');
    expect(at('2026-09-15T09:30:00Z').state).toBe('due');
    const late = at('2026-09-17T21:30:00Z');
    expect(late.state).toBe('overdue');
    expect(late.daysOverdue).toBeCloseTo(2.5, 12);
    expect(late.reason).toBe('overdue by 2.5 days: due 7 days after the latest check (2026-09-08, pass)');
  });

  it('is failed after a failed check, until a later check passes', () => {
    const failed = scheduleFor(
      [check('2026-09-01T09:30:00Z', 'pass'), check('2026-09-08T09:30:00Z', 'fail')],
      { everyDays: 7, calibrationCreatedAt: created, now: '2026-09-09T09:30:00Z' },
    );
    expect(failed.state).toBe('failed');
    expect(failed.nextDue).toBeUndefined();
    expect(failed.daysOverdue).toBeCloseTo(1, 12);
    expect(failed.reason).toMatch(/the latest check \(2026-09-08\) failed/);
    const recovered = scheduleFor(
      [check('2026-09-08T09:30:00Z', 'fail'), check('2026-09-09T08:00:00Z', 'pass')],
      { everyDays: 7, calibrationCreatedAt: created, now: '2026-09-09T09:30:00Z' },
    );
    expect(recovered).toMatchObject({ state: 'ok', nextDue: '2026-09-16T08:00:00.000Z' });
  });

  it('orders checks by time, not by the order given', () => {
    const schedule = scheduleFor(
      [check('2026-09-08T09:30:00Z', 'pass'), check('2026-09-01T09:30:00Z', 'fail')],
      { everyDays: 7, calibrationCreatedAt: created, now: '2026-09-09T00:00:00Z' },
    );
    expect(schedule.state).toBe('ok');
  });

  it('counts from the calibration when there is no check yet', () => {
    const schedule = scheduleFor([], {
      everyDays: 7,
      calibrationCreatedAt: created,
      now: '2026-09-07T00:00:00Z',
    });
    expect(schedule).toMatchObject({
      state: 'overdue',
      basis: 'calibration',
      nextDue: '2026-09-06T00:00:00.000Z',
      daysOverdue: 1,
    });
    expect(schedule.lastCheck).toBeUndefined();
  });

  it('refuses a non-positive interval and unreadable times', () => {
    expect(() => scheduleFor([], { everyDays: 0, calibrationCreatedAt: created })).toThrow(
      /recheck interval = 0 days, must be a number of days > 0/,
    );
    expect(() =>
      scheduleFor([check('last week', 'pass')], { everyDays: 7, calibrationCreatedAt: created }),
    ).toThrow(/time = "last week", must be an ISO 8601 time/);
  });
});

describe('exit statuses (DESIGN §4)', () => {
  it('status: 0 all current, 3 when one is due within a day, 4 when one is overdue or failed', () => {
    expect(statusExitCode(['ok', 'ok'])).toBe(0);
    expect(statusExitCode([])).toBe(0);
    expect(statusExitCode(['ok', 'due'])).toBe(3);
    expect(statusExitCode(['due', 'overdue', 'ok'])).toBe(4);
    expect(statusExitCode(['ok', 'failed'])).toBe(4);
  });

  it('recheck: 0 pass, 3 warning, 4 fail', () => {
    expect([recheckExitCode('pass'), recheckExitCode('warning'), recheckExitCode('fail')]).toEqual([0, 3, 4]);
  });
});
