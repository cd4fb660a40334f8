/**
 * The DIN 32645 worked example (tests/fixtures/din32645/worked-example.json) as a gas calibration
 * for the plot and report tests; the gas name, unit and band are labels only.
 */
import { readFileSync } from 'node:fs';
import type { GasCalibration } from '../../src/calibration/calibration.js';
import { fitUnivariate } from '../../src/models/univariate/fit.js';

/** The fixture: standards and the printed results. */
export const din = JSON.parse(
  readFileSync(new URL('../fixtures/din32645/worked-example.json', import.meta.url), 'utf8'),
) as {
  data: { concentration: number[]; response: number[] };
  printed: { slope: number; intercept: number; residualSD: number };
};

/** The example fitted as a straight line (α = 0.01 as printed), labelled CO in ppm. */
export function dinGas(): GasCalibration {
  const model = fitUnivariate(din.data, { form: 'linear', alpha: 0.01 });
  return {
    gas: 'CO',
    unit: 'ppm',
    curve: 'linear',
    weights: 'none',
    model,
    feature: { band: [2040, 2245], baseline: [[2000, 2030]], baselineOrder: 1, response: 'area' },
  };
}
