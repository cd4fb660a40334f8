/**
 * Spectral classical least squares (K-matrix) for gas mixtures (DESIGN §3): fit pure-component
 * spectra from standards over the method's regions, with a polynomial baseline per region and an
 * optional background spectrum, and predict a sample's concentrations with prediction intervals
 * calibrated for correlated channels. The mathematics is shared with band-area CLS (`fit-core.ts`,
 * `predict.ts`); this module handles channels, regions and baseline.
 *
 * Units: spectra in decadic absorbance on the model's channels; concentrations in each
 * component's unit at the standard's own conditions; φ = (L/L_ref)(P/P_ref)(T_ref/T) per
 * standard and per sample (dimensionless), so the model works in φ-scaled concentrations.
 */
import { BandwrightError } from '../../errors.js';
import { channelSegments, MAX_BASELINE_ORDER, nuisanceBasis, removeSpan } from './basis.js';
import { fitClsCore } from './fit-core.js';
import {
  type ClsCommonFitOptions,
  type ClsCoreModel,
  type ClsPredictOptions,
  type ClsPrediction,
  type ClsStandards,
} from './model.js';
import { predictClsState } from './predict.js';
import { prepareClsState, type ClsState } from './prediction-state.js';
import { validateClsInputs } from './validate.js';

/** Standards for a spectral CLS fit. Nothing here is modified. */
export interface ClsData extends ClsStandards {
  /** Number of channels, or the grid itself (cm⁻¹; used to centre and scale the baseline polynomials). */
  readonly channels: number | Float64Array;
  /**
   * Region label of each channel (integers ≥ 0); the baseline polynomial is fitted on each region
   * separately. Default: one region.
   */
  readonly regionOf?: ArrayLike<number>;
  /** Absorbance spectra of the standards, standards × channels. */
  readonly spectra: readonly ArrayLike<number>[];
}

/** Options of {@link fitCls}. */
export interface SpectralClsFitOptions extends ClsCommonFitOptions {
  /** Polynomial baseline order per region, 0…3 (default 1: offset and slope). */
  readonly baselineOrder?: number;
  /** A constant background spectrum (absorbance on the channels) with a free coefficient in every spectrum. */
  readonly background?: ArrayLike<number>;
}

/**
 * A fitted spectral CLS model: plain JSON-safe data, what was fitted and the channel layout it was
 * fitted on; its prediction operators are rebuilt from them when it is first used.
 */
export interface ClsModel extends ClsCoreModel {
  /** Model kind. */
  readonly kind: 'cls';
  /** Channel grid (cm⁻¹) when one was given, else null (channel indices were used). */
  readonly grid: readonly number[] | null;
  /** Baseline polynomial order per region. */
  readonly baselineOrder: number;
  /** Background spectrum, or null. */
  readonly background: readonly number[] | null;
}

function positionsOf(channels: number | Float64Array): ArrayLike<number> {
  if (typeof channels === 'number') return Float64Array.from({ length: channels }, (_, i) => i);
  return channels;
}

/**
 * Fits a spectral CLS model from standards.
 *
 * @param data - channels (count or grid, cm⁻¹), region per channel, absorbance spectra,
 *   certified concentrations (component units), φ per standard, components
 * @param options - baseline order (0…3, default 1), background spectrum, second-order
 *   components, level (default 0.95), condition limit (default 1000)
 * @returns the model (plain object: pure spectra, noise model, statistics, leave-one-out
 *   cross-validation)
 * @throws BandwrightError `INVALID_VALUE` naming the standard, channel or component for shapes,
 *   non-finite values, negative concentrations or φ ≤ 0; `INSUFFICIENT_DATA` for too few
 *   standards or channels; `SINGULAR` naming the gases when collinear standards or coinciding
 *   bands make them inseparable
 * @example
 * const model = fitCls(
 *   { channels: grid, spectra, concentrations, phi: spectra.map(() => 1),
 *     components: [{ name: 'CO', reported: true, unit: 'ppm' }, { name: 'H2O', reported: false, unit: 'ppm' }] },
 *   { baselineOrder: 1 },
 * );
 */
export function fitCls(data: ClsData, options: SpectralClsFitOptions = {}): ClsModel {
  const channelCount = typeof data.channels === 'number' ? data.channels : data.channels.length;
  const standards = { ...data, responses: data.spectra };
  const validated = validateClsInputs(standards, options, {
    channelCount,
    channelWord: 'channel',
    responsesName: 'spectra',
  });
  const baselineOrder = options.baselineOrder ?? 1;
  if (!(Number.isInteger(baselineOrder) && baselineOrder >= 0 && baselineOrder <= MAX_BASELINE_ORDER)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `baselineOrder = ${baselineOrder}, must be an integer 0…${MAX_BASELINE_ORDER}`,
      { parameter: 'baselineOrder' },
    );
  }
  if (typeof data.channels !== 'number') {
    for (let j = 0; j < channelCount; j++) {
      if (!Number.isFinite(data.channels[j])) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `channels[${j}] = ${data.channels[j]}, grid values must be finite numbers (cm⁻¹)`,
          { parameter: 'channels' },
        );
      }
    }
  }
  const regionOf = Float64Array.from({ length: channelCount }, (_, j) => data.regionOf?.[j] ?? 0);
  if (data.regionOf !== undefined && data.regionOf.length !== channelCount) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `regionOf has ${data.regionOf.length} labels for ${channelCount} channels, must be equal`,
      { parameter: 'regionOf' },
    );
  }
  regionOf.forEach((label, j) => {
    if (!(Number.isInteger(label) && label >= 0)) {
      throw new BandwrightError('INVALID_VALUE', `regionOf[${j}] = ${label}, must be an integer >= 0`, {
        parameter: 'regionOf',
      });
    }
  });
  let background: Float64Array | undefined;
  if (options.background !== undefined) {
    if (options.background.length !== channelCount) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `background has ${options.background.length} values for ${channelCount} channels, must be equal`,
        { parameter: 'background' },
      );
    }
    background = Float64Array.from(options.background);
    background.forEach((value, j) => {
      if (!Number.isFinite(value))
        throw new BandwrightError(
          'INVALID_VALUE',
          `background channel ${j} = ${value}, must be a finite number`,
          { parameter: 'background' },
        );
    });
  }
  const positions = positionsOf(data.channels);
  const nuisance = nuisanceBasis({
    positions,
    regionOf,
    order: baselineOrder,
    ...(background ? { background } : {}),
  });
  const segments = channelSegments(regionOf, positions);
  const core = fitClsCore(standards, {
    ...validated,
    nuisance,
    segments,
    estimateCorrelation: true,
    localResidualWeights: true,
    channelWord: 'channel',
  });
  return {
    kind: 'cls',
    ...core,
    grid: typeof data.channels === 'number' ? null : Array.from(data.channels),
    baselineOrder,
    background: background ? Array.from(background) : null,
  };
}

/** Prediction states of the models seen, built once per model object. */
const prepared = new WeakMap<ClsModel, ClsState>();

/**
 * The numeric prediction state of a model: its baseline basis rebuilt from the grid, regions and
 * order, and the prediction operators derived from its pure spectra and noise model. Built on the
 * first call for a model object (when a calibration is loaded or first used) and kept while the
 * object lives, so a batch pays for it once, not per scan.
 *
 * @param model - a model from {@link fitCls}, or the same object read back from JSON
 * @returns the state (shared: do not modify)
 * @throws BandwrightError `INSUFFICIENT_DATA` or `INVALID_VALUE` from the baseline basis, or
 *   `SINGULAR`, when the model is damaged (a fit never returns such a model)
 */
export function clsPredictionState(model: ClsModel): ClsState {
  let state = prepared.get(model);
  if (state === undefined) {
    const regionOf = new Float64Array(model.channelCount);
    for (const segment of model.segments) regionOf.fill(segment.region, segment.start, segment.end);
    const positions = model.grid ?? Float64Array.from({ length: model.channelCount }, (_, i) => i);
    const nuisance = nuisanceBasis({
      positions,
      regionOf,
      order: model.baselineOrder,
      ...(model.background ? { background: model.background } : {}),
    });
    state = prepareClsState(model, nuisance, 'channel');
    prepared.set(model, state);
  }
  return state;
}

/**
 * Predicts a sample's concentrations from its absorbance spectrum.
 *
 * The first call for a model builds its numeric state (baseline basis, the prediction matrix and
 * the factors its intervals need) and caches it; later calls cost a few matrix–vector products
 * over the channels.
 *
 * Channels where the sample is undefined (NaN: saturated, transmittance at or below zero as
 * printed) are left out: the model is restricted to the remaining channels (pure spectra, baseline
 * basis per region on what remains, noise segments split at the gaps) and the least squares solved
 * there. The residual is NaN at the channels left out, and `undefinedChannels` counts them.
 *
 * @param model - a model from {@link fitCls} (or the same object read back from JSON)
 * @param spectrum - decadic absorbance on the model's channels; not modified
 * @param options - the sample's φ, confidence level (default the model's), poor-fit ratio
 * @returns per reported gas { name, unit, value, se, low, high, flags } at the sample's
 *   conditions, the interferents likewise, the residual spectrum and its RMS (absorbance), and
 *   the `poor-fit` flag
 * @throws BandwrightError `INVALID_VALUE` for a spectrum of the wrong length or with infinite
 *   values, φ ≤ 0, or a level outside (0, 1); `NO_SOLUTION` when the estimates overflow
 *   (absorbances far beyond any calibration); `INSUFFICIENT_DATA` when too few channels remain
 *   besides the undefined ones for the gases and baseline terms; `SINGULAR` when the remaining
 *   channels no longer separate the gases
 * @example
 * const result = predictCls(model, sampleAbsorbance, { phi: 1 });
 * result.estimates[0]; // { name: 'CO', value: 71.3, se: 0.4, low: 70.5, high: 72.1, ... }
 */
export function predictCls(
  model: ClsModel,
  spectrum: ArrayLike<number>,
  options: ClsPredictOptions,
): ClsPrediction {
  let undefinedChannels = 0;
  for (let j = 0; j < spectrum.length; j++) if (Number.isNaN(spectrum[j])) undefinedChannels++;
  if (undefinedChannels > 0 && spectrum.length === model.channelCount)
    return predictOnDefinedChannels(model, spectrum, undefinedChannels, options);
  return predictOnAllChannels(model, spectrum, options);
}

function predictOnAllChannels(
  model: ClsModel,
  spectrum: ArrayLike<number>,
  options: ClsPredictOptions,
): ClsPrediction {
  const prediction = predictClsState(model, clsPredictionState(model), spectrum, {
    ...options,
    channelWord: 'channel',
  });
  // Finite but huge absorbances (a corrupt or mis-scaled file) overflow the least squares; such an
  // estimate must be an error, never a concentration.
  const broken = [...prediction.estimates, ...prediction.interferents].find(
    (e) => ![e.value, e.se, e.low, e.high].every(Number.isFinite),
  );
  if (broken !== undefined || !Number.isFinite(prediction.residualRms)) {
    let largest = 0;
    for (let j = 0; j < spectrum.length; j++) largest = Math.max(largest, Math.abs(spectrum[j] as number));
    const gives =
      broken === undefined
        ? `a residual RMS of ${prediction.residualRms}`
        : `${broken.name} = ${broken.value} ± ${broken.se}`;
    throw new BandwrightError(
      'NO_SOLUTION',
      `the sample spectrum gives ${gives}, not a finite estimate; its absorbance reaches ${largest}, ` +
        `far beyond any calibration`,
      { parameter: 'spectrum' },
    );
  }
  return prediction;
}

/**
 * Prediction on the channels where the sample is defined: the model restricted to them, as
 * {@link predictCls} describes, with the residual put back on all channels (NaN where left out).
 */
function predictOnDefinedChannels(
  model: ClsModel,
  spectrum: ArrayLike<number>,
  undefinedChannels: number,
  options: ClsPredictOptions,
): ClsPrediction {
  const keep: number[] = [];
  for (let j = 0; j < spectrum.length; j++) if (!Number.isNaN(spectrum[j])) keep.push(j);
  const regionOfAll = new Int32Array(model.channelCount);
  for (const segment of model.segments) regionOfAll.fill(segment.region, segment.start, segment.end);
  const positionsAll = model.grid ?? Array.from({ length: model.channelCount }, (_, i) => i);
  const regionOf = Int32Array.from(keep, (j) => regionOfAll[j]!);
  const positions = keep.map((j) => positionsAll[j]!);
  const left = `${undefinedChannels} of the ${model.channelCount} channels are undefined (saturated)`;
  const members = new Map<number, number>();
  for (const region of regionOfAll) members.set(region, 0);
  for (const region of regionOf) members.set(region, (members.get(region) ?? 0) + 1);
  let baselineTerms = model.background === null ? 0 : 1;
  for (const [region, count] of members) {
    if (count === 0) continue;
    if (count < model.baselineOrder + 3) {
      throw new BandwrightError(
        'INSUFFICIENT_DATA',
        `${left}: region ${region + 1} keeps ${count} channel(s), its order-${model.baselineOrder} baseline ` +
          `needs at least ${model.baselineOrder + 3}`,
        { parameter: 'spectrum' },
      );
    }
    baselineTerms += model.baselineOrder + 1;
  }
  const unknowns = model.terms.length + baselineTerms;
  if (keep.length <= unknowns) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${left}: the ${keep.length} left cannot determine ${model.terms.length} gas term(s) and ` +
        `${baselineTerms} baseline term(s) with a residual to judge the fit by`,
      { parameter: 'spectrum' },
    );
  }
  const background = model.background === null ? null : keep.map((j) => model.background![j]!);
  // The fitted pure spectra are orthogonal to the baseline basis over all channels; on a subset
  // they are not to the subset's basis, and prediction takes them as they are: project them again.
  const nuisance = nuisanceBasis({
    positions,
    regionOf,
    order: model.baselineOrder,
    ...(background === null ? {} : { background }),
  });
  const restricted: ClsModel = {
    ...model,
    channelCount: keep.length,
    pureSpectra: model.pureSpectra.map((row) =>
      Array.from(
        removeSpan(
          keep.map((j) => row[j]!),
          nuisance,
        ),
      ),
    ),
    segments: channelSegments(regionOf, positions),
    grid: positions,
    background,
  };
  let prediction: ClsPrediction;
  try {
    prediction = predictOnAllChannels(
      restricted,
      keep.map((j) => spectrum[j] as number),
      options,
    );
  } catch (error) {
    if (error instanceof BandwrightError && error.code === 'SINGULAR')
      throw new BandwrightError(
        'SINGULAR',
        `${left}; on the channels left, ${error.message}`,
        { parameter: 'spectrum' },
        { cause: error },
      );
    throw error;
  }
  const residual = new Float64Array(model.channelCount).fill(Number.NaN);
  keep.forEach((j, k) => {
    residual[j] = prediction.residual[k]!;
  });
  return { ...prediction, residual, undefinedChannels };
}
