/**
 * The numeric state CLS prediction uses, derived from what was fitted. A saved model holds the
 * pure spectra K, the channel-noise correlation and the channel segments; the operators below are
 * recomputed from them once per model (when it is first used, not per scan), the same way the fit
 * computes them, so a model read back from a file predicts exactly as the fitted one did.
 *
 * Predict. θ̂ = M y with M = (Kᵀ)⁺ = R_K⁻¹ Q_Kᵀ from the Householder QR Kᵀ = Q_K R_K (one
 * matrix–vector product a scan). The noise correlation seen by the estimates is W = Q_Kᵀ R Q_K,
 * R the channel-noise correlation matrix (`noise.ts`); for a linear model J⁺ R J⁺ᵀ = R_K⁻¹ W R_K⁻ᵀ.
 * The expected residual sum of squares of a sample is σ² τ_s with τ_s = N − Σ_U uᵀRu − tr W, and
 * its degrees of freedom by Satterthwaite ν ≈ τ/Σρ_l².
 */
import { Matrix, QrDecomposition } from 'ml-matrix';
import { BandwrightError } from '../../errors.js';
import { dot, invertUpperTriangular, multiply, transpose } from '../../stats/linear-algebra.js';
import type { ChannelSegment } from './basis.js';
import type { ClsCoreModel, ClsTerm } from './model.js';
import { correlationSquareSum, multiplyCorrelation } from './noise.js';
import { termName } from './terms.js';
import { listNames } from '../../words.js';

/**
 * Numeric state used for prediction (typed arrays and derived factors), built once from a model
 * by {@link prepareClsState} or during fitting; the symbols are those of the module header.
 */
export interface ClsState {
  readonly componentCount: number;
  readonly terms: readonly ClsTerm[];
  readonly pureSpectra: readonly Float64Array[];
  /** M = (Kᵀ)⁺, one row per term: θ̂ = M y. */
  readonly predictionMatrix: readonly Float64Array[];
  /** R_K (terms × terms, upper triangular). */
  readonly responseFactor: readonly (readonly number[])[];
  /** W = Q_Kᵀ R Q_K (terms × terms). */
  readonly noiseGram: readonly (readonly number[])[];
  /** (XᵀX)⁻¹ of the concentration design (terms × terms). */
  readonly concentrationGramInverse: readonly (readonly number[])[];
  /** R_K⁻¹ W R_K⁻ᵀ, the linear-model J⁺ R J⁺ᵀ. */
  readonly linearCovarianceFactor: readonly (readonly number[])[];
  readonly nuisance: readonly Float64Array[];
  readonly calibrationResidualSum: number;
  readonly calibrationResidualCount: number;
  readonly calibrationDegreesOfFreedom: number;
  /** τ_s, the expected residual sum of squares of a sample in units of σ². */
  readonly sampleResidualCount: number;
  readonly sampleDegreesOfFreedom: number;
  readonly inflation: readonly number[];
  readonly responseScale: number;
}

/** The prediction operators of {@link derivePredictionOperators}. */
export interface PredictionOperators {
  readonly predictionMatrix: Float64Array[];
  readonly responseFactor: number[][];
  readonly noiseGram: number[][];
  readonly linearCovarianceFactor: number[][];
  /** N − Σ_U uᵀRu: expected residual sum of squares per σ² of a spectrum with no terms fitted (τ_B). */
  readonly baseCount: number;
  /** τ_s = τ_B − tr W. */
  readonly sampleResidualCount: number;
  /** Σ_l ρ_l², the Satterthwaite divisor. */
  readonly squareSum: number;
}

/**
 * Derives the prediction operators from the pure spectra and the noise model.
 *
 * @param input.pureSpectra - K, one row per term, over the channels
 * @param input.correlation - noise autocorrelation ρ_0 = 1, ρ_1 … (channels)
 * @param input.segments - contiguous channel runs along which the correlation acts
 * @param input.nuisance - orthonormal nuisance basis (empty for bands)
 * @param input.termNames - names of the terms, for the message
 * @param input.channelWord - what to call a channel in the message (`channel`, `band`)
 * @returns M, R_K, W, R_K⁻¹ W R_K⁻ᵀ and the expected residual counts
 * @throws BandwrightError `SINGULAR` when the pure spectra are linearly dependent
 */
export function derivePredictionOperators(input: {
  pureSpectra: readonly Float64Array[];
  correlation: readonly number[];
  segments: readonly ChannelSegment[];
  nuisance: readonly Float64Array[];
  termNames: readonly string[];
  channelWord: string;
}): PredictionOperators {
  const { pureSpectra, correlation, segments, nuisance } = input;
  const q = pureSpectra.length;
  const channels = pureSpectra[0]!.length;
  // (Kᵀ)⁺ by Householder QR, directly with ml-matrix: the shared solver returns coefficients for
  // given right-hand sides, whereas here the operator itself is kept so that each later scan costs
  // one matrix–vector product.
  const qr = new QrDecomposition(new Matrix(pureSpectra.map((row) => Array.from(row))).transpose());
  const responseFactor = qr.upperTriangularMatrix.to2DArray();
  const rankOk = responseFactor.every((row, t) => Number.isFinite(1 / row[t]!) && row[t] !== 0);
  if (!rankOk) {
    throw new BandwrightError(
      'SINGULAR',
      `pure spectra of ${listNames(input.termNames)} are linearly dependent over the ${input.channelWord}s`,
      { parameter: 'spectra' },
    );
  }
  const qFactor = qr.orthogonalMatrix;
  const qColumns = Array.from({ length: q }, (_, t) => Float64Array.from(qFactor.getColumn(t)));
  const rInverse = invertUpperTriangular(responseFactor);
  const predictionMatrix = multiply(
    rInverse,
    qColumns.map((column) => Array.from(column)),
  ).map((row) => Float64Array.from(row));

  const rq = qColumns.map((column) => multiplyCorrelation(column, correlation, segments));
  const noiseGram = qColumns.map((column) => rq.map((other) => dot(column, other)));
  let nuisanceCorrelationSum = 0;
  for (const u of nuisance) nuisanceCorrelationSum += dot(u, multiplyCorrelation(u, correlation, segments));
  const squareSum = correlationSquareSum(correlation);
  const baseCount = channels - nuisanceCorrelationSum;
  let traceW = 0;
  for (let t = 0; t < q; t++) traceW += noiseGram[t]![t]!;
  return {
    predictionMatrix,
    responseFactor,
    noiseGram,
    linearCovarianceFactor: multiply(multiply(rInverse, noiseGram), transpose(rInverse)),
    baseCount,
    sampleResidualCount: baseCount - traceW,
    squareSum,
  };
}

/**
 * Builds the numeric prediction state of a fitted model (typed arrays, derived operators). Call
 * once per model and reuse for many samples.
 *
 * @param model - a fitted core model (or one read back from a file)
 * @param nuisance - the orthonormal nuisance basis the model was fitted with (empty for bands)
 * @param channelWord - what to call a channel in messages (default `channel`)
 * @returns the state
 * @throws BandwrightError `SINGULAR` when the model's pure spectra are linearly dependent (a
 *   damaged model: a fit never returns such spectra)
 */
export function prepareClsState(
  model: ClsCoreModel,
  nuisance: readonly Float64Array[],
  channelWord = 'channel',
): ClsState {
  const pureSpectra = model.pureSpectra.map((row) => Float64Array.from(row));
  const operators = derivePredictionOperators({
    pureSpectra,
    correlation: model.noiseCorrelation,
    segments: model.segments,
    nuisance,
    termNames: model.terms.map((term) => termName(model.components, term)),
    channelWord,
  });
  return {
    componentCount: model.components.length,
    terms: model.terms,
    pureSpectra,
    predictionMatrix: operators.predictionMatrix,
    responseFactor: operators.responseFactor,
    noiseGram: operators.noiseGram,
    concentrationGramInverse: model.concentrationGramInverse,
    linearCovarianceFactor: operators.linearCovarianceFactor,
    nuisance,
    calibrationResidualSum: model.calibration.residualVariance * model.calibration.residualCount,
    calibrationResidualCount: model.calibration.residualCount,
    calibrationDegreesOfFreedom: model.calibration.degreesOfFreedom,
    sampleResidualCount: operators.sampleResidualCount,
    sampleDegreesOfFreedom: operators.sampleResidualCount / operators.squareSum,
    inflation: model.crossValidation.inflation,
    responseScale: model.calibration.responseScale,
  };
}
