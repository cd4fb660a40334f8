import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import { curveLimits, straightLineLimits } from '../../src/stats/detection.js';
import { tQuantile } from '../../src/stats/distributions.js';
import { expectAbsolute, expectRelative } from '../fixtures/nist-strd/nist.js';

// Source: DIN 32645 worked example (tests/fixtures/din32645/worked-example.json).
const din = JSON.parse(
  readFileSync(new URL('../fixtures/din32645/worked-example.json', import.meta.url), 'utf8'),
) as {
  data: { concentration: number[] };
  printed: {
    slope: number;
    residualSD: number;
    methodSD: number;
    relativeMethodSDPercent: number;
    decisionLimit: { value: number };
    detectionLimit: { value: number };
    determinationLimit: { value: number };
  };
};
const x = din.data.concentration;
const n = x.length;
const meanX = x.reduce((a, b) => a + b, 0) / n;
const sxx = x.reduce((sum, v) => sum + (v - meanX) ** 2, 0);
const input = { n, slope: din.printed.slope, residualSD: din.printed.residualSD, meanX, sxx };

describe('straightLineLimits, DIN 32645 worked example (α = 0.01)', () => {
  const limits = straightLineLimits(input, { alpha: 0.01 });

  it('method SD s_x0 = 0.019902 and V_x0 = 7.237 %', () => {
    expectAbsolute(limits.methodSD, din.printed.methodSD, 5e-7, 's_x0');
    expectAbsolute(100 * limits.relativeMethodSD, din.printed.relativeMethodSDPercent, 5e-4, 'V_x0 %');
  });

  it('decision limit x_C = 0.0698', () => {
    expectAbsolute(limits.decision.value as number, din.printed.decisionLimit.value, 5e-5, 'x_C');
    expect(limits.decision.definition).toMatch(
      /DIN 32645.*x_C = s_x0·t\(1−α, f\)·√\(1\/m \+ 1\/n \+ x̄²\/Sxx\), α = 0\.01, f = n − 2 = 8, m = 1/,
    );
  });

  it('detection limit x_D = 0.14 (= 2·x_C for α = β)', () => {
    expectAbsolute(limits.detection.value as number, din.printed.detectionLimit.value, 5e-3, 'x_D');
    expectRelative(
      limits.detection.value as number,
      2 * (limits.decision.value as number),
      1e-14,
      'x_D = 2 x_C',
    );
    expect(limits.detection.definition).toMatch(/α = β, so x_D = 2·x_C exactly/);
  });

  it('determination limit x_Q = 0.212 (k = 3, iterative)', () => {
    expectAbsolute(limits.determination.value as number, din.printed.determinationLimit.value, 5e-4, 'x_Q');
    const xq = limits.determination.value as number;
    // The fixed point satisfies its defining equation (DIN 32645).
    const rhs = 3 * limits.methodSD * tQuantile(0.995, 8) * Math.sqrt(1 + 1 / n + (xq - meanX) ** 2 / sxx);
    expectRelative(xq, rhs, 1e-12, 'x_Q fixed point');
    expect(limits.determination.definition).toMatch(/iteratively, k = 3/);
  });

  // Source: ICH Q2(R1), limits "based on the standard deviation of the response and the slope":
  // LOD = 3.3σ/S, LOQ = 10σ/S (from memory).
  it('ICH Q2 limits 3.3σ/b and 10σ/b with σ the residual SD', () => {
    expectRelative(
      limits.ichDetection.value as number,
      (3.3 * input.residualSD) / input.slope,
      1e-15,
      'ICH LOD',
    );
    expectRelative(
      limits.ichQuantitation.value as number,
      (10 * input.residualSD) / input.slope,
      1e-15,
      'ICH LOQ',
    );
    expect(limits.ichDetection.definition).toMatch(/ICH Q2: 3\.3·σ\/b/);
  });

  it('default α = 0.05 and β other than α follow the DIN 32645 formula', () => {
    const defaults = straightLineLimits(input);
    expect(defaults.alpha).toBe(0.05);
    const factor = limits.methodSD * Math.sqrt(1 + 1 / n + meanX ** 2 / sxx);
    expectRelative(defaults.decision.value as number, factor * tQuantile(0.95, 8), 1e-14, 'x_C at α = 0.05');
    const unequal = straightLineLimits(input, { alpha: 0.05, beta: 0.1 });
    expectRelative(
      unequal.detection.value as number,
      factor * (tQuantile(0.95, 8) + tQuantile(0.9, 8)),
      1e-14,
      'x_D with β = 0.1',
    );
    expect(unequal.detection.definition).not.toMatch(/2·x_C/);
    const twoReplicates = straightLineLimits(input, { alpha: 0.01, replicates: 2 });
    expect(twoReplicates.decision.value as number).toBeLessThan(limits.decision.value as number);
  });

  it('refuses invalid inputs with the parameter named', () => {
    expect(() => straightLineLimits(input, { alpha: 0.6 })).toThrow(BandwrightError);
    expect(() => straightLineLimits(input, { alpha: 0.6 })).toThrow(/alpha = 0.6, must be between 0 and 0.5/);
    expect(() => straightLineLimits({ ...input, slope: 0 })).toThrow(
      /slope = 0, must be a finite non-zero number/,
    );
    expect(() => straightLineLimits({ ...input, n: 2 })).toThrow(/n = 2, must be an integer >= 3/);
    expect(() => straightLineLimits(input, { replicates: 0 })).toThrow(
      /replicates = 0, must be an integer >= 1/,
    );
  });
});

describe('curveLimits', () => {
  // The delta-method generalisation reduces to the DIN 32645 formulas for an unweighted straight
  // line: Var ŷ(x) = s²(1/n + (x − x̄)²/Sxx), slope b everywhere.
  it('reproduces the DIN straight-line limits', () => {
    const s = input.residualSD;
    const generic = curveLimits(
      {
        degreesOfFreedom: n - 2,
        residualSD: s,
        slopeAt: () => input.slope,
        fittedVarianceAt: (c) => s * s * (1 / n + (c - meanX) ** 2 / sxx),
        weightAt: () => 1,
        description: 'straight line',
      },
      { alpha: 0.01 },
    );
    const exact = straightLineLimits(input, { alpha: 0.01 });
    for (const key of [
      'decision',
      'detection',
      'determination',
      'ichDetection',
      'ichQuantitation',
    ] as const) {
      expectRelative(generic[key].value as number, exact[key].value as number, 1e-12, key);
    }
    expect(generic.decision.definition).toMatch(/delta method.*straight line/);
  });

  it('returns null limits with the reason when the slope at zero is 0', () => {
    const limits = curveLimits({
      degreesOfFreedom: 5,
      residualSD: 1,
      slopeAt: (c) => 2 * c,
      fittedVarianceAt: () => 0.1,
      weightAt: () => 1,
      description: 'test curve',
    });
    expect(limits.decision.value).toBeNull();
    expect(limits.decision.definition).toMatch(/slope at zero concentration is 0/);
    expect(JSON.parse(JSON.stringify(limits))).toEqual(limits);
  });
});
