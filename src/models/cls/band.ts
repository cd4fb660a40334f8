/**
 * Band-area classical least squares: the small version of spectral CLS (DESIGN §3) for
 * mixtures measured by several baseline-corrected band areas (or peak heights), with more bands
 * than gases. A band plays the part of a channel: the same core (`fit-core.ts`, `predict.ts`) fits the
 * K-matrix of band responses per unit concentration, refuses gases that cannot be separated,
 * predicts with intervals and cross-validates. Differences from spectral CLS: no baseline terms
 * (areas are already baseline-corrected) and bands are taken as independent measurements with a
 * common noise variance (no channel correlation).
 *
 * Units: band areas in AU·cm⁻¹ (or peak heights in AU); concentrations in each component's unit
 * at the standard's conditions; φ = (L/L_ref)(P/P_ref)(T_ref/T) per standard and sample.
 */
import { BandwrightError } from '../../errors.js';
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

/** Standards for a band-area CLS fit. Nothing here is modified. */
export interface BandClsData extends ClsStandards {
  /** Band names in column order of `areas` (e.g. `2040-2245`), used in messages and results. */
  readonly bands: readonly string[];
  /** Baseline-corrected band areas (AU·cm⁻¹) or peak heights (AU), standards × bands. */
  readonly areas: readonly ArrayLike<number>[];
}

/** Options of {@link fitBandCls}: those of every CLS fit (band areas have no baseline terms). */
export type BandClsFitOptions = ClsCommonFitOptions;

/** A fitted band-area CLS model: plain JSON-safe data (what was fitted; no derived operators). */
export interface BandClsModel extends ClsCoreModel {
  /** Model kind. */
  readonly kind: 'band-cls';
  /** Band names, in the order a sample's areas must follow. */
  readonly bands: readonly string[];
}

/**
 * Fits a band-area CLS model.
 *
 * @param data - band names, band areas of the standards (AU·cm⁻¹), certified concentrations,
 *   φ per standard, components
 * @param options - second-order components, level (default 0.95), condition limit (default 1000)
 * @returns the model
 * @throws BandwrightError `INVALID_VALUE` for shapes, non-finite or negative values;
 *   `INSUFFICIENT_DATA` for too few standards or no more bands than model terms; `SINGULAR`
 *   naming the gases when collinear standards or proportional band responses make them inseparable
 * @example
 * const model = fitBandCls({ bands: ['b1', 'b2', 'b3'], areas, concentrations, phi,
 *   components: [{ name: 'NO', reported: true, unit: 'ppm' }, { name: 'NO2', reported: true, unit: 'ppm' }] });
 */
export function fitBandCls(data: BandClsData, options: BandClsFitOptions = {}): BandClsModel {
  const bandCount = data.bands.length;
  const names = new Set<string>();
  data.bands.forEach((band, k) => {
    if (typeof band !== 'string' || band === '')
      throw new BandwrightError(
        'INVALID_VALUE',
        `bands[${k}] = ${JSON.stringify(band)}, must be a non-empty band name`,
        { parameter: 'bands' },
      );
    if (names.has(band))
      throw new BandwrightError(
        'INVALID_VALUE',
        `bands[${k}] = "${band}" appears twice, band names must be unique`,
        { parameter: 'bands' },
      );
    names.add(band);
  });
  const standards = { ...data, responses: data.areas };
  const validated = validateClsInputs(standards, options, {
    channelCount: bandCount,
    channelWord: 'band',
    responsesName: 'areas',
  });
  const terms = data.components.length + validated.secondOrder.length;
  if (bandCount <= terms) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${bandCount} band(s) for ${terms} model term(s): band-area CLS needs more bands than gases (and ` +
        `second-order terms)`,
      { parameter: 'bands' },
    );
  }
  const core = fitClsCore(standards, {
    ...validated,
    nuisance: [],
    segments: data.bands.map((_, k) => ({ start: k, end: k + 1, region: k })),
    estimateCorrelation: false,
    localResidualWeights: false,
    channelWord: 'band',
  });
  return { kind: 'band-cls', ...core, bands: [...data.bands] };
}

const prepared = new WeakMap<BandClsModel, ClsState>();

/**
 * Predicts a sample's concentrations from its band areas.
 *
 * @param model - a model from {@link fitBandCls}
 * @param areas - the sample's band areas, in the model's band order (AU·cm⁻¹); not modified
 * @param options - φ of the sample, level, poor-fit ratio
 * @returns estimates with prediction intervals, band residuals, `poor-fit` flag
 * @throws BandwrightError `INVALID_VALUE` for a wrong number of areas, a non-finite area, φ ≤ 0
 */
export function predictBandCls(
  model: BandClsModel,
  areas: ArrayLike<number>,
  options: ClsPredictOptions,
): ClsPrediction {
  let state = prepared.get(model);
  if (state === undefined) {
    state = prepareClsState(model, [], 'band');
    prepared.set(model, state);
  }
  return predictClsState(model, state, areas, { ...options, channelWord: 'band' });
}
