/**
 * CLS fit plot and its data from a classical-least-squares calibration.
 *
 * Known truth (synthetic): standards and a sample made of two Gaussian bands (CO at 2143 cm⁻¹,
 * N2O at 2210 cm⁻¹) whose absorbance is proportional to concentration (Beer–Lambert, DESIGN §3),
 * on a constant offset, with seeded noise on the standards only. With a baseline of order 0 the
 * model removes each region's mean (projection on the complement of the constant), so the plotted
 * "measured" trace must be the sample minus its mean, and each contribution its band minus the
 * band's mean, scaled by its concentration.
 */
import { describe, expect, it } from 'vitest';
import { renderClsFit } from '../../src/report/svg/cls-fit.js';
import { clsFitData } from '../../src/report/svg/cls-data.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';
import { uniformGrid } from '../helpers/synthetic-bands.js';
import { calibration, co, conditions, grid, mixture, n2o } from './cls-calibration.js';
import { byClass, parseMarkup, pathPoints, textOf } from './markup-tree.js';

const mean = (v: ArrayLike<number>): number => Array.from(v).reduce((a, b) => a + b, 0) / v.length;

describe('CLS fit plot data', () => {
  const built = calibration();
  // 80 ppm CO and 120 ppm N2O in a 2 m cell: φ = 2, so the absorbance is that of 160 and 240 ppm in 1 m.
  const sampleConditions = { ...conditions, pathLength_m: 2 };
  const sample = makeSpectrum({
    x: grid,
    y: mixture(160, 240, () => 0),
    yKind: 'absorbance',
    metadata: { source: 'sample.csv', ...sampleConditions },
  });
  const data = clsFitData(built, sample, sampleConditions);

  it('plots the measured spectrum as the model sees it (baseline removed) and fitted + residual = measured', () => {
    const sampleMean = mean(sample.y);
    expect(data.measured).toHaveLength(grid.length);
    for (let i = 0; i < grid.length; i++) {
      expect(Math.abs((data.measured[i] as number) - ((sample.y[i] as number) - sampleMean))).toBeLessThan(
        1e-9,
      );
      expect(
        Math.abs((data.fitted[i] as number) + (data.residual[i] as number) - (data.measured[i] as number)),
      ).toBeLessThan(1e-12);
    }
  });

  it("splits the fit into each gas's contribution: φ × concentration × its band (mean removed)", () => {
    const coContribution = data.contributions.find((c) => c.gas === 'CO')?.values as ArrayLike<number>;
    const n2oContribution = data.contributions.find((c) => c.gas === 'N2O')?.values as ArrayLike<number>;
    const coMean = mean(co);
    const n2oMean = mean(n2o);
    // Noise 1e-5 AU on the standards: the contributions follow the truth to well under 1 % of their 0.08–0.1 AU peaks.
    for (let i = 0; i < grid.length; i++) {
      expect(Math.abs((coContribution[i] as number) - 160 * ((co[i] as number) - coMean))).toBeLessThan(5e-4);
      expect(Math.abs((n2oContribution[i] as number) - 240 * ((n2o[i] as number) - n2oMean))).toBeLessThan(
        5e-4,
      );
    }
    expect(data.regions).toEqual([[2000, 2300]]);
  });

  it('draws measured, fitted, each contribution, the residual and the region, with labelled axes', () => {
    const svg = parseMarkup(renderClsFit(data, { id: 'c' }));
    expect(byClass(svg, 'measured')).toHaveLength(1);
    expect(byClass(svg, 'fitted')).toHaveLength(1);
    expect(byClass(svg, 'contribution').map((n) => n.attributes['data-gas'])).toEqual(['CO', 'N2O']);
    expect(byClass(svg, 'residual-spectrum')).toHaveLength(1);
    expect(byClass(svg, 'zero-line')).toHaveLength(1);
    expect(byClass(svg, 'region')).toHaveLength(2);
    const labels = byClass(svg, 'axis-label').map(textOf);
    expect(labels).toContain('absorbance (decadic) / AU');
    expect(labels).toContain('residual / AU');
    expect(labels.filter((l) => l.startsWith('wavenumber / cm⁻¹'))).toHaveLength(2);
    expect(textOf(svg)).toMatch(
      /Residual \(measured − fitted\): RMS [\d.e-]+ AU \(calibration [\d.e-]+ AU\)/,
    );
  });
});

describe('CLS fit plot', () => {
  const twoRegions = Float64Array.from([...uniformGrid(2000, 2050, 1), ...uniformGrid(2200, 2250, 1)]);
  const zeros = new Float64Array(twoRegions.length);
  const input = {
    title: 'two regions',
    grid: twoRegions,
    measured: zeros,
    fitted: zeros,
    contributions: [],
    residual: zeros,
  };

  it('breaks lines across the gap between regions instead of joining them', () => {
    const svg = parseMarkup(renderClsFit(input));
    const moves = pathPoints(byClass(svg, 'measured')[0]?.attributes.d ?? '').filter(
      (p) => p.command === 'M',
    );
    expect(moves).toHaveLength(2);
  });

  it('refuses arrays whose length differs from the grid, and a grid that does not ascend', () => {
    expect(() => renderClsFit({ ...input, fitted: new Float64Array(3) })).toThrow(
      /CLS plot: fitted has 3 values, the grid has 102/,
    );
    expect(() => renderClsFit({ ...input, grid: Float64Array.from(twoRegions).reverse() })).toThrow(
      /must ascend/,
    );
  });
});
