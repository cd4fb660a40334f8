/**
 * A small classical-least-squares calibration in memory for the plot and report tests (synthetic,
 * known truth): two Gaussian bands, CO at 2143 cm⁻¹ and N2O at 2210 cm⁻¹, absorbance proportional
 * to concentration (Beer–Lambert, DESIGN §3), on a constant offset, seeded noise on the standards.
 */
import { buildClsCalibration } from '../../src/calibration/build-cls.js';
import type { StandardScan } from '../../src/calibration/build.js';
import type { Calibration } from '../../src/calibration/calibration.js';
import { parseMethod, type ClsMethod } from '../../src/calibration/method.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';
import { gaussianBand, normalGenerator, uniformGrid } from '../helpers/synthetic-bands.js';

/** Channel grid, cm⁻¹. */
export const grid = uniformGrid(2000, 2300, 0.5);
/** CO band per ppm, AU. */
export const co = gaussianBand(grid, { centre: 2143, hwhm: 8, peak: 0.001 });
/** N2O band per ppm, AU. */
export const n2o = gaussianBand(grid, { centre: 2210, hwhm: 10, peak: 0.0008 });
/** Cell conditions of every scan. */
export const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };

/** A mixture spectrum: ppm × band for each gas, + 0.01 AU, + noise. */
export function mixture(ppmCo: number, ppmN2o: number, noise: () => number): Float64Array {
  return Float64Array.from(
    grid,
    (_, i) => ppmCo * (co[i] as number) + ppmN2o * (n2o[i] as number) + 0.01 + noise(),
  );
}

/** Nine standards (lots named L0…L8), spectra in memory. */
export function clsStandards(): StandardScan[] {
  const random = normalGenerator(7);
  const levels: [number, number][] = [
    [0, 0],
    [100, 0],
    [0, 100],
    [100, 100],
    [50, 150],
    [150, 50],
    [200, 200],
    [200, 0],
    [0, 200],
  ];
  return levels.map(([a, b], i) => ({
    scan: `std-${i}.csv`,
    line: i + 2,
    spectrum: makeSpectrum({
      x: grid,
      y: mixture(a, b, () => 1e-5 * random()),
      yKind: 'absorbance',
      metadata: { ...conditions },
    }),
    concentrations: [
      { gas: 'CO', unit: 'ppm', value: a },
      { gas: 'N2O', unit: 'ppm', value: b },
    ],
    conditions: {},
    lot: `L${i}`,
  }));
}

/** The CLS calibration of {@link clsStandards} over 2000–2300 cm⁻¹, baseline order 0. */
export function calibration(standards: readonly StandardScan[] = clsStandards()): Calibration {
  const method = parseMethod(
    { model: 'cls', gases: ['CO', 'N2O'], regions: [[2000, 2300]], baselineOrder: 0 },
    'method.json',
  ) as ClsMethod;
  return buildClsCalibration(method, standards, { inputs: [], createdAt: '2026-12-01T00:00:00.000Z' });
}
