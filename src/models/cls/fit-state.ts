/**
 * The K fit of classical least squares. Y = A − (A U) Uᵀ removes the nuisance (done by the
 * caller); K = argmin ‖Y − X K‖ with X = [θ(u_i)ᵀ] by QR (`solveLeastSquaresMany`, which refuses a
 * rank-deficient or ill-conditioned X and names the collinear components). The residuals give the
 * calibration's residual sum of squares and, for spectra, the channel-noise correlation; the
 * prediction operators follow from K (`prediction-state.ts`).
 */
import { solveLeastSquaresMany } from '../../stats/least-squares.js';
import type { ChannelSegment } from './basis.js';
import type { ClsComponent, ClsTerm } from './model.js';
import { estimateCorrelation } from './noise.js';
import { derivePredictionOperators, type ClsState } from './prediction-state.js';
import { termName } from './terms.js';

/** What {@link fitState} fits. */
export interface StateInput {
  /** Baseline-free responses, standards × channels. */
  projected: readonly Float64Array[];
  /** Term values θ(u_i) of each standard. */
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  nuisance: readonly Float64Array[];
  segments: readonly ChannelSegment[];
  /** Noise correlation to use, or `estimate` to estimate it from this fit's residuals. */
  correlation: readonly number[] | 'estimate';
  conditionLimit: number;
  channelWord: string;
}

/** A K fit with its prediction state and what the checks need. */
export interface FittedState {
  state: ClsState;
  /** Residual spectra of the standards. */
  residuals: Float64Array[];
  /** Condition number of the column-scaled concentration design X. */
  conditionConcentrations: number;
  /** R_K of Kᵀ = Q_K R_K. */
  rFactor: number[][];
  /** The noise correlation used (estimated or given). */
  correlation: number[];
}

/**
 * Fits K for given projected responses and design and builds the prediction state.
 *
 * @param input - projected responses, design, components and terms, noise model, condition limit
 * @returns the state, residuals, condition number, R_K and the noise correlation
 * @throws BandwrightError `SINGULAR` (via the shared least-squares engine) for a design that
 *   cannot separate the terms, or pure spectra that are linearly dependent; `INSUFFICIENT_DATA`
 *   for fewer standards than terms
 */
export function fitState(input: StateInput): FittedState {
  const { projected, design, components, terms, nuisance, segments } = input;
  const n = projected.length;
  const q = terms.length;
  const channels = projected[0]!.length;
  const names = terms.map((term) => termName(components, term));
  const fit = solveLeastSquaresMany(
    design.map((row) => Array.from(row)),
    projected.map((row) => Array.from(row)),
    { columnNames: names, conditionLimit: input.conditionLimit },
  );
  const pureSpectra = fit.coefficients.map((row) => Float64Array.from(row));
  const residuals = projected.map((row, i) => {
    const out = Float64Array.from(row);
    const x = design[i]!;
    for (let t = 0; t < q; t++) {
      const value = x[t]!;
      if (value === 0) continue;
      const k = pureSpectra[t]!;
      for (let j = 0; j < channels; j++) out[j]! -= value * k[j]!;
    }
    return out;
  });
  const calibrationResidualSum = fit.residualSumOfSquares.reduce((a, b) => a + b, 0);
  const correlation =
    input.correlation === 'estimate'
      ? estimateCorrelation(residuals, segments, { independentFraction: (n - q) / n })
      : input.correlation.slice();
  const operators = derivePredictionOperators({
    pureSpectra,
    correlation,
    segments,
    nuisance,
    termNames: names,
    channelWord: input.channelWord,
  });
  const calibrationResidualCount = (n - q) * operators.baseCount;

  let responseScale = 0;
  for (const row of projected)
    for (let j = 0; j < channels; j++) responseScale = Math.max(responseScale, Math.abs(row[j]!));

  const state: ClsState = {
    componentCount: components.length,
    terms,
    pureSpectra,
    predictionMatrix: operators.predictionMatrix,
    responseFactor: operators.responseFactor,
    noiseGram: operators.noiseGram,
    concentrationGramInverse: fit.unscaledCovariance,
    linearCovarianceFactor: operators.linearCovarianceFactor,
    nuisance,
    calibrationResidualSum,
    calibrationResidualCount,
    calibrationDegreesOfFreedom: calibrationResidualCount / operators.squareSum,
    sampleResidualCount: operators.sampleResidualCount,
    sampleDegreesOfFreedom: operators.sampleResidualCount / operators.squareSum,
    inflation: new Array<number>(components.length).fill(1),
    responseScale,
  };
  return {
    state,
    residuals,
    conditionConcentrations: fit.conditionNumber,
    rFactor: operators.responseFactor,
    correlation,
  };
}
