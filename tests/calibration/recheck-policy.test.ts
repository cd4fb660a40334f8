/**
 * The method's recheck policy: interval and tolerance, and the optional control-chart settings
 * (σ floor, CUSUM k, h and what a signal does), kept only when stated so that calibrations built
 * before them are unchanged.
 */
import { describe, expect, it } from 'vitest';
import { parseMethod, parseResponseMethod } from '../../src/calibration/method.js';

const band = { name: 'CO', band: [2040, 2245], baseline: [[2000, 2030]] };

describe('recheck policy', () => {
  it('keeps only what the method states (defaults apply when judging)', () => {
    const method = parseMethod({ gases: [band], recheck: { everyDays: 7, tolerancePct: 5 } }, 'method.json');
    expect(method.recheck).toEqual({ everyDays: 7, tolerancePct: 5 });
  });

  it('reads the σ floor and the CUSUM settings', () => {
    const method = parseMethod(
      {
        gases: [band],
        recheck: { tolerancePct: 4, sigmaFloorPct: 0.6, cusum: { k: 0.75, h: 4, onSignal: 'fail' } },
      },
      'method.json',
    );
    expect(method.recheck).toEqual({
      everyDays: 7,
      tolerancePct: 4,
      sigmaFloorPct: 0.6,
      cusum: { k: 0.75, h: 4, onSignal: 'fail' },
    });
    expect(parseResponseMethod({ name: 'CO', recheck: { cusum: { h: 4.5 } } }, 'options').recheck).toEqual({
      everyDays: 7,
      tolerancePct: 5,
      cusum: { h: 4.5 },
    });
  });

  it.each([
    [
      { sigmaFloorPct: 0 },
      /recheck\.sigmaFloorPct = 0, must be a percentage > 0 and below the tolerance \(5 %\)/,
    ],
    [
      { sigmaFloorPct: 6 },
      /recheck\.sigmaFloorPct = 6, must be a percentage > 0 and below the tolerance \(5 %\)/,
    ],
    [
      { cusum: { k: -0.1 } },
      /recheck\.cusum\.k = -0\.1, must be a reference value in units of σ from 0 to 3/,
    ],
    [
      { cusum: { h: 0 } },
      /recheck\.cusum\.h = 0, must be a decision interval in units of σ > 0 and at most 20/,
    ],
    [{ cusum: { onSignal: 'stop' } }, /recheck\.cusum\.onSignal = "stop", must be one of warning, fail/],
    [
      { cusum: { limit: 5 } },
      /recheck\.cusum\.limit = 5, is not a known field here \(known: k, h, onSignal\)/,
    ],
    [{ cusum: 5 }, /recheck\.cusum = 5, must be an object/],
  ])('refuses %j, naming the field', (recheck, message) => {
    expect(() => parseMethod({ gases: [band], recheck }, 'method.json')).toThrow(message);
  });
});
