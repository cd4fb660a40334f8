/**
 * Control chart: limit lines at their recoveries, checks marked by verdict, rule violations
 * ringed and labelled, the trend and its projection; and the chart built from a drift evaluation.
 *
 * Sources: Shewhart limits at ±2σ (warning) and ±3σ (action) around the certified value, and the
 * tolerance band (DESIGN §3 "Drift"; common practice); the Westgard multirule names (Westgard et
 * al., Clinical Chemistry 27 (1981) 493, in facts.md); recovery % = measured/certified × 100
 * (common practice). Pixels follow the SVG viewBox mapping (W3C SVG 1.1 §7.7). The CUSUM panel
 * draws the tabular sums of ISO 7870-4 (C⁺ upwards, C⁻ downwards) with the decision interval ±h.
 */
import { describe, expect, it } from 'vitest';
import { evaluateHistory } from '../../src/drift/evaluate.js';
import type { CheckRecord } from '../../src/drift/record.js';
import { renderControlChart, wrapWords, type ControlChartInput } from '../../src/report/svg/control-chart.js';
import { controlChartFromEvaluation } from '../../src/report/svg/control-chart-data.js';
import {
  byClass,
  numberAttribute,
  parseMarkup,
  pathPoints,
  textOf,
  translation,
  type Node,
} from './markup-tree.js';

const DAY = 86_400_000;
const START = Date.parse('2026-09-01T09:30:00Z');
const at = (day: number): string => new Date(START + day * DAY).toISOString();

const input: ControlChartInput = {
  records: [
    { time: at(0), recoveryPct: 100.5, verdict: 'pass', rules: [] },
    { time: at(7), recoveryPct: 99.2, verdict: 'pass', rules: [] },
    { time: at(14), recoveryPct: 103.6, verdict: 'warning', rules: ['1-2s'], label: 'check <3>.jdx' },
    { time: at(21), recoveryPct: 94.1, verdict: 'fail', rules: ['1-3s'] },
  ],
  centrePct: 100,
  tolerancePct: 5,
  sigmaPct: 1.5,
  sigmaSource: 'tolerance/3 until 8 checks exist',
  trend: {
    slopePctPerDay: -0.1,
    interceptPct: 100,
    originTime: at(0),
    fittedFrom: at(0),
    fittedTo: at(21),
    projectUntil: at(60),
    leavesToleranceAt: at(50),
  },
};

function panelOf(svg: Node): { left: number; top: number; width: number; height: number } {
  const rect = byClass(svg, 'panel-frame')[0] as Node;
  return {
    left: numberAttribute(rect, 'x'),
    top: numberAttribute(rect, 'y'),
    width: numberAttribute(rect, 'width'),
    height: numberAttribute(rect, 'height'),
  };
}

describe('control chart', () => {
  const svg = parseMarkup(renderControlChart(input, { id: 'cc', recoveryDomain: [90, 110] }));
  const panel = panelOf(svg);
  const toY = (pct: number): number => panel.top + panel.height - ((pct - 90) / 20) * panel.height;

  it('draws the centre, tolerance, ±2σ and ±3σ lines at their recoveries', () => {
    const ys = (cls: string): number[] =>
      byClass(svg, cls)
        .map((n) => numberAttribute(n, 'y1'))
        .sort((a, b) => a - b);
    const near = (actual: number[], expected: number[]): void =>
      expected.forEach((e, i) => expect(Math.abs((actual[i] as number) - e)).toBeLessThanOrEqual(0.5));
    near(ys('centre-line'), [toY(100)]);
    near(ys('tolerance-line'), [toY(105), toY(95)]);
    near(ys('warning-line'), [toY(103), toY(97)]);
    near(ys('action-line'), [toY(104.5), toY(95.5)]);
  });

  it('marks every check by verdict at its recovery, rings those where a rule fired and names the rule', () => {
    const checks = byClass(svg, 'check');
    expect(checks.map((c) => c.attributes['data-verdict'])).toEqual(['pass', 'pass', 'warning', 'fail']);
    checks.forEach((c, i) =>
      expect(Math.abs(translation(c)[1] - toY(input.records[i]?.recoveryPct as number))).toBeLessThanOrEqual(
        0.5,
      ),
    );
    // Check times map linearly onto the time axis: equal weekly steps, equal pixel steps.
    const xs = checks.map((c) => translation(c)[0]);
    expect(Math.abs(xs[1]! - xs[0]! - (xs[3]! - xs[2]!))).toBeLessThanOrEqual(0.5);
    expect(byClass(svg, 'rule-violation')).toHaveLength(2);
    expect(byClass(svg, 'rule-label').map(textOf)).toEqual(['1-2s', '1-3s']);
    expect(textOf(checks[2] as Node)).toContain('check <3>.jdx');
  });

  it('draws the trend over the fitted checks, the projection beyond, and where it leaves the tolerance', () => {
    const trend = pathPoints(byClass(svg, 'trend-line')[0]?.attributes.d ?? '');
    const checks = byClass(svg, 'check');
    expect(Math.abs((trend[0]?.x ?? NaN) - translation(checks[0] as Node)[0])).toBeLessThanOrEqual(0.5);
    expect(Math.abs((trend[0]?.y ?? NaN) - toY(100))).toBeLessThanOrEqual(0.5);
    expect(Math.abs((trend[1]?.y ?? NaN) - toY(100 - 2.1))).toBeLessThanOrEqual(0.5);
    const projection = pathPoints(byClass(svg, 'trend-projection')[0]?.attributes.d ?? '');
    expect(Math.abs((projection[1]?.y ?? NaN) - toY(100 - 6))).toBeLessThanOrEqual(0.5);
    const leaves = byClass(svg, 'leaves-tolerance')[0] as Node;
    expect(leaves.attributes['data-time']).toBe(at(50));
    expect(textOf(svg)).toContain('projected trend leaves the tolerance on 2026-10-21');
    expect(textOf(svg)).toContain('σ: tolerance/3 until 8 checks exist');
    expect(byClass(svg, 'axis-label').map(textOf)).toEqual(['check time (UTC)', 'recovery / %']);
  });

  it('refuses a time that is not ISO 8601 and a σ that is not positive', () => {
    expect(() =>
      renderControlChart({
        ...input,
        records: [{ time: 'last Tuesday', recoveryPct: 100, verdict: 'pass', rules: [] }],
      }),
    ).toThrow(/records\[0\]\.time = "last Tuesday", must be an ISO 8601 time/);
    expect(() => renderControlChart({ ...input, sigmaPct: 0 })).toThrow(/sigmaPct = 0, must be > 0/);
  });

  it('wraps long notes at spaces', () => {
    expect(wrapWords('a bb ccc dddd', 6)).toEqual(['a bb', 'ccc', 'dddd']);
  });
});

describe('control chart from a drift evaluation', () => {
  const record = (day: number, recovery: number, certified = 100): CheckRecord => ({
    time: at(day),
    recordedAt: at(day),
    gas: 'CO',
    unit: 'ppm',
    certified,
    measured: (recovery * certified) / 100,
    low: (recovery * certified) / 100 - 1,
    high: (recovery * certified) / 100 + 1,
    se: 0.5,
    verdict: 'pass',
    rules: [],
    tolerancePct: 5,
    scan: `check-${day}.jdx`,
    scanSha256: 'a'.repeat(64),
    toolVersion: '0.1.0',
  });
  // A steady drift of −0.5 % a week, then a check beyond the tolerance.
  const records = [0, 1, 2, 3, 4, 5, 6, 7, 8].map((k) =>
    record(7 * k, 100.5 - 0.5 * k + (k % 2 === 0 ? 0.2 : -0.2)),
  );
  records.push(record(63, 94.0));
  records.push({ ...record(64, 0, 0), measured: 0.1, low: -0.9, high: 1.1 });
  const evaluation = evaluateHistory(records, { policy: { everyDays: 7, tolerancePct: 5 } });
  const chart = controlChartFromEvaluation(evaluation, { nextDue: at(70) });

  it('carries every span check with its verdict and rules, the σ in force and its reason, and leaves zero gas off', () => {
    expect(chart.records).toHaveLength(10);
    expect(chart.records.map((r) => r.verdict)).toEqual(
      evaluation.spanChecks.map((i) => evaluation.checks[i]?.verdict),
    );
    expect(chart.records[9]?.verdict).toBe('fail');
    expect(chart.records[9]?.recoveryPct).toBeCloseTo(94, 10);
    expect(chart.sigmaPct).toBe(evaluation.sigma.valuePct);
    expect(chart.sigmaSource).toBe(evaluation.sigma.reason);
    expect(chart.tolerancePct).toBe(5);
    expect(chart.nextDue).toBe(at(70));
  });

  it('takes the trend line from the evaluation and draws it', () => {
    expect(evaluation.trend.status).not.toBe('insufficient');
    expect(chart.trend?.slopePctPerDay).toBe(evaluation.trend.slopePctPerDay);
    expect(chart.trend?.originTime).toBe(evaluation.trend.origin);
    const svg = parseMarkup(renderControlChart(chart));
    expect(byClass(svg, 'check')).toHaveLength(10);
    expect(byClass(svg, 'trend-line')).toHaveLength(1);
    expect(byClass(svg, 'rule-violation').length).toBe(
      chart.records.filter((r) => r.rules.length > 0).length,
    );
  });
});

describe('CUSUM panel under the control chart', () => {
  const cusum = {
    k: 0.5,
    h: 5,
    points: [
      { time: at(0), upper: 0, lower: 0.2, signal: null },
      { time: at(7), upper: 0, lower: 2.4, signal: null },
      { time: at(14), upper: 1.1, lower: 0, signal: null },
      { time: at(21), upper: 0, lower: 6.3, signal: 'below' as const },
    ],
  };
  const svg = parseMarkup(renderControlChart({ ...input, cusum }, { id: 'cs', recoveryDomain: [90, 110] }));
  const frames = byClass(svg, 'panel-frame');

  it('sits under the chart on the same time axis', () => {
    expect(frames).toHaveLength(2);
    const [chart, sums] = frames.map((f) => ({
      left: numberAttribute(f, 'x'),
      top: numberAttribute(f, 'y'),
      width: numberAttribute(f, 'width'),
      height: numberAttribute(f, 'height'),
    }));
    expect(frames[1]?.attributes['data-panel']).toBe('cusum');
    expect(sums!.top).toBeGreaterThan(chart!.top + chart!.height);
    expect([sums!.left, sums!.width]).toEqual([chart!.left, chart!.width]);
    const checkXs = byClass(svg, 'check').map((c) => translation(c)[0]);
    const sumXs = byClass(svg, 'cusum-point')
      .filter((_, i) => i % 2 === 0)
      .map((c) => translation(c)[0]);
    sumXs.forEach((x, i) => expect(Math.abs(x - (checkXs[i] as number))).toBeLessThanOrEqual(0.5));
  });

  it('draws C⁺ up and C⁻ down from zero, the decision interval ±h, and marks the signal', () => {
    const zero = numberAttribute(byClass(svg, 'cusum-zero')[0] as Node, 'y1');
    const decision = byClass(svg, 'decision-line');
    expect(decision.map((d) => d.attributes['data-value'])).toEqual(['5', '-5']);
    const plus = numberAttribute(decision[0] as Node, 'y1');
    const minus = numberAttribute(decision[1] as Node, 'y1');
    // Linear axis: +h and −h are equally far from zero, +h above.
    expect(plus).toBeLessThan(zero);
    expect(Math.abs(zero - plus - (minus - zero))).toBeLessThanOrEqual(0.5);
    const perSigma = (zero - plus) / 5;
    const points = byClass(svg, 'cusum-point');
    // The 2nd check: C⁻ = 2.4 drawn at −2.4; the 3rd: C⁺ = 1.1 at +1.1.
    expect(Math.abs(translation(points[3] as Node)[1] - (zero + 2.4 * perSigma))).toBeLessThanOrEqual(0.5);
    expect(Math.abs(translation(points[4] as Node)[1] - (zero - 1.1 * perSigma))).toBeLessThanOrEqual(0.5);
    const signals = byClass(svg, 'cusum-signal');
    expect(signals.map((n) => [n.attributes['data-signal'], n.attributes['data-time']])).toEqual([
      ['below', at(21)],
    ]);
    expect(byClass(svg, 'cusum-upper')).toHaveLength(1);
    expect(byClass(svg, 'cusum-lower')).toHaveLength(1);
    expect(textOf(svg)).toContain('k = 0.5σ, decision interval h = 5σ');
    expect(byClass(svg, 'axis-label').map(textOf)).toEqual([
      'check time (UTC)',
      'recovery / %',
      'check time (UTC)',
      'sum / σ',
    ]);
  });

  it('comes from the evaluation: the sums of every span check', () => {
    const records = [100.2, 99.1, 98.4, 97.9, 97.1].map((r, k) => ({
      time: at(7 * k),
      recordedAt: at(7 * k),
      gas: 'CO',
      unit: 'ppm' as const,
      certified: 100,
      measured: r,
      low: r - 1,
      high: r + 1,
      se: 0.5,
      verdict: 'pass' as const,
      rules: [],
      tolerancePct: 5,
      scan: `c${k}.jdx`,
      scanSha256: 'a'.repeat(64),
      toolVersion: '0.1.0',
    }));
    const evaluation = evaluateHistory(records, { policy: { everyDays: 7, tolerancePct: 5 } });
    const chart = controlChartFromEvaluation(evaluation);
    expect(chart.cusum?.h).toBe(5);
    expect(chart.cusum?.points.map((p) => p.lower)).toEqual(evaluation.checks.map((c) => c.cusum?.lower));
  });

  it('refuses h ≤ 0', () => {
    expect(() => renderControlChart({ ...input, cusum: { ...cusum, h: 0 } })).toThrow(
      /cusum\.h = 0, must be > 0/,
    );
  });
});
