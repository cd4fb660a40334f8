/**
 * Refusals of CLS components that cannot be told apart, in words a person can act on. Without
 * lack of fit the refusal is the plain one (noise). When the residual is lack of fit, the fit is
 * repeated with the second-order terms that remove it: if the component then passes, the refusal
 * says it is masked by lack of fit and names the terms to add; if it still fails, the refusal says
 * it does not absorb measurably (or the bands coincide).
 */
import { BandwrightError, isBandwrightError } from '../../errors.js';
import { fitState } from './fit-state.js';
import { describeLackOfFit, helpfulGains, lackOfFitAdvice } from './lack-of-fit.js';
import { MINIMUM_SEPARATION_RATIO, type ClsTerm } from './model.js';
import { separationRatios, type SeparationInput, type SeparationRatios } from './separation-ratios.js';
import { termsOf } from './terms.js';
import { compactNumber, listNames } from '../../words.js';

/**
 * The same fit with second-order terms for the components whose curvature makes the lack of fit,
 * and its separation ratios; null when there are none, too few standards, or the fit fails.
 */
function withHelpfulSecondOrder(
  input: SeparationInput,
): { names: string[]; ratios: SeparationRatios } | null {
  const helpful = helpfulGains(input.lackOfFit);
  if (helpful.length === 0) return null;
  const added = helpful.map((gain) =>
    input.components.findIndex((component) => component.name === gain.component),
  );
  const terms: ClsTerm[] = [...input.terms, ...added.map((component) => ({ component, power: 2 as const }))];
  const design = input.design.map((row) =>
    Float64Array.from([...Array.from(row), ...added.map((component) => row[component]! * row[component]!)]),
  );
  if (input.projected.length < terms.length + 1) return null;
  try {
    const fitted = fitState({
      projected: input.projected,
      design,
      components: input.components,
      terms,
      nuisance: input.nuisance,
      segments: input.segments,
      correlation: 'estimate',
      conditionLimit: input.conditionLimit,
      channelWord: input.channelWord,
    });
    return {
      names: helpful.map((gain) => gain.component),
      ratios: separationRatios({ ...input, fitted, design, terms }),
    };
  } catch (error) {
    if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) return null;
    throw error;
  }
}

/**
 * The refusal of a component whose spectrum does not stand out of the calibration residual.
 *
 * @param input - what the separation checks saw
 * @param component - index of the component
 * @param ratio - its signal ratio
 */
export function signalRefusal(input: SeparationInput, component: number, ratio: number): BandwrightError {
  const { components, terms, channelWord, lackOfFit } = input;
  const name = components[component]!.name;
  const jointly = termsOf(terms, component).length > 1 ? ' (first and second order together)' : '';
  const subject = `pure spectrum of ${name}${jointly}`;
  const measured =
    `signal ${compactNumber(ratio)} times the energy the calibration residual leaves in it where ` +
    `it absorbs, must be >= ${MINIMUM_SEPARATION_RATIO}`;
  const absent = `it does not absorb measurably in the method's ${channelWord}s, or its standards are too weak`;
  if (!lackOfFit.detected) {
    return new BandwrightError(
      'SINGULAR',
      `${subject} is not distinguishable from the calibration noise (${measured}): ${absent}`,
      { parameter: 'spectra' },
    );
  }
  const diagnosis = describeLackOfFit(lackOfFit, input.fitted.state);
  const remedy = withHelpfulSecondOrder(input);
  if (remedy !== null) {
    const after = remedy.ratios.components[component]!.signal;
    if (after !== null && after >= MINIMUM_SEPARATION_RATIO) {
      return new BandwrightError(
        'SINGULAR',
        `${subject} cannot be told from the calibration's lack of fit (${measured}): ${diagnosis}; with a ` +
          `second-order term for ${listNames(remedy.names)} its signal ratio would be ${compactNumber(after)}: ` +
          `give ${listNames(remedy.names)} a second-order term (secondOrder)`,
        { parameter: 'spectra' },
      );
    }
    return new BandwrightError(
      'SINGULAR',
      `${subject} is not distinguishable from the calibration residual (${measured}), not even after a ` +
        `second-order term for ${listNames(remedy.names)} removes the lack of fit (ratio ` +
        `${after === null ? 'not available' : compactNumber(after)} then): ${absent}`,
      { parameter: 'spectra' },
    );
  }
  return new BandwrightError(
    'SINGULAR',
    `${subject} is not distinguishable from the calibration residual (${measured}), and that residual is lack ` +
      `of fit: ${diagnosis}; ${lackOfFitAdvice(lackOfFit)}; then see whether ${name} absorbs measurably in the ` +
      `method's ${channelWord}s`,
    { parameter: 'spectra' },
  );
}

/**
 * The refusal of two components whose response spectra differ only by residual.
 *
 * @param input - what the separation checks saw
 * @param component - index of the component
 * @param other - index of the component it cannot be told from
 * @param ratio - their separation ratio
 */
export function shapeRefusal(
  input: SeparationInput,
  component: number,
  other: number,
  ratio: number,
): BandwrightError {
  const { components, channelWord, lackOfFit } = input;
  const pair = `${components[component]!.name} and ${components[other]!.name}`;
  const measured =
    `their difference carries ${compactNumber(ratio)} times the energy the calibration residual ` +
    `leaves in it, must be >= ${MINIMUM_SEPARATION_RATIO}`;
  const coincide =
    `their bands coincide and cannot be separated; extend the regions to where their bands ` +
    `differ, or drop one of them`;
  if (!lackOfFit.detected) {
    return new BandwrightError(
      'SINGULAR',
      `pure spectra of ${pair} have the same shape within the calibration noise (${measured}): ${coincide}`,
      { parameter: 'spectra' },
    );
  }
  const diagnosis = describeLackOfFit(lackOfFit, input.fitted.state);
  const remedy = withHelpfulSecondOrder(input);
  if (remedy !== null) {
    const after = remedy.ratios.pairs.find(
      (entry) => entry.component === component && entry.other === other,
    )?.ratio;
    if (after !== undefined && after >= MINIMUM_SEPARATION_RATIO) {
      return new BandwrightError(
        'SINGULAR',
        `pure spectra of ${pair} cannot be told apart through the calibration's lack of fit (${measured}): ` +
          `${diagnosis}; with a second-order term for ${listNames(remedy.names)} their separation ratio would ` +
          `be ${compactNumber(after)}: give ${listNames(remedy.names)} a second-order term (secondOrder)`,
        { parameter: 'spectra' },
      );
    }
    return new BandwrightError(
      'SINGULAR',
      `pure spectra of ${pair} have the same shape within the calibration residual (${measured}), even after a ` +
        `second-order term for ${listNames(remedy.names)} removes the lack of fit (ratio ` +
        `${after === undefined ? 'not available' : compactNumber(after)} then): ${coincide}`,
      { parameter: 'spectra' },
    );
  }
  return new BandwrightError(
    'SINGULAR',
    `pure spectra of ${pair} have the same shape within the calibration residual (${measured}), and that ` +
      `residual is lack of fit: ${diagnosis}; ${lackOfFitAdvice(lackOfFit)}; then see whether their bands ` +
      `differ over the method's ${channelWord}s`,
    { parameter: 'spectra' },
  );
}

/**
 * Puts the shared least-squares engine's collinearity message in the words of a calibration.
 *
 * @param error - anything thrown by the K fit
 * @returns the error to throw instead (others unchanged)
 */
export function rephraseDesignError(error: unknown): unknown {
  if (isBandwrightError(error, 'SINGULAR')) {
    return new BandwrightError(
      'SINGULAR',
      `standards' concentrations cannot separate the gases: ` +
        `${error.message.replace(/^design columns /, '').replace(/^design column /, '')} (in every standard ` +
        `they keep the same ratio, or one is a combination of the others)`,
      { parameter: 'concentrations' },
      { cause: error },
    );
  }
  return error;
}
