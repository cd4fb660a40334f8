/**
 * Drift trend: least-squares line of recovery against time, slope test, projected crossing of
 * the tolerance.
 *
 * Sources:
 * - NIST StRD "Norris" (linear regression, certified slope and its standard error; copied in
 *   tests/fixtures/nist-strd/): the trend's slope and standard error, treating x as days.
 * - Constructed linear drift: the crossing of R(t) = a + b·t with 100 − tolerance is at
 *   t = (100 − tolerance − a)/b (algebra).
 * - The slope t-test at 95 % rejects a flat series about 5 % of the time when the noise is normal
 *   and independent (the definition of the test's level; Student 1908, common statistical practice).
 */
import { describe, expect, it } from 'vitest';
import { DAY_MS, fitDriftTrend, trendAt, type TrendPoint } from '../../src/drift/trend.js';
import { createGaussian } from '../../src/simulate/random.js';
import { expectRelative, loadDataset } from '../fixtures/nist-strd/nist.js';

const START = Date.parse('2026-01-05T08:00:00Z');
const at = (days: number): string => new Date(START + days * DAY_MS).toISOString();

describe('slope and its standard error', () => {
  it('match the NIST StRD Norris certified values (x as days, all 36 points)', () => {
    const norris = loadDataset('norris');
    const points: TrendPoint[] = norris.x.map((row, i) => ({
      time: at(row[0] as number),
      recoveryPct: norris.y[i] as number,
    }));
    const trend = fitDriftTrend(points, { tolerancePct: 5, maxPoints: 100 });
    // Certified: B1 = 1.00211681802045, SE(B1) = 0.429796848199937e-3, residual SD 0.884796396144373, df 34.
    // Tolerance 1e-9: times are rounded to whole milliseconds (1e-8 days), far below the data's scale.
    expectRelative(trend.slopePctPerDay as number, norris.certified.B[1] as number, 1e-9, 'Norris slope');
    expectRelative(
      trend.slopeStandardErrorPctPerDay as number,
      norris.certified.SE[1] as number,
      1e-8,
      'Norris SE(slope)',
    );
    expectRelative(trend.residualSdPct as number, norris.certified.residualSD, 1e-8, 'Norris residual SD');
    expect(trend.df).toBe(norris.certified.dfResidual);
    // The line at x = 0 is the certified intercept B0 = −0.262323073774029 (abs. tolerance 1e-6).
    const line = trendAt(trend, at(0));
    expect(Math.abs((line?.recoveryPct as number) - (norris.certified.B[0] as number))).toBeLessThan(1e-6);
  });
});

describe('projected crossing of the tolerance', () => {
  it('gives the exact date for a noise-free linear drift of −0.2 %/day (crossing 95 % after 25 days)', () => {
    // R(t) = 100 − 0.2 t, checks every 2 days from day 0 to day 18: crosses 95 % at t = 25 days.
    const points = Array.from({ length: 10 }, (_, k) => ({
      time: at(2 * k),
      recoveryPct: 100 - 0.2 * 2 * k,
    }));
    const trend = fitDriftTrend(points, { tolerancePct: 5 });
    expect(trend.status).toBe('drift');
    expect(trend.slopePctPerDay).toBeCloseTo(-0.2, 12);
    expect(trend.projection?.limit).toBe('lower');
    expect(trend.projection?.limitPct).toBe(95);
    expect(trend.projection?.date).toBe(at(25));
    expect(trend.projection?.alreadyOutside).toBe(false);
    // No scatter: the confidence band has no width, the range is the date itself.
    expect(trend.projection?.earliest).toBe(at(25));
    expect(trend.projection?.latest).toBe(at(25));
    expect(trend.summary).toMatch(/projected to cross 95 % on 2026-01-30/);
  });

  it('gives an upward drift crossing 100 + tolerance, with noise: the date near the truth and inside its range', () => {
    // R(t) = 99 + 0.1 t (truth crosses 104 % at t = 50 days); seeded normal noise, SD 0.2 %, weekly checks.
    const normal = createGaussian(424242);
    const points = Array.from({ length: 10 }, (_, k) => ({
      time: at(7 * k - 30),
      recoveryPct: 99 + 0.1 * (7 * k - 30) + 0.2 * normal(),
    }));
    const trend = fitDriftTrend(points, { tolerancePct: 4 });
    expect(trend.status).toBe('drift');
    const projection = trend.projection;
    expect(projection?.limit).toBe('upper');
    const dateDays = (Date.parse(projection?.date as string) - START) / DAY_MS;
    const earliest = (Date.parse(projection?.earliest as string) - START) / DAY_MS;
    const latest = (Date.parse(projection?.latest as string) - START) / DAY_MS;
    expect(earliest).toBeLessThan(dateDays);
    expect(latest).toBeGreaterThan(dateDays);
    expect(earliest).toBeLessThan(50);
    expect(latest).toBeGreaterThan(50);
    // With SD 0.2 % over a 63-day span, the slope is known to about ±0.01 %/day: the crossing within ±15 days.
    expect(Math.abs(dateDays - 50)).toBeLessThan(15);
  });

  it('gives a crossing range that covers the true crossing about 95 % of the time (Fieller construction, 1000 seeded series)', () => {
    // R(t) = 100 − 0.1 t + N(0, 0.5²), ten weekly checks from day 0: truth crosses 95 % at t = 50 days.
    // The slope is always clearly significant here (|t| ≈ 13), so the range is always bounded.
    const normal = createGaussian(8675309);
    const runs = 1000;
    let covered = 0;
    for (let r = 0; r < runs; r++) {
      const points = Array.from({ length: 10 }, (_, k) => ({
        time: at(7 * k),
        recoveryPct: 100 - 0.1 * 7 * k + 0.5 * normal(),
      }));
      const projection = fitDriftTrend(points, { tolerancePct: 5 }).projection;
      if (projection === undefined) continue;
      const truth = START + 50 * DAY_MS;
      if (Date.parse(projection.earliest) <= truth && truth <= Date.parse(projection.latest)) covered++;
    }
    // Binomial(1000, 0.95): SD 0.7 %; accept 95 % ± 2.1 %.
    const coverage = covered / runs;
    expect(coverage, `coverage ${coverage}`).toBeGreaterThan(0.929);
    expect(coverage, `coverage ${coverage}`).toBeLessThan(0.971);
  });

  it('says when the line has already crossed', () => {
    const points = Array.from({ length: 6 }, (_, k) => ({ time: at(7 * k), recoveryPct: 99 - 1.5 * k }));
    const trend = fitDriftTrend(points, { tolerancePct: 5 });
    // 99 − 1.5 t/7 = 95 at t = 18.67 days (2026-01-24 00:00), before the last check (day 35).
    expect(trend.projection?.alreadyOutside).toBe(true);
    expect(
      Math.abs(Date.parse(trend.projection?.date as string) - (START + (28 / 1.5) * DAY_MS)),
    ).toBeLessThan(2);
    expect(trend.summary).toMatch(/crossed 95 % on 2026-01-24/);
  });

  it('uses only the latest checks (default 10), so an old step does not mask a recent drift', () => {
    const old = Array.from({ length: 8 }, (_, k) => ({ time: at(k), recoveryPct: 90 }));
    const recent = Array.from({ length: 10 }, (_, k) => ({ time: at(10 + k), recoveryPct: 100 - 0.1 * k }));
    const trend = fitDriftTrend([...old, ...recent], { tolerancePct: 5 });
    expect(trend.points).toBe(10);
    expect(trend.from).toBe(at(10));
    expect(trend.slopePctPerDay).toBeCloseTo(-0.1, 10);
  });
});

describe('no significant drift', () => {
  it('for a flat series whose noise has no trend (symmetric about the middle check)', () => {
    const noise = [0.4, -0.3, 0.1, -0.5, 0.2, 0.2, -0.5, 0.1, -0.3, 0.4];
    const points = noise.map((e, k) => ({ time: at(7 * k), recoveryPct: 100.2 + e }));
    const trend = fitDriftTrend(points, { tolerancePct: 5 });
    expect(trend.status).toBe('none');
    expect(trend.projection).toBeUndefined();
    expect(trend.summary).toMatch(/^no significant drift \(/);
    expect(Math.abs(trend.slopePctPerDay as number)).toBeLessThan(1e-12);
  });

  it('for flat noisy series about 5 % of the time at the 95 % level (2000 seeded series)', () => {
    const normal = createGaussian(31337);
    let significant = 0;
    const runs = 2000;
    for (let r = 0; r < runs; r++) {
      const points = Array.from({ length: 10 }, (_, k) => ({
        time: at(7 * k),
        recoveryPct: 100 + 0.8 * normal(),
      }));
      if (fitDriftTrend(points, { tolerancePct: 5 }).status === 'drift') significant++;
    }
    // Binomial(2000, 0.05): SD 0.49 %; accept 5 % ± 1.5 % (about 3 SD).
    const rate = significant / runs;
    expect(rate, `false-alarm rate ${rate}`).toBeGreaterThan(0.035);
    expect(rate, `false-alarm rate ${rate}`).toBeLessThan(0.065);
  });

  it('reports too few checks (fewer than 4) or checks all at one time as insufficient, not as an error', () => {
    const three = [0, 7, 14].map((d) => ({ time: at(d), recoveryPct: 100 - d }));
    expect(fitDriftTrend(three, { tolerancePct: 5 })).toMatchObject({
      status: 'insufficient',
      points: 3,
      summary: 'no trend yet: 3 check(s), a trend needs at least 4',
    });
    const sameTime = [99, 100, 101, 102].map((r) => ({ time: at(1), recoveryPct: r }));
    expect(fitDriftTrend(sameTime, { tolerancePct: 5 }).status).toBe('insufficient');
    expect(trendAt(fitDriftTrend(three, { tolerancePct: 5 }), at(0))).toBeUndefined();
  });

  it('does not call a slope of rounding noise a drift when the scatter has a floor, and never fails on it', () => {
    // Ten checks that agree to 1e-13 % (the same scan rechecked): the fitted residual SD is rounding
    // noise, so without a floor a slope of 1e-14 %/day is "significant" and crosses 105 % only in
    // some 1e12 years, beyond any date (which used to throw a RangeError).
    const flat = Array.from({ length: 10 }, (_, d) => ({ time: at(d), recoveryPct: 100.74 + d * 1e-13 }));
    const bare = fitDriftTrend(flat, { tolerancePct: 5 });
    expect(bare.status).toBe('drift');
    expect(bare.projection).toBeUndefined();
    expect(bare.summary).toMatch(/but too slow to reach 105 % in any time a calendar can hold$/);
    // With the checks' resolution as the floor (0.5 %), the slope is no drift at all.
    const floored = fitDriftTrend(flat, { tolerancePct: 5, scatterFloorPct: 0.5 });
    expect(floored.status).toBe('none');
    expect(floored.scatterPct).toBe(0.5);
    expect(floored.residualSdPct).toBeLessThan(1e-12);
    expect(floored.summary).toMatch(
      /^no significant drift \(\+0\.000 ± 0\.385 %\/week over the last 10 checks, p = 1\.000\)$/,
    );
  });
});
