/**
 * The tabular CUSUM chart: against a sequence computed by hand, in the evaluation (rule CUSUM, a
 * warning by default or a fail when the method says so, restarted after a failed check), and on
 * simulated weekly checks with a slow drift, where it signals well before the Shewhart limit rules.
 *
 * Sources: the tabular CUSUM C⁺ᵢ = max(0, C⁺ᵢ₋₁ + zᵢ − k), C⁻ᵢ = max(0, C⁻ᵢ₋₁ − zᵢ − k), signal when
 * a sum exceeds h (ISO 7870-4; Montgomery, Introduction to Statistical Quality Control, "the
 * tabular CUSUM"; from memory); the usual k = 0.5σ, h = 5σ (same sources, common practice, from
 * memory); restarting after corrective action (common practice). The simulation uses the project's
 * seeded normal generator (src/simulate/random.ts).
 */
import { describe, expect, it } from 'vitest';
import { evaluateHistory } from '../../src/drift/evaluate.js';
import { DEFAULT_CUSUM_H, DEFAULT_CUSUM_K, tabularCusum } from '../../src/drift/cusum.js';
import type { CheckRecord } from '../../src/drift/record.js';
import { DAY_MS } from '../../src/drift/trend.js';
import { createGaussian } from '../../src/simulate/random.js';

const START = Date.parse('2026-01-05T09:00:00Z');

/** A weekly check of a 100 ppm standard with the given recovery (%) and standard error (ppm = %). */
function weekly(week: number, recovery: number, se: number): CheckRecord {
  const time = new Date(START + 7 * week * DAY_MS).toISOString();
  return {
    time,
    recordedAt: time,
    gas: 'CO',
    unit: 'ppm',
    certified: 100,
    measured: recovery,
    low: recovery - 2 * se,
    high: recovery + 2 * se,
    se,
    recoveryPct: recovery,
    verdict: 'pass',
    rules: [],
    tolerancePct: 5,
    scan: `check-${week}.jdx`,
    scanSha256: 'a'.repeat(64),
    toolVersion: '0.1.0',
  };
}

// A sequence of z = (recovery − 100 %)/σ drifting upwards, and its sums by hand with k = 0.5, h = 5:
//
//   i    z     C⁺ = max(0, C⁺ + z − 0.5)          C⁻ = max(0, C⁻ − z − 0.5)
//   1   0.3    max(0, 0 + 0.3 − 0.5)   = 0         max(0, 0 − 0.3 − 0.5)   = 0
//   2  −0.2    max(0, 0 − 0.2 − 0.5)   = 0         max(0, 0 + 0.2 − 0.5)   = 0
//   3   1.2    0 + 1.2 − 0.5           = 0.7       0
//   4   1.6    0.7 + 1.6 − 0.5         = 1.8       0
//   5   0.9    1.8 + 0.9 − 0.5         = 2.2       0
//   6   2.1    2.2 + 2.1 − 0.5         = 3.8       0
//   7   1.4    3.8 + 1.4 − 0.5         = 4.7       0
//   8  −0.4    4.7 − 0.4 − 0.5         = 3.8       max(0, 0 + 0.4 − 0.5) = 0
//   9   1.8    3.8 + 1.8 − 0.5         = 5.1  > 5: signal (above), rising since check 3
//  10   2.2    5.1 + 2.2 − 0.5         = 6.8  > 5: signal
const RISING = [0.3, -0.2, 1.2, 1.6, 0.9, 2.1, 1.4, -0.4, 1.8, 2.2];
const RISING_UPPER = [0, 0, 0.7, 1.8, 2.2, 3.8, 4.7, 3.8, 5.1, 6.8];

// And one drifting downwards, with h = 3:
//   i    z     C⁻ = max(0, C⁻ − z − 0.5)
//   1  −0.8    0 + 0.8 − 0.5   = 0.3
//   2  −1.1    0.3 + 1.1 − 0.5 = 0.9
//   3   0.2    0.9 − 0.2 − 0.5 = 0.2
//   4  −1.5    0.2 + 1.5 − 0.5 = 1.2
//   5  −0.9    1.2 + 0.9 − 0.5 = 1.6
//   6  −1.3    1.6 + 1.3 − 0.5 = 2.4
//   7  −0.7    2.4 + 0.7 − 0.5 = 2.6
//   8  −1.6    2.6 + 1.6 − 0.5 = 3.7  > 3: signal (below), falling since check 1
// C⁺ stays 0: the largest z, 0.2, is below k.
const FALLING = [-0.8, -1.1, 0.2, -1.5, -0.9, -1.3, -0.7, -1.6];
const FALLING_LOWER = [0.3, 0.9, 0.2, 1.2, 1.6, 2.4, 2.6, 3.7];

describe('tabular CUSUM against sums computed by hand', () => {
  it('has the usual defaults k = 0.5σ and h = 5σ', () => {
    expect(DEFAULT_CUSUM_K).toBe(0.5);
    expect(DEFAULT_CUSUM_H).toBe(5);
  });

  it('accumulates an upward drift and signals when C⁺ passes h', () => {
    const points = tabularCusum(RISING);
    points.forEach((p, i) => {
      expect(p.upper, `C⁺ at check ${i + 1}`).toBeCloseTo(RISING_UPPER[i] as number, 12);
      expect(p.lower, `C⁻ at check ${i + 1}`).toBe(0);
    });
    expect(points.map((p) => p.signal)).toEqual([...new Array<null>(8).fill(null), 'above', 'above']);
    expect(points[8]?.upperSince).toBe(2);
  });

  it('accumulates a downward drift and signals when C⁻ passes h (h = 3)', () => {
    const points = tabularCusum(FALLING, { h: 3 });
    points.forEach((p, i) => {
      expect(p.lower, `C⁻ at check ${i + 1}`).toBeCloseTo(FALLING_LOWER[i] as number, 12);
      expect(p.upper, `C⁺ at check ${i + 1}`).toBe(0);
    });
    expect(points.map((p) => p.signal)).toEqual([...new Array<null>(7).fill(null), 'below']);
    expect(points[7]?.lowerSince).toBe(0);
  });

  it('restarts at zero after a check marked for restart, and leaves a NaN check out', () => {
    const restarted = tabularCusum(RISING, { restartAfter: [false, false, false, false, false, true] });
    // After check 6 (C⁺ 3.8) the sums restart: check 7 gives 0 + 1.4 − 0.5 = 0.9, check 8 0.9 − 0.9 = 0.
    expect(restarted[6]?.upper).toBeCloseTo(0.9, 12);
    expect(restarted[7]?.upper).toBeCloseTo(0, 12);
    const gap = tabularCusum([1.5, Number.NaN, 1.5]);
    expect(gap.map((p) => p.upper)).toEqual([1, 1, 2]);
  });

  it('gives the same sums through the evaluation, as rule CUSUM (a warning) with its reason', () => {
    // σ = 1 % throughout: tolerance 3 % (tolerance/3 = 1 %), the method's floor 1 %, standard error
    // 0.5 %, and a baseline SD below 1 %; so recovery = 100 + z.
    const policy = { everyDays: 7, tolerancePct: 3, sigmaFloorPct: 1 };
    const evaluation = evaluateHistory(
      RISING.map((z, week) => weekly(week, 100 + z, 0.5)),
      { policy },
    );
    expect(evaluation.checks.map((c) => c.sigma?.valuePct)).toEqual(new Array(10).fill(1));
    evaluation.checks.forEach((c, i) =>
      expect(c.cusum?.upper, `C⁺ at check ${i + 1}`).toBeCloseTo(RISING_UPPER[i] as number, 10),
    );
    const ninth = evaluation.checks[8];
    expect(ninth?.rules.map((r) => r.rule)).toEqual(['CUSUM']);
    expect(ninth?.rules[0]?.severity).toBe('warning');
    expect(ninth?.verdict).toBe('warning');
    expect(ninth?.rules[0]?.reason).toBe(
      'the upper cumulative sum is 5.10σ, beyond the decision interval h = 5σ (reference value k = 0.5σ): ' +
        'from the check of 2026-01-19 to the check of 2026-03-02 the checks have stayed above the certified ' +
        'value by more than k on the whole, a slow persistent drift high',
    );
    expect(ninth?.reasons[0]).toBe('recovery 101.80 % is within the tolerance; warning rule CUSUM fired');
    expect(evaluation.cusum).toMatchObject({ k: 0.5, h: 5, onSignal: 'warning', signal: 'above' });
    expect(evaluation.cusum.upper).toBeCloseTo(6.8, 10);
    expect(evaluation.cusum.since).toBe('2026-01-19T09:00:00.000Z');
    expect(evaluation.cusum.summary).toMatch(
      /^CUSUM \(k = 0\.5σ, h = 5σ\): C⁺ = 6\.80σ, C⁻ = 0\.00σ: signal, drifting high since the check of 2026-01-19 \(a warning\)$/,
    );
  });

  it("fails the check instead when the method's recheck policy says so, and takes its k and h", () => {
    const policy = {
      everyDays: 7,
      tolerancePct: 3,
      sigmaFloorPct: 1,
      cusum: { k: 0.5, h: 3, onSignal: 'fail' as const },
    };
    const evaluation = evaluateHistory(
      FALLING.map((z, week) => weekly(week, 100 + z, 0.5)),
      { policy },
    );
    const eighth = evaluation.checks[7];
    expect(eighth?.rules.map((r) => [r.rule, r.severity])).toEqual([['CUSUM', 'reject']]);
    expect(eighth?.verdict).toBe('fail');
    expect(eighth?.reasons[0]).toMatch(/out of statistical control: CUSUM fired/);
    expect(eighth?.cusum?.lower).toBeCloseTo(3.7, 10);
    // The failed check restarts the sums for the next check.
    expect(evaluation.cusum.restarted).toBe(true);
    expect(evaluation.cusum.summary).toMatch(/the sums restart at zero with the next check$/);
  });

  it('restarts the sums after a failed check in the evaluation', () => {
    // σ = 1 %; check 4 is at 104 %, outside ±3 %: it fails, and check 5 starts from zero.
    const policy = { everyDays: 7, tolerancePct: 3, sigmaFloorPct: 1 };
    const evaluation = evaluateHistory(
      [0.8, 0.8, 0.8, 4, 0.8, 0.8].map((z, week) => weekly(week, 100 + z, 0.5)),
      { policy },
    );
    expect(evaluation.checks[3]?.verdict).toBe('fail');
    // 0.3, 0.6, 0.9, then 0.9 + 4 − 0.5 = 4.4; restart; 0.3, 0.6 (not 4.7, 5.0).
    expect(evaluation.checks.map((c) => c.cusum?.upper)).toEqual([
      expect.closeTo(0.3, 12),
      expect.closeTo(0.6, 12),
      expect.closeTo(0.9, 12),
      expect.closeTo(4.4, 12),
      expect.closeTo(0.3, 12),
      expect.closeTo(0.6, 12),
    ]);
  });
});

describe('a slow drift on simulated weekly checks', () => {
  // Check scatter 0.4 % around the true recovery, standard error 0.6 % (so σ is the standard error,
  // as when the calibration curve's own uncertainty dominates), ±5 % tolerance; from week 8 the
  // response falls 0.03 % a week (1.6 % a year: slow mirror fouling).
  const WEEKS = 120;
  const ONSET = 8;
  const SHEWHART = ['1-3s', '2-2s', 'R-4s'];

  function simulate(seed: number, drift: number, scatter = 0.4) {
    const gaussian = createGaussian(seed);
    const records = Array.from({ length: WEEKS }, (_, week) =>
      weekly(week, 100 - drift * Math.max(0, week - ONSET) + scatter * gaussian(), 0.6),
    );
    const evaluation = evaluateHistory(records, { policy: { everyDays: 7, tolerancePct: 5 } });
    // The CUSUM chart on its own (no restart after fails of other rules), on the evaluation's z.
    const cusum = tabularCusum(evaluation.checks.map((c) => c.controlZ as number));
    const first = (test: (i: number) => boolean): number => {
      for (let i = ONSET + 1; i < WEEKS; i++) if (test(i)) return i;
      return WEEKS;
    };
    const rulesAt = (i: number) => evaluation.checks[i]?.rules ?? [];
    return {
      cusum: first((i) => cusum[i]?.signal === 'below'),
      shewhart: first((i) => rulesAt(i).some((r) => SHEWHART.includes(r.rule))),
      anyReject: first((i) => rulesAt(i).some((r) => r.severity === 'reject')),
      tolerance: first((i) => evaluation.checks[i]?.outsideTolerance === true),
      falseCusum: cusum.some((p) => p.signal !== null),
      falseReject: evaluation.checks.some((c) => c.rules.some((r) => r.severity === 'reject')),
    };
  }

  const median = (values: number[]): number =>
    [...values].sort((a, b) => a - b)[values.length >> 1] as number;

  it('is flagged by CUSUM long before the Shewhart limit rules (one series, the first seed)', () => {
    const run = simulate(1, 0.03);
    // Measured on this seeded series: CUSUM at week 32, 1-3s and 2-2s at week 52, the tolerance never.
    expect(run.cusum).toBe(32);
    expect(run.shewhart).toBe(52);
    expect(run.tolerance).toBe(WEEKS);
  });

  it('is flagged by CUSUM first in most of 200 seeded series, as early as the whole multirule set', () => {
    const runs = Array.from({ length: 200 }, (_, k) => simulate(k + 1, 0.03));
    const earlier = runs.filter((r) => r.cusum < r.shewhart).length / runs.length;
    // Measured: 93.5 % of series, a median lead of 13 weeks; medians CUSUM 30, all reject rules 32.
    expect(earlier).toBeGreaterThanOrEqual(0.9);
    expect(median(runs.map((r) => r.shewhart - r.cusum))).toBeGreaterThanOrEqual(10);
    expect(median(runs.map((r) => r.cusum))).toBeLessThan(median(runs.map((r) => r.anyReject)));
  });

  it('gives fewer false alarms than the reject rules on checks in control', () => {
    // Scatter equal to the standard error, no drift: every signal is a false alarm. Measured over
    // 120 weekly checks: a CUSUM signal in 12.5 % of series, a reject rule in 40 %.
    const runs = Array.from({ length: 200 }, (_, k) => simulate(1000 + k, 0, 0.6));
    const cusum = runs.filter((r) => r.falseCusum).length / runs.length;
    const reject = runs.filter((r) => r.falseReject).length / runs.length;
    expect(cusum).toBeGreaterThan(0);
    expect(cusum).toBeLessThan(reject / 2);
  });
});
