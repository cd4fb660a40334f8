import fc from 'fast-check';
import { Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { leastSquares, solveLeastSquaresMany } from '../../src/stats/least-squares.js';
import { expectRelative, loadDataset } from '../fixtures/nist-strd/nist.js';
import { expectError } from '../helpers/expect.js';

describe('leastSquares against NIST StRD certified values', () => {
  // Source: NIST StRD, Norris (straight line with intercept). Tolerance 1e-9 relative.
  it('Norris: coefficients, standard errors, residual SD, R²', () => {
    const { x, y, certified } = loadDataset('norris');
    const fit = leastSquares(
      x.map((row) => [1, row[0] as number]),
      y,
      { columnNames: ['B0', 'B1'] },
    );
    certified.B.forEach((value, j) =>
      expectRelative(fit.coefficients[j] as number, value, 1e-9, `Norris B${j}`),
    );
    certified.SE.forEach((value, j) =>
      expectRelative(fit.standardErrors[j] as number, value, 1e-9, `Norris SE(B${j})`),
    );
    expectRelative(fit.residualSD, certified.residualSD, 1e-9, 'Norris residual SD');
    expectRelative(fit.rSquared, certified.R2, 1e-9, 'Norris R²');
    expect(fit.degreesOfFreedom).toBe(certified.dfResidual);
    expect(fit.rSquaredKind).toBe('centred');
    expect(fit.interceptColumn).toBe(0);
  });

  // Source: NIST StRD, NoInt1 and NoInt2 (no intercept; NIST certifies the uncentred R²). 1e-9.
  for (const name of ['noint1', 'noint2'] as const) {
    it(`${name}: through the origin, uncentred R²`, () => {
      const { x, y, certified } = loadDataset(name);
      const fit = leastSquares(x, y);
      expectRelative(fit.coefficients[0] as number, certified.B[0] as number, 1e-9, `${name} B1`);
      expectRelative(fit.standardErrors[0] as number, certified.SE[0] as number, 1e-9, `${name} SE(B1)`);
      expectRelative(fit.residualSD, certified.residualSD, 1e-9, `${name} residual SD`);
      expectRelative(fit.rSquared, certified.R2, 1e-9, `${name} R²`);
      expect(fit.rSquaredKind).toBe('uncentred');
      expect(fit.degreesOfFreedom).toBe(certified.dfResidual);
    });
  }

  // Source: NIST StRD, Pontius (quadratic; x up to 3e6, so x² up to 9e12). Raw, uncentred design
  // through the column-scaled QR. Tolerance 1e-7 relative.
  it('Pontius: raw quadratic design', () => {
    const { x, y, certified } = loadDataset('pontius');
    const fit = leastSquares(
      x.map((row) => [1, row[0] as number, (row[0] as number) ** 2]),
      y,
    );
    certified.B.forEach((value, j) =>
      expectRelative(fit.coefficients[j] as number, value, 1e-7, `Pontius B${j}`),
    );
    certified.SE.forEach((value, j) =>
      expectRelative(fit.standardErrors[j] as number, value, 1e-7, `Pontius SE(B${j})`),
    );
    expectRelative(fit.residualSD, certified.residualSD, 1e-7, 'Pontius residual SD');
    expectRelative(fit.rSquared, certified.R2, 1e-7, 'Pontius R²');
  });

  // Source: NIST StRD, Longley (ill-conditioned multiple regression). Coefficients and standard
  // errors to 1e-7 relative, as the classical-least-squares engine needs.
  it('Longley: seven coefficients of an ill-conditioned design', () => {
    const { x, y, certified } = loadDataset('longley');
    const fit = leastSquares(
      x.map((row) => [1, ...row]),
      y,
      { columnNames: ['B0', 'x1', 'x2', 'x3', 'x4', 'x5', 'x6'] },
    );
    certified.B.forEach((value, j) =>
      expectRelative(fit.coefficients[j] as number, value, 1e-7, `Longley B${j}`),
    );
    certified.SE.forEach((value, j) =>
      expectRelative(fit.standardErrors[j] as number, value, 1e-7, `Longley SE(B${j})`),
    );
    expectRelative(fit.residualSD, certified.residualSD, 1e-7, 'Longley residual SD');
    expectRelative(fit.rSquared, certified.R2, 1e-7, 'Longley R²');
    expect(fit.rank).toBe(7);
    expect(fit.conditionNumber).toBeGreaterThan(1e3);
  });

  it('accepts an ml-matrix Matrix as the design (NIST StRD, Norris)', () => {
    const { x, y, certified } = loadDataset('norris');
    const fit = leastSquares(new Matrix(x.map((row) => [1, row[0] as number])), y);
    expectRelative(fit.coefficients[1] as number, certified.B[1] as number, 1e-9, 'Norris B1 via Matrix');
  });
});

describe('solveLeastSquaresMany', () => {
  // Source: NIST StRD, Longley; the second and third response columns are linear transforms of y,
  // whose least-squares coefficients transform the same way (linearity of least squares).
  it('solves several response columns with one QR and matches the certified Longley fit', () => {
    const { x, y, certified } = loadDataset('longley');
    const design = x.map((row) => [1, ...row]);
    const responses = y.map((value, i) => [
      value,
      2 * value,
      value - 1000 * ((x[i] as number[])[0] as number),
    ]);
    const many = solveLeastSquaresMany(design, responses);
    const single = leastSquares(design, y);
    certified.B.forEach((value, j) => {
      expectRelative((many.coefficients[j] as number[])[0] as number, value, 1e-7, `Longley B${j}, column 0`);
      expectRelative(
        (many.coefficients[j] as number[])[1] as number,
        2 * value,
        1e-7,
        `Longley 2·B${j}, column 1`,
      );
      const shifted = j === 1 ? value - 1000 : value;
      expectRelative(
        (many.coefficients[j] as number[])[2] as number,
        shifted,
        1e-7,
        `Longley B${j} − 1000·[j = 1], column 2`,
      );
    });
    expectRelative(many.residualSumOfSquares[0] as number, single.rss, 1e-9, 'RSS column 0 vs leastSquares');
    expectRelative(many.residualSumOfSquares[1] as number, 4 * single.rss, 1e-9, 'RSS column 1 = 4·RSS');
    expectRelative(
      many.residualSumOfSquares[0] as number,
      certified.residualSD ** 2 * certified.dfResidual,
      1e-7,
      'RSS = s²·df (NIST)',
    );
    // SE from the shared (XᵀX)⁻¹ and the column's RSS reproduce NIST's standard errors.
    certified.SE.forEach((value, j) => {
      const se = Math.sqrt(
        (((many.unscaledCovariance[j] as number[])[j] as number) * (many.residualSumOfSquares[0] as number)) /
          many.degreesOfFreedom,
      );
      expectRelative(se, value, 1e-7, `Longley SE(B${j}) from unscaledCovariance`);
    });
    expect(many.degreesOfFreedom).toBe(9);
  });

  it('refuses collinear designs like leastSquares, naming the columns', () => {
    const design = [
      [1, 2],
      [2, 4],
      [3, 6.0000000000001],
    ];
    expectError(
      () => solveLeastSquaresMany(design, [[1], [2], [3]], { columnNames: ['CO', 'N2O'] }),
      'SINGULAR',
      /design columns CO and N2O are collinear/,
    );
  });
});

describe('weighted least squares', () => {
  // Source: definition of weighted least squares (common practice): an integer weight k on an
  // observation is the same as repeating it k times, for the coefficients and the RSS.
  it('integer weights equal repeated observations (property, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.array(
          fc.tuple(
            fc.double({ min: -50, max: 50, noNaN: true }),
            fc.double({ min: -100, max: 100, noNaN: true }),
            fc.integer({ min: 1, max: 4 }),
          ),
          { minLength: 4, maxLength: 12 },
        ),
        (points) => {
          const xs = points.map((p) => p[0]);
          const spread = Math.max(...xs) - Math.min(...xs);
          fc.pre(spread > 1);
          const weighted = leastSquares(
            points.map((p) => [1, p[0]]),
            points.map((p) => p[1]),
            { weights: points.map((p) => p[2]) },
          );
          const repeated = points.flatMap((p) => Array.from({ length: p[2] }, () => p));
          const plain = leastSquares(
            repeated.map((p) => [1, p[0]]),
            repeated.map((p) => p[1]),
          );
          const scale = 1 + Math.max(...points.map((p) => Math.abs(p[1])));
          for (let j = 0; j < 2; j++) {
            const difference = Math.abs(
              (weighted.coefficients[j] as number) - (plain.coefficients[j] as number),
            );
            if (difference > 1e-9 * scale * (j === 0 ? 1 : 1 + 1 / spread)) return false;
          }
          return Math.abs(weighted.rss - plain.rss) <= 1e-9 * (1 + plain.rss + scale * scale);
        },
      ),
      { seed: 20240607, numRuns: 200 },
    );
  });

  it('refuses weights that are not finite and positive', () => {
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 1],
            [1, 2],
          ],
          [0, 1, 2],
          { weights: [1, 0, 1] },
        ),
      'INVALID_VALUE',
      /weights\[1\] = 0, must be a finite number > 0/,
    );
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 1],
            [1, 2],
          ],
          [0, 1, 2],
          { weights: [1, 1] },
        ),
      'INVALID_VALUE',
      /weights has 2 values for 3 observations/,
    );
  });
});

describe('conditioning and collinearity', () => {
  it('names the two nearly collinear columns and the condition number', () => {
    // Two gas columns that move together to 1e-13: indistinguishable in double precision.
    const design = [0, 1, 2, 3, 4, 5].map((i) => [1, i, 2 * i + (i % 2 === 0 ? 1e-13 : -1e-13), (i * i) % 5]);
    expectError(
      () => leastSquares(design, [1, 2, 3, 4, 5, 6], { columnNames: ['baseline', 'CO', 'N2O', 'H2O'] }),
      'SINGULAR',
      /design columns CO and N2O are collinear \(condition number [0-9.]+e1[0-9] exceeds the limit 1\.0e10\)/,
    );
  });

  it('names every column of an exact three-way dependence, not the independent ones', () => {
    const design = [0, 1, 2, 3, 4, 5, 6].map((i) => {
      const a = Math.sin(i + 1);
      const b = Math.cos(3 * i);
      return [a, b, a + b, i * i];
    });
    expectError(
      () => leastSquares(design, [1, 2, 3, 4, 5, 6, 7], { columnNames: ['CO', 'CO2', 'N2O', 'H2O'] }),
      'SINGULAR',
      /design columns CO, CO2 and N2O are collinear/,
    );
  });

  it('reports an all-zero column by name', () => {
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 0],
            [1, 0],
          ],
          [1, 2, 3],
          { columnNames: ['intercept', 'NO'] },
        ),
      'SINGULAR',
      /design column NO is all zero/,
    );
  });

  it('honours a stricter condition limit', () => {
    const { x, y } = loadDataset('longley');
    expectError(
      () =>
        leastSquares(
          x.map((row) => [1, ...row]),
          y,
          { conditionLimit: 100 },
        ),
      'SINGULAR',
      /exceeds the limit 1\.0e2/,
    );
  });

  it('reports condition number 1 for orthogonal unit-norm columns', () => {
    const fit = leastSquares(
      [
        [1, 1],
        [1, -1],
        [1, 1],
        [1, -1],
      ],
      [1, 2, 3, 4],
    );
    expect(fit.conditionNumber).toBeCloseTo(1, 12);
    expect(fit.rank).toBe(2);
  });
});

describe('input validation', () => {
  it('refuses NaN in y or the design, naming the position', () => {
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 1],
            [1, 2],
          ],
          [0, Number.NaN, 2],
        ),
      'INVALID_VALUE',
      /y\[1\] = NaN, must be a finite number/,
    );
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, Number.POSITIVE_INFINITY],
            [1, 2],
          ],
          [0, 1, 2],
          { columnNames: ['a', 'b'] },
        ),
      'INVALID_VALUE',
      /design row 1, column b = Infinity/,
    );
  });

  it('refuses fewer observations than coefficients and mismatched sizes', () => {
    expectError(
      () =>
        leastSquares(
          [
            [1, 0, 0],
            [1, 1, 1],
          ],
          [0, 1],
        ),
      'INSUFFICIENT_DATA',
      /2 observations for 3 coefficients/,
    );
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 1],
          ],
          [0, 1, 2],
        ),
      'INVALID_VALUE',
      /design has 2 rows but there are 3 observations/,
    );
    expectError(
      () =>
        leastSquares(
          [
            [1, 0],
            [1, 1, 2],
            [1, 2],
          ],
          [0, 1, 2],
        ),
      'INVALID_VALUE',
      /design row 1 has 3 entries, must have 2/,
    );
  });

  it('does not modify its inputs', () => {
    const design = [
      [1, 0.5],
      [1, 1.5],
      [1, 2.5],
      [1, 4],
    ].map((row) => Object.freeze(row));
    const y = Object.freeze([1, 2.9, 5.2, 8.1]);
    const weights = Object.freeze([1, 2, 1, 0.5]);
    const before = JSON.stringify({ design, y, weights });
    const fit = leastSquares(Object.freeze(design), y, { weights });
    solveLeastSquaresMany(
      Object.freeze(design),
      y.map((value) => Object.freeze([value, -value])),
    );
    expect(JSON.stringify({ design, y, weights })).toBe(before);
    expect(fit.coefficients).toHaveLength(2);
  });

  it('returns plain arrays (JSON-safe)', () => {
    const { x, y } = loadDataset('norris');
    const fit = leastSquares(
      x.map((row) => [1, row[0] as number]),
      y,
    );
    expect(JSON.parse(JSON.stringify(fit))).toEqual(fit);
  });
});
