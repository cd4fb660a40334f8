/**
 * The options shared by several commands, parsed in one place, and the stop handlers of long
 * commands.
 */
import { describe, expect, it } from 'vitest';
import { levelOption, recheckPolicyOptions, workersOption } from '../../src/cli/options.js';
import { installStopHandlers } from '../../src/cli/signals.js';

describe('shared options', () => {
  it('parses --workers', () => {
    expect(workersOption('auto')).toBe('auto');
    expect(workersOption('0')).toBe(0);
    expect(workersOption('12')).toBe(12);
    for (const bad of ['-1', '1.5', 'two', '', '65'])
      expect(() => workersOption(bad)).toThrow(/--workers = .*, must be auto or a whole number from 0 to 64/);
  });

  it('parses --level inside (0, 1) only', () => {
    expect(levelOption('0.9')).toBe(0.9);
    for (const bad of ['0', '1', '95', 'high']) expect(() => levelOption(bad)).toThrow(/--level = /);
  });

  it('parses the recheck policy overrides of recheck and status', () => {
    expect(recheckPolicyOptions({})).toEqual({});
    expect(recheckPolicyOptions({ everyDays: '7', tolerancePct: '5' })).toEqual({
      everyDays: 7,
      tolerancePct: 5,
    });
    expect(() => recheckPolicyOptions({ tolerancePct: '100' })).toThrow(
      /--tolerance-pct = 100, must be a percentage > 0 and < 100/,
    );
    expect(() => recheckPolicyOptions({ everyDays: '0' })).toThrow(/--every-days = 0, must be > 0/);
  });
});

describe('stop handlers', () => {
  it('abort at the first signal with its name, and are gone once removed', () => {
    const before = process.listenerCount('SIGTERM');
    const heard: string[] = [];
    const stop = installStopHandlers((name) => heard.push(name));
    expect(process.listenerCount('SIGTERM')).toBe(before + 1);
    expect(stop.signal.aborted).toBe(false);
    process.emit('SIGTERM', 'SIGTERM');
    expect(heard).toEqual(['SIGTERM']);
    expect(stop.signal.aborted).toBe(true);
    expect(stop.signal.reason).toBe('SIGTERM');
    expect(stop.stoppedBy()).toBe('SIGTERM');
    stop.remove();
    stop.remove();
    expect(process.listenerCount('SIGTERM')).toBe(before);
  });
});
