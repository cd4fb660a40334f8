/**
 * Building calibrations from standards already read into memory (the CLI or a script reads the
 * files through `src/store`). Pure: no file access.
 *
 * Band method, per gas: measure the baseline-corrected band (area or height) in every standard,
 * divide by the standard's φ to bring it to the reference conditions (DESIGN §3), and fit the
 * chosen univariate curve of scaled response against certified concentration.
 *
 * Every standard must be a measured spectrum (not a quantitative reference spectrum) with no
 * saturated point (NaN) inside the windows or regions the method uses: a standard's response
 * must be a measurement, not a lower bound. Saturated points elsewhere are harmless. The
 * standards' read warnings go into the calibration's warnings, each naming its file and code.
 */
import { measureBand } from '../bands/band.js';
import { formatWindow, type Window } from '../bands/windows.js';
import { BandwrightError } from '../errors.js';
import {
  densityPathFactor,
  medianConditions,
  resolveConditions,
  type CellConditions,
  type PartialConditions,
  type ResolvedConditions,
} from '../gas/conditions.js';
import { cautionsFor } from '../gas/safety.js';
import { fromPpm, toPpm, type ConcentrationUnit } from '../gas/units.js';
import { fitUnivariate } from '../models/univariate/fit.js';
import { assertMeasuredSpectrum, toAbsorbance, type Spectrum } from '../spectrum/spectrum.js';
import { describeUndefinedPoints, findUndefinedPoints } from '../spectrum/undefined-points.js';
import { TOOL } from '../version.js';
import {
  SCHEMA_VERSION,
  sealCalibration,
  type Calibration,
  type CalibrationBody,
  type CalibrationInput,
  type CalibrationStandard,
  type GasCalibration,
  type ZeroGasLimit,
} from './calibration.js';
import type { BandMethod, ResponseMethod } from './method.js';

/** A standard ready for calibration: its scan in memory and its manifest row. */
export interface StandardScan {
  /** Scan path as written in the manifest. */
  scan: string;
  /** Manifest line. */
  line: number;
  /** The scan (any y-kind; converted to absorbance here). */
  spectrum: Spectrum;
  /** Certified concentrations. */
  concentrations: readonly { gas: string; unit: ConcentrationUnit; value: number }[];
  /** Conditions from the manifest row. */
  conditions: PartialConditions;
  /** Relative uncertainty of the certified values, %. */
  uncertaintyPct?: number;
  /** Cylinder lot. */
  lot?: string;
}

/** Provenance and defaults shared by every build. */
export interface BuildContext {
  /** Input files with hashes (paths relative to where the calibration will be written). */
  inputs: CalibrationInput[];
  /** Conditions from command-line options, used when neither manifest nor scan gives them. */
  defaultConditions?: PartialConditions;
  /** Creation time, ISO 8601 (default: now). */
  createdAt?: string;
  /** Title. */
  title?: string;
  /** Notes from reading the inputs (e.g. ignored manifest columns). */
  warnings?: readonly string[];
}

/** Where a standard is, for messages: its scan and manifest line. */
function standardPlace(standard: StandardScan): string {
  return `${standard.scan} (manifest line ${standard.line})`;
}

/**
 * Refuses a standard that is not a measured spectrum, or that has saturated points inside the
 * windows or regions the method reads.
 *
 * @param standard - the standard with its scan
 * @param windows - the windows (cm⁻¹) that must hold no saturated point
 * @param what - what the windows are, for the message (e.g. `the CO band and baseline windows`)
 * @throws BandwrightError `INVALID_VALUE` naming the file, the number of points and where
 */
export function assertUsableStandard(standard: StandardScan, windows: readonly Window[], what: string): void {
  assertMeasuredSpectrum(standard.spectrum, 'standard');
  const found = findUndefinedPoints(standard.spectrum.x, standard.spectrum.y, windows);
  if (found === undefined) return;
  throw new BandwrightError(
    'INVALID_VALUE',
    `${standardPlace(standard)}: ${describeUndefinedPoints(found)} (transmittance at or below zero as ` +
      `printed) inside ${what} ${windows.map(formatWindow).join(', ')}; a standard must not be saturated ` +
      '(its response would be only a lower bound): measure it with a shorter path or a lower concentration',
    { file: standard.scan, line: standard.line },
  );
}

/**
 * The read warnings of the standards as calibration warnings, each naming its standard, file and
 * code: `standard co-050.jdx (manifest line 4): <message> (<code>)`.
 *
 * @param standards - the standards in manifest order
 */
export function standardReadWarnings(standards: readonly StandardScan[]): string[] {
  return standards.flatMap((standard) =>
    (standard.spectrum.metadata.warnings ?? []).map(
      (warning) => `standard ${standardPlace(standard)}: ${warning.message} (${warning.code})`,
    ),
  );
}

function certifiedIn(standard: StandardScan, gas: string, unit: ConcentrationUnit, where: string): number {
  const value = standard.concentrations.find((c) => c.gas === gas);
  if (value === undefined) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where}: the manifest has no ${gas} column, but the method calibrates ${gas}`,
      { parameter: gas },
    );
  }
  return fromPpm(toPpm(value.value, value.unit), unit);
}

/**
 * Reference conditions of a calibration: those the method gives, the standards' medians for the rest.
 *
 * @param given - from the method
 * @param conditions - the standards' conditions
 */
export function referenceConditions(
  given: PartialConditions,
  conditions: readonly CellConditions[],
): CellConditions {
  const median = medianConditions(conditions);
  return {
    pathLength_m: given.pathLength_m ?? median.pathLength_m,
    temperature_K: given.temperature_K ?? median.temperature_K,
    pressure_kPa: given.pressure_kPa ?? median.pressure_kPa,
  };
}

function plainConditions(resolved: ResolvedConditions): CellConditions {
  return {
    pathLength_m: resolved.pathLength_m,
    temperature_K: resolved.temperature_K,
    pressure_kPa: resolved.pressure_kPa,
  };
}

function zeroGasLimit(
  responses: readonly number[],
  concentrations: readonly number[],
  slope: number,
): ZeroGasLimit | undefined {
  const zeros = responses.filter((_, i) => concentrations[i] === 0);
  if (zeros.length < 2 || !(Math.abs(slope) > 0)) return undefined;
  const mean = zeros.reduce((a, b) => a + b, 0) / zeros.length;
  const sd = Math.sqrt(zeros.reduce((a, b) => a + (b - mean) ** 2, 0) / (zeros.length - 1));
  return {
    value: (3 * sd) / Math.abs(slope),
    scans: zeros.length,
    definition:
      `3 × SD of the responses of ${zeros.length} zero-gas standards ÷ slope (noise-based limit from ` +
      `blanks; common practice)`,
  };
}

/**
 * Builds a band calibration: one univariate curve per gas on its band.
 *
 * @param method - validated band method
 * @param standards - standards with their scans
 * @param context - provenance and default conditions
 * @returns the sealed calibration
 * @throws BandwrightError `CONDITIONS_MISSING` naming the standard; `WINDOW` when a band or
 *   baseline window is outside a scan; `INSUFFICIENT_DATA`/`SINGULAR` from the curve fit;
 *   `INVALID_VALUE` when the manifest lacks a gas of the method, or a standard is a quantitative
 *   reference spectrum or has saturated points inside a band or baseline window
 */
export function buildBandCalibration(
  method: BandMethod,
  standards: readonly StandardScan[],
  context: BuildContext,
): Calibration {
  if (standards.length === 0) throw new BandwrightError('INSUFFICIENT_DATA', 'no standards given');
  for (const standard of standards) {
    for (const gas of method.gases)
      assertUsableStandard(
        standard,
        [gas.band, ...gas.baseline],
        `the ${gas.name} band and baseline window${gas.baseline.length === 1 ? '' : 's'}`,
      );
  }
  const warnings = [...(context.warnings ?? []), ...standardReadWarnings(standards)];
  const resolved = standards.map((standard) =>
    resolveConditions(
      { manifest: standard.conditions, scan: standard.spectrum.metadata, options: context.defaultConditions },
      `${standard.scan} (manifest line ${standard.line})`,
    ),
  );
  const reference = referenceConditions(method.reference, resolved.map(plainConditions));
  const phis = resolved.map((conditions) => densityPathFactor(conditions, reference));
  const absorbances = standards.map((standard) => toAbsorbance(standard.spectrum));
  const records: CalibrationStandard[] = standards.map((standard, i) => ({
    scan: standard.scan,
    line: standard.line,
    concentrations: {},
    conditions: plainConditions(resolved[i] as ResolvedConditions),
    phi: phis[i] as number,
    responses: {},
    ...(standard.uncertaintyPct === undefined ? {} : { uncertaintyPct: standard.uncertaintyPct }),
    ...(standard.lot === undefined ? {} : { lot: standard.lot }),
  }));

  const gases: GasCalibration[] = method.gases.map((gasMethod) => {
    const concentration: number[] = [];
    const response: number[] = [];
    standards.forEach((standard, i) => {
      const where = `${standard.scan} (manifest line ${standard.line})`;
      const value = certifiedIn(standard, gasMethod.name, gasMethod.unit, where);
      const features = measureBand(absorbances[i] as Spectrum, gasMethod.band, {
        windows: gasMethod.baseline,
        order: gasMethod.baselineOrder,
      });
      if (features.undefinedPoints !== undefined)
        throw new BandwrightError(
          'INVALID_VALUE',
          `${where}: ${describeUndefinedPoints(features.undefinedPoints)} beside the ${gasMethod.name} band ` +
            `${formatWindow(gasMethod.band)} reach its interpolated ends; a standard must not be saturated: ` +
            'measure it with a shorter path or a lower concentration',
          { file: standard.scan, line: standard.line },
        );
      const raw = gasMethod.response === 'area' ? features.area : features.height;
      const scaled = raw / (phis[i] as number);
      if (!Number.isFinite(scaled)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${where}: ${gasMethod.name} band ${gasMethod.band[0]}–${gasMethod.band[1]} cm⁻¹ gives ` +
            `${gasMethod.response === 'area' ? 'an area' : 'a height'} of ${scaled}, must be finite: the ` +
            `absorbance values are too large to integrate`,
          { file: standard.scan, parameter: gasMethod.name },
        );
      }
      const record = records[i] as CalibrationStandard;
      record.concentrations[gasMethod.name] = value;
      record.responses[gasMethod.name] = { raw, scaled, peakAbsorbance: features.peakAbsorbance };
      if (features.peakAbsorbance > method.saturationAbsorbance) {
        warnings.push(
          `${where}: ${gasMethod.name} peak absorbance ${features.peakAbsorbance.toFixed(3)} is above ` +
            `${method.saturationAbsorbance}: lines saturate, the response is not proportional to concentration ` +
            `(consider a shorter path or a second-order curve)`,
        );
      }
      concentration.push(value);
      response.push(scaled);
    });
    const model = fitUnivariate(
      { concentration, response },
      { form: gasMethod.curve, weights: gasMethod.weights, alpha: method.detectionAlpha },
    );
    const gas: GasCalibration = {
      gas: gasMethod.name,
      unit: gasMethod.unit,
      feature: {
        band: gasMethod.band,
        baseline: gasMethod.baseline,
        baselineOrder: gasMethod.baselineOrder,
        response: gasMethod.response,
      },
      curve: gasMethod.curve,
      weights: gasMethod.weights,
      model,
    };
    const blank = zeroGasLimit(response, concentration, model.coefficients.b);
    if (blank !== undefined) gas.zeroGasLimit = blank;
    return gas;
  });

  return sealCalibration({
    ...provenanceHeader(context, method),
    method,
    reference,
    gases,
    standards: records,
    inputs: context.inputs,
    warnings,
    cautions: cautionsFor(method.gases.map((g) => g.name)),
  });
}

/**
 * The fields every calibration starts with: schema and tool version, creation time, and the title
 * (the command line's, else the method's, else none).
 *
 * @param context - build context
 * @param method - the method
 */
export function provenanceHeader(
  context: BuildContext,
  method: { title?: string },
): Pick<CalibrationBody, 'schemaVersion' | 'tool' | 'createdAt' | 'title'> {
  const title = context.title ?? method.title;
  return {
    schemaVersion: SCHEMA_VERSION,
    tool: { name: TOOL.name, version: TOOL.version },
    createdAt: context.createdAt ?? new Date().toISOString(),
    ...(title === undefined ? {} : { title }),
  };
}

/** One row of a responses table. */
export interface ResponseRow {
  /** Table line. */
  line: number;
  /** Concentration in the method's unit. */
  concentration: number;
  /** Response, already at the reference conditions (any unit). */
  response: number;
}

/**
 * Builds a calibration from tabulated responses (replicates as repeated rows). Responses are
 * taken as already at the calibration's reference conditions (φ = 1).
 *
 * @param method - a response method for one gas
 * @param rows - the table
 * @param context - provenance
 * @returns the sealed calibration
 * @throws BandwrightError from the curve fit
 */
export function buildResponseCalibration(
  method: ResponseMethod,
  rows: readonly ResponseRow[],
  context: BuildContext,
): Calibration {
  const [gasMethod] = method.gases;
  const concentration = rows.map((row) => row.concentration);
  const response = rows.map((row) => row.response);
  const model = fitUnivariate(
    { concentration, response },
    { form: gasMethod.curve, weights: gasMethod.weights, alpha: method.detectionAlpha },
  );
  const warnings = [...(context.warnings ?? [])];
  const reference: CellConditions = {
    pathLength_m: method.reference.pathLength_m ?? 1,
    temperature_K: method.reference.temperature_K ?? 296.15,
    pressure_kPa: method.reference.pressure_kPa ?? 101.325,
  };
  const gas: GasCalibration = {
    gas: gasMethod.name,
    unit: gasMethod.unit,
    curve: gasMethod.curve,
    weights: gasMethod.weights,
    model,
  };
  const blank = zeroGasLimit(response, concentration, model.coefficients.b);
  if (blank !== undefined) gas.zeroGasLimit = blank;
  return sealCalibration({
    ...provenanceHeader(context, method),
    method,
    reference,
    gases: [gas],
    standards: rows.map((row) => ({
      scan: `row at line ${row.line}`,
      line: row.line,
      concentrations: { [gasMethod.name]: row.concentration },
      conditions: reference,
      phi: 1,
      responses: { [gasMethod.name]: { raw: row.response, scaled: row.response } },
    })),
    inputs: context.inputs,
    warnings,
    cautions: cautionsFor([gasMethod.name]),
  });
}
