/**
 * The shared fit of classical least squares (K-matrix), used by spectral CLS (`spectral.ts`) and
 * band-area CLS (`band.ts`): removes the nuisance, fits K (`fit-state.ts`), diagnoses lack of fit
 * (`lack-of-fit.ts`), checks that the components can be separated (`separation.ts`), estimates the
 * channel-noise correlation (`noise.ts`), cross-validates (`cross-validation.ts`) and returns the
 * serialisable model: what was fitted, without the prediction operators derived from it.
 */
import { BandwrightError } from '../../errors.js';
import { removeSpan, type ChannelSegment } from './basis.js';
import { crossValidate } from './cross-validation.js';
import { fitState, type FittedState } from './fit-state.js';
import { diagnoseLackOfFit, lackOfFitWarnings } from './lack-of-fit.js';
import type { ClsCoreModel, ClsStandards } from './model.js';
import { rephraseDesignError } from './refusals.js';
import { checkPureSpectra } from './separation.js';
import { designTerms, termName, termValues } from './terms.js';
import { compactNumber, listNames } from '../../words.js';

/** Options of {@link fitClsCore}. */
export interface ClsCoreOptions {
  /** Confidence level stored as the model's default, strictly between 0 and 1. */
  readonly level: number;
  /** Largest condition number accepted for the column-scaled X and Kᵀ, ≥ 1. */
  readonly conditionLimit: number;
  /** Indices of components that get a second-order term. */
  readonly secondOrder: readonly number[];
  /** Orthonormal nuisance basis on the channels (may be empty). */
  readonly nuisance: readonly Float64Array[];
  /** Channel segments for the noise correlation; estimate correlation only when `estimateCorrelation`. */
  readonly segments: readonly ChannelSegment[];
  /** Estimate channel-noise correlation from the residuals (spectra); false for independent bands. */
  readonly estimateCorrelation: boolean;
  /**
   * Weight the separation checks by the local level of the calibration residual (spectra, whose
   * neighbouring channels share a level); false to pool it over all channels (bands).
   */
  readonly localResidualWeights: boolean;
  /** What to call a channel in messages (`channel`, `band`). */
  readonly channelWord: string;
}

/** Validated input of {@link fitClsCore}; arrays are not modified. */
export interface ClsCoreData extends ClsStandards {
  /** Responses, standards × channels (spectra or band areas). */
  readonly responses: readonly ArrayLike<number>[];
}

/**
 * Fits the CLS core: validates nothing about shapes (the callers do, with their own words),
 * removes the nuisance, fits K, checks separability, estimates the channel-noise correlation,
 * runs leave-one-out cross-validation and returns the serialisable model.
 *
 * @param data - responses, certified concentrations, φ per standard, components (not modified)
 * @param options - level, condition limit, second-order components, nuisance basis, segments
 * @returns the core model
 * @throws BandwrightError `SINGULAR` naming the components that cannot be separated;
 *   `INSUFFICIENT_DATA` when there are too few standards or channels for the terms
 */
export function fitClsCore(data: ClsCoreData, options: ClsCoreOptions): ClsCoreModel {
  const { components } = data;
  const n = data.responses.length;
  const p = components.length;
  const channels = data.responses[0]!.length;
  const terms = designTerms(p, options.secondOrder);
  const q = terms.length;
  if (n < q + 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${n} standard(s) for ${q} model term(s) ` +
        `(${listNames(terms.map((term) => termName(components, term)))}): CLS needs at least ${q + 1} standards`,
      { parameter: 'spectra' },
    );
  }
  if (channels - options.nuisance.length - q < 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${channels} ${options.channelWord}(s) for ${q} term(s) and ${options.nuisance.length} ` +
        `baseline/background term(s): needs more ${options.channelWord}s than terms`,
      { parameter: 'spectra' },
    );
  }
  const projected = data.responses.map((row) => removeSpan(row, options.nuisance));
  const scaled = data.concentrations.map((row, i) => {
    const phi = data.phi[i]!;
    return Float64Array.from({ length: p }, (_, j) => row[j]! * phi);
  });
  const design = scaled.map((u) => termValues(terms, u));

  let fitted: FittedState;
  try {
    fitted = fitState({
      projected,
      design,
      components,
      terms,
      nuisance: options.nuisance,
      segments: options.segments,
      correlation: options.estimateCorrelation ? 'estimate' : [1],
      conditionLimit: options.conditionLimit,
      channelWord: options.channelWord,
    });
  } catch (error) {
    throw rephraseDesignError(error);
  }
  const correlation = fitted.correlation;
  if (!(fitted.state.sampleResidualCount >= 1)) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${channels} ${options.channelWord}s leave ${compactNumber(fitted.state.sampleResidualCount)} independent ` +
        `residual value(s) after the baseline and ${q} term(s), given the channel-noise correlation ` +
        `(${correlation.length - 1} lags): widen the regions`,
      { parameter: 'spectra' },
    );
  }
  const lackOfFit = diagnoseLackOfFit({
    projected,
    design,
    components,
    terms,
    fitted,
    conditionLimit: options.conditionLimit,
  });
  const checks = checkPureSpectra({
    fitted,
    projected,
    nuisance: options.nuisance,
    design,
    components,
    terms,
    segments: options.segments,
    conditionLimit: options.conditionLimit,
    channelWord: options.channelWord,
    localWeights: options.localResidualWeights,
    lackOfFit,
  });
  const state = fitted.state;
  const crossValidation = crossValidate({
    responses: data.responses,
    projected,
    design,
    scaled,
    phi: data.phi,
    components,
    terms,
    nuisance: options.nuisance,
    segments: options.segments,
    correlation,
    calibrationDegreesOfFreedom: state.calibrationDegreesOfFreedom,
    channelWord: options.channelWord,
  });

  const ranges = components.map((_, j) => {
    let min = Infinity;
    let max = -Infinity;
    for (const u of scaled) {
      min = Math.min(min, u[j]!);
      max = Math.max(max, u[j]!);
    }
    return { min, max };
  });
  const calibrationVariance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;
  return {
    components: components.map((component) => ({
      name: component.name,
      reported: component.reported,
      unit: component.unit,
    })),
    terms,
    channelCount: channels,
    pureSpectra: state.pureSpectra.map((row) => Array.from(row)),
    concentrationGramInverse: state.concentrationGramInverse.map((row) => row.slice()),
    noiseCorrelation: correlation,
    segments: options.segments.map((segment) => ({
      start: segment.start,
      end: segment.end,
      region: segment.region,
    })),
    ranges,
    calibration: {
      standards: n,
      residualVariance: calibrationVariance,
      residualRms: Math.sqrt(state.calibrationResidualSum / (n * channels)),
      residualCount: state.calibrationResidualCount,
      degreesOfFreedom: state.calibrationDegreesOfFreedom,
      conditionConcentrations: fitted.conditionConcentrations,
      conditionPureSpectra: checks.condition,
      signalRatio: checks.signalRatio,
      separationRatio: checks.separationRatio,
      lackOfFit,
      responseScale: state.responseScale,
    },
    crossValidation,
    level: options.level,
    warnings: lackOfFitWarnings(lackOfFit, state, components, crossValidation.inflation),
  };
}
