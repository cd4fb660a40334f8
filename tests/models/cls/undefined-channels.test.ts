/**
 * Spectral CLS prediction of a sample with undefined (NaN, saturated) channels: those channels
 * are left out and the least squares solved on the rest (baseline basis and noise segments
 * rebuilt there), or the sample is refused when too few remain.
 *
 * Data: synthetic, known truth (tests/helpers/synthetic-bands.ts); the checks are against the
 * generating truth and against the prediction on every channel.
 */
import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../../src/errors.js';
import { nuisanceBasis, removeSpan } from '../../../src/models/cls/basis.js';
import { fitCls, predictCls, type ClsData } from '../../../src/models/cls/spectral.js';
import { leastSquares } from '../../../src/stats/least-squares.js';
import {
  correlatedNoise,
  mixtureDesign,
  normalGenerator,
  overlappingMixture,
  plus,
  withLinearBaseline,
} from '../../helpers/synthetic-bands.js';

const scenario = overlappingMixture();
const { grid } = scenario;

function standards(seed: number): ClsData {
  const normal = normalGenerator(seed);
  const concentrations = mixtureDesign(10);
  const spectra = concentrations.map((c) =>
    plus(
      withLinearBaseline(scenario.spectrumOf(c), grid, 0.02 * normal(), 2e-5 * normal()),
      correlatedNoise(grid.length, { rms: 1e-3, halfWidth: 2, normal }),
    ),
  );
  return {
    channels: grid,
    spectra,
    concentrations,
    phi: concentrations.map(() => 1),
    components: scenario.components,
  };
}

const model = fitCls(standards(11), { baselineOrder: 1 });
const truth = [80, 40, 3000];
const clean = withLinearBaseline(scenario.spectrumOf(truth), grid, 0.05, -3e-5);

/** The sample with NaN on channels [from, to) (indices). */
function withUndefined(values: Float64Array, from: number, to: number): Float64Array {
  const out = Float64Array.from(values);
  out.fill(Number.NaN, from, to);
  return out;
}

describe('predictCls with undefined channels', () => {
  it('leaves them out and still recovers each gas (noise-free sample: within 2 % of the truth)', () => {
    // Channels 200–219 are 2100–2109.5 cm⁻¹ (grid from 2000 at 0.5 cm⁻¹): the top of the first CO line.
    const sample = withUndefined(clean, 200, 220);
    const all = predictCls(model, clean, { phi: 1 });
    const dropped = predictCls(model, sample, { phi: 1 });
    expect(dropped.undefinedChannels).toBe(20);
    expect(all.undefinedChannels).toBeUndefined();
    dropped.estimates.forEach((estimate, j) => {
      const expected = truth[j]!;
      expect(Math.abs(estimate.value - expected), `${estimate.name}: ${estimate.value}`).toBeLessThan(
        0.02 * expected,
      );
      // Fewer channels carry less information: the interval is not narrower.
      expect(estimate.se).toBeGreaterThanOrEqual(all.estimates[j]!.se * 0.999);
    });
    expect(dropped.residual).toHaveLength(grid.length);
    expect(dropped.residual[210]).toBeNaN();
    expect(Number.isFinite(dropped.residual[199])).toBe(true);
    expect(Number.isFinite(dropped.residualRms)).toBe(true);
  });

  it('equals ordinary least squares on the remaining channels, baseline projected out there (QR solver)', () => {
    const sample = withUndefined(clean, 200, 220);
    const keep = Array.from(grid.keys()).filter((j) => j < 200 || j >= 220);
    const basis = nuisanceBasis({
      positions: keep.map((j) => grid[j]!),
      regionOf: new Float64Array(keep.length),
      order: 1,
    });
    const pure = model.pureSpectra.map((row) =>
      removeSpan(
        keep.map((j) => row[j]!),
        basis,
      ),
    );
    const values = removeSpan(
      keep.map((j) => sample[j]!),
      basis,
    );
    const direct = leastSquares(
      keep.map((_, i) => pure.map((row) => row[i]!)),
      Array.from(values),
    );
    const dropped = predictCls(model, sample, { phi: 1 });
    dropped.estimates.forEach((estimate, j) => {
      expect(estimate.value).toBeCloseTo(direct.coefficients[j]!, 8);
    });
    expect(dropped.residualRms).toBeCloseTo(Math.sqrt(direct.rss / keep.length), 12);
  });

  it('refuses a sample with too few defined channels for the gas and baseline terms, with a typed error', () => {
    const sample = withUndefined(clean, 0, grid.length - 4);
    try {
      predictCls(model, sample, { phi: 1 });
      throw new Error('expected an error');
    } catch (error) {
      expect(isBandwrightError(error, 'INSUFFICIENT_DATA'), String(error)).toBe(true);
      // 3 gas terms + 2 baseline terms (order 1) = 5 unknowns, 4 channels left.
      expect((error as Error).message).toBe(
        '497 of the 501 channels are undefined (saturated): the 4 left cannot determine 3 gas term(s) and ' +
          '2 baseline term(s) with a residual to judge the fit by',
      );
    }
  });
});
