/**
 * FTIR instrument line shape (ILS).
 *
 * Definition used throughout bandwright: the nominal resolution is Δν = 1/OPD_max (cm⁻¹, with the
 * maximum optical path difference OPD_max in cm). An interferogram truncated at ±OPD_max with
 * apodisation function a(x) gives the ILS as the Fourier transform of a (standard FTIR practice,
 * from memory):
 * - `boxcar` (no apodisation): a = 1 for |x| ≤ L → ILS(ν) = 2L·sinc(2πLν), FWHM ≈ 0.603·Δν,
 *   side lobes −22 %;
 * - `triangular`: a = 1 − |x|/L → ILS(ν) = L·sinc²(πLν), FWHM ≈ 0.886·Δν, no negative lobes;
 * with L = OPD_max = 1/Δν and sinc(u) = sin(u)/u. Both have unit area (a(0) = 1).
 *
 * The convolution is done as a product with a(x) in the OPD domain (FFT of the fine grid), which
 * is what the instrument does physically; the DC term is multiplied by a(0) = 1, so the ILS has
 * unit area on the grid exactly, long sinc tails included.
 */
import { BandwrightError } from '../errors.js';
import { fftInPlace, nextPowerOfTwo } from './fft.js';

/** Apodisation functions offered. */
export type Apodization = 'boxcar' | 'triangular';

/** All apodisations, for validating options. */
export const APODIZATIONS: readonly Apodization[] = ['boxcar', 'triangular'];

/**
 * The apodisation function a(x) at an optical path difference.
 *
 * @param opd_cm - optical path difference x, cm
 * @param maxOpd_cm - OPD_max = 1/resolution, cm
 * @param apodization - `boxcar` or `triangular`
 * @returns a(x), 0 beyond OPD_max
 */
export function apodizationFunction(opd_cm: number, maxOpd_cm: number, apodization: Apodization): number {
  const x = Math.abs(opd_cm);
  if (x > maxOpd_cm) return 0;
  return apodization === 'boxcar' ? 1 : 1 - x / maxOpd_cm;
}

/**
 * The continuous instrument line shape, unit area.
 *
 * @param offset_cm - ν − ν0, cm⁻¹
 * @param resolution_cm - nominal resolution Δν = 1/OPD_max, cm⁻¹
 * @param apodization - `boxcar` (sinc) or `triangular` (sinc²)
 * @returns ILS value, 1/cm⁻¹
 */
export function instrumentLineShape(
  offset_cm: number,
  resolution_cm: number,
  apodization: Apodization,
): number {
  const L = 1 / resolution_cm;
  if (apodization === 'boxcar') {
    const u = 2 * Math.PI * L * offset_cm;
    return u === 0 ? 2 * L : (2 * L * Math.sin(u)) / u;
  }
  const u = Math.PI * L * offset_cm;
  return u === 0 ? L : L * (Math.sin(u) / u) ** 2;
}

/** Options of {@link convolveWithInstrument}. */
export interface InstrumentConvolutionOptions {
  /** Spacing of the uniform input grid, cm⁻¹. Must be below resolution/2. */
  step_cm: number;
  /** Nominal resolution Δν = 1/OPD_max, cm⁻¹. */
  resolution_cm: number;
  /** Apodisation. */
  apodization: Apodization;
  /**
   * Zero padding added after the data before the FFT, in points (at least this many; the FFT
   * length is the next power of two). Keeps the circular convolution from wrapping the kernel's
   * tails around. Default: the length of the data.
   */
  padding?: number;
}

/**
 * Convolves a signal on a uniform wavenumber grid with the instrument line shape. Intended for
 * the absorptance 1 − T (which is zero outside the absorbing region, so zero padding is
 * natural); the input is not changed.
 *
 * @param signal - values on the grid (e.g. 1 − T)
 * @param options - grid spacing (cm⁻¹), resolution (cm⁻¹), apodisation, padding
 * @returns the convolved values on the same grid
 * @throws BandwrightError `INVALID_VALUE` when the grid is too coarse for the resolution
 */
export function convolveWithInstrument(
  signal: Float64Array,
  options: InstrumentConvolutionOptions,
): Float64Array {
  const { step_cm, resolution_cm, apodization } = options;
  if (!(step_cm > 0) || !(resolution_cm > 0) || !(step_cm < resolution_cm / 2)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `instrument grid step = ${step_cm} cm⁻¹ at resolution ${resolution_cm} cm⁻¹, ` +
        'must be > 0 and below resolution/2',
      { parameter: 'step_cm' },
    );
  }
  const size = nextPowerOfTwo(signal.length + Math.max(0, Math.ceil(options.padding ?? signal.length)));
  const re = new Float64Array(size);
  const im = new Float64Array(size);
  re.set(signal);
  fftInPlace(re, im);
  const maxOpd = 1 / resolution_cm;
  // Bin k holds OPD k/(N·δ) (k ≤ N/2), negative OPD above.
  const opdStep = 1 / (size * step_cm);
  for (let k = 0; k < size; k++) {
    const opd = (k <= size / 2 ? k : size - k) * opdStep;
    // The boxcar's edge bin gets the share of its width that lies inside OPD_max, so the
    // effective OPD_max (and so the resolution) is not rounded to whole bins.
    const a =
      apodization === 'boxcar'
        ? Math.min(1, Math.max(0, (maxOpd - opd) / opdStep + 0.5))
        : apodizationFunction(opd, maxOpd, apodization);
    re[k] = (re[k] as number) * a;
    im[k] = (im[k] as number) * a;
  }
  fftInPlace(re, im, { inverse: true });
  return re.slice(0, signal.length);
}
