/**
 * Building classical-least-squares calibrations from mixture or pure-gas standards. Pure.
 *
 * The channel grid is the first standard's grid points inside the method's regions; every other
 * standard (and later every sample) is resampled onto it by linear interpolation, so scans from
 * instruments with slightly different grids can be combined. Concentrations of every component
 * (reported gases and interferents) come from the manifest, each multiplied by the standard's φ
 * inside the model (DESIGN §3).
 */
import { formatWindow, type Window } from '../bands/windows.js';
import { BandwrightError } from '../errors.js';
import { densityPathFactor, resolveConditions, type CellConditions } from '../gas/conditions.js';
import { cautionsFor } from '../gas/safety.js';
import { fromPpm, toPpm } from '../gas/units.js';
import { fitCls, predictCls } from '../models/cls.js';
import { lowerBound, resample, toAbsorbance, type Spectrum } from '../spectrum/spectrum.js';
import { TOOL } from '../version.js';
import { referenceConditions, titleOf, type BuildContext, type StandardScan } from './build.js';
import { SCHEMA_VERSION, sealCalibration, type Calibration, type CalibrationStandard } from './calibration.js';
import type { ClsMethod } from './method.js';

/** The channels of a CLS calibration: wavenumbers and the region each belongs to. */
export interface ChannelGrid {
  /** Wavenumbers, cm⁻¹, ascending. */
  grid: Float64Array;
  /** Region index of each channel. */
  regionOf: Int32Array;
}

/**
 * Takes a scan's grid points inside the regions as the calibration's channels.
 *
 * @param spectrum - the first standard
 * @param regions - spectral regions, cm⁻¹, sorted and not overlapping
 * @throws BandwrightError `WINDOW` when the scan does not cover a region or a region holds fewer than 3 points
 */
export function channelsFromScan(spectrum: Spectrum, regions: readonly Window[]): ChannelGrid {
  const values: number[] = [];
  const labels: number[] = [];
  regions.forEach((region, r) => {
    assertCovers(spectrum, region);
    const start = lowerBound(spectrum.x, region[0]);
    let count = 0;
    for (let i = start; i < spectrum.x.length && (spectrum.x[i] as number) <= region[1]; i++) {
      values.push(spectrum.x[i] as number);
      labels.push(r);
      count++;
    }
    if (count < 3) {
      throw new BandwrightError('WINDOW', `${spectrum.metadata.source ?? 'scan'}: region ${formatWindow(region)} holds ${count} grid point(s), needs at least 3`, { file: spectrum.metadata.source });
    }
  });
  return { grid: Float64Array.from(values), regionOf: Int32Array.from(labels) };
}

function assertCovers(spectrum: Spectrum, region: Window): void {
  const first = spectrum.x[0] as number;
  const last = spectrum.x[spectrum.x.length - 1] as number;
  if (region[0] < first || region[1] > last) {
    throw new BandwrightError(
      'WINDOW',
      `${spectrum.metadata.source ?? 'scan'}: covers ${first}–${last} cm⁻¹, which does not contain the calibration's region ${formatWindow(region)}`,
      { file: spectrum.metadata.source },
    );
  }
}

/**
 * A scan's absorbance on the calibration's channels.
 *
 * @param spectrum - any y-kind
 * @param channels - the calibration's grid
 * @param regions - the calibration's regions (for the message when the scan does not cover them)
 * @returns absorbance at each channel
 * @throws BandwrightError `WINDOW` naming the scan and the region it does not cover
 */
export function onChannels(spectrum: Spectrum, channels: Float64Array, regions: readonly Window[]): Float64Array {
  for (const region of regions) assertCovers(spectrum, region);
  return resample(toAbsorbance(spectrum), channels).y;
}

/**
 * Builds a classical-least-squares calibration.
 *
 * @param method - validated cls method
 * @param standards - standards with their scans (every component's concentration given)
 * @param context - provenance, default conditions, and the background spectrum when the method names one
 * @returns the sealed calibration
 * @throws BandwrightError `INVALID_VALUE` when the manifest lacks a component; `WINDOW` when a scan
 *   does not cover the regions; `SINGULAR` naming the gases that cannot be separated;
 *   `CONDITIONS_MISSING`
 */
export function buildClsCalibration(method: ClsMethod, standards: readonly StandardScan[], context: BuildContext & { background?: Spectrum }): Calibration {
  const first = standards[0];
  if (first === undefined) throw new BandwrightError('INSUFFICIENT_DATA', 'no standards given');
  const components = [...method.gases.map((g) => ({ ...g, reported: true })), ...method.interferents.map((g) => ({ ...g, reported: false }))];
  const resolved = standards.map((standard) =>
    resolveConditions({ manifest: standard.conditions, scan: standard.spectrum.metadata, options: context.defaultConditions }, `${standard.scan} (manifest line ${standard.line})`),
  );
  const plain = resolved.map((c): CellConditions => ({ pathLength_m: c.pathLength_m, temperature_K: c.temperature_K, pressure_kPa: c.pressure_kPa }));
  const reference = referenceConditions(method.reference, plain);
  const phis = plain.map((c) => densityPathFactor(c, reference));
  const { grid, regionOf } = channelsFromScan(first.spectrum, method.regions);
  const warnings = [...(context.warnings ?? [])];
  let peak = 0;
  const spectra = standards.map((standard) => {
    const values = onChannels(standard.spectrum, grid, method.regions);
    for (const v of values) peak = Math.max(peak, v);
    return values;
  });
  if (peak > method.saturationAbsorbance) {
    warnings.push(`the standards reach absorbance ${peak.toFixed(2)} in the regions, above ${method.saturationAbsorbance}: lines saturate; consider second-order terms for the strong absorbers or a shorter path`);
  }
  const concentrations = standards.map((standard) =>
    components.map((component) => {
      const certified = standard.concentrations.find((c) => c.gas === component.name);
      if (certified === undefined) {
        throw new BandwrightError('INVALID_VALUE', `${standard.scan} (manifest line ${standard.line}): the manifest has no ${component.name} column, but the method models ${component.name}; give its concentration (0 when absent)`, { parameter: component.name });
      }
      return fromPpm(toPpm(certified.value, certified.unit), component.unit);
    }),
  );
  const background = context.background === undefined ? undefined : onChannels(context.background, grid, method.regions);
  const model = fitCls(
    { channels: grid, regionOf, spectra, concentrations, phi: phis, components: components.map((c) => ({ name: c.name, reported: c.reported, unit: c.unit })), standardLabels: standards.map((s) => s.scan) },
    {
      baselineOrder: method.baselineOrder,
      secondOrder: components.filter((c) => c.secondOrder).map((c) => c.name),
      ...(background === undefined ? {} : { background }),
    },
  );
  warnings.push(...model.warnings);
  const blank = predictCls(model, new Float64Array(grid.length), { phi: 1 });
  const detectionLimits: Record<string, number> = {};
  for (const estimate of blank.estimates) detectionLimits[estimate.name] = 3.3 * estimate.se;
  const records: CalibrationStandard[] = standards.map((standard, i) => ({
    scan: standard.scan,
    line: standard.line,
    concentrations: Object.fromEntries(components.map((c, k) => [c.name, (concentrations[i] as number[])[k] as number])),
    conditions: plain[i] as CellConditions,
    phi: phis[i] as number,
    responses: {},
    ...(standard.uncertaintyPct === undefined ? {} : { uncertaintyPct: standard.uncertaintyPct }),
    ...(standard.lot === undefined ? {} : { lot: standard.lot }),
  }));
  return sealCalibration({
    schemaVersion: SCHEMA_VERSION,
    tool: { name: TOOL.name, version: TOOL.version },
    createdAt: context.createdAt ?? new Date().toISOString(),
    ...titleOf(context, method),
    method,
    reference,
    gases: [],
    cls: { model, regions: method.regions, detectionLimits },
    standards: records,
    inputs: context.inputs,
    warnings,
    cautions: cautionsFor(components.map((c) => c.name)),
  });
}
