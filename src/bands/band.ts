/**
 * Band features of an absorbance spectrum: a baseline fitted through baseline windows, the
 * baseline-corrected band area (trapezoid rule with interpolated end points) and peak height.
 *
 * The baseline is a polynomial of chosen order in t = (ν − centre)/half-span, with centre and
 * half-span taken over the band and its baseline windows, so that the fit is well conditioned at
 * any wavenumber offset; it is fitted by QR least squares through every grid point inside the
 * baseline windows.
 *
 * Saturated points (y NaN: transmittance at or below zero as printed) are left out of the
 * baseline fit, and bridged by linear interpolation from their finite neighbours inside the band;
 * a band measured that way is a lower bound, and the features say where such points were.
 */
import { BandwrightError } from '../errors.js';
import { interpolateAt, type Spectrum } from '../spectrum/spectrum.js';
import {
  bridgeUndefinedPoints,
  describeUndefinedPoints,
  findUndefinedPoints,
  type UndefinedPoints,
} from '../spectrum/undefined-points.js';
import { leastSquares } from '../stats/least-squares.js';
import { assertBandWindows, formatWindow, windowIndices, type Window } from './windows.js';

/** How to place the baseline under a band. */
export interface BaselineSpec {
  /** Baseline windows, cm⁻¹; empty means no baseline correction (baseline ≡ 0). */
  windows: readonly Window[];
  /** Polynomial order: 0 constant, 1 linear (default), up to 3. */
  order?: number;
}

/** A fitted baseline polynomial: b(ν) = Σ c_k t^k with t = (ν − centre)/halfSpan. */
export interface FittedBaseline {
  /** Coefficients c_0…c_order, AU. */
  coefficients: number[];
  /** Centre of the scaled abscissa, cm⁻¹. */
  centre_cm: number;
  /** Half-span of the scaled abscissa, cm⁻¹. */
  halfSpan_cm: number;
  /** RMS of the baseline points about the fitted polynomial, AU (a noise estimate; 0 when exact). */
  rms_AU: number;
  /** Number of grid points the baseline was fitted through. */
  points: number;
  /** Saturated (NaN) points inside the baseline windows, left out of the fit; absent when none. */
  undefinedPoints?: UndefinedPoints;
}

/** Band features measured on one spectrum. */
export interface BandFeatures {
  /** Baseline-corrected band area, AU·cm⁻¹. */
  area: number;
  /** Largest baseline-corrected absorbance inside the band, AU. */
  height: number;
  /** Wavenumber of that maximum, cm⁻¹. */
  heightPosition_cm: number;
  /** Largest raw absorbance inside the band (for the saturation flag), AU. */
  peakAbsorbance: number;
  /** The baseline used. */
  baseline: FittedBaseline;
  /**
   * Saturated (NaN) points inside the band, bridged by linear interpolation from their finite
   * neighbours: area and height are then lower bounds. Absent when none.
   */
  undefinedPoints?: UndefinedPoints;
}

const MAX_BASELINE_ORDER = 3;

/**
 * Evaluates a fitted baseline at a wavenumber.
 *
 * @param baseline - fitted baseline
 * @param wavenumber - cm⁻¹
 * @returns baseline absorbance, AU
 */
export function evaluateBaseline(baseline: FittedBaseline, wavenumber: number): number {
  const t = (wavenumber - baseline.centre_cm) / baseline.halfSpan_cm;
  let value = 0;
  for (let k = baseline.coefficients.length - 1; k >= 0; k--)
    value = value * t + (baseline.coefficients[k] as number);
  return value;
}

/**
 * Fits a baseline polynomial through the grid points inside the baseline windows.
 *
 * @param spectrum - absorbance spectrum
 * @param band - the band the baseline is for, cm⁻¹ (sets the scaling of the abscissa)
 * @param spec - baseline windows and order
 * @returns the fitted baseline (zero when there are no windows)
 * @throws BandwrightError `WINDOW` when a window is outside the scan or too few points support the order;
 *   `INVALID_VALUE` for an order outside 0…3
 */
export function fitBaseline(spectrum: Spectrum, band: Window, spec: BaselineSpec): FittedBaseline {
  const order = spec.order ?? 1;
  if (!Number.isInteger(order) || order < 0 || order > MAX_BASELINE_ORDER) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `baseline order = ${order}, must be an integer from 0 to ${MAX_BASELINE_ORDER}`,
      { parameter: 'baseline order' },
    );
  }
  let low = band[0];
  let high = band[1];
  for (const window of spec.windows) {
    low = Math.min(low, window[0]);
    high = Math.max(high, window[1]);
  }
  const centre = (low + high) / 2;
  const halfSpan = (high - low) / 2;
  if (spec.windows.length === 0)
    return { coefficients: [0], centre_cm: centre, halfSpan_cm: halfSpan, rms_AU: 0, points: 0 };

  const design: number[][] = [];
  const values: number[] = [];
  spec.windows.forEach((window, i) => {
    const [start, end] = windowIndices(spectrum, window, `baseline window ${i + 1}`, 1);
    for (let j = start; j < end; j++) {
      // A saturated point says only that the absorbance is high there: no value to fit through.
      if (Number.isNaN(spectrum.y[j])) continue;
      const t = ((spectrum.x[j] as number) - centre) / halfSpan;
      const row = new Array<number>(order + 1);
      let power = 1;
      for (let k = 0; k <= order; k++) {
        row[k] = power;
        power *= t;
      }
      design.push(row);
      values.push(spectrum.y[j] as number);
    }
  });
  const undefinedPoints = findUndefinedPoints(spectrum.x, spectrum.y, spec.windows);
  if (values.length < order + 1) {
    throw new BandwrightError(
      'WINDOW',
      `${spectrum.metadata.source ?? 'scan'}: ` +
        `baseline windows ${spec.windows.map(formatWindow).join(', ')} ` +
        `hold ${values.length} point(s)` +
        (undefinedPoints === undefined ? '' : ` besides ${describeUndefinedPoints(undefinedPoints)}`) +
        `, an order-${order} baseline needs at least ${order + 1}`,
      { file: spectrum.metadata.source },
    );
  }
  const fit = leastSquares(design, values, { columnNames: design[0]?.map((_, k) => `t^${k}`) });
  const rms = Math.sqrt(fit.rss / values.length);
  return {
    coefficients: [...fit.coefficients],
    centre_cm: centre,
    halfSpan_cm: halfSpan,
    rms_AU: rms,
    points: values.length,
    ...(undefinedPoints === undefined ? {} : { undefinedPoints }),
  };
}

/**
 * Measures a band: baseline fit, baseline-corrected area by the trapezoid rule (with the
 * integrand interpolated linearly at the band's end points so the area does not jump as the
 * window edges cross grid points), and the peak height above the baseline.
 *
 * @param spectrum - absorbance spectrum on an ascending grid (cm⁻¹)
 * @param band - integration window, cm⁻¹
 * @param baseline - baseline windows and order
 * @returns area (AU·cm⁻¹), height (AU), the baseline used, and the saturated points bridged
 * @throws BandwrightError `WINDOW` when windows are invalid, overlap or lie outside the scan, or
 *   when saturated points in the band run to the end of the scan (nothing to bridge from)
 * @example
 * const features = measureBand(spectrum, [2040, 2245], { windows: [[2000, 2030], [2255, 2290]] });
 */
export function measureBand(spectrum: Spectrum, band: Window, baseline: BaselineSpec): BandFeatures {
  if (spectrum.yKind !== 'absorbance') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${spectrum.metadata.source ?? 'scan'}: y-kind ${spectrum.yKind}, band features need absorbance`,
      { file: spectrum.metadata.source },
    );
  }
  assertBandWindows(band, baseline.windows, 'band');
  const [start, end] = windowIndices(spectrum, band, 'band', 1);
  const fitted = fitBaseline(spectrum, band, baseline);
  const { x } = spectrum;
  // The points just outside the band enter through the interpolated end values, so they count.
  const first = Math.max(start - 1, 0);
  const last = Math.min(end, x.length - 1);
  const undefinedPoints = findUndefinedPoints(x, spectrum.y, [[x[first] as number, x[last] as number]]);
  const y = undefinedPoints === undefined ? spectrum.y : bridgeUndefinedPoints(x, spectrum.y);
  if (undefinedPoints !== undefined && (Number.isNaN(y[first]) || Number.isNaN(y[last]))) {
    throw new BandwrightError(
      'WINDOW',
      `${spectrum.metadata.source ?? 'scan'}: band ${formatWindow(band)} holds ` +
        `${describeUndefinedPoints(undefinedPoints)} that reach the end of the scan, so they cannot be ` +
        'bridged from both sides',
      { file: spectrum.metadata.source },
    );
  }
  const corrected = (j: number): number => (y[j] as number) - evaluateBaseline(fitted, x[j] as number);

  const lowEdge = band[0];
  const highEdge = band[1];
  const lowValue = interpolateAt(x, y, lowEdge) - evaluateBaseline(fitted, lowEdge);
  const highValue = interpolateAt(x, y, highEdge) - evaluateBaseline(fitted, highEdge);

  let area = 0;
  let previousX = lowEdge;
  let previousY = lowValue;
  let height = Math.max(lowValue, highValue);
  let heightPosition = lowValue >= highValue ? lowEdge : highEdge;
  let peak = Math.max(interpolateAt(x, y, lowEdge), interpolateAt(x, y, highEdge));
  for (let j = start; j < end; j++) {
    const xj = x[j] as number;
    if (xj <= lowEdge || xj >= highEdge) continue;
    const value = corrected(j);
    area += 0.5 * (value + previousY) * (xj - previousX);
    previousX = xj;
    previousY = value;
    if (value > height) {
      height = value;
      heightPosition = xj;
    }
    if ((y[j] as number) > peak) peak = y[j] as number;
  }
  area += 0.5 * (highValue + previousY) * (highEdge - previousX);
  return {
    area,
    height,
    heightPosition_cm: heightPosition,
    peakAbsorbance: peak,
    baseline: fitted,
    ...(undefinedPoints === undefined ? {} : { undefinedPoints }),
  };
}
