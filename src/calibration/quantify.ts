/**
 * Quantifying scans (or given responses) with a univariate calibration. Pure.
 *
 * For each gas: measure the band exactly as the calibration did, divide the response by the
 * scan's φ (its path, pressure and temperature relative to the calibration's reference), invert
 * the calibration curve for the concentration and its prediction interval, then flag what a
 * reader must know (below the detection or determination limit, outside the calibrated range,
 * saturated, far from the calibration's conditions).
 *
 * A scan's read warnings (`metadata.warnings`) lead its result's warnings. Saturated points
 * (NaN: transmittance at or below zero as printed) raise the `saturated` flag with a note saying
 * how many and where: a band bridges them (the value is then a lower bound), classical least
 * squares leaves those channels out.
 */
import { measureBand, type BandFeatures } from '../bands/band.js';
import { BandwrightError } from '../errors.js';
import {
  conditionsFarReasons,
  densityPathFactor,
  resolveConditions,
  type CellConditions,
  type PartialConditions,
} from '../gas/conditions.js';
import { cautionsFor } from '../gas/safety.js';
import { toPpm, unitLabel, type ConcentrationUnit } from '../gas/units.js';
import { predictCls } from '../models/cls/spectral.js';
import { predictUnivariate } from '../models/univariate/predict.js';
import { assertMeasuredSpectrum, toAbsorbance, type Spectrum } from '../spectrum/spectrum.js';
import { describeUndefinedPoints, findUndefinedPoints } from '../spectrum/undefined-points.js';
import { onChannels } from './build-cls.js';
import type { Calibration, GasCalibration } from './calibration.js';
import {
  decorateGases,
  readWarnings,
  type GasResult,
  type ReportingOptions,
  type ResultFlag,
  type ResultWarning,
  type ScanResult,
} from './result.js';
import { listNames } from '../words.js';

/** Options for quantification. */
export interface QuantifyOptions extends ReportingOptions {
  /** Prediction-interval level, 0 < level < 1 (default 0.95). */
  level?: number;
  /** Conditions from command-line options, used when the scan does not carry them. */
  defaultConditions?: PartialConditions;
  /** Conditions that override the scan's own (e.g. a manifest row), looked at first. */
  givenConditions?: PartialConditions;
}

function checkLevel(level: number): number {
  if (!(level > 0 && level < 1)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) => `${name('level')} = ${level}, must be a probability between 0 and 1 (e.g. 0.95)`,
      { parameter: 'level' },
    );
  }
  return level;
}

/**
 * Turns one inverse prediction into a gas result with limit and range flags.
 *
 * @param gas - the gas calibration
 * @param responses - responses at reference conditions (m replicates)
 * @param level - interval level
 */
function estimate(gas: GasCalibration, responses: readonly number[], level: number): GasResult {
  const prediction = predictUnivariate(gas.model, responses, { level });
  const flags: ResultFlag[] = [];
  const notes: string[] = [];
  // The standard interval is always bounded; only Fieller's can be unbounded (null ends).
  const result: GasResult = {
    gas: gas.gas,
    value: prediction.value,
    unit: gas.unit,
    low: prediction.low ?? Number.NEGATIVE_INFINITY,
    high: prediction.high ?? Number.POSITIVE_INFINITY,
    se: prediction.se,
    flags,
    notes: [...prediction.warnings],
  };
  const { detection, determination } = gas.model.limits;
  if (detection.value !== null) {
    result.detectionLimit = { value: detection.value, definition: detection.definition };
    if (prediction.value < detection.value) {
      flags.push('below-lod');
      notes.push(
        `below the detection limit ${detection.value.toPrecision(3)} ${gas.unit} (${detection.definition}): ` +
          `report as "< LOD"`,
      );
    }
  }
  if (determination.value !== null) {
    result.determinationLimit = { value: determination.value, definition: determination.definition };
    if (!flags.includes('below-lod') && prediction.value < determination.value) {
      flags.push('below-loq');
      notes.push(
        `below the determination limit ${determination.value.toPrecision(3)} ${gas.unit}: detected, but not ` +
          `quantified to the stated precision`,
      );
    }
  }
  const [low, high] = gas.model.range;
  if (prediction.extrapolated || prediction.value > high || (low > 0 && prediction.value < low)) {
    flags.push('extrapolated');
    // The model's own warning already says so when it noticed; add the range only otherwise.
    if (!prediction.extrapolated)
      notes.push(`outside the calibrated range ${low}–${high} ${gas.unit}: the curve is extrapolated`);
  }
  return result;
}

/**
 * Quantifies one scan with a band calibration.
 *
 * @param calibration - a verified band calibration
 * @param spectrum - the sample scan (any y-kind)
 * @param options - level, conditions, reporting
 * @returns the scan's result
 * @throws BandwrightError `CONDITIONS_MISSING`, `WINDOW` (band outside the scan), `NO_SOLUTION`,
 *   `CONVERSION`, `INVALID_VALUE` (level, a calibration that is not a band calibration, or a
 *   quantitative reference spectrum given as the scan)
 */
export function quantifyBandScan(
  calibration: Calibration,
  spectrum: Spectrum,
  options: QuantifyOptions = {},
): ScanResult {
  if (calibration.method.model !== 'band') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `the calibration is a ${calibration.method.model} calibration; quantifyBandScan needs a band calibration`,
    );
  }
  assertMeasuredSpectrum(spectrum, 'sample scan');
  const level = checkLevel(options.level ?? 0.95);
  const { scan, conditions, phi, far } = scanConditions(calibration, spectrum, options);
  const absorbance = toAbsorbance(spectrum);
  const gases: GasResult[] = [];
  let baselineRms = 0;
  for (const gas of calibration.gases) {
    const feature = gas.feature;
    if (feature === undefined)
      throw new BandwrightError(
        'SCHEMA',
        (name) =>
          `calibration gas ${gas.gas} has no band; it was built from responses, give ${name('responses')}`,
      );
    const measured = measureBand(absorbance, feature.band, {
      windows: feature.baseline,
      order: feature.baselineOrder,
    });
    baselineRms = Math.max(baselineRms, measured.baseline.rms_AU);
    const raw = feature.response === 'area' ? measured.area : measured.height;
    if (!Number.isFinite(raw / phi)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${scan}: ${gas.gas} band ${feature.band[0]}–${feature.band[1]} cm⁻¹ gives ` +
          `${feature.response === 'area' ? 'an area' : 'a height'} of ${raw / phi}, must be finite: the ` +
          `absorbance values are too large to integrate`,
        { file: scan, parameter: gas.gas },
      );
    }
    const result = estimate(gas, [raw / phi], level);
    if (measured.peakAbsorbance > calibration.method.saturationAbsorbance) {
      result.flags.push('saturated');
      result.notes.push(
        `peak absorbance ${measured.peakAbsorbance.toFixed(3)} in the band is above ` +
          `${calibration.method.saturationAbsorbance}: lines saturate, the result may be biased low`,
      );
    }
    const undefinedNotes = undefinedPointNotes(measured, feature.response);
    if (undefinedNotes.length > 0) {
      if (!result.flags.includes('saturated')) result.flags.push('saturated');
      result.notes.push(...undefinedNotes);
    }
    if (far.length > 0) {
      result.flags.push('conditions-far');
      result.notes.push(...far);
    }
    gases.push(result);
  }
  return {
    scan,
    conditions,
    gases: decorateGases(gases, options, conditions.pathLength_m),
    residualRms: baselineRms,
    cautions: cautionsFor(calibration.gases.map((g) => g.gas)),
    warnings: readWarnings(spectrum.metadata.warnings),
  };
}

/** Notes on the saturated points a band measurement met: in the band (bridged) and in the baseline windows. */
function undefinedPointNotes(measured: BandFeatures, response: 'area' | 'height'): string[] {
  const notes: string[] = [];
  if (measured.undefinedPoints !== undefined)
    notes.push(
      `${describeUndefinedPoints(measured.undefinedPoints)} in the band (transmittance at or below zero as ` +
        `printed): bridged by linear interpolation from their neighbours, so the ${response} and the result ` +
        'are lower bounds',
    );
  if (measured.baseline.undefinedPoints !== undefined)
    notes.push(
      `${describeUndefinedPoints(measured.baseline.undefinedPoints)} in the baseline windows: left out of the ` +
        'baseline fit',
    );
  return notes;
}

/** The scan's conditions, φ and how far they are from the calibration's. */
function scanConditions(
  calibration: Calibration,
  spectrum: Spectrum,
  options: QuantifyOptions,
): { scan: string; conditions: CellConditions; phi: number; far: string[] } {
  const scan = spectrum.metadata.source ?? 'scan';
  const resolved = resolveConditions(
    { manifest: options.givenConditions, scan: spectrum.metadata, options: options.defaultConditions },
    scan,
  );
  const conditions: CellConditions = {
    pathLength_m: resolved.pathLength_m,
    temperature_K: resolved.temperature_K,
    pressure_kPa: resolved.pressure_kPa,
  };
  return {
    scan,
    conditions,
    phi: densityPathFactor(conditions, calibration.reference),
    far: conditionsFarReasons(conditions, calibration.reference),
  };
}

/**
 * Quantifies one scan with a classical-least-squares calibration: the scan is resampled onto the
 * calibration's channels, the baseline projected out, and every component estimated together;
 * reported gases get intervals and flags, interferents are used only for the dry basis (water)
 * and are listed in the warnings.
 *
 * @param calibration - a verified cls calibration
 * @param spectrum - the sample scan (any y-kind)
 * @param options - level, conditions, reporting
 * @returns the scan's result, with the fit's residual RMS (AU)
 * @throws BandwrightError `WINDOW` naming the scan when it does not cover the regions,
 *   `CONDITIONS_MISSING`, `CONVERSION`, `INVALID_VALUE` for a quantitative reference spectrum given
 *   as the scan; `INSUFFICIENT_DATA` or `SINGULAR` naming the scan when its saturated channels
 *   leave too few to fit
 */
export function quantifyClsScan(
  calibration: Calibration,
  spectrum: Spectrum,
  options: QuantifyOptions = {},
): ScanResult {
  const cls = calibration.cls;
  if (calibration.method.model !== 'cls' || cls === undefined) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `the calibration is a ${calibration.method.model} calibration; quantifyClsScan needs a ` +
        `classical-least-squares calibration`,
    );
  }
  assertMeasuredSpectrum(spectrum, 'sample scan');
  const level = checkLevel(options.level ?? 0.95);
  const { scan, conditions, phi, far } = scanConditions(calibration, spectrum, options);
  const grid = Float64Array.from(cls.model.grid ?? []);
  const values = onChannels(spectrum, grid, cls.regions);
  let peak = 0;
  for (const v of values) if (v > peak) peak = v;
  const undefinedChannels = findUndefinedPoints(grid, values);
  let prediction: ReturnType<typeof predictCls>;
  try {
    prediction = predictCls(cls.model, values, { phi, level });
  } catch (error) {
    if (undefinedChannels === undefined || !(error instanceof BandwrightError)) throw error;
    throw new BandwrightError(
      error.code,
      `${scan}: ${describeUndefinedPoints(undefinedChannels)} on the calibration's channels, so the scan ` +
        `cannot be quantified: ${error.message}`,
      { file: scan },
      { cause: error },
    );
  }
  const undefinedNote =
    undefinedChannels === undefined
      ? undefined
      : `${describeUndefinedPoints(undefinedChannels)} on the calibration's channels (transmittance at or ` +
        `below zero as printed): left out, the gases fitted by least squares on the other ` +
        `${grid.length - undefinedChannels.points} of ${grid.length} channels`;
  const warnings: ResultWarning[] = [
    ...readWarnings(spectrum.metadata.warnings),
    ...prediction.warnings.map((message): ResultWarning => ({ code: 'model', message })),
  ];
  // Interferents are not reported, so their range flags would go unseen: say which are outside
  // the standards' range, and name them among the possible causes of a poor fit. Under a poor
  // fit the standard error reflects the misfit itself, so any value above the range counts
  // (more absorber than any standard held; a small negative value is no cause of misfit).
  const poorFit = prediction.flags.includes('poor-fit');
  const rangeIndex = (name: string): number => cls.model.components.findIndex((c) => c.name === name);
  const outside = [...prediction.estimates, ...prediction.interferents].filter((estimate) => {
    const range = cls.model.ranges[rangeIndex(estimate.name)];
    const scaled = estimate.value * phi;
    return estimate.flags.includes('extrapolated') || (poorFit && range !== undefined && scaled > range.max);
  });
  const rangeOf = (name: string): string => {
    const index = rangeIndex(name);
    const range = cls.model.ranges[index];
    const unit = unitLabel(cls.model.components[index]!.unit as ConcentrationUnit);
    return range === undefined
      ? ''
      : `${Number((range.min / phi).toPrecision(4))}–${Number((range.max / phi).toPrecision(4))} ${unit}`;
  };
  const poorFitCause =
    outside.length > 0
      ? `${listNames(outside.map((e) => e.name))} outside the standards' range (the model was not fitted ` +
        `there), or an absorber the method does not model`
      : 'an absorber the method does not model may be present, or the instrument is not as it was at calibration';
  const gases = prediction.estimates.map((estimate): GasResult => {
    const flags: ResultFlag[] = [...estimate.flags];
    const notes: string[] = [];
    if (estimate.flags.includes('extrapolated'))
      notes.push(`outside the calibrated range of the standards: the model is extrapolated`);
    const limit = (cls.detectionLimits[estimate.name] ?? Number.NaN) / phi;
    const result: GasResult = {
      gas: estimate.name,
      value: estimate.value,
      unit: estimate.unit as GasResult['unit'],
      low: estimate.low,
      high: estimate.high,
      se: estimate.se,
      flags,
      notes,
    };
    if (Number.isFinite(limit)) {
      result.detectionLimit = {
        value: limit,
        definition:
          "3.3 × the prediction standard error of a blank at this scan's conditions (classical least squares)",
      };
      if (estimate.value < limit) {
        flags.push('below-lod');
        notes.push(`below the detection limit ${limit.toPrecision(3)} ${estimate.unit}: report as "< LOD"`);
      }
    }
    if (prediction.flags.includes('poor-fit')) {
      flags.push('poor-fit');
      notes.push(
        `the fit leaves a residual ${prediction.fitRatio.toFixed(2)}× the calibration's (limit ` +
          `${prediction.fitRatioLimit.toFixed(2)}): ${poorFitCause}`,
      );
    }
    if (peak > calibration.method.saturationAbsorbance) {
      flags.push('saturated');
      notes.push(
        `peak absorbance ${peak.toFixed(3)} in the regions is above ` +
          `${calibration.method.saturationAbsorbance}: lines saturate`,
      );
    }
    if (undefinedNote !== undefined) {
      if (!flags.includes('saturated')) flags.push('saturated');
      notes.push(undefinedNote);
    }
    if (far.length > 0) {
      flags.push('conditions-far');
      notes.push(...far);
    }
    return result;
  });
  const water =
    prediction.interferents.find((e) => e.name === 'H2O') ??
    prediction.estimates.find((e) => e.name === 'H2O');
  for (const interferent of prediction.interferents) {
    const label = unitLabel(interferent.unit as ConcentrationUnit);
    warnings.push({
      code: 'interferent',
      message: outside.includes(interferent)
        ? `interferent ${interferent.name} modelled at ${interferent.value.toPrecision(4)} ${label} (not ` +
          `reported), outside the standards' ${rangeOf(interferent.name)} at this scan's conditions: the ` +
          `reported gases may be biased`
        : `interferent ${interferent.name} modelled at ${interferent.value.toPrecision(4)} ${label} (not reported)`,
    });
  }
  const reporting: ReportingOptions =
    options.dryBasis !== undefined && options.dryBasis.waterFraction === undefined && water !== undefined
      ? {
          ...options,
          dryBasis: {
            waterFraction: toPpm(water.value, water.unit as GasResult['unit']) * 1e-6,
            measuredInScan: true,
          },
        }
      : options;
  return {
    scan,
    conditions,
    gases: decorateGases(gases, reporting, conditions.pathLength_m),
    residualRms: prediction.residualRms,
    cautions: cautionsFor(cls.model.components.map((c) => c.name)),
    warnings,
  };
}

/**
 * Quantifies given responses (already at the calibration's reference conditions) with a
 * univariate calibration of one gas: the mean of m replicates gives one estimate.
 *
 * @param calibration - a verified calibration with one gas
 * @param responses - m ≥ 1 replicate responses
 * @param options - level and reporting options
 * @returns a result labelled `responses`
 * @throws BandwrightError `INVALID_VALUE` for no responses or a non-finite one; `NO_SOLUTION`
 */
export function quantifyResponses(
  calibration: Calibration,
  responses: readonly number[],
  options: QuantifyOptions = {},
): ScanResult {
  if (calibration.gases.length !== 1) {
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) =>
        `the calibration has ${calibration.gases.length} gases; ${name('responses')} needs a calibration of one gas`,
      { parameter: 'responses' },
    );
  }
  if (responses.length === 0)
    throw new BandwrightError('INVALID_VALUE', (name) => `${name('responses')}: give at least one response`, {
      parameter: 'responses',
    });
  responses.forEach((r, i) => {
    if (!Number.isFinite(r))
      throw new BandwrightError(
        'INVALID_VALUE',
        (name) => `${name('responses')} ${i + 1} = ${r}, must be a finite number`,
        { parameter: 'responses' },
      );
  });
  const level = checkLevel(options.level ?? 0.95);
  const gas = calibration.gases[0] as GasCalibration;
  const result = estimate(gas, responses, level);
  return {
    scan: responses.length === 1 ? 'response' : `mean of ${responses.length} responses`,
    conditions: calibration.reference,
    gases: decorateGases([result], options, calibration.reference.pathLength_m),
    cautions: cautionsFor([gas.gas]),
    warnings: [],
  };
}

/**
 * Quantifies one scan with any calibration that works on spectra (dispatches on the method).
 *
 * @param calibration - a verified calibration
 * @param spectrum - the sample scan (any y-kind)
 * @param options - level, conditions, reporting
 * @returns the scan's result
 * @throws BandwrightError as the model's quantify function; `INVALID_VALUE` for a calibration made
 *   from tabulated responses (it has no spectral method: use {@link quantifyResponses})
 */
export function quantifyScan(
  calibration: Calibration,
  spectrum: Spectrum,
  options: QuantifyOptions = {},
): ScanResult {
  assertMeasuredSpectrum(spectrum, 'sample scan');
  switch (calibration.method.model) {
    case 'band':
      return quantifyBandScan(calibration, spectrum, options);
    case 'responses':
      throw new BandwrightError(
        'INVALID_VALUE',
        (name) =>
          `the calibration was built from tabulated responses and cannot read scans; give ${name('responses')} ` +
          'values instead',
        { parameter: 'scans' },
      );
    case 'cls':
      return quantifyClsScan(calibration, spectrum, options);
  }
}
