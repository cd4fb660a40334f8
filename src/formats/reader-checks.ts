/**
 * What every spectrum reader checks the same way, whatever the file format: the point limit, the
 * conversion of wavelength abscissae to wavenumbers, and the range of transmittance fractions.
 */
import { BandwrightError } from '../errors.js';
import { RESOURCE_LIMIT_SETTINGS } from '../resource-limits.js';

/** Unit of a file's abscissae: wavenumbers (cm⁻¹), micrometres or nanometres (wavelengths). */
export type AbscissaUnit = 'cm-1' | 'um' | 'nm';

/** Default most data points a reader accepts (the BANDWRIGHT_MAX_POINTS default). */
export const DEFAULT_MAX_POINTS = RESOURCE_LIMIT_SETTINGS.maxPoints.default;

/**
 * The largest transmittance-fraction value accepted. A fraction cannot exceed 1 beyond noise, and
 * reading percent as a fraction would give wildly wrong absorbances: a CSV table above it is
 * refused; a JCAMP-DX reader reads a spectrum whose median is above it as percent and keeps a
 * few isolated spikes above it, with warnings (formats/jcamp/ordinates.ts).
 */
export const MAX_TRANSMITTANCE_FRACTION = 1.5;

/**
 * The point limit a reader applies.
 *
 * @param maxPoints - the limit the caller gave, or undefined for {@link DEFAULT_MAX_POINTS}
 * @returns the limit, a count of points
 * @throws BandwrightError `INVALID_VALUE` when it is not an integer >= 2
 */
export function pointLimit(maxPoints: number | undefined): number {
  const limit = maxPoints ?? DEFAULT_MAX_POINTS;
  if (!Number.isInteger(limit) || limit < 2) {
    throw new BandwrightError('INVALID_VALUE', `maxPoints = ${limit}, must be an integer >= 2`, {
      parameter: 'maxPoints',
    });
  }
  return limit;
}

/**
 * Converts wavelengths to wavenumbers in place: ν = 10⁴/λ for micrometres, 10⁷/λ for nanometres.
 *
 * @param x - wavelengths in µm or nm; overwritten with wavenumbers in cm⁻¹
 * @param unit - `um` (micrometres) or `nm` (nanometres)
 * @param source - label for messages
 * @throws BandwrightError `INVALID_VALUE` at the first wavelength that is not > 0, naming the point
 */
export function wavelengthsToWavenumbers(
  x: Float64Array,
  unit: Exclude<AbscissaUnit, 'cm-1'>,
  source: string,
): void {
  const scale = unit === 'um' ? 1e4 : 1e7;
  for (let i = 0; i < x.length; i++) {
    const lambda = x[i] as number;
    if (!(lambda > 0)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${source}: point ${i + 1}: wavelength ${lambda} ${unit === 'um' ? 'µm' : 'nm'}, must be > 0 ` +
          `to give a wavenumber`,
        { file: source },
      );
    }
    x[i] = scale / lambda;
  }
}

/**
 * Refuses transmittance-fraction data that reach above {@link MAX_TRANSMITTANCE_FRACTION}.
 *
 * @param y - the ordinates as read
 * @param where - message prefix (the source)
 * @param hint - how to declare percent in this file format
 * @throws BandwrightError `INVALID_VALUE` naming the largest value
 */
export function assertTransmittanceFraction(y: Float64Array, where: string, hint: string): void {
  let max = -Infinity;
  let at = 0;
  for (let i = 0; i < y.length; i++) {
    if ((y[i] as number) > max) {
      max = y[i] as number;
      at = i;
    }
  }
  if (max > MAX_TRANSMITTANCE_FRACTION) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: transmittance (fraction) reaches ${max} at point ${at + 1}, a fraction cannot ` +
        `exceed ${MAX_TRANSMITTANCE_FRACTION}; the values look like percent: ${hint}`,
      { file: where },
    );
  }
}
