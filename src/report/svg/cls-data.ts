/**
 * The CLS fit plot's input from a classical-least-squares calibration and a sample scan: the scan
 * on the calibration's channels, predicted exactly as `quantify` predicts it, split into each
 * component's contribution (its φ-scaled concentration, or its square for a second-order term,
 * times the term's pure spectrum) and the residual the prediction leaves.
 *
 * The pure spectra and the residual live in the space the model fits in, after the per-region
 * baseline polynomials (and the background spectrum, when the method has one) are projected out;
 * so the plotted "measured" trace is the sum of the contributions and the residual: the measured
 * spectrum with baseline and background removed.
 */
import { onChannels } from '../../calibration/build-cls.js';
import type { Calibration } from '../../calibration/calibration.js';
import { BandwrightError } from '../../errors.js';
import { densityPathFactor, type CellConditions } from '../../gas/conditions.js';
import { predictCls } from '../../models/cls/spectral.js';
import type { Spectrum } from '../../spectrum/spectrum.js';
import type { ClsFitPlotInput } from './cls-fit.js';

/**
 * Builds the CLS fit plot input for one sample.
 *
 * @param calibration - a verified classical-least-squares calibration
 * @param spectrum - the sample scan (any y-kind)
 * @param conditions - the sample's cell conditions as quantify resolved them (path m, K, kPa)
 * @param options - interval level (default the model's), `title` (default `<scan>: classical-least-squares fit`)
 * @returns plot input on the calibration's channels
 * @throws BandwrightError `INVALID_VALUE` for a calibration that is not CLS; `WINDOW` when the scan
 *   does not cover the regions
 */
export function clsFitData(
  calibration: Calibration,
  spectrum: Spectrum,
  conditions: CellConditions,
  options: { level?: number; title?: string } = {},
): ClsFitPlotInput {
  const cls = calibration.cls;
  if (cls === undefined || cls.model.grid === null) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `the calibration is a ${calibration.method.model} calibration; ` +
        `the CLS fit plot needs a classical-least-squares calibration with a channel grid`,
      { parameter: 'calibration' },
    );
  }
  const model = cls.model;
  const grid = Float64Array.from(model.grid as readonly number[]);
  const values = onChannels(spectrum, grid, cls.regions);
  const phi = densityPathFactor(conditions, calibration.reference);
  const prediction = predictCls(model, values, {
    phi,
    ...(options.level === undefined ? {} : { level: options.level }),
  });
  const scaled = new Map<string, number>();
  for (const estimate of [...prediction.estimates, ...prediction.interferents])
    scaled.set(estimate.name, estimate.value * phi);
  const contributions = model.components.map((component) => ({
    gas: component.name,
    reported: component.reported,
    values: new Float64Array(grid.length),
  }));
  model.terms.forEach((term, t) => {
    const component = model.components[term.component];
    const target = contributions[term.component];
    const row = model.pureSpectra[t];
    if (component === undefined || target === undefined || row === undefined) return;
    const amount = (scaled.get(component.name) ?? 0) ** term.power;
    for (let j = 0; j < grid.length; j++)
      target.values[j] = (target.values[j] as number) + amount * (row[j] as number);
  });
  const fitted = new Float64Array(grid.length);
  for (const c of contributions)
    for (let j = 0; j < grid.length; j++) fitted[j] = (fitted[j] as number) + (c.values[j] as number);
  const measured = new Float64Array(grid.length);
  for (let j = 0; j < grid.length; j++)
    measured[j] = (fitted[j] as number) + (prediction.residual[j] as number);
  const scan = spectrum.metadata.source ?? 'scan';
  return {
    title: options.title ?? `${scan}: classical-least-squares fit`,
    grid,
    measured,
    fitted,
    contributions,
    residual: prediction.residual,
    regions: cls.regions,
    residualRms: prediction.residualRms,
    calibrationResidualRms: model.calibration.residualRms,
    notes: [
      'measured and fitted are shown with the baseline polynomials (and background, if any) removed, ' +
        'as the model fits them',
    ],
  };
}
