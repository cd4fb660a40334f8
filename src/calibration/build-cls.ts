/**
 * Building classical-least-squares calibrations from mixture or pure-gas standards. Pure.
 *
 * The channel grid is the first standard's grid points inside the method's regions; every other
 * standard (and later every sample) is taken onto it, so scans from instruments with slightly
 * different grids can be combined. Where a scan's points coincide with the channels their values
 * are used as they are. Otherwise a scan on a uniform grid is interpolated in transmittance with a
 * Lanczos kernel (windowed sinc, a = 8 samples; Duchon, J. Appl. Meteorol. 18 (1979) 1016, from
 * memory): the instrument line shape acts on transmittance (DESIGN §3), so transmittance is
 * band-limited by the maximum path difference and, sampled at Δν/2 or finer as FTIR software
 * does, is recovered between its samples, whereas absorbance is its logarithm and is not, and
 * linear interpolation flattens lines a few samples wide (a sample on a grid offset by 0.05 cm⁻¹
 * at 0.5 cm⁻¹ resolution read CO 8 % low that way). A scan on a non-uniform grid falls back to
 * linear interpolation. Concentrations of every component
 * (reported gases and interferents) come from the manifest, each multiplied by the standard's φ
 * inside the model (DESIGN §3).
 */
import { formatWindow, type Window } from '../bands/windows.js';
import { BandwrightError } from '../errors.js';
import { densityPathFactor, resolveConditions, type CellConditions } from '../gas/conditions.js';
import { cautionsFor } from '../gas/safety.js';
import { fromPpm, toPpm } from '../gas/units.js';
import { fitCls, predictCls } from '../models/cls/spectral.js';
import {
  assertMeasuredSpectrum,
  interpolateAt,
  lowerBound,
  resample,
  toAbsorbance,
  type Spectrum,
} from '../spectrum/spectrum.js';
import { describeUndefinedPoints, findUndefinedPoints } from '../spectrum/undefined-points.js';
import {
  assertUsableStandard,
  provenanceHeader,
  referenceConditions,
  standardReadWarnings,
  type BuildContext,
  type StandardScan,
} from './build.js';
import { sealCalibration, type Calibration, type CalibrationStandard } from './calibration.js';
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
      throw new BandwrightError(
        'WINDOW',
        `${spectrum.metadata.source ?? 'scan'}: region ${formatWindow(region)} holds ${count} grid point(s), ` +
          `needs at least 3`,
        { file: spectrum.metadata.source },
      );
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
      `${spectrum.metadata.source ?? 'scan'}: covers ${first}–${last} cm⁻¹, which does not contain the ` +
        `calibration's region ${formatWindow(region)}`,
      { file: spectrum.metadata.source },
    );
  }
}

/**
 * A scan's absorbance on the calibration's channels: its own values where its points coincide
 * with the channels; otherwise Lanczos interpolation of its transmittance (uniform grid) or
 * linear interpolation (non-uniform grid), as the module header explains.
 *
 * @param spectrum - any y-kind
 * @param channels - the calibration's grid
 * @param regions - the calibration's regions (for the message when the scan does not cover them)
 * @returns absorbance at each channel
 * @throws BandwrightError `WINDOW` naming the scan and the region it does not cover
 */
export function onChannels(
  spectrum: Spectrum,
  channels: Float64Array,
  regions: readonly Window[],
): Float64Array {
  for (const region of regions) assertCovers(spectrum, region);
  const absorbance = toAbsorbance(spectrum);
  const { x, y } = absorbance;
  const n = x.length;
  // Channels outside the scan (possible only in a damaged calibration) would make the kernel
  // index run far past the data; refuse them here, naming the scan and the channels' span.
  const lowChannel = channels[0] as number;
  const highChannel = channels[channels.length - 1] as number;
  if (channels.length > 0 && (!(lowChannel >= (x[0] as number)) || !(highChannel <= (x[n - 1] as number)))) {
    throw new BandwrightError(
      'WINDOW',
      `${spectrum.metadata.source ?? 'scan'}: covers ${x[0]}–${x[n - 1]} cm⁻¹, which does not contain the ` +
        `calibration's channels ${lowChannel}–${highChannel} cm⁻¹`,
      { file: spectrum.metadata.source },
    );
  }
  const step = n > 1 ? ((x[n - 1] as number) - (x[0] as number)) / (n - 1) : 0;
  const tolerance = 1e-6 * Math.abs(step);
  const out = new Float64Array(channels.length);
  let coincide = n > 1;
  // Channels and scan are both ascending: one forward walk finds each channel's point (a binary
  // search per channel cost most of this function in long batches).
  let k = lowerBound(x, (channels[0] as number) - tolerance);
  for (let i = 0; i < channels.length && coincide; i++) {
    const value = channels[i] as number;
    while (k < n && (x[k] as number) < value - tolerance) k++;
    if (k < n && Math.abs((x[k] as number) - value) <= tolerance) out[i] = y[k] as number;
    else coincide = false;
  }
  if (coincide) return out;
  if (!isUniform(x, step)) return resample(absorbance, channels).y;
  const transmittance = Float64Array.from(y, (value) => 10 ** -value);
  const first = x[0] as number;
  for (let i = 0; i < channels.length; i++) {
    const t = lanczosAt(transmittance, ((channels[i] as number) - first) / step);
    // A point so opaque that the kernel's ripple reaches zero keeps the linear value.
    out[i] = t > 0 ? -Math.log10(t) : interpolateAt(x, y, channels[i] as number);
  }
  return out;
}

/** Half-width of the Lanczos kernel, in samples. */
const LANCZOS_HALF_WIDTH = 8;

/** True when the grid's steps all equal `step` within 1e-6 of it. */
function isUniform(x: Float64Array, step: number): boolean {
  if (x.length < 2 || !(step > 0)) return false;
  const first = x[0] as number;
  for (let i = 1; i < x.length; i++)
    if (Math.abs((x[i] as number) - (first + i * step)) > 1e-6 * step) return false;
  return true;
}

function sinc(t: number): number {
  if (t === 0) return 1;
  const angle = Math.PI * t;
  return Math.sin(angle) / angle;
}

/**
 * Lanczos interpolation of uniformly sampled values at fractional sample position u; the weights
 * are renormalised where the kernel runs past either end of the samples.
 */
function lanczosAt(values: Float64Array, u: number): number {
  const base = Math.floor(u);
  let sum = 0;
  let weights = 0;
  for (let k = base - LANCZOS_HALF_WIDTH + 1; k <= base + LANCZOS_HALF_WIDTH; k++) {
    if (k < 0 || k >= values.length) continue;
    const d = u - k;
    const weight = sinc(d) * sinc(d / LANCZOS_HALF_WIDTH);
    sum += weight * (values[k] as number);
    weights += weight;
  }
  return sum / weights;
}

/** Refuses a background spectrum that is not a measurement or has saturated points in the regions. */
function assertUsableBackground(background: Spectrum, regions: readonly Window[]): void {
  assertMeasuredSpectrum(background, 'background spectrum');
  const found = findUndefinedPoints(background.x, background.y, regions);
  if (found === undefined) return;
  throw new BandwrightError(
    'INVALID_VALUE',
    `${background.metadata.source ?? 'background'}: ${describeUndefinedPoints(found)} (transmittance at or ` +
      `below zero as printed) inside the regions ${regions.map(formatWindow).join(', ')}; a background ` +
      'spectrum must be defined on every channel',
    { file: background.metadata.source },
  );
}

/**
 * Builds a classical-least-squares calibration.
 *
 * @param method - validated cls method
 * @param standards - standards with their scans (every component's concentration given)
 * @param context - provenance, default conditions, and the background spectrum when the method names one
 * @returns the sealed calibration
 * @throws BandwrightError `INVALID_VALUE` when the manifest lacks a component, or a standard or the
 *   background is a quantitative reference spectrum or has saturated points inside the regions;
 *   `WINDOW` when a scan does not cover the regions; `SINGULAR` naming the gases that cannot be
 *   separated; `CONDITIONS_MISSING`
 */
export function buildClsCalibration(
  method: ClsMethod,
  standards: readonly StandardScan[],
  context: BuildContext & { background?: Spectrum },
): Calibration {
  const first = standards[0];
  if (first === undefined) throw new BandwrightError('INSUFFICIENT_DATA', 'no standards given');
  const regionWords = `the region${method.regions.length === 1 ? '' : 's'}`;
  for (const standard of standards) assertUsableStandard(standard, method.regions, regionWords);
  if (context.background !== undefined) assertUsableBackground(context.background, method.regions);
  const components = [
    ...method.gases.map((g) => ({ ...g, reported: true })),
    ...method.interferents.map((g) => ({ ...g, reported: false })),
  ];
  const resolved = standards.map((standard) =>
    resolveConditions(
      { manifest: standard.conditions, scan: standard.spectrum.metadata, options: context.defaultConditions },
      `${standard.scan} (manifest line ${standard.line})`,
    ),
  );
  const plain = resolved.map((c): CellConditions => ({
    pathLength_m: c.pathLength_m,
    temperature_K: c.temperature_K,
    pressure_kPa: c.pressure_kPa,
  }));
  const reference = referenceConditions(method.reference, plain);
  const phis = plain.map((c) => densityPathFactor(c, reference));
  const { grid, regionOf } = channelsFromScan(first.spectrum, method.regions);
  const warnings = [...(context.warnings ?? []), ...standardReadWarnings(standards)];
  for (const warning of context.background?.metadata.warnings ?? [])
    warnings.push(
      `background ${context.background?.metadata.source ?? ''}: ${warning.message} (${warning.code})`,
    );
  let peak = 0;
  const spectra = standards.map((standard) => {
    const values = onChannels(standard.spectrum, grid, method.regions);
    // A saturated point just outside a region still reaches the channels interpolated beside it.
    const found = findUndefinedPoints(grid, values);
    if (found !== undefined)
      throw new BandwrightError(
        'INVALID_VALUE',
        `${standard.scan} (manifest line ${standard.line}): ${describeUndefinedPoints(found)} on the ` +
          `calibration's channels, interpolated from saturated points beside ${regionWords}; a standard must ` +
          'not be saturated: measure it with a shorter path or a lower concentration',
        { file: standard.scan, line: standard.line },
      );
    for (const v of values) peak = Math.max(peak, v);
    return values;
  });
  if (peak > method.saturationAbsorbance) {
    warnings.push(
      `the standards reach absorbance ${peak.toFixed(2)} in the regions, above ${method.saturationAbsorbance}: ` +
        `lines saturate; consider second-order terms for the strong absorbers or a shorter path`,
    );
  }
  const concentrations = standards.map((standard) =>
    components.map((component) => {
      const certified = standard.concentrations.find((c) => c.gas === component.name);
      if (certified === undefined) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${standard.scan} (manifest line ${standard.line}): the manifest has no ${component.name} column, ` +
            `but the method models ${component.name}; give its concentration (0 when absent)`,
          { parameter: component.name },
        );
      }
      return fromPpm(toPpm(certified.value, certified.unit), component.unit);
    }),
  );
  const background =
    context.background === undefined ? undefined : onChannels(context.background, grid, method.regions);
  const model = fitCls(
    {
      channels: grid,
      regionOf,
      spectra,
      concentrations,
      phi: phis,
      components: components.map((c) => ({ name: c.name, reported: c.reported, unit: c.unit })),
      standardLabels: standards.map((s) => s.scan),
    },
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
    concentrations: Object.fromEntries(
      components.map((c, k) => [c.name, (concentrations[i] as number[])[k] as number]),
    ),
    conditions: plain[i] as CellConditions,
    phi: phis[i] as number,
    responses: {},
    ...(standard.uncertaintyPct === undefined ? {} : { uncertaintyPct: standard.uncertaintyPct }),
    ...(standard.lot === undefined ? {} : { lot: standard.lot }),
  }));
  return sealCalibration({
    ...provenanceHeader(context, method),
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
