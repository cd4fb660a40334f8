import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import { fQuantile } from '../../src/stats/distributions.js';
import { leastSquares } from '../../src/stats/least-squares.js';
import { mandelTest } from '../../src/stats/mandel.js';
import { expectAbsolute, loadDataset } from '../fixtures/nist-strd/nist.js';

// Source: DIN 32645 worked example (tests/fixtures/din32645/worked-example.json).
const din = JSON.parse(
  readFileSync(new URL('../fixtures/din32645/worked-example.json', import.meta.url), 'utf8'),
) as {
  data: { concentration: number[]; response: number[] };
  printed: { mandel: { testValue: number; fCritical: number } };
};

function variances(
  x: readonly number[],
  y: readonly number[],
): { n: number; linearResidualVariance: number; quadraticResidualVariance: number } {
  const n = x.length;
  const mean = x.reduce((a, b) => a + b, 0) / n;
  const linear = leastSquares(
    x.map((v) => [1, v - mean]),
    y,
  );
  const quadratic = leastSquares(
    x.map((v) => [1, v - mean, (v - mean) ** 2]),
    y,
  );
  return {
    n,
    linearResidualVariance: linear.rss / (n - 2),
    quadraticResidualVariance: quadratic.rss / (n - 3),
  };
}

describe('mandelTest', () => {
  it('DIN 32645 example: PW = 0.0768 against F(0.99; 1, 7) = 12.246, straight line adequate', () => {
    const result = mandelTest(variances(din.data.concentration, din.data.response));
    expectAbsolute(result.testValue, din.printed.mandel.testValue, 0.00005, 'PW (printed 0.0768)');
    expectAbsolute(result.fCritical, din.printed.mandel.fCritical, 0.0005, 'F(0.99; 1, 7) (printed 12.246)');
    expect(result.significant).toBe(false);
    expect(result.degreesOfFreedom).toEqual([1, 7]);
    expect(result.recommendation).toMatch(
      /does not fit significantly better \(PW = 0\.07681 ≤ F\(0\.99; 1, 7\) = 12\.25\): a straight line is adequate/,
    );
    expect(result.pValue).toBeGreaterThan(0.5);
  });

  // Source: NIST StRD, Pontius — a load-cell calibration NIST certifies as quadratic (the
  // certified x² coefficient is 65 standard errors from zero), so Mandel must call for second order.
  it('NIST Pontius: the second-order curve fits significantly better', () => {
    const { x, y } = loadDataset('pontius');
    const result = mandelTest(
      variances(
        x.map((row) => row[0] as number),
        y,
      ),
    );
    expect(result.significant).toBe(true);
    expect(result.testValue).toBeGreaterThan(1000);
    expect(result.recommendation).toMatch(
      /^the second-order curve fits significantly better \(PW = [0-9.]+ > F\(0\.99; 1, 37\) = 7\.373\): use a second-order calibration$/,
    );
    expect(result.pValue).toBeLessThan(1e-10);
  });

  // Source: NIST StRD, Norris — certified as a straight line (ozone-monitor calibration).
  it('NIST Norris: a straight line is adequate', () => {
    const { x, y } = loadDataset('norris');
    expect(
      mandelTest(
        variances(
          x.map((row) => row[0] as number),
          y,
        ),
      ).significant,
    ).toBe(false);
  });

  it('uses the requested confidence for the critical value', () => {
    const result = mandelTest(
      { n: 12, linearResidualVariance: 2, quadraticResidualVariance: 1 },
      { confidence: 0.95 },
    );
    expect(result.fCritical).toBe(fQuantile(0.95, 1, 9));
    // DS² = 10·2 − 9·1 = 11, PW = 11 (the formula of ISO 8466-1).
    expect(result.ds2).toBeCloseTo(11, 12);
    expect(result.testValue).toBeCloseTo(11, 12);
  });

  it('refuses n < 4 and invalid variances', () => {
    expect(() => mandelTest({ n: 3, linearResidualVariance: 1, quadraticResidualVariance: 1 })).toThrow(
      BandwrightError,
    );
    expect(() => mandelTest({ n: 3, linearResidualVariance: 1, quadraticResidualVariance: 1 })).toThrow(
      /n = 3 standards, needs at least 4/,
    );
    expect(() => mandelTest({ n: 6, linearResidualVariance: -1, quadraticResidualVariance: 1 })).toThrow(
      /linearResidualVariance = -1, must be a finite number >= 0/,
    );
    expect(() =>
      mandelTest({ n: 6, linearResidualVariance: 1, quadraticResidualVariance: Number.NaN }),
    ).toThrow(/quadraticResidualVariance = NaN/);
    expect(() =>
      mandelTest({ n: 6, linearResidualVariance: 1, quadraticResidualVariance: 1 }, { confidence: 1 }),
    ).toThrow(/confidence = 1/);
  });

  it('stays JSON-safe when the quadratic passes through every point', () => {
    const result = mandelTest({ n: 5, linearResidualVariance: 1, quadraticResidualVariance: 0 });
    expect(result.significant).toBe(true);
    expect(JSON.parse(JSON.stringify(result))).toEqual(result);
  });
});
