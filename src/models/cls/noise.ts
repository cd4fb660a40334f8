/**
 * Channel-to-channel noise correlation for classical least squares.
 *
 * Apodisation, zero filling and resampling make the noise in neighbouring channels correlated,
 * so the textbook CLS variance σ̂² (K Kᵀ)⁻¹, which treats channels as independent, is too small
 * for smooth (wide) bands and the residual variance σ̂² = RSS/(N − p) is biased. Here the noise
 * is modelled as stationary within each contiguous segment of channels, with autocorrelation
 * ρ_l estimated from the calibration residuals (all standards × channels, many thousand
 * products per lag). Lags whose estimate is not significant at 2 Bartlett standard errors,
 * SE(ρ_l) = sqrt((1 + 2 Σ_{k<l} ρ_k²)/M_l) with M_l the number of independent pairs
 * (Bartlett 1946, as used for correlogram bands in Box & Jenkins, "Time series analysis"),
 * are set to zero, and no lag beyond {@link MAX_CORRELATION_LAG} is used. The correlation matrix
 * R (banded, Toeplitz within each segment) then enters the CLS variance as J⁺ R J⁺ᵀ and the
 * residual's expected sum of squares as σ² tr(P R).
 */
import type { ChannelSegment } from './basis.js';

/** Longest lag (channels) of noise correlation that is estimated. */
export const MAX_CORRELATION_LAG = 32;

/**
 * Estimates the noise autocorrelation from residual spectra.
 *
 * @param residuals - residual spectra (standards × channels) of the calibration fit
 * @param segments - contiguous channel runs; products never cross a segment boundary
 * @param options.independentFraction - share of the residual spectra that are independent
 *   ((n − q)/n after fitting q terms to n standards); scales the pair count in the significance test
 * @returns ρ_0 = 1, ρ_1 … ρ_L with insignificant lags set to 0 (just `[1]` when nothing is
 *   estimable, e.g. noise-free residuals or one-channel segments)
 */
export function estimateCorrelation(
  residuals: readonly Float64Array[],
  segments: readonly ChannelSegment[],
  options: { independentFraction: number },
): number[] {
  const longest = segments.reduce((max, segment) => Math.max(max, segment.end - segment.start), 0);
  const maxLag = Math.min(MAX_CORRELATION_LAG, Math.floor(longest / 4));
  let variance = 0;
  let count = 0;
  for (const row of residuals) {
    for (const segment of segments) {
      for (let i = segment.start; i < segment.end; i++) variance += row[i]! * row[i]!;
      count += segment.end - segment.start;
    }
  }
  if (!(variance > 0) || maxLag < 1) return [1];
  variance /= count;
  const correlation = [1];
  let bartlettSum = 0;
  for (let lag = 1; lag <= maxLag; lag++) {
    let sum = 0;
    let pairs = 0;
    for (const row of residuals) {
      for (const segment of segments) {
        for (let i = segment.start; i + lag < segment.end; i++) sum += row[i]! * row[i + lag]!;
        pairs += Math.max(0, segment.end - segment.start - lag);
      }
    }
    if (pairs === 0) break;
    const rho = sum / pairs / variance;
    const independentPairs = pairs * options.independentFraction;
    const standardError = Math.sqrt((1 + 2 * bartlettSum) / Math.max(independentPairs, 1));
    const kept = Math.abs(rho) > 2 * standardError ? rho : 0;
    correlation.push(kept);
    bartlettSum += kept * kept;
  }
  while (correlation.length > 1 && correlation[correlation.length - 1] === 0) correlation.pop();
  return correlation;
}

/**
 * Multiplies a vector by the banded correlation matrix R: (R v)_i = Σ_l ρ_|l| v_{i+l}, the sum
 * running inside i's segment.
 *
 * @param v - values on the channels (not modified)
 * @param correlation - ρ_0 … ρ_L from {@link estimateCorrelation}
 * @param segments - contiguous channel runs covering the channels
 * @returns a new array R v
 */
export function multiplyCorrelation(
  v: ArrayLike<number>,
  correlation: readonly number[],
  segments: readonly ChannelSegment[],
): Float64Array {
  const out = Float64Array.from(v);
  const maxLag = correlation.length - 1;
  if (maxLag === 0) return out;
  for (const segment of segments) {
    for (let i = segment.start; i < segment.end; i++) {
      let sum = v[i]!;
      for (let lag = 1; lag <= maxLag; lag++) {
        const rho = correlation[lag]!;
        if (rho === 0) continue;
        if (i - lag >= segment.start) sum += rho * v[i - lag]!;
        if (i + lag < segment.end) sum += rho * v[i + lag]!;
      }
      out[i] = sum;
    }
  }
  return out;
}

/**
 * Σ_{l=−L…L} ρ_l², the factor by which correlation shrinks the effective number of independent
 * residual values (Satterthwaite: ν ≈ tr(P R)/Σ ρ_l² for long segments).
 *
 * @param correlation - ρ_0 … ρ_L
 * @returns 1 for independent channels, more when they are correlated
 */
export function correlationSquareSum(correlation: readonly number[]): number {
  let sum = 1;
  for (let lag = 1; lag < correlation.length; lag++) sum += 2 * correlation[lag]! * correlation[lag]!;
  return sum;
}
