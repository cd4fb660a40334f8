/**
 * Lack of fit of a CLS calibration. The residual variance is compared with the noise of the
 * zero-gas standards (blanks: every concentration zero, so their baseline-free spectra are noise)
 * by an F test, and each component without a second-order term is refitted with one to see how
 * much residual it removes (F test on the removed sum of squares, Satterthwaite degrees of
 * freedom). A calibration that passes its checks carries the diagnosis as a warning; one that
 * fails them says whether the lack of fit is what hides a component (`refusals.ts`).
 */
import { isBandwrightError } from '../../errors.js';
import { fQuantile } from '../../stats/distributions.js';
import { dot } from '../../stats/linear-algebra.js';
import { solveLeastSquaresMany } from '../../stats/least-squares.js';
import type { FittedState } from './fit-state.js';
import {
  DEFAULT_POOR_FIT_RATIO,
  SUBSTANTIAL_REDUCTION,
  TEST_PROBABILITY,
  type ClsComponent,
  type ClsLackOfFit,
  type ClsSecondOrderGain,
  type ClsTerm,
} from './model.js';
import { correlationSquareSum } from './noise.js';
import type { ClsState } from './prediction-state.js';
import { compactNumber, listNames } from '../../words.js';

/**
 * The lack of fit in words: the residual against the blanks' noise, and the second-order terms
 * that would reduce it.
 *
 * @param lackOfFit - the diagnosis
 * @param state - the fitted state (its residual variance)
 */
export function describeLackOfFit(lackOfFit: ClsLackOfFit, state: ClsState): string {
  const sd = Math.sqrt(state.calibrationResidualSum / state.calibrationResidualCount);
  const parts: string[] = [];
  if (lackOfFit.residualOverBlank !== null && lackOfFit.blankVariance !== null) {
    parts.push(
      `the calibration residual (SD ${compactNumber(sd)} a channel) is ` +
        `${compactNumber(Math.sqrt(lackOfFit.residualOverBlank))} times the noise of the ${lackOfFit.blanks} ` +
        `zero-gas standard(s) (SD ${compactNumber(Math.sqrt(lackOfFit.blankVariance))}), so it is mostly lack ` +
        `of fit rather than noise`,
    );
  } else {
    parts.push(
      `the calibration residual (SD ${compactNumber(sd)} a channel) is lack of fit rather than noise`,
    );
  }
  const helpful = helpfulGains(lackOfFit);
  if (helpful.length > 0) {
    const shares = helpful.map(
      (gain) => `${Math.round(100 * gain.residualReduction)} % of it for ${gain.component}`,
    );
    parts.push(`a second-order term would remove ${listNames(shares)} (significant at 99 %)`);
  }
  return parts.join('; ');
}

/**
 * Second-order terms that would remove a significant and substantial part of the residual,
 * largest first.
 *
 * @param lackOfFit - the diagnosis
 */
export function helpfulGains(lackOfFit: ClsLackOfFit): ClsSecondOrderGain[] {
  return lackOfFit.secondOrderGains
    .filter((gain) => gain.fStatistic > gain.fLimit && gain.residualReduction >= SUBSTANTIAL_REDUCTION)
    .sort((a, b) => b.residualReduction - a.residualReduction);
}

/**
 * What to do about a lack of fit, in words.
 *
 * @param lackOfFit - the diagnosis
 */
export function lackOfFitAdvice(lackOfFit: ClsLackOfFit): string {
  const helpful = helpfulGains(lackOfFit);
  if (helpful.length > 0)
    return (
      `give ${listNames(helpful.map((gain) => gain.component))} a second-order term (secondOrder), or ` +
      `choose regions with weaker lines`
    );
  return (
    'no second-order term of a gas that lacks one removes it: look for curvature beyond second order ' +
    '(saturated lines: choose regions with weaker lines or a narrower calibrated range), lines of different ' +
    'gases that overlap (they multiply in transmittance), an absorber in the standards the method does not ' +
    'model, or a baseline the polynomial order does not follow'
  );
}

/**
 * Diagnoses lack of fit (see the module header): blanks' noise against the residual, and the
 * residual a second-order term would remove for each component that has none.
 *
 * @param input - projected responses, design, components, terms, the fit and the condition limit
 * @returns the diagnosis
 */
export function diagnoseLackOfFit(input: {
  projected: readonly Float64Array[];
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  fitted: FittedState;
  conditionLimit: number;
}): ClsLackOfFit {
  const { projected, design, components, terms, fitted } = input;
  const { state } = fitted;
  const n = projected.length;
  const q = terms.length;
  const p = components.length;
  const baseCount = state.calibrationResidualCount / (n - q);
  const squareSum = correlationSquareSum(fitted.correlation);
  const residualVariance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;

  const blankRows = design
    .map((row, i) => (Array.from({ length: p }, (_, j) => row[j]!).every((value) => value === 0) ? i : -1))
    .filter((i) => i >= 0);
  let blankVariance: number | null = null;
  let residualOverBlank: number | null = null;
  let residualOverBlankLimit: number | null = null;
  if (blankRows.length > 0 && baseCount > 0) {
    let energy = 0;
    for (const i of blankRows) energy += dot(projected[i]!, projected[i]!);
    blankVariance = energy / (blankRows.length * baseCount);
    if (blankVariance > 0 && residualVariance > 0) {
      residualOverBlank = residualVariance / blankVariance;
      residualOverBlankLimit = fQuantile(
        TEST_PROBABILITY,
        state.calibrationDegreesOfFreedom,
        (blankRows.length * baseCount) / squareSum,
      );
    }
  }

  const secondOrderGains: ClsSecondOrderGain[] = [];
  if (n - q - 1 >= 1 && state.calibrationResidualSum > 0) {
    const responses = projected.map((row) => Array.from(row));
    for (let c = 0; c < p; c++) {
      if (terms.some((term) => term.component === c && term.power === 2)) continue;
      const levels = new Set(design.map((row) => row[c]!));
      if (levels.size < 3) continue;
      let reduced: number;
      try {
        const fit = solveLeastSquaresMany(
          design.map((row) => [...Array.from(row), row[c]! * row[c]!]),
          responses,
          { conditionLimit: input.conditionLimit },
        );
        reduced = fit.residualSumOfSquares.reduce((a, b) => a + b, 0);
      } catch (error) {
        if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) continue;
        throw error;
      }
      const removed = Math.max(state.calibrationResidualSum - reduced, 0);
      const fStatistic =
        reduced > 0 ? removed / baseCount / (reduced / ((n - q - 1) * baseCount)) : Number.POSITIVE_INFINITY;
      secondOrderGains.push({
        component: components[c]!.name,
        residualReduction: removed / state.calibrationResidualSum,
        fStatistic,
        fLimit: fQuantile(TEST_PROBABILITY, baseCount / squareSum, ((n - q - 1) * baseCount) / squareSum),
      });
    }
  }
  const aboveNoise =
    residualOverBlank !== null &&
    residualOverBlankLimit !== null &&
    residualOverBlank > Math.max(residualOverBlankLimit, DEFAULT_POOR_FIT_RATIO ** 2);
  const partial: ClsLackOfFit = {
    blanks: blankRows.length,
    blankVariance,
    residualOverBlank,
    residualOverBlankLimit,
    secondOrderGains,
    detected: false,
  };
  return { ...partial, detected: aboveNoise || helpfulGains(partial).length > 0 };
}

/**
 * The warning a calibration that passes its checks carries when its residual is lack of fit.
 *
 * @param lackOfFit - the diagnosis
 * @param state - the fitted state
 * @param components - the model's components
 * @param inflation - cross-validation's interval inflation per component
 * @returns no warning, or one
 */
export function lackOfFitWarnings(
  lackOfFit: ClsLackOfFit,
  state: ClsState,
  components: readonly ClsComponent[],
  inflation: readonly number[],
): string[] {
  if (!lackOfFit.detected) return [];
  const widened = components
    .map((component, j) => ({ name: component.name, factor: inflation[j]! }))
    .filter((entry) => entry.factor > 1);
  const consequence =
    widened.length > 0
      ? `cross-validation widens the intervals ` +
        `(${widened.map((entry) => `${entry.name} ×${entry.factor.toFixed(2)}`).join(', ')}) to cover it`
      : 'cross-validation does not show it in the estimates, but results near the ends of the calibrated range ' +
        'may be biased';
  return [
    `lack of fit: ${describeLackOfFit(lackOfFit, state)}; ${consequence}; ${lackOfFitAdvice(lackOfFit)}`,
  ];
}
