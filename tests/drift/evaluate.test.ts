/**
 * Judging checks over a history: tolerance, control rules, σ before and after the baseline,
 * zero-gas checks, time order, several gases.
 *
 * Sources: the rule definitions of Westgard et al., Clinical Chemistry 27 (1981) 493 (facts.md);
 * σ = tolerance/3 until a baseline of 8 checks (the short-history floor), then the baseline SD
 * frozen (Shewhart phase I / phase II, common practice; DESIGN §3), never below the check's own
 * standard error nor the floor (tests/drift/sigma.test.ts); recovery % = measured/certified × 100
 * (common practice); the sample SD with n − 1 (its definition).
 */
import { describe, expect, it } from 'vitest';
import { evaluateHistory, judgeCheck, controlLimits, type EvaluatedCheck } from '../../src/drift/evaluate.js';
import type { CheckRecord } from '../../src/drift/record.js';
import { DAY_MS } from '../../src/drift/trend.js';

const START = Date.parse('2026-03-02T09:00:00Z');
const policy = { everyDays: 7, tolerancePct: 5 };

/** A check of a 100 ppm standard on day `day` with the given recovery and a ±1 % interval. */
function check(day: number, recovery: number, extra: Partial<CheckRecord> = {}): CheckRecord {
  const measured = recovery;
  return {
    time: new Date(START + day * DAY_MS).toISOString(),
    recordedAt: new Date(START + day * DAY_MS).toISOString(),
    gas: 'CO',
    unit: 'ppm',
    certified: 100,
    measured,
    low: measured - 1,
    high: measured + 1,
    se: 0.5,
    detectionLimit: 4,
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

function series(recoveries: number[]): CheckRecord[] {
  return recoveries.map((r, k) => check(7 * k, r));
}

const last = (checks: EvaluatedCheck[]): EvaluatedCheck => checks[checks.length - 1] as EvaluatedCheck;

describe('σ: tolerance/3 until the baseline exists, then the baseline SD, frozen', () => {
  it('uses tolerance/3 for the first checks and says why', () => {
    const evaluation = evaluateHistory(series([100.4, 99.6, 100.2]), { policy });
    const sigma = last(evaluation.checks).sigma;
    expect(sigma?.basis).toBe('floor');
    expect(sigma?.shortHistory).toBe(true);
    expect(sigma?.reason).toMatch(/the history is too short to estimate σ/);
    expect(sigma?.valuePct).toBeCloseTo(5 / 3, 14);
    expect(sigma?.reason).toMatch(
      /σ = tolerance\/3 = 5 %\/3 = 1\.667 %: 2 of the 8 baseline checks within tolerance exist so far, so the ±3σ action limit is the tolerance/,
    );
    expect(last(evaluation.checks).limits?.action).toEqual([95, 105]);
  });

  it('freezes σ to the SD of the first 8 checks within tolerance (a failed check is not part of it)', () => {
    const baseline = [99.5, 100.5, 99.0, 101.0, 99.8, 100.2, 99.3, 100.7];
    // Check 3 (93 %) is outside the ±5 % tolerance and is left out of the baseline.
    const recoveries = [baseline[0], baseline[1], 93, ...baseline.slice(2), 100.1, 98.9] as number[];
    const evaluation = evaluateHistory(series(recoveries), { policy });
    const mean = baseline.reduce((s, v) => s + v, 0) / 8;
    const sd = Math.sqrt(baseline.reduce((s, v) => s + (v - mean) ** 2, 0) / 7);
    expect(evaluation.baseline.complete).toBe(true);
    expect(evaluation.baseline.checks).toEqual([0, 1, 3, 4, 5, 6, 7, 8]);
    expect(evaluation.baseline.sdPct).toBeCloseTo(sd, 12);
    // The 9th baseline check itself was judged with tolerance/3; the checks after it with the frozen SD.
    expect(evaluation.checks[8]?.sigma?.basis).toBe('floor');
    expect(evaluation.checks[9]?.sigma).toMatchObject({ basis: 'baseline' });
    expect(evaluation.checks[9]?.sigma?.valuePct).toBeCloseTo(sd, 12);
    expect(evaluation.checks[10]?.sigma?.valuePct).toBeCloseTo(sd, 12);
    expect(evaluation.sigma.reason).toMatch(
      /the SD of the first 8 checks within tolerance \(2026-03-02 to 2026-04-27, mean 100\.00 %\), frozen so that later drift cannot widen the limits/,
    );
    expect(evaluation.limits.warning[0]).toBeCloseTo(100 - 2 * sd, 12);
  });

  it('does not re-estimate σ from later checks, however they drift', () => {
    const calm = [99.5, 100.5, 99.0, 101.0, 99.8, 100.2, 99.3, 100.7];
    const drifting = [...calm, 99, 98, 97, 96];
    const a = evaluateHistory(series(calm.concat([100])), { policy });
    const b = evaluateHistory(series(drifting), { policy });
    expect(b.sigma.valuePct).toBe(a.sigma.valuePct);
  });

  it('does not let a baseline SD of 0 set σ: the floor (here equal to the standard error) does, and says so', () => {
    // se 0.5 ppm of 100 ppm = 0.5 %; floor tolerance/10 = 0.5 %.
    const evaluation = evaluateHistory(series(new Array<number>(9).fill(100)), { policy });
    expect(evaluation.sigma.basis).toBe('floor');
    expect(evaluation.sigma.valuePct).toBe(0.5);
    expect(evaluation.sigma.reason).toMatch(
      /the SD of the 8 baseline checks .*, 0\.000 %, and this check's standard error, 0\.500 %, are both smaller/,
    );
  });

  it('notes when the baseline is too scattered for the tolerance (±3σ wider than the tolerance)', () => {
    const evaluation = evaluateHistory(series([97, 103, 96.5, 103.5, 97, 103, 96.5, 103.5]), { policy });
    expect(evaluation.sigma.basis).toBe('baseline');
    expect(evaluation.sigma.reason).toMatch(/wider than the tolerance/);
  });
});

describe('verdicts', () => {
  it('fails a check outside the tolerance, and says so with the limits', () => {
    const evaluation = evaluateHistory(series([100, 94.2]), { policy });
    const latest = last(evaluation.checks);
    expect(latest.verdict).toBe('fail');
    expect(latest.outsideTolerance).toBe(true);
    expect(latest.reasons[0]).toBe('recovery 94.20 % is outside the tolerance 95.00–105.00 %');
  });

  it('keeps a check exactly on the tolerance limit inside it (a warning: 1-2s, not 1-3s)', () => {
    const latest = last(
      evaluateHistory([check(0, 100), check(7, 95, { low: 94.5, high: 95.5 })], { policy }).checks,
    );
    expect(latest.outsideTolerance).toBe(false);
    expect(latest.rules.map((r) => r.rule)).toEqual(['1-2s']);
    expect(latest.verdict).toBe('warning');
  });

  it('fails a check within the tolerance when a reject rule fires (2-2s), naming the rule', () => {
    // σ = 5/3: 96.5 % is −2.1σ, twice in a row.
    const latest = last(evaluateHistory(series([100, 96.5, 96.5]), { policy }).checks);
    expect(latest.verdict).toBe('fail');
    expect(latest.rules.map((r) => r.rule)).toEqual(['1-2s', '2-2s']);
    expect(latest.reasons[0]).toBe(
      'recovery 96.50 % is within the tolerance, but the check is out of statistical control: 2-2s fired',
    );
    expect(
      latest.reasons.some((r) =>
        r.startsWith(
          '2-2s: the check of 2026-03-09 (−2.10σ) and the check of 2026-03-16 (−2.10σ) are both beyond −2σ',
        ),
      ),
    ).toBe(true);
  });

  it('warns on 1-2s alone', () => {
    const latest = last(evaluateHistory(series([100, 96.5]), { policy }).checks);
    expect(latest.verdict).toBe('warning');
    expect(latest.reasons[0]).toBe('recovery 96.50 % is within the tolerance; warning rule 1-2s fired');
  });

  it('warns when the prediction interval reaches beyond the tolerance although the recovery is inside', () => {
    const latest = last(
      evaluateHistory([check(0, 100), check(7, 98, { low: 94.6, high: 101.4 })], { policy }).checks,
    );
    expect(latest.rules).toEqual([]);
    expect(latest.nearTolerance).toBe(true);
    expect(latest.verdict).toBe('warning');
    expect(latest.reasons[0]).toMatch(
      /the prediction interval 94\.60–101\.40 % reaches beyond the tolerance 95\.00–105\.00 %/,
    );
  });

  it('passes a check inside the tolerance with no rule fired', () => {
    const latest = last(evaluateHistory(series([100.5, 99.2]), { policy }).checks);
    expect(latest.verdict).toBe('pass');
    expect(latest.reasons).toEqual([
      'recovery 99.20 % is within the tolerance 95.00–105.00 % and no control rule fired',
    ]);
  });

  it('evaluates 10-x and 4-1s on the history once σ is the baseline SD', () => {
    // Baseline SD of ±0.5 alternation ≈ 0.53 %; then a shift to +0.7 % (> 1σ) for four checks.
    const calm = [99.5, 100.5, 99.5, 100.5, 99.5, 100.5, 99.5, 100.5];
    const evaluation = evaluateHistory(series([...calm, 100.7, 100.7, 100.7, 100.7]), { policy });
    const latest = last(evaluation.checks);
    expect(latest.sigma?.basis).toBe('baseline');
    expect(latest.rules.map((r) => r.rule)).toContain('4-1s');
    expect(latest.verdict).toBe('fail');
    const three = evaluateHistory(series([...calm, 100.7, 100.7, 100.7]), { policy });
    expect(last(three.checks).rules.map((r) => r.rule)).not.toContain('4-1s');
  });
});

describe('zero-gas checks', () => {
  const zero = (day: number, measured: number, extra: Partial<CheckRecord> = {}): CheckRecord => {
    const { recoveryPct: _none, ...rest } = check(day, 0, {
      certified: 0,
      measured,
      low: measured - 2,
      high: measured + 2,
      ...extra,
    });
    return rest;
  };

  it('passes when |measured| is below the detection limit, fails when not, and says so', () => {
    const ok = last(evaluateHistory([zero(0, -1.2)], { policy }).checks);
    expect(ok).toMatchObject({ kind: 'zero', verdict: 'pass' });
    expect(ok.reasons[0]).toBe(
      'zero gas: |measured| = 1.200 ppm is below the detection limit 4.000 ppm, consistent with zero',
    );
    const shifted = last(evaluateHistory([zero(0, 4.5)], { policy }).checks);
    expect(shifted.verdict).toBe('fail');
    expect(shifted.reasons[0]).toMatch(/is not below the detection limit 4\.000 ppm: the zero has shifted/);
  });

  it('judges by the prediction interval when the calibration has no detection limit', () => {
    const noLimit = (measured: number): CheckRecord => {
      const { detectionLimit: _none, ...rest } = zero(0, measured);
      return rest;
    };
    expect(last(evaluateHistory([noLimit(1.5)], { policy }).checks).verdict).toBe('pass');
    const fail = last(evaluateHistory([noLimit(2.5)], { policy }).checks);
    expect(fail.verdict).toBe('fail');
    expect(fail.reasons[0]).toMatch(/interval 0\.500–4\.500 ppm excludes 0/);
  });

  it('leaves zero checks out of the control chart series and the trend', () => {
    const records = [check(0, 100), zero(1, 0.3), check(7, 96.5), zero(8, 0.1), check(14, 96.5)];
    const evaluation = evaluateHistory(records, { policy });
    expect(evaluation.spanChecks).toEqual([0, 2, 4]);
    // 2-2s still sees the two span checks as consecutive.
    expect(evaluation.checks[4]?.rules.map((r) => r.rule)).toContain('2-2s');
    expect(evaluation.trend.status).toBe('insufficient');
  });
});

describe('order, gases, recorded verdicts', () => {
  it('evaluates in time order whatever the order of the file (checks recorded later with --at)', () => {
    const inOrder = series([100, 96.5, 96.5]);
    const shuffled = [inOrder[2], inOrder[0], inOrder[1]] as CheckRecord[];
    const a = evaluateHistory(inOrder, { policy });
    const b = evaluateHistory(shuffled, { policy });
    expect(b.checks.map((c) => c.record.time)).toEqual(a.checks.map((c) => c.record.time));
    expect(b.checks.map((c) => c.verdict)).toEqual(['pass', 'warning', 'fail']);
  });

  it('needs the gas when the history holds several, and evaluates only that gas', () => {
    const records = [check(0, 100), check(0, 90, { gas: 'NO' }), check(7, 96.5), check(7, 99, { gas: 'NO' })];
    expect(() => evaluateHistory(records, { policy })).toThrow(
      /the history holds checks of CO, NO; name the gas to evaluate \(`gas`\)/,
    );
    const no = evaluateHistory(records, { policy, gas: 'NO' });
    expect(no.checks.map((c) => c.record.measured)).toEqual([90, 99]);
  });

  it('notes a recorded verdict that differs under another tolerance', () => {
    const evaluation = evaluateHistory([check(0, 100), check(7, 96, { verdict: 'warning', line: 4 })], {
      policy: { everyDays: 7, tolerancePct: 3 },
    });
    expect(evaluation.notes).toEqual([
      'the check of 2026-03-09 (history line 4) was recorded as warning (tolerance ±5 %) and is judged fail now (tolerance ±3 %)',
    ]);
  });

  it('judgeCheck completes the new record with its verdict, rules and σ, without a note about itself', () => {
    const { verdict: _v, rules: _rules, tolerancePct: _t, ...measurement } = check(14, 96.5);
    const judged = judgeCheck(
      [check(0, 100), check(7, 96.5, { verdict: 'warning', rules: ['1-2s'] })],
      measurement,
      { policy },
    );
    expect(judged.record.verdict).toBe('fail');
    expect(judged.record.rules).toEqual(['1-2s', '2-2s']);
    expect(judged.record.sigmaPct).toBeCloseTo(5 / 3, 14);
    expect(judged.record.tolerancePct).toBe(5);
    expect(judged.check.record).toBe(judged.record);
    expect(judged.evaluation.latest?.record).toBe(judged.record);
    expect(judged.evaluation.notes).toEqual([]);
  });

  it('refuses a tolerance that is not a percentage between 0 and 100', () => {
    expect(() => evaluateHistory([], { policy: { everyDays: 7, tolerancePct: 0 } })).toThrow(
      /tolerance = 0 %, must be a percentage > 0 and < 100/,
    );
  });

  it('gives ±1σ, ±2σ, ±3σ and the tolerance around 100 %', () => {
    expect(controlLimits(1.5, 5)).toEqual({
      centrePct: 100,
      sigmaPct: 1.5,
      oneSigma: [98.5, 101.5],
      warning: [97, 103],
      action: [95.5, 104.5],
      tolerance: [95, 105],
    });
  });
});
