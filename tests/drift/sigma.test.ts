/**
 * σ of the control rules that cannot collapse: never below the check's own standard error of
 * prediction nor a floor, and each of the three (baseline SD, check standard error, floor) setting
 * it in turn; twenty identical checks in tolerance all pass; σ multiples printed with sensible digits.
 *
 * Sources: recovery % = measured/certified × 100 and the check's standard error in % of the
 * certified value = se/certified × 100 (common practice); the sample SD with n − 1 (its
 * definition); the floor's default, a tenth of the tolerance ("rule of ten", common practice, from
 * memory); Shewhart phase I / phase II (common practice; DESIGN §3). The identical-checks series
 * repeats a real case: one check scan of 100.74 % recovery with a standard error of 1.2 %,
 * rechecked on twenty successive days against ±5 %.
 */
import { describe, expect, it } from 'vitest';
import { evaluateHistory, judgeCheck, type EvaluatedCheck } from '../../src/drift/evaluate.js';
import type { CheckRecord } from '../../src/drift/record.js';
import { formatSigmaMultiple } from '../../src/drift/rules.js';
import { checkStandardErrorPct, chooseSigma } from '../../src/drift/sigma.js';
import { DAY_MS } from '../../src/drift/trend.js';

const START = Date.parse('2026-03-02T09:00:00Z');
const policy = { everyDays: 7, tolerancePct: 5 };

/** A check of a 100 ppm standard `day` days after START with the given recovery and standard error (ppm = %). */
function check(day: number, recovery: number, se: number, extra: Partial<CheckRecord> = {}): CheckRecord {
  const time = new Date(START + day * DAY_MS).toISOString();
  return {
    time,
    recordedAt: time,
    gas: 'CO',
    unit: 'ppm',
    certified: 100,
    measured: recovery,
    low: recovery - 2.1 * se,
    high: recovery + 2.1 * se,
    se,
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

const span = (checks: EvaluatedCheck[]): EvaluatedCheck[] => checks.filter((c) => c.kind === 'span');

describe('twenty identical checks within tolerance', () => {
  // 100.74 % each day, se 1.2 % (the case that used to fail from the ninth check on at "+4.85e+13σ").
  const records = Array.from({ length: 20 }, (_, day) => check(day, 100.74, 1.2));

  it('all pass, with no rule fired, judged all at once', () => {
    const evaluation = evaluateHistory(records, { policy });
    expect(evaluation.checks.map((c) => c.verdict)).toEqual(new Array(20).fill('pass'));
    expect(evaluation.checks.flatMap((c) => c.rules)).toEqual([]);
    // The baseline SD of identical values is 0 (or rounding noise): the check's own standard error sets σ.
    expect(evaluation.baseline.sdPct).toBeLessThan(1e-12);
    for (const c of evaluation.checks.slice(8)) {
      expect(c.sigma).toMatchObject({ basis: 'check-se', valuePct: 1.2, shortHistory: false });
      // z = 0.74 / 1.2 = 0.617
      expect(c.controlZ).toBeCloseTo(0.74 / 1.2, 12);
    }
    expect(evaluation.checks[8]?.sigma?.reason).toMatch(
      /^σ = 1\.200 %, this check's own standard error of prediction: the SD of the 8 baseline checks \(2026-03-02 to 2026-03-09\), 0\.000 %, is smaller than what one check can resolve/,
    );
    // The first eight: short history, tolerance/3 = 1.667 % is above the standard error.
    expect(evaluation.checks[0]?.sigma).toMatchObject({ basis: 'floor', shortHistory: true });
    expect(evaluation.checks[0]?.sigma?.valuePct).toBeCloseTo(5 / 3, 14);
    // CUSUM: z − k = 0.617 − 0.5 = 0.117 per check from the ninth on: 12 × 0.117 = 1.40 < h = 5.
    expect(evaluation.cusum.upper).toBeCloseTo(12 * (0.74 / 1.2 - 0.5), 10);
    expect(evaluation.cusum.signal).toBeNull();
    // Nor does the trend judge rounding noise: its scatter has the same floor.
    expect(evaluation.trend.status).toBe('none');
  });

  it('all pass when recorded one after another, as rechecks append them', () => {
    let history: CheckRecord[] = [];
    for (const record of records) {
      const { verdict: _v, rules: _r, tolerancePct: _t, ...measurement } = record;
      const judged = judgeCheck(history, measurement, { policy });
      expect(judged.record.verdict, `check of ${record.time}: ${judged.check.reasons.join('; ')}`).toBe(
        'pass',
      );
      expect(judged.changed).toEqual([]);
      history = [...history, { ...judged.record, line: history.length + 3 }];
    }
    const evaluation = evaluateHistory(history, { policy });
    expect(evaluation.notes).toEqual([]);
    expect(history.map((r) => r.sigmaPct)).toEqual([
      ...new Array<number>(8).fill(5 / 3),
      ...new Array<number>(12).fill(1.2),
    ]);
  });
});

describe('each of the three sources sets σ in turn, and the output says which', () => {
  const baseline = [99.2, 100.9, 99.6, 100.7, 98.9, 101.0, 99.5, 100.4];
  const mean = baseline.reduce((s, v) => s + v, 0) / 8;
  const sd = Math.sqrt(baseline.reduce((s, v) => s + (v - mean) ** 2, 0) / 7);

  it('the baseline SD, when it is above the standard error and the floor', () => {
    // sd = 0.821 % > se 0.3 % and > floor 0.5 %.
    const evaluation = evaluateHistory(
      [...baseline, 100.2].map((r, day) => check(day, r, 0.3)),
      { policy },
    );
    const sigma = evaluation.checks[8]?.sigma;
    expect(sigma?.basis).toBe('baseline');
    expect(sigma?.valuePct).toBeCloseTo(sd, 12);
    expect(sigma?.baselineSdPct).toBeCloseTo(sd, 12);
    expect(sigma?.checkSePct).toBeCloseTo(0.3, 12);
    expect(sigma?.floorPct).toBeCloseTo(0.5, 12);
    expect(sigma?.reason).toMatch(
      /it is above this check's standard error, 0\.300 % and the floor, 0\.500 % \(tolerance\/10 = 5 %\/10\)/,
    );
  });

  it("the check's standard error, when the baseline agrees more closely than one check resolves", () => {
    // sd 0.821 % < se 1.1 %.
    const evaluation = evaluateHistory(
      [...baseline, 100.2].map((r, day) => check(day, r, 1.1)),
      { policy },
    );
    expect(evaluation.checks[8]?.sigma).toMatchObject({ basis: 'check-se', valuePct: 1.1 });
    expect(evaluation.checks[8]?.sigma?.reason).toMatch(/is smaller than what one check can resolve/);
  });

  it('the floor, when the baseline SD and the standard error are both below it', () => {
    const tight = baseline.map((r) => 100 + (r - mean) / 5); // sd 0.164 %
    const evaluation = evaluateHistory(
      [...tight, 100.1].map((r, day) => check(day, r, 0.1)),
      { policy },
    );
    expect(evaluation.checks[8]?.sigma).toMatchObject({ basis: 'floor', valuePct: 0.5 });
    expect(evaluation.checks[8]?.sigma?.reason).toMatch(
      /^σ = 0\.500 %, the floor \(tolerance\/10 = 5 %\/10\): the SD of the 8 baseline checks .*, 0\.164 %, and this check's standard error, 0\.100 %, are both smaller/,
    );
    // The method may state its own floor.
    const stated = evaluateHistory(
      [...tight, 100.1].map((r, day) => check(day, r, 0.1)),
      { policy: { ...policy, sigmaFloorPct: 0.8 } },
    );
    expect(stated.checks[8]?.sigma).toMatchObject({ basis: 'floor', valuePct: 0.8 });
    expect(stated.checks[8]?.sigma?.reason).toMatch(/the floor \(the method's recheck\.sigmaFloorPct\)/);
  });

  it("a history too short to estimate σ uses the check's own standard error when it is above tolerance/3, and says so", () => {
    const evaluation = evaluateHistory([check(0, 101, 2)], { policy });
    const sigma = evaluation.checks[0]?.sigma;
    expect(sigma).toMatchObject({ basis: 'check-se', valuePct: 2, shortHistory: true });
    expect(sigma?.reason).toBe(
      "σ = 2.000 %, this check's own standard error of prediction: 0 of the 8 baseline checks within " +
        'tolerance exist so far, too few to estimate σ from the checks, and the standard error is above ' +
        'the short-history floor (tolerance/3 = 5 %/3 = 1.667 %); its ±3σ action limit (±6.00 %) is ' +
        'wider than the tolerance: a single check is too uncertain for this tolerance',
    );
  });

  it('a check without a standard error is judged with the baseline SD or the floor, and says so', () => {
    const tight = baseline.map((r) => 100 + (r - mean) / 5);
    const evaluation = evaluateHistory(
      [...tight, 100.1].map((r, day) => check(day, r, 0)),
      { policy },
    );
    expect(evaluation.checks[8]?.sigma).toMatchObject({ basis: 'floor', valuePct: 0.5, checkSePct: null });
    expect(evaluation.checks[8]?.sigma?.reason).toMatch(/is smaller, and the check has no standard error/);
  });

  it('chooseSigma takes the largest of the three (a table of cases)', () => {
    const complete = { size: 8, have: 8, sdPct: 0.6, meanPct: 100, from: '2026-01-01', to: '2026-02-01' };
    const cases: [number | undefined, number | undefined, number, string][] = [
      // [sd, se, expected σ, expected basis]; floor tolerance/10 = 0.5
      [0.6, 0.4, 0.6, 'baseline'],
      [0.6, 0.7, 0.7, 'check-se'],
      [0.6, undefined, 0.6, 'baseline'],
      [0.3, 0.4, 0.5, 'floor'],
      [0.3, undefined, 0.5, 'floor'],
      [undefined, 0.4, 5 / 3, 'floor'],
      [undefined, 1.9, 1.9, 'check-se'],
    ];
    for (const [sdPct, se, expected, basis] of cases) {
      const state = sdPct === undefined ? { size: 8, have: 3 } : { ...complete, sdPct };
      const sigma = chooseSigma(policy, state, se);
      expect(sigma.valuePct, `sd ${sdPct}, se ${se}`).toBeCloseTo(expected, 14);
      expect(sigma.basis, `sd ${sdPct}, se ${se}`).toBe(basis);
    }
  });

  it("derives the check's standard error in % of the certified value", () => {
    expect(checkStandardErrorPct({ se: 0.6, certified: 50 })).toBeCloseTo(1.2, 14);
    expect(checkStandardErrorPct({ se: 0, certified: 50 })).toBeUndefined();
    expect(checkStandardErrorPct({ se: 0.6, certified: 0 })).toBeUndefined();
    expect(checkStandardErrorPct({ se: Number.NaN, certified: 50 })).toBeUndefined();
  });
});

describe('σ multiples are printed with the digits they can carry', () => {
  it.each([
    [2.104, '+2.10σ'],
    [-2.104, '−2.10σ'],
    [9.996, '+10.0σ'],
    [-12.44, '−12.4σ'],
    [99.96, '+100σ'],
    [245.4, '+245σ'],
    [999.4, '+999σ'],
    [999.6, 'more than +999σ'],
    [4.85e13, 'more than +999σ'],
    [-Infinity, 'more than −999σ'],
  ])('%s → %s', (z, text) => {
    expect(formatSigmaMultiple(z)).toBe(text);
  });

  it('never prints an exponent in any reason, even for a check far outside the tolerance', () => {
    const records = [
      ...Array.from({ length: 9 }, (_, day) => check(day, 100.74, 1e-9)),
      check(9, 40, 1e-9),
      check(10, 1, 1e-9),
    ];
    const evaluation = evaluateHistory(records, { policy });
    const text = span(evaluation.checks)
      .flatMap((c) => [...c.reasons, c.sigma?.reason ?? ''])
      .join('\n');
    expect(text).not.toMatch(/\de[+-]?\d/);
    // σ is the floor 0.5 %: 40 % recovery is at −120σ, 1 % at −198σ.
    expect(text).toMatch(/the check of 2026-03-11 is at −120σ, beyond −3σ/);
    expect(text).toMatch(/the check of 2026-03-12 is at −198σ, beyond −3σ/);
  });
});
