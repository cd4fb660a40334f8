/**
 * Scans with one Gaussian band whose area is known analytically (h·s·√(2π)), on a sloped
 * baseline, written as CSV or JCAMP-DX for end-to-end tests of calibrate and quantify.
 */
import { writeFileSync } from 'node:fs';
import { formatJcamp } from '../../src/formats/jcamp/write.js';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { makeSpectrum, type ScanMetadata, type Spectrum } from '../../src/spectrum/spectrum.js';

/** Band area per ppm at the reference conditions, AU·cm⁻¹ (chosen for the tests). */
export const AREA_PER_PPM = 0.02;
/** Band shape. */
export const BAND = { centre: 2143, sd: 15 };

/**
 * A scan of a Gaussian band whose area is `AREA_PER_PPM · ppm · φ`, on a gentle sloped baseline.
 *
 * @param ppm - concentration
 * @param options - φ (number-density × path factor), metadata, grid
 */
export function bandScan(
  ppm: number,
  options: { phi?: number; metadata?: ScanMetadata; step?: number; from?: number; to?: number } = {},
): Spectrum {
  const { from = 1950, to = 2350, step = 0.5, phi = 1 } = options;
  const area = AREA_PER_PPM * ppm * phi;
  const height = area / (BAND.sd * Math.sqrt(2 * Math.PI));
  const n = Math.round((to - from) / step) + 1;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const nu = from + i * step;
    x[i] = nu;
    y[i] = height * Math.exp(-0.5 * ((nu - BAND.centre) / BAND.sd) ** 2) + 0.02 + 2e-5 * (nu - 2000);
  }
  return makeSpectrum({ x, y, yKind: 'absorbance', metadata: options.metadata ?? {} });
}

/**
 * Writes a scan as CSV or JCAMP-DX (by the file's extension).
 *
 * @param path - destination (.csv or .jdx)
 * @param spectrum - the scan
 */
export function writeScan(path: string, spectrum: Spectrum): void {
  writeFileSync(
    path,
    path.endsWith('.jdx') ? formatJcamp(spectrum, { title: 'test band' }) : formatSpectrumCsv(spectrum),
  );
}

/** Command-line options for a CO band calibration on {@link bandScan} scans. */
export const BAND_OPTIONS = [
  '--gas',
  'CO',
  '--band',
  '2040:2245',
  '--baseline',
  '2000:2030,2255:2290',
] as const;

/**
 * Writes the ten-standard series the CLI tests calibrate from — 0, 50, 100, 200, 400 ppm in
 * duplicate with ±0.2 % scatter (so the residual SD and the intervals are not zero) — as
 * `std-<i>.csv` plus `standards.csv` (columns scan, CO_ppm) in a folder.
 *
 * @param at - maps a file name to its path in the folder
 * @param metadata - the scans' conditions
 * @returns the manifest's path
 */
export function writeStandardSeries(at: (name: string) => string, metadata: ScanMetadata): string {
  const rows = ['scan,CO_ppm'];
  [0, 0, 50, 50, 100, 100, 200, 200, 400, 400].forEach((ppm, i) => {
    writeScan(at(`std-${i}.csv`), bandScan(ppm * (1 + 0.002 * Math.sin(7 * i + 1)), { metadata }));
    rows.push(`std-${i}.csv,${ppm}`);
  });
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  return at('standards.csv');
}
